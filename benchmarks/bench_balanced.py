"""Speed of mass-balanced maps against the naive dense-grid solve.

Run:  python benchmarks/bench_balanced.py  [--repeat N]

Prints, for a Cu-NH3 map (Cu 1e-2, N 1 mol/kg) and an Au-CN map (Au 1e-5,
CN 1e-3 mol/kg) over the default window (pH -2..16, -2..2 V):
- the median time of ``compute_balanced_map`` (the call ``pourbaix map
  --balance`` makes; tables cached, one warm-up run) and its number of
  equilibrium solves, with the time per solve;
- the dense grid at 0.05 pH x 5 mV (361 x 801 points, the naive way): its
  number of solves and its time, extrapolated from timing every 20th row of
  the grid, the faster of warm starts along each row and each row as one
  batched solve (``solve_many``);
- the ratios. Targets (issue 15): <= 1 s per map, >= 50x fewer solves;
- with ``--cli``, the wall time of the issue's three commands as a user runs
  them (``python -m pourbaix.cli ...`` in a fresh interpreter: imports, table
  loading, the map or speciation, drawing the PNG), median of the runs.
No assertions: this prints figures.
"""

from __future__ import annotations

import argparse
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np
from timing import median_time


def _grid_time(system, ph, e, every=20):
    """Seconds to solve the whole grid, from every ``every``-th row.

    Two ways, the faster counts: one point at a time with warm starts along the row, and
    each row as one batch (``solve_many``, the batched Newton steps the traced map uses for
    its mesh).
    """
    from pourbaix.solve.equilibrium import solve_at, solve_many

    rows = e[::every]
    t = time.perf_counter()
    for ev in rows:
        r = None
        for p in ph:
            r = solve_at(system, p, ev, start=r)
    one_by_one = (time.perf_counter() - t) / len(rows) * len(e)
    t = time.perf_counter()
    for ev in rows:
        solve_many(system, ph, np.full(len(ph), ev))
    batched = (time.perf_counter() - t) / len(rows) * len(e)
    return min(one_by_one, batched), one_by_one, batched


#: The commands of the issue's "Done when" (output file names as there).
CLI_COMMANDS = (
    ("map", "Cu", "--total", "Cu=1e-2", "--total", "N=1", "--balance", "--out", "cu-nh3.png"),
    ("map", "Au", "--total", "Au=1e-5", "--total", "CN=1e-3", "--balance", "--out", "aucn.png"),
    ("speciation", "Cu", "--total", "N=1", "--potential", "0.2", "--out", "cu-spec.png"),
)


def _cli_times(repeat):
    """Median wall time of each command in a fresh interpreter (one warm-up run each).

    The package is found from the repository (the commands run there with
    PYTHONPATH set to it), as in the README's way of running from a clone.
    """
    root = Path(__file__).resolve().parent.parent
    with tempfile.TemporaryDirectory() as out:
        # run as an installed copy would, with compiled bytecode: a machine that sets
        # PYTHONDONTWRITEBYTECODE would otherwise recompile our sources on every run
        env = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}
        env["PYTHONPYCACHEPREFIX"] = str(Path(out) / "pycache")
        env["PYTHONPATH"] = os.pathsep.join(filter(None, [str(root), env.get("PYTHONPATH")]))
        for command in CLI_COMMANDS:
            args = [str(Path(out) / c) if c.endswith(".png") else c for c in command]
            ts = []
            for k in range(repeat + 1):
                t = time.perf_counter()
                subprocess.run(
                    [sys.executable, "-m", "pourbaix.cli", *args],
                    cwd=root,
                    env=env,
                    check=True,
                    capture_output=True,
                )
                if k:
                    ts.append(time.perf_counter() - t)
            print(
                f"pourbaix {' '.join(command)}: {statistics.median(ts):.2f} s (median of {repeat})"
            )


def main(argv=None):
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--repeat", type=int, default=5, help="runs per figure (median)")
    p.add_argument("--cli", action="store_true", help="also time the issue's three commands")
    a = p.parse_args(argv)

    from pourbaix.maps.balanced import compute_balanced_map
    from pourbaix.tables.species import load_species

    table = load_species()
    ph = np.arange(-2.0, 16.0 + 1e-9, 0.05)
    e = np.arange(-2.0, 2.0 + 1e-9, 0.005)
    print(f"dense grid: {len(ph)} x {len(e)} = {len(ph) * len(e)} points (0.05 pH x 5 mV)")
    for metal, totals in (("Cu", {"Cu": 1e-2, "N": 1.0}), ("Au", {"Au": 1e-5, "CN": 1e-3})):

        def run(metal=metal, totals=totals):
            return compute_balanced_map(metal, totals, table=table)

        run()  # warm-up
        t, m = median_time(run, a.repeat)
        grid = len(ph) * len(e)
        t_grid, t_one, t_batch = _grid_time(m.system, ph, e)
        name = f"{metal}-{'-'.join(k for k in totals if k != metal)}"
        print(
            f"{name}: traced map {t:.2f} s (median of {a.repeat}), {m.solves} solves "
            f"({1e3 * t / m.solves:.2f} ms each), {len(m.domains)} domains, "
            f"{len(m.boundaries)} boundary segments"
        )
        print(
            f"{name}: dense grid {grid} solves, about {t_grid:.0f} s (one by one {t_one:.0f} s, "
            f"row batches {t_batch:.0f} s); "
            f"{grid / m.solves:.0f}x fewer solves, {t_grid / t:.0f}x faster "
            f"(targets: <= 1 s per map, >= 50x fewer solves)"
        )
    if a.cli:
        _cli_times(a.repeat)


if __name__ == "__main__":
    main()
