"""The gradient refinement of free-form outlines: the moved-mesh derivative against a central difference of
independent fine-level evaluations, Kirsch's scale invariance, the 12-radius harmonic-hole search, and the
search contracts (exact budget, probes recorded, resume after a kill, two workers, method errors)."""

from __future__ import annotations

import json
from dataclasses import replace

import numpy as np
import pytest
import tomllib
from test_search import HARMONIC, kill_after, optimise, resume_keeps, write  # noqa: E402  (tests/ is on the path)

from holeshape.cli import main
from holeshape.evaluate import ACCURACY_LEVELS, evaluate
from holeshape.geometry import Cutout
from holeshape.geometry.spline import Spline
from holeshape.mesh import Region, mesh_panel
from holeshape.search.gradient import chosen_method, moved_mesh, sample_stress
from holeshape.study import LoadCase, Measure
from holeshape.studyfile import parse_study

# the harmonic-hole study of test_search.py with the opening drawn free-form: 12 radii, every one searched
FREE = HARMONIC.replace('title = "harmonic hole check"', 'title = "free-form harmonic hole"').replace(
    'shape = "superellipse"\na = {min = 10.0, max = 40.0}\nb = {min = 10.0, max = 40.0}\n'
    'exponent = {min = 2.0, max = 6.0}',
    'shape = "spline"\nsymmetry = "none"\nradii = {min = 6.0, max = 30.0, count = 12}').replace(
    "seed = 3", "seed = 3\nMETHOD")
assert 'shape = "spline"' in FREE and "METHOD" in FREE


def _parse(text: str):
    return parse_study(tomllib.loads(text))


def _study(load=None):
    s = _parse(FREE.replace("TRIALS", "10").replace("METHOD", ""))
    return s if load is None else replace(s, load_cases=(load,))


def _cut(r) -> Cutout:
    return Cutout(Spline(tuple(float(v) for v in r)), (1000.0, 1000.0))


def test_moved_mesh_derivative_matches_a_central_difference_of_remeshed_evaluations():
    # A smooth case: an egg-shaped 12-radius spline (one peak, at theta = 0, clear of the one at 180 degrees)
    # under sigma_y = 100 MPa. d(peak)/d(radii[0]) by the refinement's forward difference over the moved standard
    # mesh (step 0.02 mm), against a central difference of two independent fine-level evaluations, each on its own
    # mesh, at +-0.4 mm. Tolerance 5 %: the fine level's scatter between meshes (0.03 % of 370 MPa, holeshape's
    # measured floor) over the 0.8 mm span is 0.14 MPa/mm against a derivative of ~2 MPa/mm; the central
    # difference's own truncation error is below that (halving the span changes it by less).
    s = _study(LoadCase(name="sigma_y", sigma_x=0.0, sigma_y=100.0))
    th = np.arange(12) * 2 * np.pi / 12
    r0 = 20.0 + 4.0 * np.cos(2 * th) + 1.5 * np.cos(th)
    pm = mesh_panel(2000.0, 2000.0, _cut(r0), Region(2000.0, 2000.0), ACCURACY_LEVELS["standard"].spec)
    _, peak0 = sample_stress(pm, s, _cut(r0))
    r1 = r0.copy()
    r1[0] += 0.02
    _, peak1 = sample_stress(moved_mesh(pm, _cut(r0), _cut(r1), s.panel), s, _cut(r1))
    forward = (peak1 - peak0) / 0.02
    ends = []
    for sign in (1.0, -1.0):
        r2 = r0.copy()
        r2[0] += sign * 0.4
        ends.append(evaluate(s.panel, s.material, s.load_cases, _cut(r2), Measure("hoop", "fine")).peak_stress_mpa)
    central = (ends[0] - ends[1]) / 0.8
    assert central > 1.0  # the check has something to measure
    assert forward == pytest.approx(central, rel=0.05)


