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


def with_buckling(study, cutout, measure, cache: dict):
    """The plane-stress evaluation and the buckling check of one design, as a search trial or a check runs them
    (the unperforated panel kept in ``cache`` between calls); returns the stability result."""
    from holeshape.evaluate import evaluate
    from holeshape.stability import buckling

    evaluate(study.panel, study.material, study.load_cases, cutout, measure)
    return buckling(study.panel, study.material, study.load_cases, cutout, study.stability, measure.accuracy,
                    cache=cache)
