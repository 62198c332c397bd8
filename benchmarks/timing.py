"""The one timing helper the benchmarks share: a median of repeated calls."""

from __future__ import annotations

import statistics
import time


def median_time(fn, *args, repeat=3, clock=time.perf_counter):
    """Median time of ``repeat`` calls of ``fn(*args)``, and the last result. [s]

    Wall time by default; ``clock=time.process_time`` gives this process's CPU time,
    steadier than wall time on a machine others are using.
    """
    times, out = [], None
    for _ in range(repeat):
        t0 = clock()
        out = fn(*args)
        times.append(clock() - t0)
    return statistics.median(times), out
