"""Shared timing helper of the benchmark scripts (run from the repository root: python benchmarks/<name>.py)."""

from __future__ import annotations

import time


def best_of(fn, n: int = 3) -> tuple[float, object]:
    """Best-of-n wall time of ``fn()`` (s) and its last result."""
    times, out = [], None
    for _ in range(n):
        t0 = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - t0)
    return min(times), out
