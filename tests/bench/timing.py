"""Timing shared by the benchmark scripts (not a test module)."""

import statistics
import time


def median_seconds(fn, repeat=15):
    """Median wall time of ``fn()`` over ``repeat`` runs, after one warm-up run, in seconds."""
    fn()
    runs = []
    for _ in range(repeat):
        start = time.perf_counter()
        fn()
        runs.append(time.perf_counter() - start)
    return statistics.median(runs)
