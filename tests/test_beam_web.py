"""Beam-web load cases (shear force and bending moment) against exact plane-stress solutions.

Sources, each derived or stated beside its check:
- the end-loaded cantilever of a rectangular section, sigma_x = M y / I, tau = V (c^2 - y^2) / (2 I), sigma_y = 0,
  is the exact plane-stress solution when the end tractions follow it (Timoshenko & Goodier, Theory of
  Elasticity, the cantilever loaded at its end);
- a small circular hole on the neutral axis in shear: Kirsch's 4 tau (Kirsch 1898);
- a small circular hole on the neutral axis in pure bending: the hole in a linear stress gradient
  sigma_x = k y, solved here from the Airy stress function k y^3 / 6 with the decaying Michell terms
  sin(theta) / r, sin(3 theta) / r, sin(3 theta) / r^3 that free the edge (derived in the test, numerically
  differentiated to 1e-8): the peak hoop stress is 2 k a at the top and bottom of the hole.
"""

from __future__ import annotations

import json
import math
import re
from pathlib import Path

import numpy as np
import pytest
from conftest import checked

from holeshape.cli import main
from holeshape.elastic import Isotropic
from holeshape.evaluate import evaluate
from holeshape.geometry import Circle, Cutout
from holeshape.solve import BeamField, FactorisedSystem, panel_edge_loads, stiffness, stress_from_gradient, vector_basis
from holeshape.study import LoadCase, Material, Measure, Panel

ROOT = Path(__file__).resolve().parents[1]
STUDY = ROOT / "studies" / "floor-beam-service-opening.toml"
E, NU = 70000.0, 0.3
MAT = Material("al", Isotropic(E, NU))


def _plain_web(length: float, depth: float, size: float):
    """A rectangle without a hole, 6-node triangles (gmsh), and its named edges."""
    from holeshape.mesh import gmsh_session, mesh_from_gmsh

    gmsh = gmsh_session()
    gmsh.clear()
    gmsh.model.add("web")
    g = gmsh.model.geo
    pts = [g.addPoint(x, y, 0) for x, y in ((0, 0), (length, 0), (length, depth), (0, depth))]
    surface = g.addPlaneSurface([g.addCurveLoop([g.addLine(pts[i], pts[(i + 1) % 4]) for i in range(4)])])
    g.synchronize()
    gmsh.option.setNumber("Mesh.MeshSizeMax", size)
    gmsh.model.mesh.generate(2)
    gmsh.model.mesh.setOrder(2)
    mesh = mesh_from_gmsh(gmsh, surface)
    gmsh.clear()
    bf = mesh.boundary_facets()
    mid = mesh.p[:, mesh.facets[:, bf]].mean(axis=1)
    edges = {"left": bf[np.abs(mid[0]) < 1e-9], "right": bf[np.abs(mid[0] - length) < 1e-9],
             "bottom": bf[np.abs(mid[1]) < 1e-9], "top": bf[np.abs(mid[1] - depth) < 1e-9]}
    return mesh, edges


@pytest.mark.parametrize("distribution, inertia, axis", [("parabolic", None, None), ("uniform", 4.0e6, 40.0)])
def test_unperforated_web_carries_the_beam_theory_stresses(distribution, inertia, axis):
    # exact: the cantilever (parabolic, solid section) and the same stress family with a larger section and an
    # offset neutral axis (uniform): both satisfy equilibrium and compatibility, so the P2 solve must reproduce them;
    # 1e-3 of the largest stress covers P2's O(h^2) error on the cubic displacement (measured 1e-4 at 10 mm)
    length, depth, t = 600.0, 100.0, 2.0
    panel = Panel(length, depth, t, section_inertia=inertia or t * depth ** 3 / 12, neutral_axis_y=axis,
                  shear_distribution=distribution)
    field = BeamField.of(LoadCase("c", shear_force=5000.0, bending_moment=2.0e6), panel)
    mesh, edges = _plain_web(length, depth, 10.0)
    basis = vector_basis(mesh)
    loads = panel_edge_loads(basis, mesh, edges, np.zeros((1, 3)), [field])
    assert abs(loads.sum()) < 1e-6 * np.abs(loads).sum()  # self-equilibrated tractions
    p = mesh.p[:, :mesh.nvertices]
    a, b = int(np.argmin(p[0] ** 2 + p[1] ** 2)), int(np.argmin((p[0] - length) ** 2 + p[1] ** 2))
    nd = basis.nodal_dofs
    u = FactorisedSystem(stiffness(basis, Isotropic(E, NU)), np.array([nd[0, a], nd[1, a], nd[1, b]])).solve(loads)
    from skfem import Basis

    cb = Basis(mesh, basis.elem, quadrature=(np.array([[1 / 3], [1 / 3]]), np.array([0.5])))
    sig = stress_from_gradient(np.asarray(cb.interpolate(u[:, 0]).grad), Isotropic(E, NU))[:, :, 0]
    x = np.asarray(cb.global_coordinates())[:, :, 0]
    exact = np.array(field(x[0], x[1]))
    scale = np.abs(exact).max()
    assert np.abs(sig - exact).max() < 1e-3 * scale
    if distribution == "parabolic":
        # Timoshenko & Goodier's end-loaded cantilever: tau_max = 1.5 V / (h t) at the neutral axis, free top
        assert field(0.0, 50.0)[2] == pytest.approx(1.5 * 5000.0 / (depth * t))
        assert field(0.0, depth)[2] == pytest.approx(0.0, abs=1e-12)
    else:
        # the web carries the whole shear force: integral of tau t over the depth = V (quadrature, exact)
        yq, wq = np.polynomial.legendre.leggauss(6)
        assert 0.5 * depth * t * np.dot(wq, field(0.0, 0.5 * depth * (yq + 1))[2]) == pytest.approx(5000.0)


