"""Generators of malformed study files for the robustness tests and benchmark (hypothesis strategies).

Each strategy returns (document, field, value_text): a study that breaks exactly one rule, the dotted field the
error message must name, and a fragment of the offending value the message must echo (or None).
"""

from __future__ import annotations

import copy
import math

from hypothesis import strategies as st

from holeshape.studyfile import dump_toml as to_toml  # noqa: F401 - re-exported for the tests

VALID = {
    "title": "robustness base study",
    "panel": {"width": 300.0, "height": 200.0, "thickness": 1.6, "edges": "traction"},
    "material": {"name": "alloy", "youngs_modulus": 71000.0, "poisson_ratio": 0.33, "allowable_stress": 280.0},
    "load_case": [{"name": "tension", "sigma_x": 60.0, "tau_xy": 20.0}, {"name": "compression", "sigma_x": -80.0}],
    "cutout": {"shape": "ellipse", "center": [150.0, 100.0], "a": {"min": 30.0, "max": 80.0, "value": 50.0},
               "b": {"min": 20.0, "max": 60.0, "value": 30.0}, "rotation": 0.0},
    "constraints": {"min_area": 3000.0, "min_ligament": 20.0, "min_radius": 5.0,
                    "access": {"width": 60.0, "height": 30.0}, "clearance": 2.0},
    "search": {"trials": 10, "seed": 1},
}


def _set(doc, path, value):
    d = doc
    for p in path[:-1]:
        d = d[p]
    if value is _DELETE:
        del d[path[-1]]
    else:
        d[path[-1]] = value
    return doc


_DELETE = object()
POSITIVE = [("panel", "width"), ("panel", "height"), ("panel", "thickness"), ("material", "youngs_modulus"),
            ("material", "allowable_stress"), ("constraints", "min_area"), ("constraints", "min_ligament"),
            ("constraints", "min_radius")]
NUMBERS = POSITIVE + [("material", "poisson_ratio"), ("load_case", 0, "sigma_x"), ("load_case", 1, "sigma_x"),
                      ("cutout", "rotation"), ("constraints", "clearance")]
REQUIRED = [("panel", "width"), ("panel", "height"), ("panel", "thickness"), ("material", "youngs_modulus"),
            ("material", "poisson_ratio"), ("cutout", "shape")]
TABLES = ["panel", "material", "cutout", "load_case"]
KEY_HOMES = [("panel", ["width", "height", "thickness", "edges"]),
             ("material", ["youngs_modulus", "poisson_ratio", "allowable_stress"]),
             ("constraints", ["min_ligament", "min_area", "min_radius", "clearance"]),
             ("search", ["trials", "seed"])]


def dotted(path) -> str:
    out = ""
    for p in path:
        out += f"[{p}]" if isinstance(p, int) else (("." if out else "") + p)
    return out


@st.composite
def wrong_type(draw):
    path = draw(st.sampled_from(NUMBERS))
    bad = draw(st.sampled_from(["wide", True, [1.0, 2.0], {"x": 1.0}]))
    return _set(copy.deepcopy(VALID), path, bad), dotted(path), None


@st.composite
def non_finite(draw):
    path = draw(st.sampled_from(NUMBERS))
    bad = draw(st.sampled_from([math.nan, math.inf, -math.inf]))
    return _set(copy.deepcopy(VALID), path, bad), dotted(path), {True: "nan"}.get(math.isnan(bad), "inf")


@st.composite
def not_positive(draw):
    path = draw(st.sampled_from(POSITIVE))
    bad = draw(st.one_of(st.just(0.0), st.floats(min_value=-1e6, max_value=-1e-6)))
    return _set(copy.deepcopy(VALID), path, bad), dotted(path), None


@st.composite
def missing(draw):
    if draw(st.booleans()):
        path = draw(st.sampled_from(REQUIRED))
        return _set(copy.deepcopy(VALID), path, _DELETE), dotted(path), None
    table = draw(st.sampled_from(TABLES))
    return _set(copy.deepcopy(VALID), (table,), _DELETE), table, None


