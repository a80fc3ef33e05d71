"""Nelder-Mead simplex search in the unit cube, written as a generator: ``x = gen.send(f(previous x))``.

Used after the global sampler: the optimum of a cutout often lies in a narrow valley (a few percent of a/b costs a
few percent of peak stress), which a global sampler polishes slowly and a simplex follows quickly.
"""

from __future__ import annotations

from collections.abc import Generator, Sequence

import numpy as np


def nelder_mead(x0: np.ndarray, step: float = 0.08, signs: Sequence[float] | np.ndarray | None = None
                ) -> Generator[np.ndarray, float, None]:
    """Yields points in [0, 1]^n to evaluate; receive each point's value by ``send``. Runs until closed.
    ``signs`` (n,) of +-1 choose the direction of each start vertex (default all +, turned back at the bounds)."""
    n = len(x0)
    x0 = np.clip(np.asarray(x0, dtype=float), 0.0, 1.0)
    pts = [x0]
    for i in range(n):
        p = x0.copy()
        d = step * (1.0 if signs is None else float(signs[i]))
        p[i] = p[i] + d if 0.0 <= p[i] + d <= 1.0 else p[i] - d
        pts.append(p)
    vals = []
    for p in pts:
        vals.append((yield p))
    alpha, gamma, rho, sigma = 1.0, 2.0, 0.5, 0.5
    while True:
        order = np.argsort(vals)
        pts = [pts[i] for i in order]
        vals = [vals[i] for i in order]
        centroid = np.mean(pts[:-1], axis=0)
        xr = np.clip(centroid + alpha * (centroid - pts[-1]), 0.0, 1.0)
        fr = yield xr
        if fr < vals[0]:
            xe = np.clip(centroid + gamma * (xr - centroid), 0.0, 1.0)
            fe = yield xe
            pts[-1], vals[-1] = (xe, fe) if fe < fr else (xr, fr)
            continue
        if fr < vals[-2]:
            pts[-1], vals[-1] = xr, fr
            continue
        outside = fr < vals[-1]
        xc = np.clip(centroid + rho * ((xr if outside else pts[-1]) - centroid), 0.0, 1.0)
        fc = yield xc
        if fc < (fr if outside else vals[-1]):
            pts[-1], vals[-1] = xc, fc
            continue
        for i in range(1, n + 1):
            pts[i] = pts[0] + sigma * (pts[i] - pts[0])
            vals[i] = yield pts[i]
