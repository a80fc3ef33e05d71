"""The check command: JSON contract, plots, cautions, and one-line errors with exit code 2 for bad input."""

import json
import re
from pathlib import Path

import pytest

from holeshape.cli import main

ROOT = Path(__file__).resolve().parents[1]
STUDY = ROOT / "tests" / "data" / "check-fixture.toml"  # numbers only, plane stress


def test_json_contract(capsys):
    assert main(["check", str(STUDY), "--json", "--accuracy", "draft"]) == 0
    d = json.loads(capsys.readouterr().out)
    for key, typ in [("peak_stress_mpa", float), ("kt", float), ("kt_reference", str), ("error_estimate_pct", float),
                     ("area_mm2", float), ("dofs", int), ("elapsed_s", float), ("load_cases", list)]:
        assert isinstance(d[key], typ), key
    assert d["margin_of_safety"] == pytest.approx(280.0 / d["peak_stress_mpa"] - 1, rel=1e-12)
    assert [c["name"] for c in d["load_cases"]] == ["shear and chordwise tension", "chordwise compression"]
    for c in d["load_cases"]:
        assert {"name", "peak_stress_mpa", "kt", "x_mm", "y_mm"} <= set(c)
    assert d["peak_stress_mpa"] == max(c["peak_stress_mpa"] for c in d["load_cases"])
    # superellipse area 4ab Gamma(1 + 1/n)^2 / Gamma(1 + 2/n), n = 4 (closed form)
    assert d["area_mm2"] == pytest.approx(3.708149354602744 * 60 * 40, rel=1e-9)
    # net-section stress across the 60 mm ligament under sx = -80: -80 x 200 / 120 (statics), 0.5 %
    assert d["load_cases"][1]["net_section_stress_mpa"] == pytest.approx(-80 * 200 / 120, rel=5e-3)
    assert "qualified engineer" in d["cautions"]


def test_human_output_and_plots(tmp_path, capsys):
    assert main(["check", str(STUDY), "--plots", str(tmp_path), "--accuracy", "draft"]) == 0
    out = capsys.readouterr().out
    assert "CAUTION" in out and "plane-stress" in out and "buckling" in out and "qualified engineer" in out
    assert "margin" in out
    for name in ("stress_field.png", "boundary_stress.png", "mesh_near_cutout.png"):
        f = tmp_path / name
        assert f.stat().st_size > 10_000 and f.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


BASE = STUDY.read_text()


def _variant(tmp_path, old, new):
    assert old in BASE, old
    p = tmp_path / "bad.toml"
    p.write_text(BASE.replace(old, new))
    return p


BAD = [
    ("width = 300.0", "width = -300.0", r"panel\.width must be > 0, got -300\.0"),
    ("width = 300.0", "width = \"wide\"", r"panel\.width must be a number, got 'wide'"),
    ("height = 200.0 ", "", r"panel\.height is missing"),
    ("poisson_ratio = 0.33", "poisson_ratio = 0.5", r"material\.poisson_ratio must lie strictly between -1 and 0\.5"),
    ("poisson_ratio = 0.33", "poisson_ratio = -1.2", r"poisson_ratio.*got -1\.2"),
    ("youngs_modulus = 71000.0", "youngs_modulus = 0.0", r"material\.youngs_modulus must be > 0, got 0\.0"),
    ("shape = \"superellipse\"", "shape = \"hexagon\"", r"cutout\.shape must be one of .*got 'hexagon'"),
    ("exponent = 4.0", "exponant = 4.0", r"cutout\.exponant is not a known key \(did you mean 'exponent'\?\)"),
    ("center = [150.0, 100.0]", "center = [30.0, 100.0]", r"across the left panel edge"),
    ("center = [150.0, 100.0]", "center = [500.0, 100.0]", r"outside or across the right panel edge"),
    ("a = 60.0 ", "a = 0.0 ", r"cutout\.a must be > 0, got 0\.0"),
    ("edges = \"traction\"", "edges = \"clamped\"", r"panel\.edges must be one of traction, displacement"),
    ("stress = \"von_mises\"", "stress = \"tresca\"", r"measure\.stress must be one of"),
    ("sigma_x = -80.0", "sigma_x = nan", r"load_case\[1\]\.sigma_x must be finite, got nan"),
    ("[cutout]\nshape = \"superellipse\"", "[cutout]\nshape = \"spline\"\nradii = [40.0, 40.0, 4.0, 4.0, 40.0, 40.0,"
     " 40.0, 40.0]", r"cutout\.a is not a known key"),
    ("[measure]", "[[stability]]\nedge_support = \"clamped\"\n[measure]",
     r"stability must be one table, written \[stability\], got \[\[stability\]\]"),
]


