"""The examples run and give the published numbers."""

import importlib.util
from pathlib import Path

import pytest

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"


def load(name):
    spec = importlib.util.spec_from_file_location(name, EXAMPLES / f"{name}.py")
    mod = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mod)
    return mod


def test_strip_with_hole_example(capsys):
    out = load("strip_with_hole").main()
    # Howland (1930), d/W = 0.4, gross section: 3.74; 1 % (3-figure table)
    assert out["kt"] == pytest.approx(3.74, rel=0.01)
    assert out["margin"] == pytest.approx(300.0 / (100.0 * out["kt"]) - 1, rel=1e-9)
    assert "Howland" in capsys.readouterr().out


def test_web_buckling_example(capsys):
    out = load("web_buckling").main()
    # Stein & Neff (1947) as tabulated by Timoshenko & Gere: simply supported square in shear, k = 9.34; 1 %
    assert out["k_plain"] == pytest.approx(9.34, rel=0.01)
    assert out["factor"] < out["unperforated"]  # with traction edges the hole lowers the shear buckling load
    assert out["reserve"] == pytest.approx(out["factor"] / 1.5, rel=1e-12)
    assert "Stein & Neff" in capsys.readouterr().out