def test_hole_on_the_neutral_axis_in_shear_is_kirsch():
    # Kirsch (1898): 4 tau for a small hole (d / h = 0.01) in shear, with both distributions; 0.2 % covers the
    # shear's variation over the hole and the standard level's error
    w, h, a = 4000.0, 2000.0, 10.0
    uniform = Panel(w, h, 1.0, section_inertia=1e15)  # caps so stiff the web carries no bending: uniform shear
    ev = evaluate(uniform, MAT, (LoadCase("v", shear_force=100.0 * h),), Cutout(Circle(a), (w / 2, h / 2)),
                  Measure("hoop"))
    assert ev.peak_stress_mpa == pytest.approx(400.0, rel=2e-3)
    assert ev.kt == pytest.approx(4.0, rel=2e-3)  # against the beam-theory shear at the centre
    solid = Panel(w, h, 1.0, section_inertia=h ** 3 / 12, shear_distribution="parabolic")
    ev = evaluate(solid, MAT, (LoadCase("v", shear_force=100.0 * h / 1.5),), Cutout(Circle(a), (w / 2, h / 2)),
                  Measure("hoop"))
    assert ev.peak_stress_mpa == pytest.approx(400.0, rel=2e-3)  # 4 x the parabola's peak 1.5 V / (h t)


def _hole_in_bending_peak() -> float:
    """Peak hoop stress over k a for a traction-free circular hole (radius 1) in sigma_x = k y (k = 1), from the
    Airy function k y^3 / 6 plus sin(t) / r, sin(3 t) / r, sin(3 t) / r^3 with coefficients that free the edge."""
    def terms(r, th):
        return [(r * np.sin(th)) ** 3 / 6, np.sin(th) / r, np.sin(3 * th) / r, np.sin(3 * th) / r ** 3]

    def stresses(f, r, th, d=1e-4):
        # sigma_r = phi_r / r + phi_tt / r^2, sigma_t = phi_rr, tau = -d/dr (phi_t / r)
        pr = (f(r + d, th) - f(r - d, th)) / (2 * d)
        prr = (f(r + d, th) - 2 * f(r, th) + f(r - d, th)) / d ** 2
        ptt = (f(r, th + d) - 2 * f(r, th) + f(r, th - d)) / d ** 2
        pt = lambda rr: (f(rr, th + d) - f(rr, th - d)) / (2 * d)  # noqa: E731
        return pr / r + ptt / r ** 2, prr, -((pt(r + d) / (r + d)) - (pt(r - d) / (r - d))) / (2 * d)

    th = np.linspace(0.05, 2 * math.pi, 37)
    cols = []
    for i in range(4):
        sr, _, tau = stresses(lambda r, t, i=i: terms(r, t)[i], 1.0, th)
        cols.append(np.concatenate([sr, tau]))
    coef, *_ = np.linalg.lstsq(np.array(cols[1:]).T, -cols[0], rcond=None)
    full = [1.0, *coef]
    f = lambda r, t: sum(c * x for c, x in zip(full, terms(r, t)))  # noqa: E731
    sr, st, tau = stresses(f, 1.0, np.linspace(0.0, 2 * math.pi, 721))
    assert np.abs(sr).max() < 1e-6 and np.abs(tau).max() < 1e-6  # the edge is free: the term set is complete
    return float(st.max())


