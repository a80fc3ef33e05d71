"""Published reference cases solved by the same pipeline as a design, for the report's validation appendix and
the README table. Sources: Kirsch (1898); Inglis (1913); Howland (1930); NAFEMS LE1 (1990); Mansfield (1953) and the
Lame solution for reinforced holes. Units mm, MPa."""

from __future__ import annotations

import time
from typing import Any

import numpy as np

from holeshape.elastic import Isotropic
from holeshape.evaluate import evaluate
from holeshape.geometry import Circle, Cutout, Ellipse, Flange, Ring
from holeshape.study import LoadCase, Material, Measure, Panel

_REFERENCE_ELASTIC = Isotropic(71000.0, 0.33)  # typed as the isotropic law its constants are read from
REFERENCE_MATERIAL = Material(name="reference", elastic=_REFERENCE_ELASTIC)
BIG = 4000.0  # 400 hole sizes across: finite-panel effect ~0.005 % on the peak


def le1_mesh(size_mm: float) -> Any:
    """NAFEMS LE1 quarter elliptic membrane (mm) meshed by gmsh on its own ellipse arcs, 6-node triangles."""
    from holeshape.mesh import gmsh_session, mesh_from_gmsh

    gmsh = gmsh_session()
    gmsh.clear()
    gmsh.model.add("le1")
    g = gmsh.model.geo
    c = g.addPoint(0, 0, 0)
    p1, p2 = g.addPoint(2000.0, 0, 0), g.addPoint(0, 1000.0, 0)
    p3, p4 = g.addPoint(3250.0, 0, 0), g.addPoint(0, 2750.0, 0)
    inner, outer = g.addEllipseArc(p1, c, p1, p2), g.addEllipseArc(p3, c, p3, p4)
    bottom, left = g.addLine(p1, p3), g.addLine(p4, p2)
    s = g.addPlaneSurface([g.addCurveLoop([bottom, outer, left, -inner])])
    g.synchronize()
    gmsh.option.setNumber("Mesh.MeshSizeMax", size_mm)
    gmsh.option.setNumber("Mesh.MeshSizeMin", size_mm / 4)
    gmsh.model.mesh.setSize([(0, p1)], size_mm / 4)
    gmsh.model.mesh.generate(2)
    gmsh.model.mesh.setOrder(2)  # mid-side nodes on the exact ellipses
    mesh = mesh_from_gmsh(gmsh, s)
    gmsh.clear()
    return mesh


def le1_sigma_yy_at_d(size_mm: float = 60.0) -> float:
    """sigma_yy (MPa) at D = (2000, 0) mm: outward pressure 10 MPa on the outer ellipse, E = 210 GPa, nu = 0.3."""
    from holeshape.solve import FactorisedSystem, boundary_stress, stiffness, traction_load, vector_basis

    mesh = le1_mesh(size_mm)
    bf = mesh.boundary_facets()
    mid = mesh.p[:, mesh.facets[:, bf]].mean(axis=1)
    outer = bf[np.abs((mid[0] / 3250) ** 2 + (mid[1] / 2750) ** 2 - 1) < 0.02]
    inner = bf[np.abs((mid[0] / 2000) ** 2 + (mid[1] / 1000) ** 2 - 1) < 0.02]
    basis = vector_basis(mesh)
    fixed = np.concatenate([basis.get_dofs(bf[np.abs(mid[1]) < 1e-6]).all("u^2"),
                            basis.get_dofs(bf[np.abs(mid[0]) < 1e-6]).all("u^1")])
    steel = Isotropic(210000.0, 0.3)
    u = FactorisedSystem(stiffness(basis, steel), fixed).solve(
        traction_load(mesh, outer, lambda x, y: (10.0, 10.0, 0.0))[:, None])
    c = mesh.facets[:, inner]
    ang = np.arctan2(mesh.p[1, c].mean(axis=0), mesh.p[0, c].mean(axis=0))
    return float(boundary_stress(mesh, u, inner[np.argsort(ang)], steel, closed=False).sigma[1, 0, 0])


def lame_ring_hoop(ratio: float, b_over_a: float, nu: float) -> float:
    """Hoop stress at the hole edge over the equibiaxial remote stress for a concentric doubler ring out to
    b = ``b_over_a`` a with ``ratio`` times the web's thickness (same material): the Lame solutions of the ring
    (sigma_r = P (1 - a^2/r^2)) and the web (sigma_r = 1 + Q/r^2) joined by force per unit length and hoop strain
    at r = b. Returns 2 P."""
    k = 1.0 / b_over_a ** 2
    m = np.array([[ratio * (1 - k), -k], [(1 + k) - nu * (1 - k), (1 + nu) * k]])
    p, _ = np.linalg.solve(m, np.array([1.0, 1.0 - nu]))
    return float(2 * p)


