"""Reinforced circular openings against exact plane-stress solutions derived here.

Every reference value below is derived in this file from the equations of plane elasticity (no number is taken
from the code under test):
- a doubler ring (concentric annulus of extra thickness) under equibiaxial stress: the Lame solution in the ring and
  in the web, joined by continuity of displacement and of force per unit length (thickness x radial stress);
- an edge member (a formed flange as a bar with hoop stiffness only) under equibiaxial stress: the Lame solution
  with the bar's hoop strain equal to the sheet's at the edge, and its neutral size A = a t / (1 - nu) (Mansfield
  1953, "Neutral holes in plane sheet - reinforced holes which are elastically equivalent to the uncut sheet",
  Quart. J. Mech. Appl. Math. 6, 370);
- the same edge member under uniaxial stress: the Airy stress function of the Kirsch problem (harmonics 0 and 2)
  with the bar's radial and tangential equilibrium and strain compatibility at the edge (a curved bar without
  bending stiffness, the idealisation of Reissner & Morduchow's thin-ring case, NACA TN 1852, from memory);
- limits: vanishing reinforcement gives Kirsch (Kirsch 1898: 3 uniaxial, 2 equibiaxial); an inextensible edge
  member under equibiaxial stress is the bonded rigid inclusion, sigma_r = 2 s / (1 + nu) (u_r = 0 at the edge in
  the Lame solution; Goodier 1933, Trans. ASME 55, from memory).

Tolerances: the panel is 100 hole diameters wide, where the finite-width effect on these peaks is below 0.05 %
(the equibiaxial disturbance decays as (a / r)^2, the uniaxial one as (a / r)^2 too); the standard level's measured
discretisation error is below 0.1 %. So 0.3 % on peaks and distributions.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from conftest import checked

from holeshape.elastic import Isotropic
from holeshape.evaluate import CUTOUT_EDGE, FLANGE, RING_EDGE
from holeshape.geometry import Circle, Cutout, Flange, Ring
from holeshape.mesh import MeshSpec, Region, mesh_panel
from holeshape.solve import member_stress, solve_panel
from holeshape.study import LoadCase, Material, Panel

E, NU, T, A, W = 70000.0, 0.3, 2.0, 10.0, 2000.0
STANDARD = MeshSpec(boundary_ratio=32.0, growth=0.3, max_fraction=0.1, min_segments=96)
TOL = 3e-3


def solve(reinforcement, remote, region=None):
    region = region or Region(W, W, True, True)
    cut = Cutout(Circle(A), (W / 2, W / 2), 0.0, reinforcement)
    pm = mesh_panel(W, W, cut, region, STANDARD)
    return solve_panel(pm, Isotropic(E, NU), np.array([remote], dtype=float), "traction", W, W,
                       reinforcement=reinforcement, thickness=T)


# ----- exact solutions --------------------------------------------------------------------------------------------
def ring_equibiaxial(ratio: float, b: float, s: float = 1.0) -> tuple[float, float, float]:
    """Doubler ring a < r < b with total thickness ratio * t, web t beyond, equibiaxial s (Lame).

    Ring: sigma_r = P (1 - a^2 / r^2), sigma_t = P (1 + a^2 / r^2) (free edge at a). Web: sigma_r = s + Q / r^2,
    sigma_t = s - Q / r^2. At r = b: ratio * sigma_r(ring) = sigma_r(web) (force per unit length) and
    sigma_t - nu sigma_r equal on both sides (hoop strain, i.e. u = r eps_t, continuous; same E).
    Returns (hoop at the hole edge, web hoop at b, web radial at b)."""
    m = np.array([[ratio * (1 - A * A / b / b), -1 / b / b],
                  [(1 + A * A / b / b) - NU * (1 - A * A / b / b), (1 + NU) / b / b]])
    p, q = np.linalg.solve(m, np.array([s, s * (1 - NU)]))
    return 2 * p, s - q / b / b, s + q / b / b


def member_equibiaxial(area: float, s: float = 1.0) -> tuple[float, float, float]:
    """Edge member of area ``area`` (same E), equibiaxial s: the web beyond is s + Q / r^2 (Lame). The member's
    hoop force N = a t sigma_r(a) and its strain N / (E A) = (sigma_t - nu sigma_r) / E at the edge give
    sigma_r(a) = q = 2 s / (1 + nu + a t / A). Returns (sheet hoop, sheet radial, member stress) at the edge."""
    q = 2 * s / (1 + NU + A * T / area)
    return 2 * s - q, q, q * A * T / area


def member_uniaxial(area: float, s: float = 1.0, n: int = 721):
    """Edge member of area ``area`` (same E), uniaxial s along x: sheet stresses at the edge (sigma_r, sigma_t,
    tau_rt) on theta in [0, pi], and the member stress.

    Harmonic 0 is the equibiaxial s / 2 above. Harmonic 2, Airy phi = (A2 r^2 + C2 / r^2 + D2) cos 2 theta with
    A2 = -s / 4 (remote s / 2 cos 2 theta): sigma_r = -(2 A2 + 6 C2 / r^4 + 4 D2 / r^2) cos 2 theta,
    sigma_t = (2 A2 + 6 C2 / r^4) cos 2 theta, tau = (2 A2 - 6 C2 / r^4 - 2 D2 / r^2) sin 2 theta.
    Bar of radius a with hoop force N2 cos 2 theta: radial equilibrium t sigma_r = N / a, tangential
    dN / (a dtheta) + t tau = 0, strain N = E A (sigma_t - nu sigma_r) / E at r = a."""
    a2 = -s / 4
    # unknowns C2, D2, N2: three linear equations at r = a
    m = np.array([
        [-6 * T / A ** 4, -4 * T / A ** 2, -1 / A],  # t sigma_r - N / a = 0 (less the 2 A2 t term)
        [-6 * T / A ** 4, -2 * T / A ** 2, -2 / A],  # t tau - 2 N / a = 0
        [area * (6 / A ** 4 + NU * 6 / A ** 4), area * NU * 4 / A ** 2, -1.0],  # A (s_t - nu s_r) - N = 0
    ])
    rhs = np.array([2 * a2 * T, -2 * a2 * T, -area * (2 * a2 + NU * 2 * a2)])
    c2, d2, n2 = np.linalg.solve(m, rhs)
    th = np.linspace(0.0, math.pi, n)
    t0, r0, f0 = member_equibiaxial(area, s / 2)
    sr = r0 - (2 * a2 + 6 * c2 / A ** 4 + 4 * d2 / A ** 2) * np.cos(2 * th)
    st = t0 + (2 * a2 + 6 * c2 / A ** 4) * np.cos(2 * th)
    tau = (2 * a2 - 6 * c2 / A ** 4 - 2 * d2 / A ** 2) * np.sin(2 * th)
    member = f0 + n2 / area * np.cos(2 * th)
    return th, sr, st, tau, member


def test_exact_member_solution_reduces_to_kirsch():
    # the derivation above with a vanishing member: Kirsch, sigma_t = s (1 - 2 cos 2 theta), free edge
    th, sr, st, tau, _ = member_uniaxial(1e-12)
    assert np.allclose(st, 1 - 2 * np.cos(2 * th), atol=1e-9)
    assert np.allclose(sr, 0.0, atol=1e-9) and np.allclose(tau, 0.0, atol=1e-9)
    # and the neutral member of the equibiaxial case leaves the sheet uniform
    hoop, radial, _ = member_equibiaxial(A * T / (1 - NU))
    assert hoop == pytest.approx(1.0) and radial == pytest.approx(1.0)


# ----- doubler ring -----------------------------------------------------------------------------------------------
@pytest.mark.parametrize("ring_thickness", [1e-6, 1.0, 2.0, 6.0])
def test_ring_equibiaxial_matches_lame(ring_thickness):
    # exact: ring_equibiaxial (Lame, derived above); ring thickness ratio 1 (a vanishing doubler) is Kirsch's 2.0
    s = 100.0
    sol = solve(Ring(width=A, thickness=ring_thickness), [s, s, 0.0])
    hoop_a, hoop_b, radial_b = ring_equibiaxial(1 + ring_thickness / T, 2 * A, s)
    assert sol.cutout.hoop[:, 0] == pytest.approx(np.full(len(sol.cutout.s), hoop_a), rel=TOL)
    assert sol.interior_edge.hoop[:, 0] == pytest.approx(np.full(len(sol.interior_edge.s), hoop_b), rel=TOL)
    assert sol.interior_edge.normal[:, 0] == pytest.approx(np.full(len(sol.interior_edge.s), radial_b), rel=TOL)
    if ring_thickness < 1e-3:
        assert hoop_a == pytest.approx(2 * s, rel=1e-5)  # Kirsch, equibiaxial


def test_ring_evaluation_reports_both_edges_and_the_governing_one():
    # the evaluation's peaks at the two locations equal the Lame values (von Mises = |hoop| at the free edge; at
    # the outer edge von Mises of (radial, hoop)); the governing peak is the larger
    s = 100.0
    res = checked(Cutout(Circle(A), (W / 2, W / 2), 0.0, Ring(width=A, thickness=2.0)), [LoadCase("eq", s, s, 0.0)],
                  panel=Panel(W, W, T), material=Material("al", Isotropic(E, NU)))
    ev, rf = res.evaluation, res.result("reinforcement")
    hoop_a, hoop_b, radial_b = ring_equibiaxial(2.0, 2 * A, s)
    vm_b = math.sqrt(hoop_b ** 2 - hoop_b * radial_b + radial_b ** 2)
    peaks = rf.peak_stress_mpa
    assert peaks[CUTOUT_EDGE] == pytest.approx(hoop_a, rel=TOL)
    assert peaks[RING_EDGE] == pytest.approx(vm_b, rel=TOL)
    assert ev.peak_stress_mpa == pytest.approx(max(hoop_a, vm_b), rel=TOL)
    assert ev.load_cases[0].peak_location == (CUTOUT_EDGE if hoop_a > vm_b else RING_EDGE)
    assert ev.within_target
    assert rf.ring_area_mm2 == pytest.approx(math.pi * (4 - 1) * A * A, rel=1e-4)


# ----- flange as an edge member -----------------------------------------------------------------------------------
@pytest.mark.parametrize("area", [A * T / (1 - NU), 5.0, 40.0])
def test_flange_equibiaxial_matches_lame_and_the_neutral_hole(area):
    # exact: member_equibiaxial; area a t / (1 - nu) is Mansfield's neutral hole (sheet stress uniform, Kt = 1)
    s = 100.0
    sol = solve(Flange(height=area / T), [s, s, 0.0])
    hoop, radial, member = member_equibiaxial(area, s)
    n = len(sol.cutout.s)
    assert sol.cutout.hoop[:, 0] == pytest.approx(np.full(n, hoop), rel=TOL)
    assert sol.cutout.normal[:, 0] == pytest.approx(np.full(n, radial), rel=TOL)
    assert member_stress(sol.cutout, Isotropic(E, NU), E)[:, 0] == pytest.approx(np.full(n, member), rel=TOL)
    if area == pytest.approx(A * T / (1 - NU)):
        vm = sol.cutout.von_mises[:, 0]
        assert vm.max() / s == pytest.approx(1.0, abs=TOL)  # Kt -> 1 (Mansfield 1953)


@pytest.mark.parametrize("area", [4.0, 20.0])
def test_flange_uniaxial_matches_the_airy_solution(area):
    # exact: member_uniaxial (Airy stress function, derived above), pointwise round the edge of the modelled
    # quarter; tolerance TOL of the remote stress
    s = 100.0
    sol = solve(Flange(height=area / T), [s, 0.0, 0.0])
    bs = sol.cutout
    theta = np.arctan2(bs.xy[1] - W / 2, bs.xy[0] - W / 2)
    th, sr, st, tau, member = member_uniaxial(area, s)
    assert bs.hoop[:, 0] == pytest.approx(np.interp(theta, th, st), abs=TOL * s)
    assert bs.normal[:, 0] == pytest.approx(np.interp(theta, th, sr), abs=TOL * s)
    assert member_stress(bs, Isotropic(E, NU), E)[:, 0] == pytest.approx(np.interp(theta, th, member), abs=TOL * s)
    vm_exact = np.sqrt(sr ** 2 - sr * st + st ** 2 + 3 * tau ** 2).max()
    res = checked(Cutout(Circle(A), (W / 2, W / 2), 0.0, Flange(height=area / T)), [LoadCase("x", s, 0.0, 0.0)],
                  panel=Panel(W, W, T), material=Material("al", Isotropic(E, NU)))
    peaks = res.result("reinforcement").peak_stress_mpa
    assert peaks[CUTOUT_EDGE] == pytest.approx(vm_exact, rel=TOL)
    assert peaks[FLANGE] == pytest.approx(np.abs(member).max(), rel=TOL)


def test_vanishing_reinforcement_gives_the_bare_hole_and_a_stiff_member_the_rigid_inclusion():
    # Kirsch 3.0 (uniaxial) with a flange of 1e-6 mm and with a ring of 1e-6 mm thickness; an inextensible member
    # under equibiaxial stress: sigma_r = 2 s / (1 + nu), sigma_t = nu sigma_r at the edge (rigid inclusion)
    s = 100.0
    for r in (Flange(height=1e-6), Ring(width=A, thickness=1e-6)):
        assert solve(r, [s, 0.0, 0.0]).cutout.hoop[:, 0].max() == pytest.approx(3.0 * s, rel=TOL)
    sol = solve(Flange(height=1e6), [s, s, 0.0])
    assert sol.cutout.normal[:, 0].mean() == pytest.approx(2 * s / (1 + NU), rel=TOL)
    assert sol.cutout.hoop[:, 0].mean() == pytest.approx(NU * 2 * s / (1 + NU), rel=TOL)


def test_reduced_and_full_models_agree_with_a_ring():
    # the quarter model's mirror conditions are exact for the ring too: full and quarter within the mesh scatter
    r = Ring(width=6.0, thickness=1.5)
    quarter = solve(r, [100.0, 30.0, 0.0])
    full = solve(r, [100.0, 30.0, 0.0], Region(W, W))
    for a, b in ((quarter.cutout, full.cutout), (quarter.interior_edge, full.interior_edge)):
        assert a.von_mises.max() == pytest.approx(b.von_mises.max(), rel=1e-3)


def test_reinforcement_keys_and_mass_in_the_json():
    mat = Material("al", Isotropic(E, NU), 250.0, 2780.0)
    d = checked(Cutout(Circle(40.0), (200.0, 150.0), 0.0, Flange(height=8.0)), [LoadCase("s", 0, 0, 40.0)],
                panel=Panel(400, 300, 1.6), material=mat).to_dict()
    block = d["reinforcement"]
    assert block["kind"] == "flange" and block["sizes"] == {"height": 8.0, "thickness": 1.6}
    # mass = perimeter x height x thickness x density
    assert block["added_mass_kg"] == pytest.approx(2 * math.pi * 40.0 * 8.0 * 1.6 * 2780e-9, rel=1e-4)
    assert set(block["peak_stress_mpa"]) == {CUTOUT_EDGE, FLANGE}
    assert {c["location"] for c in d["load_cases"][0]["locations"]} == {CUTOUT_EDGE, FLANGE}
    bare = checked(Cutout(Circle(40.0), (200.0, 150.0)), [LoadCase("s", 0, 0, 40.0)], panel=Panel(400, 300, 1.6),
                   material=mat).to_dict()
    assert "reinforcement" not in bare and "locations" not in bare["load_cases"][0]


# ----- stability: the flange as an edge beam, the ring as a thicker plate -----------------------------------------
def _free_top_edge_plate(n: int):
    from skfem import MeshTri1

    from holeshape.plate import plate_basis
    from holeshape.stability import crossed_grid

    p, t = crossed_grid(300.0, 300.0, n, n)
    m = MeshTri1(p, t)
    bnd = m.boundary_facets()
    mid = m.p[:, m.facets[:, bnd]].mean(axis=1)
    chain = np.flatnonzero(np.abs(m.p[1] - 300.0) < 1e-9)
    return plate_basis(p, t), bnd[np.abs(mid[1] - 300.0) > 1e-9], chain[np.argsort(m.p[0, chain])]


def _k(pb, supported, thickness, extra, prestress=(-1.0, 0.0, 0.0)):
    from holeshape.stability import _plate_factors, critical_stress_coefficient

    f = _plate_factors(pb, [np.array(prestress)], Material("al", Isotropic(E, NU)), thickness, supported,
                       "simply_supported", 1, extra=extra)
    return f[0][0][0], critical_stress_coefficient(f[0][0][0], 300.0, thickness, E, NU)


def test_edge_beam_limits_on_a_plate_with_one_free_edge():
    # square plate, three edges simply supported, the fourth free with a beam along it, compressed along the beam:
    # - a beam infinitely stiff in bending holds the edge straight: the simply supported plate, k = 4 (Bryan 1891;
    #   exact); 1 % covers the O(h^2) error of the 24 x 24 mesh (measured 0.26 %);
    # - no beam: below the Rayleigh quotient of the mode w = y sin(pi x / a), k = 6 (1 - nu) / pi^2 + (b / a)^2
    #   (derived from the plate energy; an upper bound by the Rayleigh principle);
    # - a beam alone (the web 100x thinner than a foil) under an end load P: Euler's pin-ended column pi^2 EI / a^2
    #   (exact); 0.5 % covers the second differences at 24 segments (measured 0.14 %)
    from holeshape.plate import edge_beam_matrices

    pb, supported, chain = _free_top_edge_plate(24)
    d = E * T ** 3 / (12 * (1 - NU ** 2))
    stiff = edge_beam_matrices(pb, chain, False, 1e7 * d * 300.0)
    assert _k(pb, supported, T, (stiff[0], [stiff[0] * 0.0]))[1] == pytest.approx(4.0, rel=0.01)
    none = edge_beam_matrices(pb, chain, False, 0.0)
    k_free = _k(pb, supported, T, (none[0], [none[0] * 0.0]))[1]
    assert k_free < 6 * (1 - NU) / math.pi ** 2 + 1.0
    ei = 1e6
    column = edge_beam_matrices(pb, chain, False, ei, [np.full(len(chain) - 1, -1.0)])
    assert _k(pb, supported, 0.01, column, (0.0, 0.0, 0.0))[0] == pytest.approx(math.pi ** 2 * ei / 300.0 ** 2,
                                                                               rel=0.005)


@pytest.fixture(scope="module")
def web_factors():
    """Buckling factors of a 300 x 200 x 1.6 mm web with a 100 mm hole, bare and reinforced (standard level)."""
    from holeshape.stability import buckling
    from holeshape.study import StabilitySettings

    panel, mat = Panel(300.0, 200.0, 1.6), Material("al", Isotropic(E, 0.33))
    cases = (LoadCase("shear", 0.0, 0.0, 20.0), LoadCase("compression", -15.0, 0.0, 0.0))

    def run(r):
        st = buckling(panel, mat, cases, Cutout(Circle(50.0), (150.0, 100.0), 0.0, r), StabilitySettings())
        return [c.load_factor for c in st.cases]

    return {name: run(r) for name, r in {
        "bare": None, "tiny flange": Flange(height=1e-4),
        "tiny ring": Ring(width=15.0, thickness=1e-5),
        "flange 6": Flange(height=6.0), "flange 12": Flange(height=12.0),
        "ring": Ring(width=15.0, thickness=1.6)}.items()}


def test_vanishing_reinforcement_leaves_the_buckling_factor(web_factors):
    # limit: a flange of 0.1 um and a doubler of 10 nm change nothing beyond the mesh scatter of the ring's own
    # mesh (the ring adds an interior line: 0.3 %); the flange keeps the bare mesh (1e-5)
    for a, b in zip(web_factors["tiny flange"], web_factors["bare"]):
        assert a == pytest.approx(b, rel=1e-5)
    for a, b in zip(web_factors["tiny ring"], web_factors["bare"]):
        assert a == pytest.approx(b, rel=3e-3)


def test_reinforcement_stiffens_the_shear_web(web_factors):
    # common practice, no source: flanged or ring-reinforced lightening holes restore a shear web's buckling load;
    # here a check that the model moves the right way, and that a 12 mm flange more than doubles the factor
    bare, f6, f12, ring = (web_factors[k][0] for k in ("bare", "flange 6", "flange 12", "ring"))
    assert bare < f6 < f12 and f12 > 2 * bare
    assert ring > bare
    # in compression the ring (thicker plate) helps; the flange attracts hoop compression and, with only its own
    # bending stiffness counted, can lower the factor: it must not be reported as a gain there without computing it
    assert web_factors["ring"][1] > web_factors["bare"][1]
