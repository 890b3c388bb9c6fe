"""Cost of a map at temperature and pressure, and of a 100-temperature sweep.

Run:  python benchmarks/bench_temperature.py  [--repeat N] [--element Fe]

Prints the median time of compute_map at 25 °C, at 150 and 300 °C along
saturation and at 300 °C/1000 bar and 400 °C/1000 bar (tables loaded once;
each state's first call, which solves IAPWS-95 for water and builds the HKF
parameters, is printed separately), the ratio of each median to the 25 °C map
(the target of issue 12 is <= 1.5x for 300 °C and 300 °C/1000 bar), and the
per-map time of a sweep over 100 temperatures from 5 to 350 °C (cold, then
warm). No assertions: this prints figures.
"""

from __future__ import annotations

import argparse
import statistics
import time

import numpy as np


def main():
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--repeat", type=int, default=21)
    p.add_argument("--element", default="Fe")
    a = p.parse_args()

    from pourbaix.maps.domain_map import compute_map, compute_sweep
    from pourbaix.tables.species import load_species

    table = load_species()
    el = a.element
    compute_map(el, table=table)  # warm imports

    def median(fn):
        fn()
        ts = []
        for _ in range(a.repeat):
            t = time.perf_counter()
            fn()
            ts.append(time.perf_counter() - t)
        return statistics.median(ts)

    base = median(lambda: compute_map(el, table=table))
    print(f"{el} at 25 °C: {base * 1e3:.2f} ms median of {a.repeat}")
    for t_c, p_bar in ((150.0, None), (300.0, None), (300.0, 1000.0), (400.0, 1000.0)):
        label = f"{t_c:g} °C" + (f", {p_bar:g} bar" if p_bar else " (saturation)")
        t0 = time.perf_counter()
        compute_map(el, temperature_c=t_c, pressure_bar=p_bar, table=table)
        first = time.perf_counter() - t0
        m = median(
            lambda t_c=t_c, p_bar=p_bar: compute_map(
                el, temperature_c=t_c, pressure_bar=p_bar, table=table
            )
        )
        print(
            f"{el} at {label}: first call {first * 1e3:.1f} ms, then {m * 1e3:.2f} ms median"
            f" = {m / base:.2f}x the 25 °C map"
        )

    temps = list(np.linspace(5.0, 350.0, 100))
    t0 = time.perf_counter()
    compute_sweep(el, temperatures_c=temps, table=table)
    cold = time.perf_counter() - t0
    per = []
    for _ in range(3):
        t0 = time.perf_counter()
        compute_sweep(el, temperatures_c=temps, table=table)
        per.append((time.perf_counter() - t0) / len(temps))
    print(
        f"sweep of 100 temperatures 5-350 °C: {cold:.2f} s cold (water state per T), then "
        f"{statistics.median(per) * 1e3:.2f} ms per map (median of 3 sweeps)"
    )


if __name__ == "__main__":
    main()
