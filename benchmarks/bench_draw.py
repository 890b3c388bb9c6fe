"""Drawing time of crowded maps: the 316 stainless steel map and Fe-Cr-Ni 70:19:11.

Run:  python benchmarks/bench_draw.py  [--repeat N] [--command-repeat M]

Prints, per map (warmed up: matplotlib imported and one figure drawn first),
the median over N runs of computing the map, drawing it (``draw_map``: fills,
labels, callouts, key) and saving it as a 200 dpi PNG (``save_figure``), plus
the number of domains, of domains labelled in place or boxed, of numbered
domains and of domains left unlabelled.

Then the call a user makes, as a fresh process each time (wall time, and the
CPU time of the process, user + system: on a shared machine the CPU time
moves less with the load than the wall time does):
``pourbaix map Fe Cr Ni Mo Mn --ratio 66:17:11:3:3 --out 316.png`` and
``pourbaix map Fe --out fe.png``, medians of M runs after one warm-up run,
beside the floor: a bare script that imports what the command
cannot do without (numpy, shapely, matplotlib's Figure and Agg canvas; the
map command imports no scipy) and saves an empty figure as a 200 dpi PNG,
once as plain Python and once started as the ``pourbaix`` program starts
(pourbaix.cli.process: one BLAS thread, matplotlib without its setter
docstrings). Ratios are to the plain floor. All run with compiled
bytecode in a private cache, as an installed copy has it (a machine that sets
PYTHONDONTWRITEBYTECODE would otherwise recompile our sources on every run).
Target (issue 16): the 316 command in well under a second.
No assertions: this prints figures.
"""

from __future__ import annotations

import argparse
import os
import resource
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

from timing import median_time


def _counts(ax):
    gids = [t.get_gid() or "" for t in ax.figure.findobj(lambda a: hasattr(a, "get_text"))]
    labelled = sum(g.startswith("pourbaix-label:domain:") for g in gids)
    numbered = sum(g.startswith("pourbaix-key:") for g in gids)
    return labelled, numbered


_FLOOR = (
    "import sys; import numpy, shapely, matplotlib; "
    "from matplotlib.figure import Figure; "
    "from matplotlib.backends.backend_agg import FigureCanvasAgg; "
    "fig = Figure(figsize=(7.0, 5.5)); FigureCanvasAgg(fig); fig.add_subplot(); "
    "fig.savefig(sys.argv[1], dpi=200)"
)


def bench_command(repeat):
    """Wall time of the user's commands as fresh processes, beside the floor."""
    repo = Path(__file__).resolve().parents[1]
    with tempfile.TemporaryDirectory() as tmp:
        env = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}
        env["PYTHONPYCACHEPREFIX"] = str(Path(tmp) / "pycache")
        env["PYTHONPATH"] = str(repo) + os.pathsep + env.get("PYTHONPATH", "")
        png = str(Path(tmp) / "out.png")
        cli = [sys.executable, "-m", "pourbaix.cli", "map"]
        commands = {
            "floor (imports + empty 200 dpi PNG)": [sys.executable, "-c", _FLOOR, png],
            "floor started as the program starts": [
                sys.executable,
                "-c",
                "from pourbaix.cli.process import prepare_process; prepare_process(); " + _FLOOR,
                png,
            ],
            "pourbaix map Fe --out fe.png": [*cli, "Fe", "--out", png],
            "pourbaix map Fe Cr Ni Mo Mn --ratio 66:17:11:3:3 --out 316.png": [
                *cli,
                *"Fe Cr Ni Mo Mn --ratio 66:17:11:3:3 --out".split(),
                png,
            ],
        }
        for cmd in commands.values():  # warm-up: bytecode cache, OS file cache
            subprocess.run(cmd, check=True, capture_output=True, env=env)
        times = {name: [] for name in commands}
        cpu = {name: [] for name in commands}
        for _ in range(repeat):  # interleaved, so a change in load hits every command alike
            for name, cmd in commands.items():
                before = resource.getrusage(resource.RUSAGE_CHILDREN)
                t = time.perf_counter()
                subprocess.run(cmd, check=True, capture_output=True, env=env)
                times[name].append(time.perf_counter() - t)
                after = resource.getrusage(resource.RUSAGE_CHILDREN)
                cpu[name].append(
                    after.ru_utime - before.ru_utime + after.ru_stime - before.ru_stime
                )
    first = next(iter(commands))
    floor, floor_cpu = statistics.median(times[first]), statistics.median(cpu[first])
    print(f"\nfresh processes, median of {repeat} (compiled bytecode, after a warm-up):")
    for name, ts in times.items():
        med, med_cpu = statistics.median(ts), statistics.median(cpu[name])
        print(
            f"  {name}: wall {med * 1e3:.0f} ms (min {min(ts) * 1e3:.0f}, max {max(ts) * 1e3:.0f}), "
            f"{med / floor:.2f} x floor; CPU {med_cpu * 1e3:.0f} ms, {med_cpu / floor_cpu:.2f} x floor"
        )
    try:
        print(f"  load average during the run: {os.getloadavg()[0]:.1f}")
    except OSError:
        pass


def main(argv=None):
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--repeat", type=int, default=5, help="runs per figure (median)")
    p.add_argument(
        "--command-repeat", type=int, default=7, help="runs of each whole command (median)"
    )
    a = p.parse_args(argv)

    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from pourbaix import compute_map
    from pourbaix.maps.systems import compute_system_map
    from pourbaix.plot.draw import draw_map, save_figure

    plt.close(draw_map(compute_map("Fe")).figure)  # warm-up: imports, fonts
    maps = {
        "316 (Fe-Cr-Ni-Mo-Mn 66:17:11:3:3)": lambda: compute_system_map(
            ["Fe", "Cr", "Ni", "Mo", "Mn"], ratio=(66, 17, 11, 3, 3)
        ),
        "Fe-Cr-Ni 70:19:11": lambda: compute_system_map(["Fe", "Cr", "Ni"], ratio=(70, 19, 11)),
    }
    with tempfile.TemporaryDirectory() as folder:
        path = os.path.join(folder, "map.png")
        for name, make in maps.items():
            make()
            t_compute, dmap = median_time(make, a.repeat)

            def drawn(dmap=dmap):
                ax = draw_map(dmap)
                plt.close(ax.figure)
                return ax

            t_draw, ax = median_time(drawn, a.repeat)
            t_save, _ = median_time(lambda ax=ax: save_figure(ax, path), a.repeat)
            labelled, numbered = _counts(ax)
            unlabelled = len(dmap.domains) - labelled - numbered
            w, h = ax.figure.get_size_inches()
            print(
                f"{name}: compute {t_compute * 1e3:.0f} ms, draw {t_draw * 1e3:.0f} ms, "
                f"save PNG {t_save * 1e3:.0f} ms (median of {a.repeat}); "
                f"{len(dmap.domains)} domains: {labelled} labelled, {numbered} numbered, "
                f"{unlabelled} unlabelled; figure {w:.1f} x {h:.1f} in"
            )
    bench_command(a.command_repeat)


if __name__ == "__main__":
    main()
