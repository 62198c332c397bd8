"""The one timing helper the benchmarks share: a median of repeated calls."""

from __future__ import annotations

import statistics
import time


def median_time(fn, *args, repeat=3):
    """Median wall time of ``repeat`` calls of ``fn(*args)``, and the last result. [s]"""
    times, out = [], None
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn(*args)
        times.append(time.perf_counter() - t0)
    return statistics.median(times), out
