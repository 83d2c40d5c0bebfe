"""Shared timing helper for the benchmark scripts (they print, never fail on time)."""

from __future__ import annotations

import statistics
import time


def median_time(fn, repeat: int = 7):
    """Run ``fn`` once to warm up, then ``repeat`` times; (median, min, max) seconds."""
    fn()
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times), min(times), max(times)
