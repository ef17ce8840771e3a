"""What the benchmarks share: the median time of a call over rounds of calls."""

from __future__ import annotations

import statistics
import time


def timed(fn, n: int, rounds: int) -> float:
    """The median time of one call [s] over ``rounds`` rounds of ``n`` calls."""
    times = []
    for _ in range(rounds):
        t0 = time.perf_counter()
        for _ in range(n):
            fn()
        times.append((time.perf_counter() - t0) / n)
    return statistics.median(times)
