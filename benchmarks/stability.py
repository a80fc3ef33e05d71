"""Cost and accuracy of the buckling check, against the plane-stress evaluation of the same design (measured in the
same run) and against the C1 Argyris plate element at equal accuracy.

Run:  .venv/bin/python benchmarks/stability.py
Rows:
- time of one verified plane-stress evaluation (both mesh levels, error estimate), the baseline;
- time of the buckling check of the same design with the unperforated panel already known (what each design of a
  search costs: the unperforated panel is computed once per process), and the first call including it;
- ratio buckling / plane stress at draft and standard (median of 3 after a warm-up);
- accuracy on a square with a central hole (d/b = 0.3) against the shared independent table, and the time the
  Argyris element needs on one mesh to reach the same accuracy as holeshape's two Morley levels.
"""

from __future__ import annotations

import math
import statistics
import time

import numpy as np

from holeshape import stability as S
from holeshape.elastic import Isotropic
from holeshape.evaluate import evaluate
from holeshape.geometry import Circle, Cutout, Superellipse
from holeshape.study import LoadCase, Material, Measure, Panel, StabilitySettings

ALU = Material("aluminium alloy sheet", Isotropic(71000.0, 0.33), 280.0)
DESIGNS = [
    ("rib web, superellipse 120 x 80 (bundled check study)", Panel(300.0, 200.0, 2.5, "traction"),
     (LoadCase("shear and chordwise tension", sigma_x=16.0, tau_xy=18.0), LoadCase("compression", sigma_x=-18.0)),
     Cutout(Superellipse(60.0, 40.0, 4.0), (150.0, 100.0), 0.0)),
    ("square web, circle d/b = 0.3, shear and compression", Panel(100.0, 100.0, 1.0, "displacement"),
     (LoadCase("shear", tau_xy=1.0), LoadCase("compression", sigma_x=-1.0)),
     Cutout(Circle(15.0), (50.0, 50.0), 0.0)),
    ("lightening hole, superellipse 115 x 48", Panel(300.0, 200.0, 1.6, "traction"),
     (LoadCase("rib shear", tau_xy=8.0), LoadCase("crushing", sigma_y=-4.0)),
     Cutout(Superellipse(57.3, 24.0, 2.75), (150.0, 100.0), 0.0)),
]


def median_time(fn, repeat=3):
    fn()
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - t0)
    return out, statistics.median(times)


def speed_table() -> None:
    print("| design | level | plane stress (s) | buckling, per design (s) | first call incl. unperforated (s) | ratio |"
          " plate DOFs | estimate (%) |")
    print("|---|---|---|---|---|---|---|---|")
    for name, panel, cases, cut in DESIGNS:
        for acc in ("draft", "standard"):
            _, t_plane = median_time(lambda p=panel, c=cases, k=cut, a=acc: evaluate(p, ALU, c, k,
                                                                                      Measure("von_mises", a)))
            cache: dict = {}  # a search run's cache: the unperforated panel is computed once
            t0 = time.perf_counter()
            S.buckling(panel, ALU, cases, cut, StabilitySettings(), acc, cache=cache)
            t_first = time.perf_counter() - t0
            res, t_buck = median_time(lambda p=panel, c=cases, k=cut, a=acc, m=cache: S.buckling(
                p, ALU, c, k, StabilitySettings(), a, cache=m))
            print(f"| {name} | {acc} | {t_plane:.2f} | {t_buck:.2f} | {t_first:.2f} | {t_buck / t_plane:.2f} |"
                  f" {', '.join(str(n) for n in res.level_dofs)} | {res.error_estimate_pct:.2g} |")