@st.composite
def unknown_key(draw):
    table, keys = draw(st.sampled_from(KEY_HOMES))
    k = draw(st.sampled_from(keys))
    i = draw(st.integers(min_value=0, max_value=len(k) - 2))
    typo = k[:i] + k[i + 1] + k[i] + k[i + 2:]  # swap two letters: a misspelling
    if typo == k:
        typo = k + "x"
    doc = copy.deepcopy(VALID)
    doc[table][typo] = doc[table].pop(k) if k in doc[table] else 1.0
    return doc, f"{table}.{typo}", "did you mean"


@st.composite
def bad_range(draw):
    lo = draw(st.floats(min_value=10.0, max_value=80.0))
    hi = lo - draw(st.floats(min_value=0.5, max_value=9.0))
    doc = copy.deepcopy(VALID)
    doc["cutout"]["a"] = {"min": lo, "max": hi}
    return doc, "cutout.a", "min <= max"


@st.composite
def poisson(draw):
    nu = draw(st.one_of(st.floats(min_value=0.5, max_value=5.0), st.floats(min_value=-10.0, max_value=-1.0)))
    return _set(copy.deepcopy(VALID), ("material", "poisson_ratio"), nu), "material.poisson_ratio", None


@st.composite
def off_panel(draw):
    doc = copy.deepcopy(VALID)
    doc.pop("constraints")
    x = draw(st.one_of(st.floats(min_value=-400.0, max_value=49.9), st.floats(min_value=250.1, max_value=900.0)))
    doc["cutout"]["center"] = [x, 100.0]
    return doc, "cutout.center", "panel edge"


@st.composite
def too_big(draw):
    doc = copy.deepcopy(VALID)
    doc.pop("constraints")
    doc["cutout"] = {"shape": "circle", "radius": draw(st.floats(min_value=100.0, max_value=1e4))}
    return doc, "cutout.center", "panel edge"


@st.composite
def self_crossing(draw):
    doc = copy.deepcopy(VALID)
    doc.pop("constraints")
    dip = draw(st.floats(min_value=0.2, max_value=1.2))
    big = draw(st.floats(min_value=40.0, max_value=60.0))
    doc["cutout"] = {"shape": "spline", "center": [150.0, 100.0],
                     "radii": [big, big, dip, dip, big, big, big, big]}
    return doc, "cutout.radii", "self-crossing"


@st.composite
def impossible(draw):
    doc = copy.deepcopy(VALID)
    kind = draw(st.sampled_from(["access", "area", "ligament", "minmax"]))
    c = doc["constraints"]
    if kind == "access":
        c["access"] = {"width": draw(st.floats(min_value=261.0, max_value=2000.0)), "height": 30.0}
        return doc, "constraints.access", "cannot fit"
    if kind == "area":
        c["min_area"] = draw(st.floats(min_value=60000.0, max_value=1e7))
        return doc, "constraints.min_area", "cannot be removed"
    if kind == "ligament":
        c["min_ligament"] = draw(st.floats(min_value=100.0, max_value=1e4))
        return doc, "constraints.min_ligament", "no room"
    c["max_area"] = c["min_area"] - draw(st.floats(min_value=1.0, max_value=2999.0))
    return doc, "constraints.min_area", "must not exceed"


@st.composite
def wrong_choice(draw):
    path, word = draw(st.sampled_from([(("panel", "edges"), "clamped"), (("cutout", "shape"), "hexagon"),
                                       (("panel", "edges"), "tractions"), (("cutout", "shape"), "elipse")]))
    return _set(copy.deepcopy(VALID), path, word), dotted(path), word


CLASSES = {
    "wrong type": wrong_type(), "NaN or infinity": non_finite(), "zero or negative size": not_positive(),
    "missing field or table": missing(), "unknown key": unknown_key(), "range with min > max": bad_range(),
    "Poisson's ratio out of range": poisson(), "cutout outside or across the edge": off_panel(),
    "cutout larger than the panel": too_big(), "self-crossing spline": self_crossing(),
    "impossible constraint set": impossible(), "unknown choice": wrong_choice(),
}
ANY_BAD = st.one_of(*[st.tuples(st.just(name), s) for name, s in CLASSES.items()])
