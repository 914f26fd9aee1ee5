"""The one timing rule of the benchmark scripts: the best of several runs (least disturbed by the machine)."""

from __future__ import annotations

import time


def best_time(fn, repeats: int) -> float:
    """Shortest wall time in seconds of ``repeats`` calls of ``fn()``."""
    best = float("inf")
    for _ in range(max(1, repeats)):
        t = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t)
    return best
