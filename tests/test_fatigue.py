"""Fatigue of the opening's edge against hand calculations from published formulas: Kirsch's local range with
Basquin and Goodman, Peterson's and Neuber's notch sensitivity with a textbook's worked numbers, the rainflow
example of ASTM E1049-85, Palmgren-Miner over two blocks and the reserve factor, Neuber's rule and the elastic limit
of the strain-life curve, and where the hot spot lies under shear and under a cycle between two load states.

The material constants in these tests are invented for the check (the formulas are what is tested); units mm, MPa.
"""

from __future__ import annotations

import json
import math

import numpy as np
import pytest
import tomllib

from holeshape.checkrun import check_design
from holeshape.cli import main
from holeshape.fatigue import (
    Curve,
    Cyclic,
    cycle_damage,
    equivalent_amplitude,
    fatigue_factor,
    masing_history,
    neuber_first,
    neuber_range,
    notch_sensitivity,
    rainflow_cycles,
    reserve_factor,
    strain_life_cycles,
)
from holeshape.studyfile import parse_study

S = 50.0  # MPa remote
SIGMA_F, B, SU = 900.0, -0.2, 480.0  # invented Basquin constants and ultimate strength for the checks
HOLE = 10.0  # mm radius
WIDTH = 2000.0  # mm: d / W = 0.01


def plate(fatigue: str, cases: str = '[[load_case]]\nname = "tension"\nsigma_x = 50.0\n', accuracy: str = "standard",
          extra: str = "") -> str:
    return f"""
title = "fatigue test plate"
[panel]
width = {WIDTH}
height = {WIDTH}
thickness = 2.0
[material]
name = "test alloy"
youngs_modulus = 70000.0
poisson_ratio = 0.33
{cases}
[cutout]
shape = "circle"
center = [{WIDTH / 2}, {WIDTH / 2}]
radius = {HOLE}
[measure]
accuracy = "{accuracy}"
{extra}
{fatigue}
"""


BASQUIN = f"""
[fatigue]
unit = "flight"
required_life = 20000.0
scatter_factor = 3.0
[fatigue.curve]
kind = "basquin"
strength_coefficient = {SIGMA_F}
exponent = {B}
mean_stress = "goodman"
ultimate_strength = {SU}
"""


def check(text: str):
    study = parse_study(tomllib.loads(text), source="test.toml")
    return check_design(study, keep_fields=True)


def heywood_kt(d_over_w: float) -> float:
    """Heywood's finite-width formula on the gross stress: Kt_net = 2 + (1 - d/W)^3 (Heywood, Designing by
    Photoelasticity; Pilkey & Pilkey, Peterson's Stress Concentration Factors)."""
    return (2.0 + (1.0 - d_over_w) ** 3) / (1.0 - d_over_w)


def test_kirsch_range_with_basquin_and_goodman_gives_the_hand_life():
    # Kirsch: the hoop stress at the hole's edge is 3 S under uniaxial S (Timoshenko & Goodier); the plate is 100
    # hole diameters wide (Heywood's correction 3.0003, applied). Goodman: S_ar = S_a / (1 - S_m / S_u); Basquin
    # N = (S_ar / sigma'_f)^(1 / b) / 2 (Dowling). Tolerance 0.5 % on the life: with b = -0.2 and Goodman's
    # amplification of the mean the life goes as the stress to about the 5.9th power, and the standard level's peak
    # is within 0.07 % (about 0.41 % on the life).
    res = check(plate(BASQUIN + """
[[fatigue.block]]
name = "0 to S"
from = "zero"
to = { "tension" = 1.0 }
cycles = 1.0
"""))
    f = res.result("fatigue")
    local = heywood_kt(2 * HOLE / WIDTH) * S
    sa = sm = local / 2
    sar = sa / (1 - sm / SU)
    n_hand = 0.5 * (sar / SIGMA_F) ** (1 / B)
    assert f.life == pytest.approx(n_hand, rel=5e-3)
    assert f.blocks[0].range_mpa == pytest.approx(local, rel=1e-3)
    # the reserve: the factor F on S at which N = required x scatter, solved here by hand with the same formulas
    need = 20000.0 * 3.0

    def life_at(k: float) -> float:
        a = k * local / 2
        return 0.5 * (a / (1 - a / SU) / SIGMA_F) ** (1 / B)

    from scipy.optimize import brentq

    k_hand = brentq(lambda k: math.log(life_at(k) / need), 0.1, 0.999 * 2 * SU / local)  # the mean below S_u
    assert f.reserve_factor == pytest.approx(k_hand, rel=1e-3)  # a stress factor: the peak's 0.07 % and margin
    # the JSON contract
    d = res.to_dict()
    for key in ("fatigue_life", "fatigue_reserve_factor", "fatigue_damage_per_unit"):
        assert key in d
    blk = d["fatigue"]
    assert {"method", "notch", "unit", "required_life", "scatter_factor", "hot_spot", "blocks"} <= set(blk)
    assert set(blk["hot_spot"]) >= {"x_mm", "y_mm", "opening", "radius_mm", "kt", "q", "kf"}
    assert set(blk["blocks"][0]) >= {"name", "cycles_per_unit", "local_max_mpa", "local_min_mpa", "range_mpa",
                                     "mean_mpa", "equivalent_amplitude_mpa", "cycles_to_failure", "damage_per_unit"}
    # the hot spot is the Kirsch peak at the top or bottom of the hole, radius 10 mm
    hs = blk["hot_spot"]
    assert abs(abs(hs["y_mm"] - WIDTH / 2) - HOLE) < 0.01 and abs(hs["x_mm"] - WIDTH / 2) < 0.2
    assert hs["radius_mm"] == pytest.approx(HOLE, rel=1e-4)


