"""Sweeps: 10^4 iron maps batched against one compute_map call each; a Dask LocalCluster against local.

Run:  python benchmarks/bench_sweep.py  [--repeat N] [--maps N] [--skip-cluster] [--alloy-only]

Prints:
- maps per second for 10^4 iron maps (100 temperatures x 100 activities):
  the batch route (planes built once per temperature, then the stable
  species at a point, domain areas, passive width and solubility of every
  map in numpy) against the fastest fair baseline, one compute_map call per
  map with the tables loaded and the answers read from each map (timed on a
  sample of the grid and scaled), with the ratio; the batch split into
  building the planes and solving them;
- the whole sweep a user runs (pourbaix.sweep, 10^4 maps, local processes)
  and the same sweep with a 2-worker dask.distributed LocalCluster, with
  the ratio of their times;
- an alloy sweep (Fe-Cr-Ni over 24 ratios x 3 temperatures, one process):
  one map per temperature and a walk per ratio (the default) against one
  compute_map call per grid point (the route before), with the ratio.
Medians after a warm-up. Target (issue 16): 10^4 iron maps in <= 2 s on
this 2-core machine. No assertions: this prints figures.
"""

from __future__ import annotations

import argparse

import numpy as np
from timing import median_time


def main(argv=None):
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--repeat", type=int, default=3, help="runs per figure (median)")
    p.add_argument("--maps", type=int, default=10_000, help="maps in the grid (a square number)")
    p.add_argument("--sample", type=int, default=200, help="maps timed one call each")
    p.add_argument("--skip-cluster", action="store_true", help="leave out the LocalCluster run")
    p.add_argument("--alloy-only", action="store_true", help="only the alloy sweep")
    a = p.parse_args(argv)
    if a.alloy_only:
        bench_alloy_sweep(a.repeat)
        return

    from pourbaix.maps.compute import compute_map
    from pourbaix.solve import batch
    from pourbaix.tables.species import load_species

    table = load_species()
    side = int(round(a.maps**0.5))
    temps = np.repeat(np.linspace(25.0, 300.0, side), side)
    acts = np.tile(np.logspace(-8, -4, side), side)
    n = len(temps)

    def planes():
        return batch.batch_planes("Fe", temperature_c=temps, activity=acts, table=table)

    b = planes()
    passive = np.array(b.states) == "passivation"

    def solve():
        batch.stable_at(b.planes, [7.0], [-0.5])
        batch.domain_areas(b.planes, b.window)
        batch.passive_width(b.planes, passive, 9.0, b.window)
        batch.solubility_at(b, 7.0, -0.5)

    def whole_batch():
        nonlocal b
        b = planes()
        solve()

    t_planes = median_time(planes, a.repeat, warm_up=True)[0]
    t_solve = median_time(solve, a.repeat, warm_up=True)[0]
    t_batch = median_time(whole_batch, a.repeat, warm_up=True)[0]

    rng = np.random.default_rng(16)
    sample = rng.choice(n, size=min(a.sample, n), replace=False)

    def one_each():
        for m in sample:
            dm = compute_map("Fe", temperature_c=temps[m], activity=acts[m], table=table)
            dm.probe(7.0, -0.5)
            [d.area for d in dm.domains]

    t_single = median_time(one_each, 1, warm_up=True)[0] / len(sample) * n
    print(
        f"{n} iron maps ({side} temperatures x {side} activities), answers: species and margins at"
    )
    print("(7, -0.5), domain areas, passive width at pH 9, solubility at (7, -0.5)")
    print(
        f"  batch:            {t_batch:8.2f} s  {n / t_batch:10.0f} maps/s  "
        f"(planes {t_planes:.2f} s, solve {t_solve:.2f} s)"
    )
    print(
        f"  one call each:    {t_single:8.2f} s  {n / t_single:10.0f} maps/s  "
        f"(compute_map + probe + areas, {len(sample)} timed, scaled)"
    )
    print(f"  ratio:            {t_single / t_batch:8.1f}x")

    from pourbaix.analyses.sweep import sweep

    kw = dict(
        temperature_c=f"25:300:{side}",
        activity=f"1e-8:1e-4:{side}",
        at=[(7.0, -0.5)],
        passive_ph=9.0,
        solubility_at=(7.0, -0.5),
    )
    t_local = median_time(lambda: sweep("Fe", **kw), a.repeat, warm_up=True)[0]
    print(f"  pourbaix.sweep, local processes: {t_local:6.2f} s  {n / t_local:10.0f} maps/s")
    if a.skip_cluster:
        return
    from dask.distributed import Client, LocalCluster

    with (
        LocalCluster(
            n_workers=2, threads_per_worker=1, processes=True, dashboard_address=":0"
        ) as cluster,
        Client(cluster) as client,
    ):
        t_cluster = median_time(
            lambda: sweep("Fe", client=client, **kw), a.repeat, warm_up=True
        )[0]
    print(
        f"  pourbaix.sweep, 2-worker LocalCluster: {t_cluster:6.2f} s  {n / t_cluster:10.0f} maps/s"
    )
    print(f"  ratio cluster / local: {t_cluster / t_local:6.2f}")
    bench_alloy_sweep(a.repeat)


def bench_alloy_sweep(repeat):
    """An alloy sweep by ratio (one map per condition, a walk per ratio) against map by map."""
    from pourbaix.analyses import sweep as sweep_module

    fe = np.linspace(50, 80, 24)
    ratios = [f"{f:g}:{(100 - f) * 0.6:g}:{(100 - f) * 0.4:g}" for f in fe]
    kw = dict(
        systems=["Fe Cr Ni"],
        ratio=ratios,
        temperature_c=[25.0, 80.0, 150.0],
        at=[(7.0, -0.5), (9.0, 0.2)],
        passive_ph=9.0,
        workers=1,
    )
    n = len(ratios) * 3
    t_ratio = median_time(lambda: sweep_module.sweep(**kw), repeat, warm_up=True)[0]
    by_ratio = sweep_module._by_ratio
    sweep_module._by_ratio = lambda spec, system: False  # the map-by-map route
    try:
        t_maps = median_time(lambda: sweep_module.sweep(**kw), repeat, warm_up=True)[0]
    finally:
        sweep_module._by_ratio = by_ratio
    print(
        f"alloy sweep, Fe-Cr-Ni over {len(ratios)} ratios x 3 temperatures ({n} maps, 1 process):"
    )
    print(
        f"  one map per temperature, a walk per ratio: {t_ratio:6.2f} s  {n / t_ratio:8.1f} maps/s"
    )
    print(f"  one compute_map per grid point:            {t_maps:6.2f} s  {n / t_maps:8.1f} maps/s")
    print(f"  ratio: {t_maps / t_ratio:6.2f}x")


if __name__ == "__main__":
    main()
