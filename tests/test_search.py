"""Shape search: the published harmonic-hole optimum, every constraint binding (checked independently on the
written profile), resume after SIGKILL, two workers, DXF round trip, JSON contract."""

from __future__ import annotations

import json
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import numpy as np
import pytest
from shapely.geometry import Polygon, box

from holeshape.cli import main

HARMONIC = """
title = "harmonic hole check"
[panel]
width = 2000.0
height = 2000.0
thickness = 1.0
[material]
youngs_modulus = 71000.0
poisson_ratio = 0.33
[[load_case]]
name = "biaxial"
sigma_x = 100.0
sigma_y = 50.0
[cutout]
shape = "superellipse"
a = {min = 10.0, max = 40.0}
b = {min = 10.0, max = 40.0}
exponent = {min = 2.0, max = 6.0}
[constraints]
area = 628.3185307179587
[search]
trials = TRIALS
seed = 3
[measure]
stress = "hoop"
"""

RIB = """
title = "rib web test"
[panel]
width = 300.0
height = 200.0
thickness = 1.6
[material]
youngs_modulus = 71000.0
poisson_ratio = 0.33  # no allowable: these tests are about the geometric limits, no margin binds
[[load_case]]
name = "shear and tension"
sigma_x = 60.0
tau_xy = 35.0
[cutout]
shape = "superellipse"
center = [150.0, 100.0]
a = {min = 30.0, max = 110.0}
b = {min = 20.0, max = 80.0}
exponent = {min = 2.0, max = 6.0}
rotation = {min = -40.0, max = 40.0}
[constraints]
CONSTRAINTS
[search]
trials = TRIALS
seed = 11
"""


def write(tmp_path: Path, text: str, name: str = "study.toml", **subs) -> Path:
    for k, v in subs.items():
        text = text.replace(k, str(v))
    p = tmp_path / name
    p.write_text(text)
    return p


def optimise(capsys, study: Path, out: Path, *extra: str) -> dict:
    assert main(["optimise", str(study), "--out", str(out), "--json", "-q", *extra]) == 0
    return json.loads(capsys.readouterr().out)


def profile(out: Path) -> np.ndarray:
    rows = (out / "best.csv").read_text().strip().splitlines()[1:]
    pts = np.array([[float(v) for v in r.split(",")] for r in rows])
    assert np.allclose(pts[0], pts[-1])  # closed
    return pts[:-1]


@pytest.mark.slow
def test_harmonic_hole_optimum(tmp_path, capsys):
    """Same-sign biaxial stress s1 = 100, s2 = 50 MPa: the best hole is the ellipse with a/b = s1/s2 = 2 and a
    uniform hoop stress s1 + s2 = 150 MPa (Bjorkman & Richards, J. Appl. Mech. 43 (1976) 414-418; from memory).
    The circle of the same area gives Kirsch's 2.5 s1 = 250 MPa. Tolerance 1 %: 70 trials reach 0.2 % in the
    benchmark, the fine-level mesh error is under 0.1 %, and the 8000 mm panel adds ~0.01 %; a/b within 5 % (the
    valley is narrow: a/b +-2.5 % costs 2-3 %); exponent within 0.3 of 2."""
    d = optimise(capsys, write(tmp_path, HARMONIC, TRIALS=70), tmp_path / "run")
    best = d["best"]
    assert best["peak_stress_mpa"] == pytest.approx(150.0, rel=0.01)
    p = best["params"]
    assert p["a"] / p["b"] == pytest.approx(2.0, rel=0.05)
    assert p["exponent"] < 2.3
    assert best["area_mm2"] == pytest.approx(628.3185307179587, rel=1e-9)  # the fixed area
    circle = [b for b in d["baselines"] if b["shape"] == "circle"][0]
    assert circle["peak_stress_mpa"] == pytest.approx(250.0, rel=0.005)  # Kirsch (1898): (3 - k) s, k = 0.5
    assert d["trials_completed"] + d["trials_failed"] == 70


