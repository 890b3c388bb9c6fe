"""Timing shared by the benchmark scripts (run as ``python benchmarks/bench_*.py``)."""

import statistics
import time


def median_time(fn, repeat, *, warm_up=False):
    """Median wall time [s] of ``repeat`` calls of ``fn``, and what the last call returned.

    With ``warm_up``, one untimed call comes first (imports, caches).
    """
    if warm_up:
        fn()
    ts, out = [], None
    for _ in range(repeat):
        t = time.perf_counter()
        out = fn()
        ts.append(time.perf_counter() - t)
    return statistics.median(ts), out