def test_no_fatigue_table_no_fatigue_keys():
    res = check(plate(""))
    d = res.to_dict()
    assert not {"fatigue_life", "fatigue_reserve_factor", "fatigue_damage_per_unit", "fatigue"} & set(d)


def test_peterson_and_neuber_match_the_textbook_numbers():
    # Neuber with Shigley's fit for steel (Mechanical Engineering Design, 9th ed., eqs. 6-33 to 6-35):
    # sqrt(rho') = 0.246 - 3.08e-3 S + 1.51e-5 S^2 - 2.67e-8 S^3 (sqrt-in, S = 100 kpsi) = 0.0623 sqrt-in; evaluated
    # from those equations by hand with Kt = 3: r = 0.1 in gives q = 0.835, Kf = 2.671; r = 0.04 in gives q = 0.762,
    # Kf = 2.525 (to 3 figures). The tool takes rho' in mm: the conversion is part of what is checked.
    s_ut = 100.0
    root = 0.246 - 3.08e-3 * s_ut + 1.51e-5 * s_ut ** 2 - 2.67e-8 * s_ut ** 3
    rho_mm = root ** 2 * 25.4
    for r_in, q_ref, kf_ref in ((0.1, 0.835, 2.671), (0.04, 0.762, 2.525)):
        q = float(notch_sensitivity("neuber", rho_mm, np.array(r_in * 25.4)))
        assert q == pytest.approx(q_ref, abs=1e-3)
        assert float(fatigue_factor(np.array(3.0), np.array(q))) == pytest.approx(kf_ref, abs=2e-3)
    # Peterson: q = 1 / (1 + a / r); with a = 0.51 mm for aluminium alloys (from memory, Peterson 1959 via Pilkey &
    # Pilkey ch. 1) and r = 2 mm, q = 1 / (1 + 0.255) = 0.7968
    assert float(notch_sensitivity("peterson", 0.51, np.array(2.0))) == pytest.approx(1 / 1.255, rel=1e-12)
    assert float(notch_sensitivity("none", None, np.array(2.0))) == 1.0


def test_notch_factor_on_one_uniaxial_case_is_kf_times_the_nominal_stress():
    # the textbook use of Kf: the fatigue stress at the notch is Kf S with Kf = 1 + q (Kt - 1) (Peterson); here
    # Kt = 3.0003 (Kirsch with Heywood's width correction), r = 10 mm, Peterson a = 0.51 mm. Tolerance 0.1 %: the
    # standard level's peak (0.07 %).
    res = check(plate(BASQUIN.replace('scatter_factor = 3.0', 'scatter_factor = 3.0\nnotch = "peterson"\n'
                                      'notch_constant = 0.51') + """
[[fatigue.block]]
name = "0 to S"
from = "zero"
to = { "tension" = 1.0 }
cycles = 1.0
"""))
    f = res.result("fatigue")
    q = 1 / (1 + 0.51 / HOLE)
    kf = 1 + q * (heywood_kt(2 * HOLE / WIDTH) - 1)
    assert f.hot_spot.q == pytest.approx(q, rel=1e-3)
    assert f.hot_spot.kf == pytest.approx(kf, rel=1e-3)
    assert f.blocks[0].local_max_mpa == pytest.approx(kf * S, rel=1e-3)


def test_rainflow_counts_the_astm_example():
    # ASTM E1049-85 (reapproved 2017), section 5.4.4 example history: ranges 3 (0.5), 4 (1.5), 6 (0.5), 8 (1.0),
    # 9 (0.5) (from memory; the rainflow package returns exactly these)
    counts: dict[float, float] = {}
    for r, _, c in rainflow_cycles([-2, 1, -3, 5, -1, 3, -4, 4, -2]):
        counts[r] = counts.get(r, 0.0) + c
    assert counts == {3.0: 0.5, 4.0: 1.5, 6.0: 0.5, 8.0: 1.0, 9.0: 0.5}


def test_miner_over_two_blocks_and_the_reserve_factor():
    # Palmgren-Miner: D = sum n_i / N_i over two constant-amplitude blocks (Dowling); the reserve is the factor F on
    # every stress at which D(F) = 1 / (required x scatter): the life at F equals the required to 1e-6
    curve = Curve("basquin", strength_coefficient=900.0, exponent=-0.1, mean_stress="goodman", ultimate_strength=480.0)
    smax, smin, n = np.array([150.0, 90.0]), np.array([0.0, 30.0]), np.array([1.0, 20.0])
    _, nf, d = cycle_damage(curve, smax, smin, n)
    hand = [0.5 * ((a / 2) / (1 - (a / 2 + b) / 480.0) / 900.0) ** (1 / -0.1) for a, b in ((150.0, 0.0), (60.0, 30.0))]
    assert nf == pytest.approx(hand, rel=1e-12)
    assert d.sum() == pytest.approx(1 / hand[0] + 20 / hand[1], rel=1e-12)
    target = 1 / (50000.0 * 2.0)

    def damage_at(f: float) -> float:
        return float(cycle_damage(curve, f * smax, f * smin, n)[2].sum())

    f = reserve_factor(damage_at, target)
    assert f is not None
    assert 1 / damage_at(f) == pytest.approx(50000.0 * 2.0, rel=1e-6)


