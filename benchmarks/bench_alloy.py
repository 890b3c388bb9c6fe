"""Alloy maps at a fixed ratio: walking the optimal bases (multi-parametric LP) against enumeration.

Run:  python benchmarks/bench_alloy.py  [--repeat N] [--max-enumerate K] [--max-enumerate-ligands L]

Prints, for real systems of 2 to 6 metals (and 8 by the walk), and for steels
with chloride or sulfide (the walk then runs in each region of the ligand's
predominant species), the median
time of the call a user makes (compute_map with the tables loaded, after a
warm-up) and the peak memory of one such call in a fresh process (VmHWM of
a child that loads the tables and computes the map once, and its rise during
that map), for the walk (default) and for the
enumeration of every combination (the reference method), and their ratios.
Enumeration is run up to --max-enumerate metals (default 5: Fe-Cr-Ni-Mo-Mn
takes seconds and over a gigabyte), with ligands up to --max-enumerate-ligands
(default 4). Target (issue 16): Fe-Cr-Ni-Mo-Mn
66:17:11:3:3 in <= 100 ms and <= 150 MB; eight metals feasible.
No assertions: this prints figures.
"""

from __future__ import annotations

import argparse
import json
import os
import subprocess
import sys

from timing import median_time

SYSTEMS = [
    (("Fe", "Cr"), (3, 1), {}),
    (("Fe", "Cr", "Ni"), (70, 19, 11), {}),
    (("Fe", "Cr", "Ni", "Mo"), (66, 17, 11, 3), {}),
    (("Fe", "Cr", "Ni", "Mo", "Mn"), (66, 17, 11, 3, 3), {}),
    (("Fe", "Cr", "Ni", "Mo", "Mn", "Cu"), (64, 17, 11, 3, 3, 2), {}),
    (("Fe", "Cr", "Ni", "Mo", "Mn", "Cu", "Co", "Ti"), (60, 17, 11, 3, 3, 2, 2, 2), {}),
    # with ligands: chloride of a brine, sulfide of a sour water
    (("Fe", "Cr", "Ni"), (70, 19, 11), {"Cl": 0.5}),
    (("Fe", "Cr", "Ni"), (70, 19, 11), {"S": 1e-3}),
    (("Fe", "Cr", "Ni", "Mo"), (66, 17, 11, 3), {"Cl": 0.5}),
    (("Fe", "Cr", "Ni", "Mo"), (66, 17, 11, 3), {"S": 1e-3}),
    (("Fe", "Cr", "Ni", "Mo", "Mn"), (66, 17, 11, 3, 3), {"Cl": 0.5}),
    (("Fe", "Cr", "Ni", "Mo", "Mn"), (66, 17, 11, 3, 3), {"S": 1e-3}),
]

_CHILD = r"""
import json, sys
from pourbaix.tables.species import load_species
from pourbaix.maps.systems import compute_system_map


def high_water_kib():
    # VmHWM: this process's peak resident memory (reset by exec, unlike ru_maxrss)
    with open("/proc/self/status") as fh:
        for line in fh:
            if line.startswith("VmHWM:"):
                return int(line.split()[1])


metals, ratio, ligands, method = json.loads(sys.argv[1])
table = load_species()
compute_system_map(("Fe",), table=table, ligands=ligands)  # imports and caches of any map
before = high_water_kib()
compute_system_map(
    tuple(metals), ratio=tuple(ratio), ligands=ligands, table=table, ratio_method=method
)
after = high_water_kib()
print(json.dumps([before, after]))
"""


def peak_mb(metals, ratio, ligands, method):
    """Peak resident memory of a fresh process computing one map, and above its start [MB]."""
    env = dict(os.environ)
    env["PYTHONPATH"] = os.pathsep.join(
        [os.path.dirname(os.path.dirname(os.path.abspath(__file__))), env.get("PYTHONPATH", "")]
    )
    out = subprocess.run(
        [sys.executable, "-c", _CHILD, json.dumps([metals, ratio, ligands, method])],
        capture_output=True,
        text=True,
        env=env,
        check=True,
    )
    before, after = json.loads(out.stdout.strip().splitlines()[-1])
    return after / 1024.0, (after - before) / 1024.0


def main(argv=None):
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--repeat", type=int, default=5, help="runs per figure (median)")
    p.add_argument("--max-enumerate", type=int, default=5, help="largest system enumerated")
    p.add_argument(
        "--max-enumerate-ligands", type=int, default=4, help="largest ligand system enumerated"
    )
    a = p.parse_args(argv)

    from pourbaix.maps.systems import compute_system_map
    from pourbaix.tables.species import load_species

    table = load_species()
    print(
        f"{'system':<38} {'method':<10} {'domains':>7} {'median ms':>10} {'peak MB':>8} "
        f"{'above tables MB':>16}"
    )
    for metals, ratio, ligands in SYSTEMS:
        rows = {}
        for method in ("walk", "enumerate"):
            largest = a.max_enumerate_ligands if ligands else a.max_enumerate
            if method == "enumerate" and len(metals) > largest:
                continue

            def call(method=method, metals=metals, ratio=ratio, ligands=ligands):
                return compute_system_map(
                    metals, ratio=ratio, ligands=ligands, table=table, ratio_method=method
                )

            n_dom = len(call().domains)
            runs = a.repeat if len(metals) < 5 or method == "walk" else 1
            t = median_time(call, runs, warm_up=True)[0]
            peak, extra = peak_mb(list(metals), list(ratio), ligands, method)
            rows[method] = (t, peak)
            name = "-".join(metals) + " " + ":".join(str(v) for v in ratio)
            name += "".join(f" {k} {v:g}" for k, v in ligands.items())
            print(
                f"{name:<38} {method:<10} {n_dom:>7} {t * 1e3:>10.1f} {peak:>8.0f} {extra:>16.0f}"
            )
        if len(rows) == 2:
            (tw, mw), (te, me) = rows["walk"], rows["enumerate"]
            print(
                f"{'':<38} {'ratio':<10} {'':>7} {te / tw:>9.1f}x {me / mw:>7.1f}x   (enumeration / walk)"
            )
    print(
        "(peak MB: VmHWM of a fresh process that loads the tables, computes an iron map, then the "
        "map; above tables MB: its rise during the map)"
    )
    print(f"load average (1, 5, 15 min) at the end: {os.getloadavg()}  (a shared machine)")


if __name__ == "__main__":
    main()
