"""The standard shapes a reviewer would try first: the smallest circle, ellipse and rounded rectangle that clear
the access envelope (with its clearance) and meet the area requirement. The search result is compared with them
and is never reported worse than the best of them. Lengths mm."""

from __future__ import annotations

import math

from holeshape.errors import GeometryError
from holeshape.geometry import Circle, Cutout, Ellipse, RoundedRectangle
from holeshape.search.constraints import constraint_values
from holeshape.search.space import scaled_to_area
from holeshape.study import Constraints, Panel, Range


def baseline_center(spec_values: dict, panel: Panel, cons: Constraints) -> tuple[float, float]:
    if cons.access is not None and cons.access.center is not None:
        return cons.access.center
    c = spec_values.get("center")
    if c is not None and not any(isinstance(v, Range) for v in c):
        return float(c[0]), float(c[1])
    return panel.width / 2, panel.height / 2


def standard_shapes(spec_values: dict, panel: Panel, cons: Constraints, density: float | None = None
                    ) -> list[tuple[str, Cutout | None, str]]:
    """(family, cutout or None, note) for circle, ellipse and rounded rectangle; None with the reason when the
    family cannot meet the constraints. With a [reinforcement] the shapes carry it at its nominal sizes
    (``study.nominal_reinforcement``)."""
    from holeshape.geometry.reinforcement import check_formable
    from holeshape.study import nominal_reinforcement, nominal_row

    reinforcement = nominal_reinforcement(spec_values)
    row = nominal_row(spec_values)  # a row: rows of the standard shapes at the nominal pitch
    count = 1 if row is None else row.count
    center = baseline_center(spec_values, panel, cons)
    rot = cons.access.rotation if cons.access is not None else 0.0
    shapes: list[tuple[str, object]] = []
    if cons.access is not None:
        c = cons.clearance
        if cons.access.diameter is not None:
            r = cons.access.diameter / 2 + c
            shapes = [("circle", Circle(r)), ("ellipse", Ellipse(r, r)),
                      ("rounded_rectangle", RoundedRectangle(r, r, max(cons.min_radius or 0.0, 0.5 * r)))]
        else:
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
        values, reasons = constraint_values(cut, panel, cons, density)
        if reasons:
            out.append((family, None, "; ".join(reasons)))
        else:
            out.append((family, cut, "meets every constraint"))
    return out