def test_mean_stress_corrections_by_hand():
    # the equivalent fully reversed amplitude of a cycle 0 -> 200 MPa (S_a = S_m = 100) by each correction (Dowling)
    base = dict(strength_coefficient=900.0, exponent=-0.1, ultimate_strength=500.0, walker_exponent=0.6)
    expect = {"none": 100.0, "goodman": 100.0 / (1 - 100.0 / 500.0), "gerber": 100.0 / (1 - (100.0 / 500.0) ** 2),
              "morrow": 100.0 / (1 - 100.0 / 900.0), "smith_watson_topper": math.sqrt(200.0 * 100.0),
              "walker": 200.0 ** 0.4 * 100.0 ** 0.6}
    for kind, v in expect.items():
        c = Curve("basquin", mean_stress=kind, **base)
        assert float(equivalent_amplitude(c, np.array(200.0), np.array(0.0))) == pytest.approx(v, rel=1e-12)
    # a cycle entirely in compression does no damage (common practice, no source)
    c = Curve("basquin", mean_stress="none", **base)
    assert float(equivalent_amplitude(c, np.array(-10.0), np.array(-200.0))) == 0.0


def test_detail_category_curve():
    # the bilinear range curve steel codes use: N = N_C (dS_C / dS)^m1 above the knee, slope m2 to the cut-off
    # (the form of EN 1993-1-9; the numbers here are invented: 71 MPa at 2e6, m1 = 3, m2 = 5, knee 5e6, cut-off 1e8)
    c = Curve("detail_category", reference_range=71.0, reference_cycles=2e6, slope=3.0, slope_after_knee=5.0,
              knee_cycles=5e6, cutoff_cycles=1e8)
    d_knee = 71.0 * (2e6 / 5e6) ** (1 / 3)
    d_cut = d_knee * (5e6 / 1e8) ** (1 / 5)
    n = c.cycles_to_failure(np.array([100.0, 0.5 * d_knee * 0.9, 0.5 * d_cut * 0.99]))  # amplitudes
    assert n[0] == pytest.approx(2e6 * (71.0 / 200.0) ** 3, rel=1e-12)  # amplitude 100 = range 200
    assert n[1] == pytest.approx(5e6 * (d_knee / (d_knee * 0.9)) ** 5, rel=1e-12)
    assert np.isinf(n[2])


def test_neuber_rule_and_the_elastic_limit_of_strain_life():
    # Neuber's rule: sigma epsilon = (Kt S)^2 / E at first loading, and the doubled curve for a range (Dowling)
    E, cyc = 70000.0, Cyclic(700.0, 0.08)
    se = np.array([300.0, 600.0, -500.0])
    s, e = neuber_first(se, E, cyc)
    assert s * e == pytest.approx(se ** 2 / E, rel=1e-9)
    assert e == pytest.approx(s / E + np.sign(s) * (np.abs(s) / 700.0) ** (1 / 0.08), rel=1e-9)
    ds, de = neuber_range(np.array([900.0]), E, cyc)
    assert ds * de == pytest.approx(900.0 ** 2 / E, rel=1e-9)
    # the strain-life curve with a negligible plastic term and a hard cyclic curve gives Basquin's life
    curve = Curve("basquin", strength_coefficient=900.0, exponent=-0.1, ductility_coefficient=1e-9,
                  ductility_exponent=-0.6, mean_stress="none")
    amp = 150.0
    n = strain_life_cycles(curve, E, np.array([amp / E]), np.array([amp]), np.array([0.0]))
    assert float(n[0]) == pytest.approx(0.5 * (amp / 900.0) ** (1 / -0.1), rel=1e-6)
    # Masing with memory: a large loop interrupted by a small one closes both (two cycles for the history
    # 0 -> 400 -> -400 -> 100 -> -100 -> 400 repeated: the small 200 MPa loop and the large 800 MPa one)
    cycles = masing_history(np.array([400.0, -400.0, 100.0, -100.0, 400.0]), E, Cyclic(700.0, 0.08))
    ranges = sorted(round(c.stress_max - c.stress_min, 3) for c in cycles)
    big = float(neuber_range(np.array([800.0]), E, Cyclic(700.0, 0.08))[0][0])
    small = float(neuber_range(np.array([200.0]), E, Cyclic(700.0, 0.08))[0][0])
    assert ranges == pytest.approx(sorted([round(small, 3), round(big, 3)]), rel=1e-6)


