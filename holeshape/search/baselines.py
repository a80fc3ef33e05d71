"""The standard shapes a reviewer would try first: the smallest circle, ellipse and rounded rectangle that clear
the access envelope (with its clearance) and meet the area requirement. The search result is compared with them
and is never reported worse than the best of them. Lengths mm."""

from __future__ import annotations

import math
from typing import TYPE_CHECKING, Any

from holeshape.errors import GeometryError
from holeshape.geometry import Circle, Cutout, Ellipse, RoundedRectangle
from holeshape.parameters import CutoutSpec, Param, Range
from holeshape.search.space import DesignSpace, scaled_to_area
from holeshape.study import Constraints, Panel, Study

if TYPE_CHECKING:
    from holeshape.geometry import Shape


def baseline_center(spec: CutoutSpec, panel: Panel, cons: Constraints) -> tuple[float, float]:
    if cons.access is not None and cons.access.center is not None:
        return cons.access.center
    c = spec.fixed_center()
    return c if c is not None else (panel.width / 2, panel.height / 2)


def standard_shapes(study: Study) -> list[tuple[str, Cutout | None, str]]:
    """(family, cutout or None, note) for circle, ellipse and rounded rectangle; None with the reason when the
    family cannot meet the geometric requirements. With a [reinforcement] the shapes carry it at its nominal sizes
    (``CutoutSpec.nominal_reinforcement``)."""
    from holeshape.checks import assess
    from holeshape.geometry.reinforcement import check_formable

    spec, panel, cons = study.cutout, study.panel, study.constraints

    reinforcement = spec.nominal_reinforcement()
    row = spec.nominal_row()  # a row: rows of the standard shapes at the nominal pitch
    count = 1 if row is None else row.count
    center = baseline_center(spec, panel, cons)
    rot = cons.access.rotation if cons.access is not None else 0.0
    shapes: list[tuple[str, Shape]] = []
    if cons.access is not None:
        c = cons.clearance
        if cons.access.diameter is not None:
            r = cons.access.diameter / 2 + c
            shapes = [("circle", Circle(r)), ("ellipse", Ellipse(r, r)),
                      ("rounded_rectangle", RoundedRectangle(r, r, max(cons.min_radius or 0.0, 0.5 * r)))]
        else:
            assert cons.access.width is not None and cons.access.height is not None  # a diameter or both sizes
            p, q = cons.access.width / 2 + c, cons.access.height / 2 + c
            rc = min(max(cons.min_radius or 0.0, 0.2 * min(p, q)), min(p, q))
            grow = rc * (1 - 1 / math.sqrt(2))  # the corner arc must pass outside the envelope's corner
            shapes = [("circle", Circle(math.hypot(p, q))),
                      ("ellipse", Ellipse(math.sqrt(2) * p, math.sqrt(2) * q)),
                      ("rounded_rectangle", RoundedRectangle(p + grow, q + grow, rc))]
    else:
        target = cons.area or cons.min_area
        if target is None:
            return []
        r = math.sqrt(target / count / math.pi)
        shapes = [("circle", Circle(r))]
    out: list[tuple[str, Cutout | None, str]] = []
    for family, shape in shapes:
        cut = Cutout(shape, center, rot, reinforcement, row)
        try:
            if cons.area is not None:
                cut = scaled_to_area(cut, cons.area)
            elif cons.min_area is not None and cut.area < cons.min_area:
                cut = scaled_to_area(cut, cons.min_area)
            check_formable(cut)
        except GeometryError as err:
            out.append((family, None, str(err)))
            continue
        geo = assess(study, cut)
        if not geo.meets_every_requirement:
            out.append((family, None, "; ".join(geo.reasons())))
        else:
            out.append((family, cut, "meets every geometric requirement"))
    return out


def family_point(base_family: str, cut: Cutout, space: DesignSpace) -> dict[str, float] | None:
    """The search parameters (by flat name) that reproduce a standard shape in the study's own family, or None
    when the family cannot represent it within the ranges (and the study's fixed values)."""
    spec = space.spec
    family = spec.shape
    sh: Any = cut.shape  # of the family base_family names: its own parameters are read below
    own: dict[str, float] = {}
    if family == base_family:
        own = {k: v for k, v in sh.parameters().items() if not isinstance(v, (tuple, list, str))}
    elif family == "superellipse" and base_family in ("circle", "ellipse"):
        a = sh.radius if base_family == "circle" else sh.a
        b = sh.radius if base_family == "circle" else sh.b
        own = {"a": a, "b": b, "exponent": 2.0}
    elif family == "ellipse" and base_family == "circle":
        own = {"a": sh.radius, "b": sh.radius}
    elif family != "spline":
        return None
    vals: dict[Param, float] = {Param(0, "shape", k): v for k, v in own.items()}
    rotation = cut.rotation
    if family == "spline":
        if base_family != "circle":
            rotation = _spline_rotation(cut, spec)
        vals.update(_spline_radii(cut, spec, rotation))
    vals.update({Param(0, "place", "center", 0): cut.center[0], Param(0, "place", "center", 1): cut.center[1],
                 Param(0, "place", "rotation"): rotation})
    ranges = spec.ranges
    out = {}
    for p, r in ranges.items():
        if p not in vals:
            return None
        v = vals[p]
        if space.constraints.area is None and not (r.min <= v <= r.max):
            return None
        out[p.flat] = min(max(v, r.min), r.max)
    # fixed (non-searched) values must agree with the standard shape
    fixed = spec.entries()
    for p, v in vals.items():
        if p in ranges:
            continue
        f = fixed.get(p)
        if isinstance(f, (int, float)) and not isinstance(f, bool) and abs(float(f) - v) > 1e-9 * max(1, abs(v)):
            if space.constraints.area is None or not p.is_length:
                return None
    return out


def _spline_rotation(cut: Cutout, spec: CutoutSpec) -> float:
    """The rotation a spline start takes: the standard shape's where the study searches it, else the study's."""
    fixed = spec.openings[0].rotation
    return cut.rotation if isinstance(fixed, Range) else float(fixed)


def _spline_radii(cut: Cutout, spec: CutoutSpec, rotation: float) -> dict[Param, float]:
    """The spline radii through a standard shape's outline (its polar radius about its centre at the spline's
    angles, in the spline's own frame): the same shape for a circle, a close one otherwise (a start)."""
    import numpy as np

    op = spec.openings[0]
    radii, sym = op.value("radii"), op.value("symmetry")
    assert isinstance(radii, tuple) and isinstance(sym, str)  # a spline table's values
    n = len(radii)
    span = {"none": 2 * math.pi * (n - 1) / n, "x": math.pi, "xy": math.pi / 2}[sym]
    theta = np.linspace(0.0, span, n) + math.radians(rotation)
    p = cut.sampling.points
    phi = np.arctan2(p[1] - cut.center[1], p[0] - cut.center[0])
    rho = np.hypot(p[0] - cut.center[0], p[1] - cut.center[1])
    order = np.argsort(phi)
    r = np.interp(np.mod(theta + math.pi, 2 * math.pi) - math.pi, phi[order], rho[order], period=2 * math.pi)
    return {Param(0, "shape", "radii", i): float(v) for i, v in enumerate(r)}
