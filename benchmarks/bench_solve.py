"""Speed of the exact solve against a dense-grid argmin, and of the whole command.

Run:  python benchmarks/bench_solve.py  [--repeat N]

Prints, for Fe, Cu, Zn, Mn and a synthetic 200-species system:
- the median exact solve time (planes -> polygons, the solver alone) and the
  median time of the whole compute_map call (tables cached);
- the same map by dense-grid argmin at 0.01 pH x 1 mV, its time, the speed
  ratio, and the fraction of grid points that disagree with the exact map
  farther than 1 mV from a boundary (should be 0);
then the wall time of `pourbaix map Fe --out fe.svg` split into import,
solve and render, beside a bare script that imports numpy, scipy, shapely
and matplotlib and saves an empty SVG (the floor), run side by side.
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


def grid_argmin(planes, window, dph=0.01, de=0.001):
    """Dense-grid reference: index of the lowest plane at every grid node."""
    x0, x1, y0, y1 = window
    xs = np.arange(x0, x1 + dph / 2, dph)
    ys = np.arange(y0, y1 + de / 2, de)
    out = np.empty((len(ys), len(xs)), dtype=np.int32)
    for r, y in enumerate(ys):  # row by row keeps memory small
        vals = planes[:, 0][None, :] + np.outer(xs, planes[:, 1]) + y * planes[:, 2][None, :]
        out[r] = vals.argmin(axis=1)
    return xs, ys, out


def synthetic_planes(n, seed=3):
    rng = np.random.default_rng(seed)
    k = 0.05916
    x = rng.integers(1, 4, n)
    return np.column_stack(
        [rng.uniform(-3, 3, n), -rng.integers(-4, 17, n) * k / x, -rng.integers(-2, 9, n) / x]
    )


def check_grid(planes, env, xs, ys, grid):
    from shapely import contains_xy
    from shapely.geometry import Polygon

    X, Y = np.meshgrid(xs, ys)
    x, y = X.ravel(), Y.ravel()
    g = grid.ravel()
    vals_sorted = None
    owner = np.full(len(x), -1)
    for i, p in enumerate(env.polygons):
        if p is not None:
            owner[contains_xy(Polygon(p), x, y)] = i
    inside = owner >= 0  # grid nodes exactly on an edge are skipped (they belong to two domains)
    # distance to a boundary in volts: gap between the two lowest planes over |Δce|
    vals = (
        planes[:, 0][None, :]
        + np.outer(x[inside], planes[:, 1])
        + np.outer(y[inside], planes[:, 2])
    )
    vals_sorted = np.sort(vals, axis=1)
    clear = (vals_sorted[:, 1] - vals_sorted[:, 0]) > 1e-3
    bad = np.sum(owner[inside][clear] != g[inside][clear])
    return int(bad), int(clear.sum())


def bench_systems(repeat):
    import pourbaix
    from pourbaix.solve.envelope import lower_envelope
    from pourbaix.tables.species import load_species

    table = load_species()
    window = (-2.0, 16.0, -2.0, 2.0)
    print(
        f"{'system':<12}{'N':>5}{'solve ms':>10}{'map ms':>9}{'grid ms':>10}{'ratio':>9}{'grid pts':>11}{'disagree':>10}"
    )
    cases = [(el, None) for el in ("Fe", "Cu", "Zn", "Mn")] + [("synthetic", synthetic_planes(200))]
    for name, planes in cases:
        if planes is None:
            m = pourbaix.compute_map(name, table=table)
            planes = m._planes
            t_map = median_time(lambda n=name: pourbaix.compute_map(n, table=table), repeat)[0]
        else:
            t_map = float("nan")
        t_solve = median_time(lambda p=planes: lower_envelope(p, window), repeat)[0]
        t0 = time.perf_counter()
        xs, ys, grid = grid_argmin(planes, window)
        t_grid = time.perf_counter() - t0
        env = lower_envelope(planes, window)
        bad, n_clear = check_grid(planes, env, xs, ys, grid)
        print(
            f"{name:<12}{len(planes):>5}{t_solve * 1e3:>10.3f}{t_map * 1e3:>9.2f}{t_grid * 1e3:>10.0f}"
            f"{t_grid / t_solve:>8.0f}x{grid.size:>11}{bad:>10}"
        )
    print(
        "solve = planes -> exact polygons; map = compute_map with tables loaded; grid = 0.01 pH x 1 mV argmin"
    )


def bench_command(repeat):
    floor_code = (
        "import time; t=time.perf_counter(); import numpy, scipy, shapely, matplotlib; "
        "matplotlib.use('Agg'); import matplotlib.pyplot as plt; "
        "fig, ax = plt.subplots(); fig.savefig(sys.argv[1]); print(time.perf_counter()-t)"
    )
    split_code = (
        "import time, sys; t0=time.perf_counter(); import pourbaix; from pourbaix.maps.domain_map import compute_map; "
        "t1=time.perf_counter(); m=compute_map('Fe'); t2=time.perf_counter(); "
        "from pourbaix.plot import draw; ax=draw.draw_map(m); draw.save_figure(ax, sys.argv[1]); t3=time.perf_counter(); "
        "print(t1-t0, t2-t1, t3-t2)"
    )
    with tempfile.TemporaryDirectory() as tmp:
        out = Path(tmp) / "fe.svg"
        # Both sides run as an installed copy would: with compiled bytecode. A machine that
        # sets PYTHONDONTWRITEBYTECODE would otherwise recompile our sources on every run
        # (site-packages already hold their .pyc), so bytecode goes to a private cache here.
        env = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}
        env["PYTHONPYCACHEPREFIX"] = str(Path(tmp) / "pycache")
        floor_cmd = [sys.executable, "-c", "import sys; " + floor_code, str(out)]
        map_cmd = [sys.executable, "-m", "pourbaix.cli.commands", "map", "Fe", "--out", str(out)]
        for cmd in (floor_cmd, map_cmd):  # warm-up: fill the bytecode cache and the OS file cache
            subprocess.run(cmd, check=True, capture_output=True, env=env)
        floor, whole, parts = [], [], []
        for _ in range(repeat):
            t = time.perf_counter()
            subprocess.run(floor_cmd, check=True, capture_output=True, env=env)
            floor.append(time.perf_counter() - t)
            t = time.perf_counter()
            subprocess.run(map_cmd, check=True, capture_output=True, env=env)
            whole.append(time.perf_counter() - t)
            res = subprocess.run(
                [sys.executable, "-c", split_code, str(out)],
                check=True,
                capture_output=True,
                text=True,
                env=env,
            )
            parts.append([float(v) for v in res.stdout.split()])
    f, w = statistics.median(floor), statistics.median(whole)
    imp, solve, render = (statistics.median(p[i] for p in parts) for i in range(3))
    print(f"\n`pourbaix map Fe --out fe.svg`: {w * 1e3:.0f} ms wall (median of {repeat})")
    print(
        f"  in-process split: import {imp * 1e3:.0f} ms, solve {solve * 1e3:.0f} ms (first call, loads tables), render+save {render * 1e3:.0f} ms"
    )
    print(f"floor (python + numpy/scipy/shapely/matplotlib + empty SVG): {f * 1e3:.0f} ms wall")
    print(
        f"ratio command / floor: {w / f:.2f}  (both with compiled bytecode, after one warm-up run)"
    )
    code = "import sys; from pourbaix.cli.commands import main; main(sys.argv[1:]); print('matplotlib' in sys.modules, file=sys.stderr)"
    for cmd in (
        ["probe", "Fe", "--ph", "7", "--potential", "-0.6"],
        ["lines", "Fe"],
        ["species", "Fe"],
    ):
        res = subprocess.run(
            [sys.executable, "-c", code, *cmd], capture_output=True, text=True, check=True
        )
        print(f"`pourbaix {cmd[0]}` imports matplotlib: {res.stderr.strip().splitlines()[-1]}")


def main():
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--repeat", type=int, default=15)
    a = p.parse_args()
    bench_systems(a.repeat)
    bench_command(max(11, a.repeat // 2))


if __name__ == "__main__":
    main()
