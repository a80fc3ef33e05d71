"""Circular hole in a large plate against Kirsch (1898).

Source for every value here: Kirsch, Z. VDI 42 (1898) 797-807, as given in Timoshenko & Goodier, Theory of
Elasticity, 3rd ed. (1970): hoop stress sigma_theta = (sx + sy) - 2 (sx - sy) cos 2theta - 4 txy sin 2theta.
Tolerances: "standard" accuracy was measured at <= 0.07 % peak error on these cases (benchmarks/speed.py prints
the table); the tests allow 0.1 % on the peak (that measured error with a little room; the level's target of 0.5 %
bounds the error *estimate*, which over-states the error) and 0.5 % of the peak on the whole-boundary distribution
(pointwise values between nodes carry the larger P2 stress error).
"""

import math

import numpy as np
import pytest
from conftest import BIG, centred, run

from holeshape.elastic import Isotropic


def kirsch_hoop(theta, sx, sy, txy):
    return (sx + sy) - 2 * (sx - sy) * np.cos(2 * theta) - 4 * txy * np.sin(2 * theta)


def test_plane_stress_constants_regression():
    # closed form: lambda* = E nu / (1 - nu^2), mu = E / (2 (1 + nu)) (any elasticity text); guards the
    # scikit-fem 12.0.2 change of plane_stress(), which silently gave Kt of 44-687 with the older idiom
    lam, mu = Isotropic(71000.0, 0.33).lame
    assert lam == pytest.approx(71000.0 * 0.33 / (1 - 0.33**2), rel=1e-14)
    assert mu == pytest.approx(71000.0 / 2.66, rel=1e-14)


@pytest.mark.parametrize("load,peak,name", [
    ((100.0, 0.0, 0.0), 300.0, "uniaxial: 3 s"),
    ((100.0, 100.0, 0.0), 200.0, "equibiaxial: 2 s"),
    ((100.0, 50.0, 0.0), 250.0, "sx = s, sy = k s, k = 0.5: (3 - k) s"),
    ((100.0, -100.0, 0.0), 400.0, "sx = s, sy = -s (k = -1): 4 s"),
    ((0.0, 0.0, 100.0), 400.0, "pure shear: 4 t"),
])
def test_kirsch_peak(load, peak, name):
    ev = run(centred("circle", radius=10.0), load, stress="hoop")
    # Kirsch (1898) table, see module docstring; 0.1 %: the measured true error of "standard" with a little room
    assert ev.peak_stress_mpa == pytest.approx(peak, rel=1e-3), name
    assert ev.error_estimate_pct >= 100 * abs(ev.peak_stress_mpa / peak - 1), "estimate must bracket the error"


@pytest.mark.parametrize("load", [(100.0, 0.0, 0.0), (0.0, 0.0, 100.0), (60.0, -20.0, 35.0)])
def test_kirsch_whole_boundary(load):
    ev = run(centred("circle", radius=10.0), load, stress="hoop")
    fields = ev.fields
    bs = fields.boundary
    theta = np.arctan2(bs.xy[1] - BIG / 2, bs.xy[0] - BIG / 2)
    exact = kirsch_hoop(theta, *load)
    scale = np.abs(exact).max()
    # Kirsch (1898) distribution; tolerance 0.5 % of the peak pointwise (see module docstring)
    assert np.abs(bs.hoop[:, 0] - exact).max() <= 5e-3 * scale
    assert bs.s[-1] == pytest.approx(2 * math.pi * 10.0, rel=1e-6)  # whole outline, mirrored if reduced


def test_kirsch_along_the_axis():
    """sigma_x / s = 1 + a^2/(2 r^2) + 3 a^4/(2 r^4) on the y axis under sx = s (Timoshenko & Goodier, 1970)."""
    from holeshape.evaluate import stress_at_points

    ev = run(centred("circle", radius=10.0), (100.0, 0.0, 0.0), accuracy="fine")
    fields = ev.fields
    r = np.array([15.0, 20.0])
    pts = np.array([np.full(2, BIG / 2), BIG / 2 + r])
    sig = stress_at_points(fields.panel_mesh, fields.solution, pts)
    # published: r/a = 1.5 -> 1.519, r/a = 2 -> 1.219. Tolerance 0.3 %: away from the edge the mesh is graded
    # coarser (it is sized for the edge peak); the measured interior error of "fine" is ~0.15 %
    assert sig[0, :, 0] / 100.0 == pytest.approx([1.519, 1.219], rel=3e-3)