@pytest.mark.parametrize("old,new,message", BAD, ids=[b[2][:40] for b in BAD])
def test_bad_input_is_one_line_exit_2(tmp_path, capsys, old, new, message):
    path = _variant(tmp_path, old, new)
    assert main(["check", str(path)]) == 2
    cap = capsys.readouterr()
    lines = cap.err.strip().splitlines()
    assert len(lines) == 1, cap.err
    assert "Traceback" not in cap.err
    assert re.search(message, lines[0]), lines[0]
    assert cap.out == ""


def test_a_modulus_given_in_gpa_is_flagged_in_every_output(tmp_path, capsys):
    # 70 "MPa" is an aluminium modulus typed in GPa (about 70 GPa, from memory): the run goes on (the stress field of
    # a single isotropic material under applied stresses does not depend on E) but every output says so
    path = _variant(tmp_path, "youngs_modulus = 71000.0", "youngs_modulus = 70.0")
    assert main(["check", str(path), "--json", "--accuracy", "draft"]) == 0
    d = json.loads(capsys.readouterr().out)
    assert any("material.youngs_modulus = 70 MPa is outside 1 to 1000 GPa" in w and "did you mean 70000 MPa" in w
               for w in d["warnings"])
    assert main(["check", str(path), "--accuracy", "draft"]) == 0
    assert "WARNING       material.youngs_modulus = 70 MPa" in capsys.readouterr().out


@pytest.mark.parametrize("old,new,said", [
    ("allowable_stress = 280.0", "allowable_stress = 280.0e6", "material.allowable_stress = 2.8e+08 MPa is outside"),
    ("sigma_x = 60.0 ", "sigma_x = 60.0e6 ", "load_case[0].sigma_x = 6e+07 MPa"),
], ids=["allowable in Pa", "load in Pa"])
def test_a_stress_given_in_pa_is_flagged(tmp_path, capsys, old, new, said):
    # 280 MPa typed as Pa: the margin would read +1e6 without a word (common practice, no source: 1 to 5000 MPa)
    path = _variant(tmp_path, old, new)
    assert main(["check", str(path), "--json", "--accuracy", "draft"]) == 0
    assert any(said in w and "check the unit" in w for w in json.loads(capsys.readouterr().out)["warnings"])


def test_a_pass_inside_the_error_estimate_is_flagged(tmp_path, capsys):
    # the allowable 0.01 % above the draft peak: the margin is met by less than the draft's error estimate
    # (0.1-0.3 % at draft), so the pass rests on the mesh and the output says so
    assert main(["check", str(STUDY), "--json", "--accuracy", "draft"]) == 0
    peak = json.loads(capsys.readouterr().out)["peak_stress_mpa"]
    path = _variant(tmp_path, "allowable_stress = 280.0", f"allowable_stress = {peak * 1.0001!r}")
    assert main(["check", str(path), "--json", "--accuracy", "draft"]) == 0
    d = json.loads(capsys.readouterr().out)
    assert all(r["met"] for r in d["requirements"] if r["kind"] == "margin")  # met, but by less than the estimate
    assert any("meets its requirement by" in w and "less than its mesh error estimate" in w for w in d["warnings"])


def test_a_table_or_key_written_twice_is_named(tmp_path, capsys):
    p = tmp_path / "twice.toml"
    p.write_text(BASE.replace("[measure]", "[panel]\nwidth = 1.0\n[measure]"))
    assert main(["check", str(p)]) == 2
    assert "[panel] is written twice" in capsys.readouterr().err
    p.write_text(BASE.replace("width = 300.0", "width = 300.0\nwidth = 310.0"))
    assert main(["check", str(p)]) == 2
    assert "a key is given twice in its table" in capsys.readouterr().err


def test_self_crossing_spline(tmp_path, capsys):
    p = tmp_path / "spline.toml"
    radii = "[40.0, 40.0, 4.0, 4.0, 40.0, 40.0, 40.0, 40.0]"
    text = BASE.split("[cutout]")[0] + f"[cutout]\nshape = \"spline\"\ncenter = [150.0, 100.0]\nradii = {radii}\n"
    p.write_text(text)
    assert main(["check", str(p)]) == 2
    err = capsys.readouterr().err
    assert "cutout.radii" in err and "self-crossing" in err and len(err.strip().splitlines()) == 1


def test_missing_file_and_bad_toml(tmp_path, capsys):
    assert main(["check", str(tmp_path / "nope.toml")]) == 2
    assert "does not exist" in capsys.readouterr().err
    bad = tmp_path / "broken.toml"
    bad.write_text("title = \n")
    assert main(["check", str(bad)]) == 2
    assert "not valid TOML" in capsys.readouterr().err


def test_debug_shows_the_traceback(tmp_path, capsys):
    path = _variant(tmp_path, "width = 300.0", "width = -300.0")
    assert main(["check", str(path), "--debug"]) == 2
    assert "Traceback" in capsys.readouterr().err
