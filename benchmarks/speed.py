"""Speed and accuracy per evaluation at each accuracy level, against straight-sided P2 with a nodal projection.

Run:  .venv/bin/python benchmarks/speed.py
For Kirsch (uniaxial) and Inglis (a/b = 2, 4, 8, load across the long axis) in a panel 400 hole sizes across:
- holeshape at draft / standard / fine: error against the published peak and wall time of one whole evaluation
  (both mesh levels, error estimate included), median of 3 runs after one warm-up;
- the baseline measured in the same run: straight-sided P2 elements on the polygonal outline, stress read from an
  L2 projection of the stress to the P2 nodes, one mesh level; the boundary ratio is raised until its error is no
  worse than holeshape "standard", and the ratio of times at that equal accuracy is printed.
"""

from __future__ import annotations

import statistics
import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "tests"))

from conftest import ALUMINIUM, BIG, big_panel, centred  # noqa: E402

from holeshape.evaluate import choose_region, evaluate  # noqa: E402
from holeshape.mesh import MeshSpec, mesh_panel  # noqa: E402
from holeshape.solve import solve_panel  # noqa: E402
from holeshape.study import LoadCase, Measure  # noqa: E402

CASES = [("Kirsch circle, sx", "circle", {"radius": 10.0}, (100.0, 0, 0), 300.0)]
CASES += [(f"Inglis a/b = {r}, sy", "ellipse", {"a": 10.0, "b": 10.0 / r}, (0, 100.0, 0), 100.0 * (1 + 2 * r))
          for r in (2, 4, 8)]


def timed(fn, repeat=3):
    fn()
    times, out = [], None
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - t0)
    return out, statistics.median(times)


def baseline_peak(cutout, load, ratio: float) -> tuple[float, int]:
    """Straight-sided P2, stress projected to nodes (L2), hoop stress at the cutout nodes."""
    from skfem import Basis, BilinearForm, ElementTriP2, LinearForm
    from skfem import solve as sksolve

    panel = big_panel()
    lc = (LoadCase("c", *load),)
    region = choose_region(panel, cutout, lc)
    spec = MeshSpec(boundary_ratio=ratio, growth=0.3, max_fraction=0.1, min_segments=int(3 * ratio), curved=False)
    pm = mesh_panel(BIG, BIG, cutout, region, spec)
    sol = solve_panel(pm, ALUMINIUM.elastic, np.array([load]), "traction", BIG, BIG)
    lam, mu = ALUMINIUM.elastic.lame
    sb = Basis(pm.mesh, ElementTriP2(), intorder=4)
    uh = sol.basis.interpolate(sol.u[:, 0])
    g = uh.grad
    comps = [2 * mu * g[0, 0] + lam * (g[0, 0] + g[1, 1]), 2 * mu * g[1, 1] + lam * (g[0, 0] + g[1, 1]),
             mu * (g[0, 1] + g[1, 0])]
    M = BilinearForm(lambda u, v, w: u * v).assemble(sb)
    nodal = [sksolve(M, LinearForm(lambda v, w, c=c: c * v).assemble(sb)) for c in comps]
    nodes = np.unique(pm.mesh.facets[:, pm.cutout_facets])
    sxx, syy, sxy = (n[nodes] for n in nodal)
    vm = np.sqrt(sxx**2 - sxx * syy + syy**2 + 3 * sxy**2)  # on a free edge equals |hoop|
    return float(vm.max()), sol.dofs


def main() -> None:
    print("| case | level | DOFs | error vs published | error estimate | time per evaluation |")
    print("|---|---|---|---|---|---|")
    standard = {}
    for name, fam, params, load, exact in CASES:
        c = centred(fam, **params)
        for level in ("draft", "standard", "fine"):
            ev, dt = timed(lambda c=c, load=load, level=level: evaluate(
                big_panel(), ALUMINIUM, (LoadCase("c", *load),), c, Measure("von_mises", level)))
            err = 100 * abs(ev.peak_stress_mpa / exact - 1)
            if level == "standard":
                standard[name] = (err, dt)
            print(f"| {name} | {level} | {ev.dofs} | {err:.4f} % | {ev.error_estimate_pct:.3f} % | {dt:.3f} s |")
    print("\nBaseline (straight-sided P2 + L2 nodal projection, one level) at equal accuracy to 'standard':\n")
    print("| case | holeshape standard: error, time | baseline boundary ratio | baseline DOFs | baseline error |"
          " baseline time | time ratio baseline / holeshape |")
    print("|---|---|---|---|---|---|---|")
    for name, fam, params, load, exact in CASES:
        c = centred(fam, **params)
        err_h, t_h = standard[name]
        target = max(err_h, 0.01)
        ratio, result = 16.0, None
        while ratio <= 256:
            (pk, dofs), dt = timed(lambda c=c, load=load, ratio=ratio: baseline_peak(c, load, ratio), repeat=1)
            err = 100 * abs(pk / exact - 1)
            result = (ratio, dofs, err, dt)
            if err <= target:
                break
            ratio *= 2
        r, dofs, err, dt = result
        reached = "" if err <= target else " (not reached)"
        print(f"| {name} | {err_h:.4f} %, {t_h:.3f} s | {r:g}{reached} | {dofs} | {err:.4f} % | {dt:.2f} s |"
              f" {dt / t_h:.1f}x{reached} |")


if __name__ == "__main__":
    main()
