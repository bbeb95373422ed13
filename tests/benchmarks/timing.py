"""Timing helper shared by the benchmark scripts (run as scripts from this folder)."""

from __future__ import annotations

import time


def best_s(fn, runs: int) -> float:
    """The fastest of ``runs`` calls of ``fn``, in seconds (the least disturbed run)."""
    best = float("inf")
    for _ in range(runs):
        t0 = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t0)
    return best
