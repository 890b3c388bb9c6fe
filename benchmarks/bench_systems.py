"""Speed of ligand systems and of several metals at a fixed ratio, and how it scales.

Run:  python benchmarks/bench_systems.py  [--repeat N] [--quick]

Prints:
- Fe-Cr-Ni 70:19:11 with the full tables: median compute_map time (tables
  cached), number of species and of combination entries, domains, and the
  split between enumerating the combinations and the exact solve;
- Cu-S-Cl (S 1e-3, Cl 0.1) and Cu-S: median time, ligand regions, domains,
  boundaries;
- a scaling curve: synthetic random planes (100 .. 20000) through the exact
  solver alone, and real fixed-ratio systems of growing size (two to four
  metals, metastable forms in or out) through the whole ratio path, each with
  time / (N log2 N) and the fitted exponent of time against N.
Target (issue 5): <= 1 s for Fe-Cr-Ni, time growing no faster than N log N.
No assertions: this prints figures.
"""

from __future__ import annotations

import argparse
import math

import numpy as np
from timing import median_time


def synthetic_planes(n, seed=7):
    """Random planes shaped like transformed energies (multiples of k/x in pH, of 1/x in E)."""
    rng = np.random.default_rng(seed)
    k = 0.05916
    x = rng.integers(1, 4, n)
    return np.column_stack(
        [rng.uniform(-3, 3, n), -rng.integers(-4, 17, n) * k / x, -rng.integers(-2, 9, n) / x]
    )


def _fit_exponent(ns, ts):
    """Least-squares slope of log t against log N."""
    return float(np.polyfit(np.log(ns), np.log(ts), 1)[0])


def main(argv=None):
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--repeat", type=int, default=5, help="runs per figure (median)")
    p.add_argument("--quick", action="store_true", help="fewer sizes in the scaling curve")
    a = p.parse_args(argv)

    from pourbaix import compute_map
    from pourbaix.maps.systems import ratio_combinations
    from pourbaix.solve.envelope import lower_envelope
    from pourbaix.tables.species import load_species

    table = load_species()
    window = (-2.0, 16.0, -2.0, 2.0)
    compute_map(["Fe", "Cr"], ratio=(3, 1), table=table)  # warm-up: imports, water properties
    compute_map("Cu", ligands={"S": 1e-3}, table=table)
    lower_envelope(synthetic_planes(50), window)

    print("== Fe-Cr-Ni 70:19:11, full tables")
    t, m = median_time(
        lambda: compute_map(["Fe", "Cr", "Ni"], ratio=(70, 19, 11), table=table), a.repeat
    )
    planes = np.array([u.plane for u in m.units])
    counts = np.array(
        [
            [dict(se.species.composition).get(el, 0) for el in ("Fe", "Cr", "Ni")]
            for se in m.species[:-1]
            if any(el in se.species.composition for el in ("Fe", "Cr", "Ni"))
        ],
        dtype=float,
    )
    t_comb, combos = median_time(lambda: ratio_combinations(counts, (70, 19, 11)), a.repeat)
    t_env, _ = median_time(lambda: lower_envelope(planes, window), a.repeat)
    print(f"  median compute_map   {t * 1e3:8.1f} ms   (target <= 1000 ms)")
    print(
        f"  species {len(counts)}, combination entries {len(m.units)}, domains {len(m.domains)}, "
        f"boundaries {len(m.boundaries)}"
    )
    print(
        f"  of which: combinations {t_comb * 1e3:.1f} ms ({len(combos)} entries), exact solve {t_env * 1e3:.1f} ms"
    )

    for label, ligands in (
        ("Cu-S (S 1e-3)", {"S": 1e-3}),
        ("Cu-S-Cl (S 1e-3, Cl 0.1)", {"S": 1e-3, "Cl": 0.1}),
    ):
        print(f"== {label}")
        t, m = median_time(
            lambda lig=ligands: compute_map("Cu", ligands=lig, table=table), a.repeat
        )
        regions = 1
        for lm in m.ligand_maps.values():
            regions *= len(lm.domains)
        print(f"  median compute_map   {t * 1e3:8.1f} ms")
        print(
            f"  metal species {len(m.units)}, ligand species "
            f"{sum(len(lm.entries) for lm in m.ligand_maps.values())}, ligand regions <= {regions}, "
            f"domains {len(m.domains)}, boundaries {len(m.boundaries)}"
        )

    print("== scaling: synthetic planes through the exact solver (lower_envelope)")
    sizes = [100, 300, 1000, 3000, 10000, 20000] if not a.quick else [100, 1000, 10000]
    ns, ts = [], []
    print(f"  {'N':>7} {'time ms':>9} {'stable':>7} {'us / (N log2 N)':>16}")
    for n in sizes:
        P = synthetic_planes(n)
        t, env = median_time(lambda P=P: lower_envelope(P, window), max(1, a.repeat // 2))
        ns.append(n)
        ts.append(t)
        print(f"  {n:7d} {t * 1e3:9.1f} {len(env.stable):7d} {t / (n * math.log2(n)) * 1e6:16.4f}")
    print(
        f"  fitted exponent of time vs N: {_fit_exponent(ns, ts):.2f}  (N log N over this range ~ 1.1)"
    )

    print("== scaling: real fixed-ratio systems through the whole ratio path (compute_map)")
    ladder = [
        (["Fe", "Cr"], (3, 1), "exclude"),
        (["Fe", "Cr"], (3, 1), "include"),
        (["Fe", "Ni"], (1, 1), "include"),
        (["Fe", "Cr", "Ni"], (70, 19, 11), "exclude"),
        (["Fe", "Cr", "Ni"], (70, 19, 11), "include"),
        (["Fe", "Cr", "Ni", "Mo"], (68, 17, 12, 3), "exclude"),
        (["Fe", "Cr", "Ni", "Mn"], (70, 18, 8, 2), "exclude"),
    ]
    if a.quick:
        ladder = ladder[::2]
    ns, ts = [], []
    print(
        f"  {'system':<24} {'metastable':>10} {'entries':>8} {'time ms':>9} {'us / (N log2 N)':>16}"
    )
    for els, ratio, meta in ladder:
        t, m = median_time(
            lambda els=els, ratio=ratio, meta=meta: compute_map(
                els, ratio=ratio, metastable=meta, table=table
            ),
            max(1, a.repeat // 2),
        )
        n = len(m.units)
        ns.append(n)
        ts.append(t)
        name = "-".join(els) + " " + ":".join(str(v) for v in ratio)
        print(
            f"  {name:<24} {meta:>10} {n:8d} {t * 1e3:9.1f} {t / (n * math.log2(max(n, 2))) * 1e6:16.4f}"
        )
    big = [k for k, n in enumerate(ns) if n >= 500]
    if len(big) >= 2:
        print(
            f"  fitted exponent of time vs entries (N >= 500): "
            f"{_fit_exponent([ns[k] for k in big], [ts[k] for k in big]):.2f}"
        )
    print("  (small systems are dominated by fixed costs: conditions, water properties, tables)")


if __name__ == "__main__":
    main()
