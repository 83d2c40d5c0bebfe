"""Shared timing helper for the benchmark scripts (they print, never fail on time)."""

from __future__ import annotations

import statistics
import time


def median_time(fn, repeat: int = 7, clock=time.perf_counter):
    """Run ``fn`` once to warm up, then ``repeat`` times; (median, min, max) seconds of
    ``clock`` (wall time by default; ``time.process_time`` counts this process's CPU time
    only, which waiting for a core on a shared machine does not add to)."""
    fn()
    times = []
    for _ in range(repeat):
        t0 = clock()
        fn()
        times.append(clock() - t0)
    return statistics.median(times), min(times), max(times)