def test_hole_on_the_neutral_axis_in_pure_bending():
    # derived above: 2 k a (peak hoop at the top and bottom of the hole); the FE panel is a deep solid beam in
    # pure bending (V = 0) with a hole of d / h = 0.01; 0.3 % covers the standard level's error
    exact = _hole_in_bending_peak()
    assert exact == pytest.approx(2.0, rel=1e-5)
    w, h, a = 4000.0, 2000.0, 10.0
    panel = Panel(w, h, 1.0, section_inertia=h ** 3 / 12, shear_distribution="parabolic")
    k = 10.0  # MPa per mm: k a = 100 MPa
    res = checked(Cutout(Circle(a), (w / 2, h / 2)), [LoadCase("m", bending_moment=k * panel.section_inertia)],
                  panel=panel, material=MAT, stress="hoop")
    ev = res.evaluation
    r = ev.load_cases[0]
    tee = res.result("tee_sections").cases["m"]
    assert r.peak_stress_mpa == pytest.approx(exact * k * a, rel=3e-3)
    assert abs(r.x_mm - w / 2) < 0.5 and abs(abs(r.y_mm - h / 2) - a) < 1e-6  # at the top or bottom of the hole
    # the centre lies on the neutral axis: Kt is measured against the largest beam-theory stress in the web
    assert r.reference_stress_mpa == pytest.approx(k * h / 2)
    assert "largest beam-theory stress" in ev.kt_reference
    # tee sections: mean sigma_x above and below = k times the mean lever arm of each tee (statics of the linear
    # field), 0.5 %
    for mean, y0, y1 in ((tee["tee_above_mpa"], a, h / 2), (tee["tee_below_mpa"], -h / 2, -a)):
        assert mean == pytest.approx(k * 0.5 * (y0 + y1), rel=5e-3)


def test_beam_cases_buckle_like_the_same_remote_stress():
    # the unperforated web under uniform beam shear (stiff caps) is the same plate problem as the remote shear
    # stress V / (h t): the two buckling factors agree to round-off (same meshes, same prestress)
    from holeshape.stability import buckling
    from holeshape.study import StabilitySettings

    panel = Panel(400.0, 300.0, 2.5, section_inertia=1e15)
    v = 9000.0
    cut = Cutout(Circle(45.0), (200.0, 150.0))
    beam = buckling(panel, MAT, (LoadCase("v", shear_force=v),), cut, StabilitySettings(), "draft")
    remote = buckling(panel, MAT, (LoadCase("t", tau_xy=v / (300.0 * 2.5)),), cut, StabilitySettings(), "draft")
    assert beam.cases[0].unperforated_factor == pytest.approx(remote.cases[0].unperforated_factor, rel=1e-6)
    assert beam.cases[0].load_factor == pytest.approx(remote.cases[0].load_factor, rel=1e-6)


TEXT = STUDY.read_text()


@pytest.mark.parametrize("old, new, message", [
    ("shear_force = 9000.0 ", "sigma_x = 10.0\nshear_force = 9000.0 ",
     r"load_case\[0\] mixes remote stresses \(sigma_x\) with beam forces"),
    ("section_inertia = 14.6e6 ", "", r"panel\.section_inertia is missing"),
    ('shear_distribution = "uniform"', 'shear_distribution = "parabolic"',
     r'panel\.shear_distribution = "parabolic" is the solid rectangular section.*5\.625e\+06 mm\^4'),
    ("neutral_axis_y = 150.0 ", "neutral_axis_y = 400.0 ", r"panel\.neutral_axis_y = 400\.0 mm must lie within"),
    ('shear_distribution = "uniform"', 'shear_distribution = "even"', r"panel\.shear_distribution must be one of"),
    ("[panel]", '[panel]\nedges = "displacement"', r'panel\.edges must be "traction"'),
    ("shear_force = 9000.0 ", "shear_force = 0.0 ", None),
])
def test_bad_beam_input_is_one_line_exit_2(tmp_path, capsys, old, new, message):
    assert old in TEXT, old
    text = TEXT.replace(old, new)
    if message is None:  # both forces zero: no load
        text = text.replace("bending_moment = 1.5e6 ", "bending_moment = 0.0 ")
        message = r"load_case\[0\] \('near the support'\) has no load"
    p = tmp_path / "bad.toml"
    p.write_text(text.replace('edges = "displacement"\nwidth', 'edges = "displacement"\nwidth'))
    assert main(["check", str(p), "--accuracy", "draft"]) == 2
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1 and "Traceback" not in err
    assert re.search(message, err), err


def test_check_of_the_bundled_beam_study(capsys):
    assert main(["check", str(STUDY), "--json", "--accuracy", "draft"]) == 0
    d = json.loads(capsys.readouterr().out)
    assert d["model"] == "full"
    for c in d["load_cases"]:
        assert {"tee_above_mpa", "tee_below_mpa", "tee_above_shear_mpa", "tee_below_shear_mpa"} <= set(c)
    near = d["load_cases"][0]
    # the mean shear across both tees carries the shear force the web gives up at the hole (statics): the two tees
    # (300 - 90 mm of web) carry V = 9000 N, 2 %
    tees = (near["tee_above_shear_mpa"] + near["tee_below_shear_mpa"]) / 2 * (300.0 - 90.0) * 2.5
    assert tees == pytest.approx(9000.0, rel=0.02)
    assert main(["check", str(STUDY), "--accuracy", "draft"]) == 0
    out = capsys.readouterr().out
    assert "beam load" in out and "TEE SECTIONS" in out