# (name, source, cutout, panel, load (sigma_x, sigma_y, tau_xy) MPa, published peak MPa, tolerance %)
ReferenceCase = tuple[str, str, Cutout, Panel, tuple[float, float, float], float, float]


def reference_cases(full: bool = True) -> list[ReferenceCase]:
    """(name, source, cutout, panel, load, published peak MPa, tolerance %)."""
    big = Panel(BIG, BIG, 1.0)
    mid = (BIG / 2, BIG / 2)
    rows: list[ReferenceCase] = [
        ("circle, uniaxial", "Kirsch (1898): 3 s", Cutout(Circle(10.0), mid), big, (100, 0, 0), 300.0, 0.1),
        ("circle, pure shear", "Kirsch (1898): 4 t", Cutout(Circle(10.0), mid), big, (0, 0, 100), 400.0, 0.1)]
    if full:
        rows += [("circle, equibiaxial", "Kirsch (1898): 2 s", Cutout(Circle(10.0), mid), big, (100, 100, 0),
                  200.0, 0.1)]
    for r in ((2, 4, 8) if full else (4,)):
        rows.append((f"ellipse a/b = {r}, load across", "Inglis (1913): 1 + 2a/b",
                     Cutout(Ellipse(10.0, 10.0 / r), mid), big, (0, 100, 0), 100.0 * (1 + 2 * r), 0.1))
    nu = _REFERENCE_ELASTIC.poisson_ratio
    rows.append(("flanged circle, neutral member, equibiaxial",
                 "Mansfield (1953): A = a t / (1 - nu) leaves the sheet uniform",
                 Cutout(Circle(10.0), mid, 0.0, Flange(height=10.0 / (1 - nu))), big,
                 (100, 100, 0), 100.0, 0.1))
    if full:
        rows.append(("doubler ring, t_ring = t, b = 2a, equibiaxial", "Lame (closed form, derived)",
                     Cutout(Circle(10.0), mid, 0.0, Ring(width=10.0, thickness=1.0)), big,
                     (100, 100, 0), 100.0 * lame_ring_hoop(2.0, 2.0, nu), 0.1))
    strip = Panel(1000.0, 100.0, 1.0)
    for dw, kt in (((0.2, 3.14), (0.3, 3.36), (0.4, 3.74), (0.5, 4.32)) if full else ((0.4, 3.74),)):
        rows.append((f"strip, d/W = {dw}", "Howland (1930), 3-figure table", Cutout(Circle(dw * 50.0), (500.0, 50.0)),
                     strip, (100, 0, 0), 100.0 * kt, 1.0))
    return rows


_MEMO: dict[tuple, list[dict]] = {}


def run_validation(accuracy: str, full: bool = False, stability: bool = False, fatigue: bool = False) -> list[dict]:
    """Solve the reference cases at ``accuracy``; rows ready for JSON. ``stability``: also the plate buckling
    cases (for a study that uses [stability]); ``fatigue``: also the fatigue case (for a study with [fatigue]). The
    rows of one process are computed once (every run of a ``compare`` and a test session reuses them)."""
    key = (accuracy, full, stability, fatigue)
    if key not in _MEMO:
        _MEMO[key] = _validation(accuracy, full, stability) + (fatigue_cases(accuracy) if fatigue else [])
    return [dict(r) for r in _MEMO[key]]


FATIGUE_CASE = """
title = "fatigue reference"
[panel]
width = 4000.0
height = 4000.0
thickness = 1.0
[material]
youngs_modulus = 71000.0
poisson_ratio = 0.33
[[load_case]]
name = "tension"
sigma_x = 50.0
[cutout]
shape = "circle"
center = [2000.0, 2000.0]
radius = 10.0
[fatigue]
unit = "cycle"
required_life = 1.0e5
[fatigue.curve]
kind = "basquin"
strength_coefficient = 900.0
exponent = -0.1
mean_stress = "goodman"
ultimate_strength = 480.0
[[fatigue.block]]
from = "zero"
to = { "tension" = 1.0 }
cycles = 1.0
"""


