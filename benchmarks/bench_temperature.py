"""Cost of a map at temperature, and of a 100-temperature sweep for iron.

Run:  python benchmarks/bench_temperature.py  [--repeat N]

Prints the median time of compute_map("Fe") at 25 °C and at 60, 150 and
250 °C (tables loaded once; water properties cached per T after the first
call, whose cost is printed separately), the ratio to the 25 °C map, and the
median per-map time of a sweep over 100 temperatures from 5 to 300 °C.
No assertions: this prints figures.
"""

from __future__ import annotations

import argparse
import statistics
import time

import numpy as np


def main():
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--repeat", type=int, default=21)
    a = p.parse_args()

    from pourbaix.maps.domain_map import compute_map, compute_sweep
    from pourbaix.tables.species import load_species

    table = load_species()
    compute_map("Fe", table=table)  # warm imports

    def median(fn):
        ts = []
        for _ in range(a.repeat):
            t = time.perf_counter()
            fn()
            ts.append(time.perf_counter() - t)
        return statistics.median(ts)

    base = median(lambda: compute_map("Fe", table=table))
    print(f"Fe at 25 °C: {base * 1e3:.2f} ms median")
    for t_c in (60.0, 150.0, 250.0):
        t0 = time.perf_counter()
        compute_map("Fe", temperature_c=t_c, table=table)
        first = time.perf_counter() - t0
        m = median(lambda t_c=t_c: compute_map("Fe", temperature_c=t_c, table=table))
        print(
            f"Fe at {t_c:g} °C: first call {first * 1e3:.1f} ms (IAPWS-95 solve), then {m * 1e3:.2f} ms median = {m / base:.2f}x the 25 °C map"
        )

    temps = np.linspace(5.0, 300.0, 100)
    t0 = time.perf_counter()
    compute_sweep("Fe", temperatures_c=list(temps), table=table)
    cold = time.perf_counter() - t0
    per = []
    for _ in range(3):
        t0 = time.perf_counter()
        compute_sweep("Fe", temperatures_c=list(temps), table=table)
        per.append((time.perf_counter() - t0) / len(temps))
    print(
        f"sweep of 100 temperatures: {cold:.2f} s cold (water state per T), then {statistics.median(per) * 1e3:.2f} ms per map (median of 3 sweeps)"
    )


if __name__ == "__main__":
    main()