def test_moved_mesh_keeps_kirsch_scale_invariance():
    # Kirsch: in a large plate the peak round a hole does not depend on its size. Scaling every radius by 1.001
    # on the moved mesh must change the peak by far less than 0.1 % (tolerance 1 % of the scaling: the panel is
    # 100 radii wide, its finite-width effect on the derivative is ~1e-3).
    s = _study()
    r0 = np.full(12, 20.0)
    pm = mesh_panel(2000.0, 2000.0, _cut(r0), Region(2000.0, 2000.0), ACCURACY_LEVELS["draft"].spec)
    _, p0 = sample_stress(pm, s, _cut(r0))
    _, p1 = sample_stress(moved_mesh(pm, _cut(r0), _cut(r0 * 1.001), s.panel), s, _cut(r0 * 1.001))
    assert p0 == pytest.approx(250.0, rel=0.01)  # Kirsch 3 sigma_x - sigma_y, draft level
    assert abs(p1 / p0 - 1.0) < 1e-5


@pytest.mark.slow
def test_twelve_radius_search_approaches_the_harmonic_hole(tmp_path, capsys):
    # The harmonic hole for sigma_x = 100, sigma_y = 50 MPa is the ellipse a/b = 2 with a uniform hoop stress of
    # 150 MPa (Bjorkman & Richards, harmonic holes). A 12-radius spline cannot draw that ellipse exactly: the
    # spline through it gives 155.8 MPa at the draft level (holeshape check). The refinement must beat that
    # point within 80 evaluations (measured 154.2 MPa at 79; the best 12-radius spline found by any run of
    # benchmarks/search.py is quoted in the README) and stay above the exact optimum.
    study = write(tmp_path, FREE, TRIALS=80, METHOD="")
    assert chosen_method(_parse(study.read_text())) == "gradient"
    d = optimise(capsys, study, tmp_path / "run")
    assert d["trials_completed"] + d["trials_failed"] == 80  # the exact budget, probes included
    assert d["trials_probes"] >= 50
    summary = json.loads((tmp_path / "run" / "summary.json").read_text())
    assert summary["trials_probes"] == d["trials_probes"]
    assert summary["trials_infeasible"] == 0  # probes are not counted as infeasible designs
    peak = d["best"]["peak_stress_mpa"]
    assert 150.0 < peak < 155.8
    radii = np.array(d["best"]["params"]["radii"])
    assert radii.max() / radii.min() == pytest.approx(2.0, rel=0.05)  # the a/b = 2 of the harmonic ellipse
    assert (tmp_path / "run" / "search_outlines.png").stat().st_size > 0


@pytest.mark.slow
def test_gradient_search_resumes_after_a_kill_and_runs_with_two_workers(tmp_path, capsys):
    study = write(tmp_path, FREE, TRIALS=60, METHOD="")
    out = tmp_path / "run"
    before = kill_after(study, out, 20)
    assert 20 <= len(before) < 60
    resume_keeps(capsys, study, out, before, 60)
    d2 = optimise(capsys, write(tmp_path, FREE, name="two.toml", TRIALS=40, METHOD=""), tmp_path / "two",
                  "--workers", "2")
    assert d2["trials_completed"] + d2["trials_failed"] == 40
    assert d2["best"]["peak_stress_mpa"] < 200.0  # well below the circle's 250 (Kirsch)


def test_method_errors_are_one_line(tmp_path, capsys):
    bad = write(tmp_path, FREE, TRIALS=10, METHOD='method = "steepest"')
    assert main(["optimise", str(bad), "--out", str(tmp_path / "a")]) == 2
    err = capsys.readouterr().err.strip()
    assert "search.method" in err and "'steepest'" in err and "gradient" in err and len(err.splitlines()) == 1
    text = FREE.replace('shape = "spline"\nsymmetry = "none"\nradii = {min = 6.0, max = 30.0, count = 12}',
                        'shape = "ellipse"\na = {min = 10.0, max = 30.0}\nb = {min = 10.0, max = 30.0}')
    wrong = write(tmp_path, text, name="ellipse.toml", TRIALS=10, METHOD='method = "gradient"')
    assert main(["optimise", str(wrong), "--out", str(tmp_path / "b")]) == 2
    err = capsys.readouterr().err.strip()
    assert "search.method" in err and "spline" in err and len(err.splitlines()) == 1
    assert not (tmp_path / "b" / "study.journal").exists()
    # few parameters keep the sampler and simplex (measured best there, benchmarks/search.py)
    assert chosen_method(_parse(text.replace("TRIALS", "10").replace("METHOD", ""))) == "sampler_simplex"