def test_reduced_model_is_used_and_agrees_with_the_full_model():
    c = centred("ellipse", a=20.0, b=10.0)
    reduced = run(c, (100.0, 50.0, 0.0), accuracy="draft")
    full = run(c, (100.0, 50.0, 0.0), accuracy="draft", allow_reduction=False)
    assert reduced.model == "quarter" and full.model == "full"
    # the two models are different meshes of one exact problem: they agree within their error estimates
    tol = (reduced.error_estimate_pct + full.error_estimate_pct) / 100
    assert reduced.peak_stress_mpa == pytest.approx(full.peak_stress_mpa, rel=tol)
    # Inglis (1913) for sx = 100, sy = 50, a/b = 2 with a along x: the peak is at beta = 90 deg where
    # sigma = sx (1 + 2b/a) - sy = 200 - 50 = 150 MPa; draft tolerance 1 %
    assert full.peak_stress_mpa == pytest.approx(150.0, rel=1e-2)


def test_half_model_for_a_shape_symmetric_about_one_axis():
    from holeshape.geometry import Cutout, Spline

    c = Cutout(Spline((20.0, 24.0, 15.0, 18.0), "x"), (BIG / 2, BIG / 2), 0.0)
    half = run(c, (100.0, 30.0, 0.0), accuracy="draft")
    full = run(c, (100.0, 30.0, 0.0), accuracy="draft", allow_reduction=False)
    assert half.model == "half"
    tol = (half.error_estimate_pct + full.error_estimate_pct) / 100
    assert half.peak_stress_mpa == pytest.approx(full.peak_stress_mpa, rel=tol)
    # with shear no mirror is exact: the full model must be chosen
    assert run(c, (100.0, 0.0, 10.0), accuracy="draft").model == "full"


def test_displacement_edges_in_a_large_panel_give_kirsch():
    # far from the hole imposing the remote strain or the remote traction is the same problem; Kirsch 3 s,
    # tolerance 0.2 %: the displacement condition stiffens a finite panel slightly (effect ~ (a / L)^2)
    from conftest import big_panel

    ev = run(centred("circle", radius=10.0), (100.0, 0.0, 0.0), panel=big_panel("displacement"))
    assert ev.peak_stress_mpa == pytest.approx(300.0, rel=2e-3)


def test_several_load_cases_share_one_solve_and_superpose():
    c = centred("circle", radius=10.0)
    both = run(c, (100.0, 0.0, 0.0), (0.0, 0.0, 100.0), (100.0, 0.0, 100.0), accuracy="draft", stress="hoop")
    single = run(c, (100.0, 0.0, 100.0), accuracy="draft", stress="hoop")
    # linear elasticity: a case solved alongside others equals the same case solved alone (same mesh)
    assert both.load_cases[2].peak_stress_mpa == pytest.approx(single.peak_stress_mpa, rel=1e-9)
    # Kirsch: sx = s with txy = s: peak |(s) - 2 s cos 2t - 4 s sin 2t| = s (1 + 2 sqrt(5)) = 5.472 s
    assert single.peak_stress_mpa == pytest.approx(100 * (1 + 2 * math.sqrt(5)), rel=1e-2)


def test_mesher_options_do_not_leak_between_calls():
    """A caller that changes gmsh's global options (as the NAFEMS LE1 test does) must not change later meshes."""
    from holeshape.mesh import MeshSpec, Region, gmsh_session, mesh_panel

    c = centred("circle", radius=10.0)
    region = Region(BIG, BIG, True, True)
    before = mesh_panel(BIG, BIG, c, region, MeshSpec()).n_elements
    gmsh_session().option.setNumber("Mesh.MeshSizeMin", 50.0)
    after = mesh_panel(BIG, BIG, c, region, MeshSpec()).n_elements
    assert after == before