@pytest.mark.parametrize("name,constraints", [
    ("access", "access = {width = 150.0, height = 70.0}\nclearance = 3.0"),
    ("ligament", "min_ligament = 45.0\nmin_area = 9000.0"),
    ("radius", "min_radius = 30.0\nmin_area = 6000.0"),
    ("area", "min_area = 14000.0"),
])
@pytest.mark.slow
def test_every_constraint_holds_on_the_written_profile(tmp_path, capsys, name, constraints):
    d = optimise(capsys, write(tmp_path, RIB, TRIALS=24, CONSTRAINTS=constraints), tmp_path / "run")
    assert d["best"]["feasible"] is True
    pts = profile(tmp_path / "run")
    poly = Polygon(pts)
    assert poly.is_valid
    # independent checks on the CSV profile (shapely and numpy only; the profile is within 0.01 mm of the curve)
    if name == "access":
        env = box(150 - 75, 100 - 35, 150 + 75, 100 + 35).buffer(3.0 - 0.02)
        assert poly.contains(env)
    if name == "ligament":
        gaps = [pts[:, 0].min(), pts[:, 1].min(), 300 - pts[:, 0].max(), 200 - pts[:, 1].max()]
        assert min(gaps) >= 45.0 - 0.02
    if name == "radius":
        # circumradius of consecutive vertex triples: a discrete radius of curvature
        a, b, c = pts, np.roll(pts, -1, axis=0), np.roll(pts, -2, axis=0)
        ab, bc, ca = (np.linalg.norm(x - y, axis=1) for x, y in ((a, b), (b, c), (c, a)))
        cross = np.abs((b - a)[:, 0] * (c - a)[:, 1] - (b - a)[:, 1] * (c - a)[:, 0])
        radius = ab * bc * ca / (2 * np.maximum(cross, 1e-300))
        assert radius.min() >= 30.0 * 0.98  # 2 %: three-point radius of a polyline with 0.01 mm chord error
    if name in ("area", "ligament", "radius"):
        need = {"area": 14000.0, "ligament": 9000.0, "radius": 6000.0}[name]
        assert poly.area >= need * (1 - 1e-3)  # inscribed polyline: area a little under the curve's


def test_dxf_round_trip_and_json_contract(tmp_path, capsys):
    import ezdxf

    d = optimise(capsys, write(tmp_path, RIB, TRIALS=12, CONSTRAINTS="min_area = 6000.0"), tmp_path / "run")
    for key in ("best", "baselines", "trials_completed", "trials_infeasible", "trials_failed", "storage"):
        assert key in d
    for key in ("peak_stress_mpa", "kt", "area_mm2", "error_estimate_pct", "params", "shape", "dxf", "feasible"):
        assert key in d["best"]
    doc = ezdxf.readfile(d["best"]["dxf"])
    assert doc.header["$INSUNITS"] == 4  # millimetres
    assert not doc.audit().has_errors
    lines = [e for e in doc.modelspace() if e.dxftype() == "LWPOLYLINE" and e.dxf.layer == "CUTOUT_PROFILE"]
    assert len(lines) == 1 and lines[0].closed
    x, y = np.array([p[:2] for p in lines[0].get_points()]).T
    area = 0.5 * abs(np.sum(x * np.roll(y, -1) - np.roll(x, -1) * y))
    # 0.1 %: a polyline with a chord error of at most 0.01 mm on a ~100 mm outline loses far less area than that
    assert area == pytest.approx(d["best"]["area_mm2"], rel=1e-3)
    for f in ("best.csv", "summary.json", "search_history.png", "best_shape.png", "best_stress_field.png",
              "best_boundary_stress.png"):
        assert (tmp_path / "run" / f).stat().st_size > 0
    assert not list((tmp_path / "run").glob(".*.tmp")) and not list((tmp_path / "run").glob(".best*"))


def _finished_params(journal: Path) -> dict[int, dict]:
    import optuna
    from optuna.storages.journal import JournalFileBackend

    from holeshape.search.runner import finished

    st = optuna.storages.JournalStorage(JournalFileBackend(str(journal)))
    study = optuna.load_study(study_name="holeshape", storage=st)
    return {t.number: dict(t.params) for t in finished(study)}


