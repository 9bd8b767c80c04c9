"""Shared timing helper for the benchmark scripts (run by hand, never by the tests)."""

from __future__ import annotations

import statistics
import time


def best_and_median(fn, repeat: int = 5) -> tuple[float, float]:
    """Best and median wall-clock seconds (``time.perf_counter``) of ``repeat`` calls of ``fn``."""
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return min(times), statistics.median(times)