def argyris_comparison() -> None:
    """Traction-edge compression of a square with a d/b = 0.3 hole: Morley two levels (standard) against Argyris
    on meshes of rising density, time to equal accuracy (the difference to the finest Argyris value)."""
    from skfem import Basis, ElementTriArgyris, ElementTriP2, ElementVector, MeshTri1

    from holeshape.mesh import MeshSpec, Region, mesh_panel
    from holeshape.solve import solve_panel, stress_from_gradient

    E, nu, t, b = 70000.0, 0.3, 1.0, 100.0
    mat = Material("m", Isotropic(E, nu))
    panel = Panel(b, b, t, "traction")
    cut = Cutout(Circle(15.0), (50.0, 50.0), 0.0)
    ref = math.pi ** 2 * E / (12 * (1 - nu ** 2)) * (t / b) ** 2
    cache: dict = {}
    res, t_m = median_time(lambda: S.buckling(panel, mat, (LoadCase("c", sigma_x=-1.0),), cut, StabilitySettings(),
                                              "standard", cache=cache))
    rows = []
    for frac in (1 / 8, 1 / 12, 1 / 16, 1 / 24):
        t0 = time.perf_counter()
        pm = mesh_panel(b, b, cut, Region(b, b), MeshSpec(4.0, 0.3, frac, 32, ligament_elements=4.0))
        sol = solve_panel(pm, Isotropic(E, nu), np.array([[-1.0, 0.0, 0.0]]), "traction", b, b)
        m = pm.mesh
        pb = Basis(MeshTri1(m.p[:, :m.nvertices], m.t), ElementTriArgyris(), intorder=8)
        sb = Basis(m, ElementVector(ElementTriP2()), quadrature=pb.quadrature)
        St = stress_from_gradient(np.asarray(sb.interpolate(sol.u[:, 0]).grad), Isotropic(E, nu))
        K = S.bending_stiffness(pb, Isotropic(E, nu), t)
        KG = S.geometric_stiffness(pb, St, t)
        bnd = pm.boundaries
        fixed = np.concatenate([
            pb.get_dofs(np.concatenate([bnd["left"], bnd["right"]])).all(["u", "u_y", "u_yy"]),
            pb.get_dofs(np.concatenate([bnd["bottom"], bnd["top"]])).all(["u", "u_x", "u_xx"])])
        k = S.lowest_factors(K, [KG], np.unique(fixed))[0][0][0] / ref
        rows.append((frac, pb.N, k, time.perf_counter() - t0))
    k_ref = rows[-1][2]
    k_m = res.load_factor / ref
    print()
    print(f"Square, d/b = 0.3, traction edges, compression: holeshape standard k = {k_m:.4f} in {t_m:.2f} s "
          f"(Morley, {res.level_dofs} DOFs), {100 * abs(k_m / k_ref - 1):.3f} % from the finest Argyris value")
    print("| Argyris element size / side | DOFs | k | difference to finest (%) | time (s) | time / holeshape |")
    print("|---|---|---|---|---|---|")
    for frac, n, k, dt in rows:
        print(f"| 1/{round(1 / frac)} | {n} | {k:.4f} | {100 * abs(k / k_ref - 1):.3f} | {dt:.2f} | {dt / t_m:.1f} |")


def accuracy_table() -> None:
    """Unperforated plates against exact and published k, every level."""
    E, nu, t, b = 70000.0, 0.3, 1.0, 100.0
    mat = Material("m", Isotropic(E, nu))
    cases = [("simply supported square, compression", Panel(b, b, t), LoadCase("c", sigma_x=-1.0),
              "simply_supported", 4.0),
             ("simply supported a/b = 1.5, compression", Panel(1.5 * b, b, t), LoadCase("c", sigma_x=-1.0),
              "simply_supported", (2 / 1.5 + 1.5 / 2) ** 2),
             ("simply supported square, shear", Panel(b, b, t), LoadCase("s", tau_xy=1.0), "simply_supported", 9.3245),
             ("clamped square, compression", Panel(b, b, t), LoadCase("c", sigma_x=-1.0), "clamped", 10.07),
             ("clamped square, shear", Panel(b, b, t), LoadCase("s", tau_xy=1.0), "clamped", 14.71)]
    print()
    print("| plate | reference k | draft k (est. %) | standard k (est. %) | fine k (est. %) |")
    print("|---|---|---|---|---|")
    for name, panel, lc, support, kref in cases:
        cells = []
        for acc in ("draft", "standard", "fine"):
            r = S.buckling(panel, mat, (lc,), None, StabilitySettings(support), acc)
            k = S.critical_stress_coefficient(r.load_factor, b, t, E, nu)
            cells.append(f"{k:.4f} ({r.error_estimate_pct:.2g})")
        print(f"| {name} | {kref:.4f} | " + " | ".join(cells) + " |")


if __name__ == "__main__":
    speed_table()
    accuracy_table()
    argyris_comparison()