def test_pure_shear_puts_the_hot_spot_at_45_degrees():
    # under shear tau the hoop stress at a circle is -4 tau sin 2 theta (Kirsch): tensile peaks at 135 and 315 deg
    res = check(plate(BASQUIN + """
[[fatigue.block]]
name = "0 to shear"
from = "zero"
to = { "shear" = 1.0 }
cycles = 1.0
""", cases='[[load_case]]\nname = "shear"\ntau_xy = 40.0\n'))
    h = res.result("fatigue").hot_spot
    ang = math.degrees(math.atan2(h.y_mm - WIDTH / 2, h.x_mm - WIDTH / 2)) % 180.0
    assert ang == pytest.approx(135.0, abs=1.0)  # the boundary samples lie about 0.4 deg apart


def test_a_cycle_between_two_states_damages_where_its_range_is_largest():
    # between sigma_x = S and shear tau = S the hoop range at a circle is S |1 - 2 cos 2t + 4 sin 2t| (Kirsch),
    # largest (1 + sqrt 20) at 2t = 180 - atan(2) deg, t = 58.28 deg: neither static peak (90 deg for tension, 45 or
    # 135 deg for shear). No mean-stress correction, so the damage follows the range.
    text = plate(BASQUIN.replace('mean_stress = "goodman"', 'mean_stress = "none"').replace(
        f"ultimate_strength = {SU}", "") + """
[[fatigue.block]]
name = "tension to shear"
from = { "tension" = 1.0 }
to = { "shear" = 1.0 }
cycles = 1.0
""", cases='[[load_case]]\nname = "tension"\nsigma_x = 50.0\n[[load_case]]\nname = "shear"\ntau_xy = 50.0\n')
    f = check(text).result("fatigue")
    h = f.hot_spot
    ang = math.degrees(math.atan2(h.y_mm - WIDTH / 2, h.x_mm - WIDTH / 2)) % 180.0
    expect = 0.5 * (180.0 - math.degrees(math.atan(2.0)))
    assert ang == pytest.approx(expect, abs=1.0)
    # the range at the hot spot: the two cases' peaks are each within 0.07 % (standard level) and the sampled point
    # lies within 0.4 deg of the true maximum, where the range is flat to 1e-4: 0.2 % covers both
    assert f.blocks[0].range_mpa == pytest.approx(S * (1 + math.sqrt(20.0)), rel=2e-3)


def test_a_compressive_spectrum_does_no_damage_and_says_why():
    res = check(plate(BASQUIN + """
[[fatigue.block]]
name = "crush"
from = "zero"
to = { "crush" = 1.0 }
cycles = 10.0
""", cases='[[load_case]]\nname = "crush"\nsigma_x = -50.0\nsigma_y = -50.0\n'))
    f = res.result("fatigue")
    assert f.damage_per_unit == 0.0 and f.life is None and f.reserve_factor is None
    assert any("no cycle of the spectrum is tensile" in w for w in res.warnings)


def test_a_sequence_is_rainflow_counted_like_the_same_blocks(tmp_path):
    # a sequence 0, S, 0, S/2, 0 per flight counted as a closed loop holds one cycle 0 -> S and one 0 -> S/2: the
    # same damage as those two blocks (Palmgren-Miner with ASTM E1049-85 counting). Tolerance 1e-9: the same stresses.
    blocks = check(plate(BASQUIN + """
[[fatigue.block]]
from = "zero"
to = { "tension" = 1.0 }
cycles = 1.0
[[fatigue.block]]
from = "zero"
to = { "tension" = 0.5 }
cycles = 1.0
""")).result("fatigue")
    (tmp_path / "seq.csv").write_text("tension\n0\n1.0\n0\n0.5\n0\n")
    text = plate(BASQUIN.replace("[fatigue.curve]", 'sequence = "seq.csv"\n[fatigue.curve]'))
    seq = parse_study(tomllib.loads(text), source=str(tmp_path / "s.toml"))
    f = check_design(seq, keep_fields=True).result("fatigue")
    assert f.damage_per_unit == pytest.approx(blocks.damage_per_unit, rel=1e-9)