def fatigue_cases(accuracy: str) -> list[dict]:
    """A small hole in a large plate cycled 0 -> S = 50 MPa through the fatigue check: the reserve factor against
    the hand value from Kirsch's local range 3 S (Kirsch 1898), Basquin's curve and Goodman's mean-stress line
    (sigma'_f = 900 MPa, b = -0.1, S_u = 480 MPa, required life 1e5 cycles; constants chosen for the check)."""
    import math

    import tomllib
    from scipy.optimize import brentq

    from holeshape.checks import assess
    from holeshape.studyfile import parse_study

    t0 = time.perf_counter()
    study = parse_study(tomllib.loads(FATIGUE_CASE), source="fatigue reference")
    cut = study.cutout.build(study.cutout.nominal())
    ev = evaluate(study.panel, study.material, study.load_cases, cut, Measure("hoop", accuracy))
    res = assess(study, cut, ev, accuracy=accuracy).result("fatigue")
    local = 3.0 * 50.0

    def log_life(k: float) -> float:
        a = k * local / 2
        return math.log(0.5 * (a / (1 - a / 480.0) / 900.0) ** (1 / -0.1) / 1.0e5)

    published = brentq(log_life, 0.1, 0.999 * 2 * 480.0 / local)
    got = getattr(res, "reserve_factor", None) or math.nan
    err = 100 * (got / published - 1)
    return [{"case": "small hole, 0 -> S, Basquin with Goodman (fatigue reserve factor)",
             "source": "Kirsch (1898) 3 S at the edge; Basquin's curve and Goodman's line by hand",
             "published": published, "holeshape": got, "error_pct": err, "tolerance_pct": 0.5,
             "error_estimate_pct": getattr(res, "reserve_error_estimate_pct", None), "within": abs(err) <= 0.5,
             "dofs": ev.dofs, "seconds": time.perf_counter() - t0}]


def _validation(accuracy: str, full: bool, stability: bool) -> list[dict]:
    out = []
    for name, source, cut, panel, load, published, tol in reference_cases(full):
        t0 = time.perf_counter()
        ev = evaluate(panel, REFERENCE_MATERIAL, (LoadCase("c", *load),), cut, Measure("hoop", accuracy))
        err = 100 * (ev.peak_stress_mpa / published - 1)
        out.append({"case": name, "source": source, "published": published, "holeshape": ev.peak_stress_mpa,
                    "error_pct": err, "tolerance_pct": tol, "error_estimate_pct": ev.error_estimate_pct,
                    "within": abs(err) <= tol, "dofs": ev.dofs, "seconds": time.perf_counter() - t0})
    t0 = time.perf_counter()
    v = le1_sigma_yy_at_d()
    out.append({"case": "NAFEMS LE1 elliptic membrane, sigma_yy at D", "source": "NAFEMS (1990): 92.7 MPa",
                "published": 92.7, "holeshape": v, "error_pct": 100 * (v / 92.7 - 1), "tolerance_pct": 1.0,
                "error_estimate_pct": None, "within": abs(v / 92.7 - 1) <= 0.01, "dofs": None,
                "seconds": time.perf_counter() - t0})
    if stability:
        out += buckling_cases(accuracy)
    return out


# plate buckling references: sigma_cr = k pi^2 E / (12 (1 - nu^2)) (t / b)^2, simply supported square of side b
BUCKLING_CASES = (
    ("square plate, simply supported, uniaxial compression (buckling factor)",
     "Bryan (1891): k = 4 (exact), as in Timoshenko & Gere (1961)", (-10.0, 0.0, 0.0), 4.0, 0.5),
    ("square plate, simply supported, pure shear (buckling factor)",
     "Stein & Neff (1947), NACA TN 1222: k = 9.34 (tabulated, about 0.17 % above the converged 9.3245)",
     (0.0, 0.0, 10.0), 9.34, 1.0),
)


def buckling_cases(accuracy: str) -> list[dict]:
    """The unperforated simply supported square plate in compression and in shear through the stability layer
    (the same plate elements, levels and extrapolation as a design's check): load factor against k."""
    import math

    from holeshape.stability import buckling
    from holeshape.study import StabilitySettings

    side, t = 200.0, 1.0
    e, nu = _REFERENCE_ELASTIC.youngs_modulus, _REFERENCE_ELASTIC.poisson_ratio
    unit = math.pi ** 2 * e / (12.0 * (1.0 - nu ** 2)) * (t / side) ** 2  # sigma_cr for k = 1, MPa
    rows = []
    for name, source, load, k, tol in BUCKLING_CASES:
        t0 = time.perf_counter()
        st = buckling(Panel(side, side, t), REFERENCE_MATERIAL, (LoadCase("c", *load),), None,
                      StabilitySettings("simply_supported"), accuracy)
        published = k * unit / 10.0  # the load factor on 10 MPa
        f = st.load_factor
        assert f is not None  # an unperforated plate under compression or shear buckles
        err = 100 * (f / published - 1)
        rows.append({"case": name, "source": source, "published": published, "holeshape": f, "error_pct": err,
                     "tolerance_pct": tol, "error_estimate_pct": st.error_estimate_pct, "within": abs(err) <= tol,
                     "dofs": st.dofs, "seconds": time.perf_counter() - t0})
    return rows