def kill_after(study: Path, out: Path, count: int) -> dict[int, dict]:
    """Start ``holeshape optimise`` in a process group of its own, SIGKILL it once ``count`` trials have finished
    (or after 120 s) and return the finished trials' parameters as the journal holds them after the kill."""
    cmd = [sys.executable, "-m", "holeshape.cli", "optimise", str(study), "--out", str(out), "-q"]
    proc = subprocess.Popen(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, start_new_session=True,
                            cwd=os.getcwd())
    journal = out / "study.journal"
    deadline = time.time() + 120
    while time.time() < deadline:
        time.sleep(0.3)
        try:
            if len(_finished_params(journal)) >= count:
                break
        except Exception:  # noqa: BLE001 - the journal or the study may not exist yet
            continue
    os.killpg(proc.pid, signal.SIGKILL)
    proc.wait()
    return _finished_params(journal)


def resume_keeps(capsys, study: Path, out: Path, before: dict[int, dict], total: int) -> dict:
    """Resume the killed run: the budget is met exactly and every trial finished before the kill is unchanged."""
    d = optimise(capsys, study, out)
    after = _finished_params(out / "study.journal")
    assert d["trials_completed"] + d["trials_failed"] == total == len(after)
    for number, params in before.items():
        assert after[number] == params
    return d


@pytest.mark.slow
def test_resume_after_sigkill_keeps_every_completed_trial(tmp_path, capsys):
    study = write(tmp_path, RIB, TRIALS=30, CONSTRAINTS="min_area = 6000.0")
    out = tmp_path / "run"
    before = kill_after(study, out, 10)
    assert 10 <= len(before) < 30
    resume_keeps(capsys, study, out, before, 30)


@pytest.mark.slow
def test_two_workers_lose_and_duplicate_nothing(tmp_path, capsys):
    study = write(tmp_path, RIB, TRIALS=24, CONSTRAINTS="min_area = 6000.0")
    d = optimise(capsys, study, tmp_path / "run", "--workers", "2")
    trials = _finished_params(tmp_path / "run" / "study.journal")
    assert len(trials) == 24 == d["trials_completed"] + d["trials_failed"]
    # nothing evaluated twice: the two workers' points are all different designs (their parameter sets differ)
    points = [tuple(round(v, 9) for _, v in sorted(p.items())) for p in trials.values()]
    assert len(set(points)) == len(points)


def test_sqlite_storage_url(tmp_path, capsys):
    study = write(tmp_path, RIB, TRIALS=6, CONSTRAINTS="min_area = 6000.0")
    url = f"sqlite:///{tmp_path / 'shared.db'}"
    d = optimise(capsys, study, tmp_path / "run", "--storage", url)
    assert d["storage"] == url and d["trials_completed"] + d["trials_failed"] == 6
    # the same command again resumes: nothing more to do, the count stays
    d2 = optimise(capsys, study, tmp_path / "run", "--storage", url)
    assert d2["trials_completed"] + d2["trials_failed"] == 6
    assert d2["best"]["peak_stress_mpa"] == pytest.approx(d["best"]["peak_stress_mpa"], rel=1e-12)


def test_impossible_constraints_are_refused_before_any_search(tmp_path, capsys):
    study = write(tmp_path, RIB, TRIALS=6, CONSTRAINTS="access = {width = 280.0, height = 60.0}\nmin_ligament = 25.0")
    assert main(["optimise", str(study), "--out", str(tmp_path / "run")]) == 2
    err = capsys.readouterr().err
    assert "constraints.access" in err and "cannot fit" in err and len(err.strip().splitlines()) == 1
    assert not (tmp_path / "run").exists()


@pytest.mark.slow
def test_trade_off_front(tmp_path, capsys):
    import ezdxf

    study = write(tmp_path, RIB, TRIALS=16, CONSTRAINTS="min_area = 5000.0\nmin_ligament = 20.0")
    d = optimise(capsys, study, tmp_path / "run", "--trade-off")
    front = d["front"]
    assert front, "a front with at least one member"
    areas = [f["area_mm2"] for f in front]
    peaks = [f["peak_stress_mpa"] for f in front]
    assert areas == sorted(areas)
    # on a Pareto front more removed area never comes with a lower peak
    assert all(p1 <= p2 + 1e-9 for p1, p2 in zip(peaks, peaks[1:]))
    for f in front:
        assert not ezdxf.readfile(f["dxf"]).audit().has_errors
    assert (tmp_path / "run" / "trade_off_front.png").stat().st_size > 0
