"""Validation table: holeshape against published solutions, at one accuracy level (default "standard").

Run:  .venv/bin/python benchmarks/validation.py [draft|standard|fine]
Prints a Markdown table (case, published value, holeshape value, error, tolerance, DOFs, time) for the README.
Sources: Kirsch (1898); Inglis (1913); Howland (1930); NAFEMS LE1 (1990); Mansfield (1953) and the Lame solution
for reinforced holes; see tests/ for the same checks.
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "tests"))

from conftest import ALUMINIUM, BIG, big_panel, centred  # noqa: E402

from holeshape.evaluate import evaluate  # noqa: E402
from holeshape.geometry import Circle, Cutout, Flange, Ring  # noqa: E402
from holeshape.study import LoadCase, Measure, Panel  # noqa: E402


def rows(accuracy: str):
    m = Measure("hoop", accuracy)
    cases = [
        ("Kirsch, circle, uniaxial sx", centred("circle", radius=10.0), (100, 0, 0), 300.0, 0.1, big_panel()),
        ("Kirsch, circle, equibiaxial", centred("circle", radius=10.0), (100, 100, 0), 200.0, 0.1, big_panel()),
        ("Kirsch, circle, sx = s, sy = s/2", centred("circle", radius=10.0), (100, 50, 0), 250.0, 0.1, big_panel()),
        ("Kirsch, circle, pure shear", centred("circle", radius=10.0), (0, 0, 100), 400.0, 0.1, big_panel()),
    ]
    for r in (2, 4, 8):
        cases.append((f"Inglis, ellipse a/b = {r}, load across", centred("ellipse", a=10.0, b=10.0 / r),
                      (0, 100, 0), 100.0 * (1 + 2 * r), 0.1, big_panel()))
        cases.append((f"Inglis, ellipse a/b = {r}, load along", centred("ellipse", a=10.0, b=10.0 / r),
                      (100, 0, 0), 100.0 * (1 + 2 / r), 0.1, big_panel()))
    strip = Panel(width=1000.0, height=100.0, thickness=1.0)
    for dw, kt in ((0.2, 3.14), (0.3, 3.36), (0.4, 3.74), (0.5, 4.32)):
        cases.append((f"Howland, strip, d/W = {dw}", Cutout(Circle(dw * 50.0), (500.0, 50.0)), (100, 0, 0),
                      100.0 * kt, 1.0, strip))
    from holeshape.validation import lame_ring_hoop

    nu, mid = ALUMINIUM.elastic.poisson_ratio, (BIG / 2, BIG / 2)
    for ratio in (1.5, 2.0, 4.0):  # doubler thickness (ratio - 1) t over the web, out to b = 2a
        cases.append((f"Lame, doubler ring to b = 2a, total thickness {ratio:g} t, equibiaxial",
                      Cutout(Circle(10.0), mid, 0.0, Ring(width=10.0, thickness=ratio - 1.0)),
                      (100, 100, 0), 100.0 * lame_ring_hoop(ratio, 2.0, nu), 0.1, big_panel()))
    for share in (1.0, 0.5, 2.0):  # edge member area over Mansfield's neutral a t / (1 - nu)
        area = share * 10.0 / (1 - nu)
        q = 2 * 100.0 / (1 + nu + 10.0 / area)  # radial stress the member takes (Lame, derived in the tests)
        cases.append((f"Mansfield, flange of {share:g} x the neutral area, equibiaxial (sheet hoop)",
                      Cutout(Circle(10.0), mid, 0.0, Flange(height=area)), (100, 100, 0),
                      200.0 - q, 0.1, big_panel()))
    for name, cut, load, published, tol, panel in cases:
        t0 = time.perf_counter()
        ev = evaluate(panel, ALUMINIUM, (LoadCase("c", *load),), cut, m)
        dt = time.perf_counter() - t0
        yield name, published, ev.peak_stress_mpa, ev.error_estimate_pct, tol, ev.dofs, dt, ev.model
    t0 = time.perf_counter()
    yield ("NAFEMS LE1, sigma_yy at D (MPa)", 92.7, le1(), None, 1.0, None, time.perf_counter() - t0, "quarter")


def le1() -> float:
    from holeshape.validation import le1_sigma_yy_at_d

    return le1_sigma_yy_at_d(60.0)


def main() -> None:
    accuracy = sys.argv[1] if len(sys.argv) > 1 else "standard"
    print(f"Validation at accuracy = {accuracy!r} (panel {BIG:g} mm square for the infinite-plate cases)\n")
    print("| case | published | holeshape | error | tolerance | error estimate | model, DOFs | time |")
    print("|---|---|---|---|---|---|---|---|")
    ok = True
    for name, pub, val, est, tol, dofs, dt, model in rows(accuracy):
        err = 100 * (val / pub - 1)
        ok &= abs(err) <= tol
        e = "-" if est is None else f"{est:.3f} %"
        d = "-" if dofs is None else f"{model}, {dofs}"
        print(f"| {name} | {pub:.4g} | {val:.4f} | {err:+.3f} % | {tol:g} % | {e} | {d} | {dt:.2f} s |")
    print(f"\nall within tolerance: {ok}")


if __name__ == "__main__":
    main()