@pytest.mark.parametrize("change, words", [
    (('to = { "tension" = 1.0 }', 'to = { "tensoin" = 1.0 }'), "fatigue.block[0].to names load case 'tensoin'"),
    (("cycles = 1.0", "cycles = -3.0"), "fatigue.block[0].cycles must be > 0"),
    (("exponent = -0.2", "exponent = 0.1"), "fatigue.curve.exponent must lie strictly between -1 and 0, got 0.1"),
    (('ultimate_strength = 480.0', ''), 'fatigue.curve.ultimate_strength is missing: give the ultimate strength'),
    (('mean_stress = "goodman"', 'mean_stress = "morrow"', 'ultimate_strength = 480.0', '',
      'unit = "flight"', 'unit = "flight"\nmethod = "strain_life"'),
     "fatigue.curve.ductility_coefficient is missing"),
    (('kind = "basquin"', 'kind = "detail_category"\nreference_range = 71.0', 'strength_coefficient = 900.0', '',
      'exponent = -0.2', '', 'mean_stress = "goodman"', 'mean_stress = "none"', 'ultimate_strength = 480.0', ''),
     "fatigue.curve.slope is missing"),
    (('mean_stress = "goodman"', 'mean_stress = "none"'), "fatigue.curve.ultimate_strength = 480.0 is not used"),
    (('cycles = 1.0', 'cycles = 1.0\n[[fatigue.block]]\nfrom = "zero"\nto = "zero"\ncycles = 5.0'),
     "fatigue.block[1] runs from a state to the same state"),
    (('to = { "tension" = 1.0 }', 'to = { "tension" = "1.0" }'), 'fatigue.block[0].to."tension" must be a finite'),
    (('scatter_factor = 3.0', 'scatter_factor = 0.5'), "fatigue.scatter_factor must be >= 1"),
    (('unit = "flight"\n', ''), "fatigue.unit is missing"),
    (('unit = "flight"', 'unit = "flight"\nlife = 3'), "fatigue.life is not a known key"),
    (('[fatigue.curve]', 'sequence = []\n[fatigue.curve]'), "fatigue.sequence must be a list"),
])
def test_bad_fatigue_input_is_one_line_naming_the_field(tmp_path, capsys, change, words):
    text = plate(BASQUIN + '[[fatigue.block]]\nfrom = "zero"\nto = { "tension" = 1.0 }\ncycles = 1.0\n')
    for old, new in zip(change[::2], change[1::2]):
        assert old in text
        text = text.replace(old, new, 1)
    path = tmp_path / "bad.toml"
    path.write_text(text)
    out = tmp_path / "out"
    assert main(["check", str(path), "--plots", str(out)]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and words in err[0], err
    assert not out.exists()


def test_strain_life_needs_the_cyclic_curve(tmp_path, capsys):
    text = plate(BASQUIN.replace('unit = "flight"', 'unit = "flight"\nmethod = "strain_life"').replace(
        'mean_stress = "goodman"', 'mean_stress = "morrow"\nductility_coefficient = 0.3\nductility_exponent = -0.6')
        .replace(f"ultimate_strength = {SU}", "")
        + '[[fatigue.block]]\nfrom = "zero"\nto = { "tension" = 1.0 }\ncycles = 1.0\n')
    path = tmp_path / "s.toml"
    path.write_text(text)
    assert main(["check", str(path)]) == 2
    assert "needs [fatigue.cyclic]" in capsys.readouterr().err
    path.write_text(text.replace("[fatigue.curve]", "[fatigue.cyclic]\nstrength_coefficient = 700.0\n"
                                 "hardening_exponent = 0.08\n[fatigue.curve]"))
    assert main(["check", str(path), "--json"]) == 0
    d = json.loads(capsys.readouterr().out)
    assert d["fatigue"]["method"] == "strain_life" and d["fatigue_life"] > 0


def test_a_fatigue_constraint_without_the_table_is_refused(tmp_path, capsys):
    path = tmp_path / "s.toml"
    path.write_text(plate("", extra="[constraints]\nmin_fatigue_reserve = 1.2\n"))
    assert main(["check", str(path)]) == 2
    assert "constraints.min_fatigue_reserve = 1.2 needs a [fatigue] table" in capsys.readouterr().err


SEARCH = """
title = "fatigue search test"
[panel]
width = 300.0
height = 200.0
thickness = 2.0
[material]
name = "test alloy"
youngs_modulus = 70000.0
poisson_ratio = 0.33
allowable_stress = 400.0
[[load_case]]
name = "steady"
sigma_x = 30.0
tau_xy = 10.0
[[load_case]]
name = "cyclic"
sigma_x = 15.0
[cutout]
shape = "ellipse"
center = [150.0, 100.0]
a = {min = 15.0, max = 90.0, value = 40.0}
b = {min = 15.0, max = 60.0, value = 30.0}
[constraints]
min_ligament = 20.0
min_fatigue_reserve = 1.0
[search]
goal = "GOAL"
trials = 10
seed = 2
[fatigue]
unit = "hour"
required_life = 20000.0
scatter_factor = 2.0
[fatigue.curve]
kind = "basquin"
strength_coefficient = 600.0
exponent = -0.1
mean_stress = "goodman"
ultimate_strength = 500.0
[[fatigue.block]]
name = "duty"
from = { "steady" = 1.0, "cyclic" = -1.0 }
to = { "steady" = 1.0, "cyclic" = 1.0 }
cycles = 100.0
"""


@pytest.mark.slow
@pytest.mark.parametrize("goal", ["largest_opening", "longest_life"])
def test_the_search_answer_meets_the_fatigue_requirement_at_the_fine_level(tmp_path, capsys, goal):
    # the fatigue reserve is a constraint of every trial and a requirement of the answer at the fine level; the
    # largest opening stops on it (no static limit comes close: allowable 400 MPa), the longest life maximises it
    path = tmp_path / "s.toml"
    path.write_text(SEARCH.replace("GOAL", goal))
    out = tmp_path / "run"
    code = main(["optimise", str(path), "--out", str(out), "--quiet"])
    assert code == 0, capsys.readouterr().err
    s = json.loads((out / "summary.json").read_text())
    best = s["best"]
    assert best["meets_every_requirement"] and best["fatigue_reserve_factor"] >= 1.0
    assert {"fatigue_life", "fatigue_damage_per_unit"} <= set(best)
    assert best["assessments"]["fatigue"]["hot_spot"]["kt"] > 1.0
    assert any(r["name"] == "fatigue_reserve" for r in best["requirements"])
    assert (out / "best_fatigue.png").exists()
    report = (out / "report.html").read_text()
    assert "Fatigue" in report and "Safe-life" in report
    if goal == "largest_opening":
        assert best["area_mm2"] > math.pi * 40.0 * 30.0  # it grew from the study's design, as far as the reserve let it


def _blocks(*rows: tuple[str, str, float]) -> str:
    return "".join(f'[[fatigue.block]]\nfrom = {a}\nto = {b}\ncycles = {n}\n' for a, b, n in rows)


def test_check_json_is_strict_json_with_a_counted_sequence(tmp_path, capsys):
    # JSON has no NaN or Infinity (RFC 8259): a sequence with more than 20 distinct cycles at the hot spot merges the
    # rest into one row, whose mean is undefined
    rng = np.random.default_rng(3)
    (tmp_path / "seq.csv").write_text("tension\n" + "\n".join(f"{x:.3f}" for x in rng.uniform(0, 1, 300)) + "\n")
    path = tmp_path / "s.toml"
    path.write_text(plate(BASQUIN.replace("[fatigue.curve]", 'sequence = "seq.csv"\n[fatigue.curve]')))
    assert main(["check", str(path), "--json"]) == 0
    out = capsys.readouterr().out

    def refuse(name):
        raise AssertionError(f"{name} in the JSON")

    d = json.loads(out, parse_constant=refuse)
    assert len(d["fatigue"]["blocks"]) == 21 and d["fatigue"]["blocks"][-1]["mean_mpa"] is None


def test_a_sequence_with_the_ground_air_ground_cycle_counts_it_whole():
    # rainflow (ASTM E1049-85) of the flight ground, peak, trough, peak, ground counts one cycle from the ground to the
    # peak and one peak-trough cycle: the same damage as those two blocks (Palmgren-Miner); the blocks "ground to
    # 1g" and "gusts about 1g" would miss the larger ground-to-peak range. Tolerance 1e-9: the same stresses.
    cases = ('[[load_case]]\nname = "steady"\nsigma_x = 30.0\n[[load_case]]\nname = "gust"\nsigma_x = 10.0\n'
             '[[load_case]]\nname = "ground"\nsigma_x = -8.0\n')
    fat = BASQUIN
    seq = fat.replace("[fatigue.curve]", 'sequence = [{ "ground" = 1.0 }, { "steady" = 1.0, "gust" = 1.0 },'
                      ' { "steady" = 1.0, "gust" = -1.0 }, { "steady" = 1.0, "gust" = 1.0 }, { "ground" = 1.0 }]\n'
                      "[fatigue.curve]")
    a = check(plate(seq, cases=cases)).result("fatigue")
    b = check(plate(fat + _blocks(('{ "ground" = 1.0 }', '{ "steady" = 1.0, "gust" = 1.0 }', 1.0),
                                  ('{ "steady" = 1.0, "gust" = -1.0 }', '{ "steady" = 1.0, "gust" = 1.0 }', 1.0)),
                    cases=cases)).result("fatigue")
    assert a.damage_per_unit == pytest.approx(b.damage_per_unit, rel=1e-9)
    naive = check(plate(fat + _blocks(('{ "ground" = 1.0 }', '{ "steady" = 1.0 }', 1.0),
                                      ('{ "steady" = 1.0, "gust" = -1.0 }', '{ "steady" = 1.0, "gust" = 1.0 }', 1.0)),
                        cases=cases)).result("fatigue")
    assert naive.damage_per_unit < 0.8 * b.damage_per_unit


def test_a_sequence_finds_the_hot_spot_of_many_small_cycles():
    # one cycle 0 -> tension and 300 shear cycles per unit: the shear cycles dominate the damage at 135 deg (Kirsch:
    # hoop -4 tau sin 2t), not the tension peak at 90 deg; counted as a sequence the tool must find what the same
    # loading in blocks gives (a sequence is only counted at screened points: this checks the screening).
    # Tolerance 1 %: the blocks count each shear cycle about the tension-free state exactly as the sequence does.
    cases = '[[load_case]]\nname = "tension"\nsigma_x = 50.0\n[[load_case]]\nname = "shear"\ntau_xy = 25.0\n'
    states = ['{ "tension" = 1.0 }', '"zero"'] + ['{ "shear" = 1.0 }', '"zero"'] * 300
    seq = BASQUIN.replace("[fatigue.curve]", f"sequence = [{', '.join(states)}]\n[fatigue.curve]")
    a = check(plate(seq, cases=cases)).result("fatigue")
    b = check(plate(BASQUIN + _blocks(('"zero"', '{ "tension" = 1.0 }', 1.0), ('"zero"', '{ "shear" = 1.0 }', 300.0)),
                    cases=cases)).result("fatigue")
    ang = math.degrees(math.atan2(a.hot_spot.y_mm - WIDTH / 2, a.hot_spot.x_mm - WIDTH / 2)) % 180.0
    assert ang == pytest.approx(135.0, abs=2.0)
    assert a.damage_per_unit == pytest.approx(b.damage_per_unit, rel=1e-2)
    assert a.reserve_factor == pytest.approx(b.reserve_factor, rel=1e-2)


def test_strain_life_through_the_pipeline_matches_a_hand_neuber_solution():
    # Kirsch's 3 S (Heywood-corrected) at the edge, zero to S: Neuber's rule at first loading on the cyclic curve
    # (sigma epsilon = sigma_e^2 / E, epsilon = sigma / E + (sigma / K')^(1/n')), the range on Masing's doubled curve,
    # Morrow's strain-life equation for N (Dowling); solved here with scipy's brentq, independently of the tool's
    # solvers. Tolerance 1 %: the standard level's peak (0.07 %) moves the life about ten times faster here.
    from scipy.optimize import brentq

    E, K, n = 70000.0, 700.0, 0.08
    sf, b, ef, c = 900.0, -0.1, 0.3, -0.6
    fat = f"""
[fatigue]
unit = "cycle"
required_life = 1.0e5
method = "strain_life"
[fatigue.cyclic]
strength_coefficient = {K}
hardening_exponent = {n}
[fatigue.curve]
kind = "basquin"
strength_coefficient = {sf}
exponent = {b}
ductility_coefficient = {ef}
ductility_exponent = {c}
mean_stress = "morrow"
""" + _blocks(('"zero"', '{ "tension" = 1.0 }', 1.0))
    S = 120.0
    f = check(plate(fat, cases=f'[[load_case]]\nname = "tension"\nsigma_x = {S}\n')).result("fatigue")
    se = heywood_kt(2 * HOLE / WIDTH) * S
    s1 = brentq(lambda s: s * (s / E + (s / K) ** (1 / n)) - se * se / E, 1e-6, se)
    ds = brentq(lambda d: d * (d / E + 2 * (d / (2 * K)) ** (1 / n)) - se * se / E, 1e-6, se)
    de = ds / E + 2 * (ds / (2 * K)) ** (1 / n)
    sm = s1 - ds / 2
    n_hand = 0.5 * 10 ** brentq(lambda x: (sf - sm) / E * (10 ** x) ** b + ef * (10 ** x) ** c - de / 2, 0, 25)
    assert f.blocks[0].local_max_mpa == pytest.approx(s1, rel=2e-3)
    assert f.blocks[0].local_min_mpa == pytest.approx(s1 - ds, abs=0.5)
    assert f.life == pytest.approx(n_hand, rel=1e-2)
    # the loop's product holds: (max - min) x strain range = (elastic range)^2 / E, Neuber on the doubled curve
    assert ds * de == pytest.approx(se * se / E, rel=1e-9)


def test_an_endurance_limit_gives_no_damage_and_a_finite_reserve():
    # below the endurance limit a cycle does no damage; the reserve is the factor that lifts the hot spot's
    # equivalent amplitude to the endurance limit, where the damage jumps past the target (Goodman, by hand)
    fat = BASQUIN.replace("ultimate_strength = 480.0", "ultimate_strength = 480.0\nendurance_limit = 120.0")
    f = check(plate(fat + _blocks(('"zero"', '{ "tension" = 1.0 }', 1.0)))).result("fatigue")
    assert f.damage_per_unit == 0.0 and f.life is None
    local = heywood_kt(2 * HOLE / WIDTH) * S
    # S_ar(F) = (F local / 2) / (1 - F local / (2 S_u)) = 120  =>  F = 240 / (local (1 + 240 / (2 S_u)))... by hand:
    k = 120.0 / (local / 2 * (1 + 120.0 / SU))
    assert f.reserve_factor == pytest.approx(k, rel=2e-3)  # the peak's 0.07 % and the root finder's step


def test_min_fatigue_life_is_a_requirement():
    fat = BASQUIN + _blocks(('"zero"', '{ "tension" = 1.0 }', 1.0))
    res = check(plate(fat, extra="[constraints]\nmin_fatigue_life = 1.0e12\n"))
    row = next(r for r in res.assessment.requirements if r.name == "fatigue_life")
    assert not row.met and row.value == pytest.approx(res.result("fatigue").life / 3.0)


def test_the_notch_rule_does_not_depend_on_the_static_stress_measure():
    # the fatigue stress is the tangential stress whatever [measure] says; Kt for the notch rule is on the remote
    # largest principal stress (pure shear: Kt = 4 at a circle, Kirsch)
    fat = (BASQUIN.replace('scatter_factor = 3.0', 'scatter_factor = 3.0\nnotch = "peterson"\nnotch_constant = 2.0')
           + _blocks(('"zero"', '{ "shear" = 1.0 }', 1.0)))
    cases = '[[load_case]]\nname = "shear"\ntau_xy = 40.0\n'
    a = check(plate(fat, cases=cases)).result("fatigue")
    b = check(plate(fat, cases=cases).replace('accuracy = "standard"', 'accuracy = "standard"\nstress = "hoop"'))
    b = b.result("fatigue")
    assert a.reserve_factor == pytest.approx(b.reserve_factor, rel=1e-9)
    assert a.hot_spot.kt == pytest.approx(4.0, rel=2e-3)  # Kirsch 4 tau; the 0.07 % peak and the width's 0.03 %


def test_a_row_and_a_ring_are_assessed_on_every_edge_of_the_web():
    fat = BASQUIN + _blocks(('"zero"', '{ "tension" = 1.0 }', 1.0))
    row = plate(fat, cases='[[load_case]]\nname = "tension"\nsigma_y = 50.0\n').replace(
        f"radius = {HOLE}", f"radius = {HOLE}\ncount = 3\npitch = 60.0")
    f = check(row).result("fatigue")
    assert f.hot_spot.opening.startswith("opening ")
    # a ring: the cutout edge and the web at the ring's outer edge (critical planes) are both read; the hot spot's
    # Kt is reported only on a free edge
    ring = plate(fat) + '\n[reinforcement]\nkind = "ring"\nwidth = 8.0\nthickness = 2.0\n'
    g = check(ring).result("fatigue")
    assert g.hot_spot.opening in ("cutout edge", "web at the ring's outer edge") or "ring" in g.hot_spot.opening
    assert (g.hot_spot.kt is None) == (g.hot_spot.plane_deg is not None)
    # the ring lowers the edge's stress, so the reserve rises against the bare hole's
    bare = check(plate(fat)).result("fatigue")
    assert g.reserve_factor > bare.reserve_factor


def test_masing_memory_carries_the_large_loop_through_a_small_one():
    # Masing's rule with memory (Dowling): in 400 -> -400 -> 100 -> -100 -> 400 the branch from -400 to 100 is the
    # doubled curve from -400's local stress, the small loop 100 -> -100 hangs on it, and after it closes the branch
    # goes on from -400 as if it had not happened. Each branch by Neuber's rule on the doubled curve (neuber_range,
    # itself checked above against its defining products); tolerance 1e-9: the same arithmetic.
    E, c = 70000.0, Cyclic(700.0, 0.08)

    def dsig(d):
        return float(neuber_range(np.array([d]), E, c)[0][0])

    s0 = float(neuber_first(np.array([400.0]), E, c)[0][0])
    s1 = s0 - dsig(800.0)
    s2 = s1 + dsig(500.0)
    s3 = s2 - dsig(200.0)
    cycles = sorted(masing_history(np.array([400.0, -400.0, 100.0, -100.0, 400.0]), E, c),
                    key=lambda x: x.stress_max - x.stress_min)
    assert cycles[0].stress_max == pytest.approx(s2, rel=1e-9)
    assert cycles[0].stress_min == pytest.approx(s3, rel=1e-9)
    assert cycles[1].stress_max == pytest.approx(s0, rel=1e-9)
    assert cycles[1].stress_min == pytest.approx(s1, rel=1e-9)
    # Masing: the doubled curve is the first-loading curve scaled by two, d_sigma(d_e) = 2 sigma(d_e / 2)
    assert dsig(800.0) == pytest.approx(2 * float(neuber_first(np.array([400.0]), E, c)[0][0]), rel=1e-9)


def test_a_detail_category_on_the_kirsch_range_by_hand():
    # the local range at the edge is 3 S (Kirsch, Heywood-corrected); on a detail category of 100 MPa at 2e6 cycles
    # with m1 = 3 above the knee (the bilinear form of EN 1993-1-9; the numbers invented) N = 2e6 (100 / (3 S))^3.
    # Tolerance 0.3 %: the life goes as the stress cubed and the standard level's peak is within 0.07 %.
    fat = """
[fatigue]
unit = "cycle"
required_life = 1.0e5
[fatigue.curve]
kind = "detail_category"
reference_range = 100.0
slope = 3.0
slope_after_knee = 5.0
knee_cycles = 5.0e6
cutoff_cycles = 1.0e8
""" + _blocks(('"zero"', '{ "tension" = 1.0 }', 1.0))
    f = check(plate(fat)).result("fatigue")
    dr = heywood_kt(2 * HOLE / WIDTH) * S
    assert f.life == pytest.approx(2e6 * (100.0 / dr) ** 3, rel=3e-3)


def test_the_stress_gradient_rule_on_kirsch():
    # Kirsch: at the peak of a circle of radius a under uniaxial S, d sigma_theta / dr = -7 S / a, so the relative
    # gradient is chi* = 7 / (3 a) (from sigma_theta = S / 2 (2 + a^2 / r^2 + 3 a^4 / r^4) at theta = 90 deg); the
    # support factor n = 1 + sqrt(rho* chi*) (Siebel & Stieler, from memory) gives Kf = Kt / n, and for one uniaxial
    # case the fatigue stress at the peak is Kf S. Tolerance 1 % on chi* (a cubic fitted over two element sizes along
    # the normal: measured within 0.6 % at standard and fine) and 0.2 % on Kf (n moves as the square root of chi*).
    rho = 0.1
    res = check(plate(BASQUIN.replace('scatter_factor = 3.0', 'scatter_factor = 3.0\nnotch = "stress_gradient"\n'
                                      f'notch_constant = {rho}') + _blocks(('"zero"', '{ "tension" = 1.0 }', 1.0))))
    h = res.result("fatigue").hot_spot
    assert h.relative_gradient_per_mm == pytest.approx(7.0 / (3.0 * HOLE), rel=1e-2)
    kt = heywood_kt(2 * HOLE / WIDTH)
    n = 1.0 + math.sqrt(rho * 7.0 / (3.0 * HOLE))
    assert h.kf == pytest.approx(kt / n, rel=2e-3)
    assert res.result("fatigue").blocks[0].local_max_mpa == pytest.approx(kt / n * S, rel=2e-3)
