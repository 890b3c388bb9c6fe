"""Drawing time of crowded maps: the 316 stainless steel map and Fe-Cr-Ni 70:19:11.

Run:  python benchmarks/bench_draw.py  [--repeat N]

Prints, per map (warmed up: matplotlib imported and one figure drawn first),
the median over N runs of computing the map, drawing it (``draw_map``: fills,
labels, callouts, key) and saving it as a 200 dpi PNG (``save_figure``), plus
the number of domains, of domains labelled in place or boxed, of numbered
domains and of domains left unlabelled. The user's call is
``pourbaix map Fe Cr Ni Mo Mn --ratio 66:17:11:3:3 --out 316.png``.
Target (issue 16): drawing the 316 map in well under a second.
No assertions: this prints figures.
"""

from __future__ import annotations

import argparse
import os
import statistics
import tempfile
import time


def _median_time(fn, repeat):
    ts, out = [], None
    for _ in range(repeat):
        t = time.perf_counter()
        out = fn()
        ts.append(time.perf_counter() - t)
    return statistics.median(ts), out


def _counts(ax):
    gids = [t.get_gid() or "" for t in ax.figure.findobj(lambda a: hasattr(a, "get_text"))]
    labelled = sum(g.startswith("pourbaix-label:domain:") for g in gids)
    numbered = sum(g.startswith("pourbaix-key:") for g in gids)
    return labelled, numbered


def main(argv=None):
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--repeat", type=int, default=5, help="runs per figure (median)")
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
            t_compute, dmap = _median_time(make, a.repeat)

            def drawn(dmap=dmap):
                ax = draw_map(dmap)
                plt.close(ax.figure)
                return ax

            t_draw, ax = _median_time(drawn, a.repeat)
            t_save, _ = _median_time(lambda ax=ax: save_figure(ax, path), a.repeat)
            labelled, numbered = _counts(ax)
            unlabelled = len(dmap.domains) - labelled - numbered
            w, h = ax.figure.get_size_inches()
            print(
                f"{name}: compute {t_compute * 1e3:.0f} ms, draw {t_draw * 1e3:.0f} ms, "
                f"save PNG {t_save * 1e3:.0f} ms (median of {a.repeat}); "
                f"{len(dmap.domains)} domains: {labelled} labelled, {numbered} numbered, "
                f"{unlabelled} unlabelled; figure {w:.1f} x {h:.1f} in"
            )


if __name__ == "__main__":
    main()
