"""Constraints checked on the geometry before any mesh is made, as scaled values (feasible when <= 0).

Each value is a relative shortfall (for instance (required ligament - ligament) / required ligament), so the values
are of comparable size and the sampler can rank infeasible designs by how far they miss.
"""

from __future__ import annotations

import math

import numpy as np

from holeshape.evaluate import neighbour_ligaments as neighbour_gaps
from holeshape.geometry import Cutout
from holeshape.study import Constraints, Panel


def outline_polygon(cutout: Cutout, n: int = 720):
    from shapely.geometry import Polygon

    return Polygon(cutout.polygon(n))


def edge_gaps(cutout: Cutout, panel: Panel) -> dict[str, float]:
    """Distance (mm) from the outline to each panel edge (negative when it crosses the edge)."""
    return cutout.edge_gaps(panel.width, panel.height)


def access_margin(cutout: Cutout, cons: Constraints, poly=None) -> float:
    """Signed margin (mm) by which the outline clears the access envelope grown by the clearance:
    >= 0 the envelope is inside with that much to spare; < 0 the envelope pokes out by that much."""
    from shapely.geometry import Point

    poly = poly if poly is not None else outline_polygon(cutout)
    env = cons.access.polygon(cutout.center, cons.clearance)
    if poly.contains(env):
        return float(poly.exterior.distance(env))
    ring = np.asarray(env.exterior.coords)
    return -max(float(poly.distance(Point(*p))) for p in ring)


def access_tolerance(cutout: Cutout, n: int = 720) -> float:
    """How far (mm) the ``n``-gon of an outline falls inside the curve between its vertices (the chord sagitta on
    the smallest radius): an envelope touching the true outline is accepted to this much."""
    perimeter = cutout.sampling.perimeter
    return (perimeter / n) ** 2 / (8.0 * max(cutout.min_radius, 1e-9))


def constraint_values(cutout: Cutout, panel: Panel, cons: Constraints, density: float | None = None
                      ) -> tuple[dict[str, float], list[str]]:
    """Scaled constraint values (<= 0 feasible) and the reasons for every violated one. ``density`` (kg/m^3)
    weighs a reinforcement for ``max_added_mass``."""
    values: dict[str, float] = {}
    reasons: list[str] = []
    poly = outline_polygon(cutout)
    size = math.sqrt(max(cutout.area, 1e-12))
    if not poly.is_valid:
        values["outline"] = 1.0
        reasons.append("the outline crosses itself")
    gaps = edge_gaps(cutout, panel)
    edge, gap = min(gaps.items(), key=lambda kv: kv[1])
    values["inside_panel"] = -gap / min(panel.width, panel.height)
    if gap <= 0:
        reasons.append(f"the outline crosses the {edge} panel edge by {-gap:.3g} mm")
    if cons.min_ligament is not None:
        values["ligament"] = (cons.min_ligament - gap) / cons.min_ligament
        if gap < cons.min_ligament:
            reasons.append(f"ligament to the {edge} edge {gap:.3g} mm < {cons.min_ligament:g} mm")
    if cutout.count > 1:
        between = min(neighbour_gaps(cutout))
        values["row_overlap"] = -between / size
        if between <= 0:
            reasons.append(f"neighbouring openings of the row overlap (pitch {cutout.row.pitch:.3g} mm)"
                           if cutout.row is not None else "two of the openings overlap")
        if cons.min_ligament is not None:
            values["ligament_between"] = (cons.min_ligament - between) / cons.min_ligament
            if 0 < between < cons.min_ligament:
                reasons.append(f"ligament between neighbouring openings {between:.3g} mm < {cons.min_ligament:g} mm")
    if cons.min_radius is not None:
        r = cutout.min_radius
        values["min_radius"] = (cons.min_radius - r) / cons.min_radius
        if r < cons.min_radius:
            reasons.append(f"smallest radius {r:.3g} mm < {cons.min_radius:g} mm")
    area = cutout.area
    if cons.min_area is not None:
        values["min_area"] = (cons.min_area - area) / cons.min_area
        if area < cons.min_area:
            reasons.append(f"area {area:.0f} mm^2 < {cons.min_area:g} mm^2")
    if cons.max_area is not None:
        values["max_area"] = (area - cons.max_area) / cons.max_area
        if area > cons.max_area:
            reasons.append(f"area {area:.0f} mm^2 > {cons.max_area:g} mm^2")
    if cons.access is not None:
        m = access_margin(cutout, cons, poly) + access_tolerance(cutout)
        values["access"] = -m / size
        if m < 0:
            reasons.append(f"the access envelope (with {cons.clearance:g} mm clearance) pokes out by {-m:.3g} mm")
    _reinforcement_values(cutout, panel, cons, density, values, reasons)
    return values, reasons


def _reinforcement_values(cutout: Cutout, panel: Panel, cons: Constraints, density, values: dict, reasons: list):
    from holeshape.errors import GeometryError
    from holeshape.geometry.reinforcement import reinforced_sizes, ring_outline

    r = cutout.reinforcement
    if r is None:
        return
    if r.kind == "ring":
        try:
            outer = ring_outline(cutout, r.width)
        except GeometryError as err:
            values["ring"] = 1.0
            reasons.append(str(err))
            return
        gap = min(outer.edge_gaps(panel.width, panel.height).values())
        need = 1e-3 * min(panel.width, panel.height)
        values["ring_inside_panel"] = (need - gap) / min(panel.width, panel.height)
        if gap < need:
            reasons.append(f"the ring's outer edge comes within {gap:.3g} mm of a panel edge")
        if not outline_polygon(outer).is_valid:
            values["ring"] = 1.0
            reasons.append("the ring's outer edge crosses itself")
            return
    sizes = reinforced_sizes(cutout, panel.thickness)
    if cons.max_reinforcement_area is not None:
        a = sizes.cross_section_mm2
        values["reinforcement_area"] = (a - cons.max_reinforcement_area) / cons.max_reinforcement_area
        if a > cons.max_reinforcement_area:
            reasons.append(f"reinforcement cross-section {a:.3g} mm^2 > {cons.max_reinforcement_area:g} mm^2")
    mass = sizes.mass_kg(density)
    if cons.max_added_mass is not None and mass is not None:
        values["added_mass"] = (mass - cons.max_added_mass) / cons.max_added_mass
        if mass > cons.max_added_mass:
            reasons.append(f"added mass {mass:.3g} kg > {cons.max_added_mass:g} kg")


def solved_constraint_values(ev, cons: Constraints) -> tuple[dict[str, float], list[str]]:
    """Scaled values (<= 0 feasible) and reasons for the requirements that need a solved design: the margin of
    safety against the allowable (``min_margin``) and the buckling load factor (``min_buckling_factor``).
    ``ev`` is an :class:`~holeshape.evaluate.Evaluation` (with its stability result for the buckling factor)."""
    values: dict[str, float] = {}
    reasons: list[str] = []
    if cons.min_margin is not None:
        worst = min((r for r in ev.load_cases if r.margin_of_safety is not None),
                    key=lambda r: r.margin_of_safety, default=None)
        if worst is not None:
            values["margin"] = cons.min_margin - worst.margin_of_safety
            if worst.margin_of_safety < cons.min_margin:
                reasons.append(f"margin of safety {worst.margin_of_safety:+.3f} < {cons.min_margin:+g}"
                               f" ({worst.name})")
    if cons.min_buckling_factor is not None:
        st = ev.stability
        if st is None:
            raise ValueError("min_buckling_factor needs an evaluation with its stability result")
        f = st.load_factor
        values["buckling"] = -1.0 if f is None else (cons.min_buckling_factor - f) / cons.min_buckling_factor
        if f is not None and f < cons.min_buckling_factor:
            reasons.append(f"buckling load factor {f:.3g} < {cons.min_buckling_factor:g} ({st.governing.name})")
    return values, reasons


def requirement_rows(ev, cutout: Cutout, panel: Panel, cons: Constraints, material) -> list[dict]:
    """Every requirement the study sets, checked on one evaluated design: one row each with what was required,
    what the design achieves and whether it is met (the verdict tables of the outputs)."""
    rows = []

    def add(name, value, limit, met, load_case=None, kind="geometry"):
        rows.append({"requirement": name, "value": value, "limit": limit, "met": bool(met), "kind": kind,
                     "load_case": load_case})

    gap = min(edge_gaps(cutout, panel).values())
    if cons.min_ligament is not None:
        add("ligament to the panel edges (mm)", gap, f">= {cons.min_ligament:g}", gap >= cons.min_ligament)
        if cutout.count > 1:
            between = min(neighbour_gaps(cutout))
            add("ligament between neighbouring openings (mm)", between, f">= {cons.min_ligament:g}",
                between >= cons.min_ligament)
    if cons.min_radius is not None:
        add("smallest radius of the outline (mm)", cutout.min_radius, f">= {cons.min_radius:g}",
            cutout.min_radius >= cons.min_radius)
    if cons.access is not None:
        m = access_margin(cutout, cons)
        add("clearance round the access envelope (mm)", m + cons.clearance, f">= {cons.clearance:g}",
            m + access_tolerance(cutout) >= 0)
    if cons.area is not None:
        add("removed area (mm^2)", cutout.area, f"= {cons.area:g}", abs(cutout.area / cons.area - 1) < 1e-6)
    if cons.min_area is not None:
        add("removed area (mm^2)", cutout.area, f">= {cons.min_area:g}", cutout.area >= cons.min_area)
    if cons.max_area is not None:
        add("removed area (mm^2)", cutout.area, f"<= {cons.max_area:g}", cutout.area <= cons.max_area)
    if cutout.reinforcement is not None:
        from holeshape.geometry.reinforcement import reinforced_sizes

        sizes = reinforced_sizes(cutout, panel.thickness)
        if cons.max_reinforcement_area is not None:
            add("reinforcement cross-section (mm^2)", sizes.cross_section_mm2, f"<= {cons.max_reinforcement_area:g}",
                sizes.cross_section_mm2 <= cons.max_reinforcement_area)
        mass = sizes.mass_kg(material.density)
        if cons.max_added_mass is not None and mass is not None:
            add("added mass of the reinforcement (kg)", mass, f"<= {cons.max_added_mass:g}",
                mass <= cons.max_added_mass, kind="mass")
    if material.allowable_stress is not None:
        limit = cons.min_margin if cons.min_margin is not None else 0.0
        for r in ev.load_cases:
            add(f"margin of safety, {r.name}", r.margin_of_safety, f">= {limit:+g}", r.margin_of_safety >= limit,
                r.name, "margin")
    st = ev.stability
    if st is not None:
        need = max(st.required_factor, cons.min_buckling_factor or 0.0)
        for c in st.cases:
            add(f"buckling load factor, {c.name}", c.load_factor, f">= {need:g}",
                c.load_factor is None or c.load_factor >= need, c.name, "buckling")
    add("mesh error estimate of the peak (%)", ev.error_estimate_pct, f"<= {ev.accuracy_target_pct:g}",
        ev.within_target, kind="accuracy")
    if st is not None:
        add("mesh error estimate of the buckling factor (%)", st.error_estimate_pct,
            f"<= {st.accuracy_target_pct:g}", st.error_estimate_pct <= st.accuracy_target_pct, kind="accuracy")
    return rows


ADVICE = {
    "margin": "to lower the peak: search the shape (holeshape optimise), use larger radii, a thicker web, or"
              " reinforce the opening",
    "buckling": "to raise the buckling factor: a smaller or better-shaped opening (search with"
                " constraints.min_buckling_factor), a thicker web, stiffeners, or a flanged or reinforced opening",
    "accuracy": "to meet the accuracy target: use a finer accuracy level (--accuracy fine)",
    "geometry": "to meet the geometric requirements: change the design or search within the ranges",
    "mass": "to lighten the reinforcement: a smaller flange or ring, or search its sizes (ranges in"
            " [reinforcement])",
}


def verdict(rows: list[dict], load_case: str | None = None) -> dict:
    """``{"verdict": "pass" | "fail", "verdict_reasons": [...], "advice": [...]}`` over the requirement rows (those
    of one load case with ``load_case``): every failed requirement with the design's value and the limit, and
    what the user can change."""
    sel = [r for r in rows if load_case is None or r.get("load_case") == load_case]
    failed = [r for r in sel if not r["met"]]
    reasons = [f"{r['requirement']} is {requirement_value(r)}, required {r['limit']}" for r in failed]
    advice = [ADVICE[k] for k in dict.fromkeys(r.get("kind", "geometry") for r in failed)]
    return {"verdict": "fail" if failed else "pass", "verdict_reasons": reasons, "advice": advice}


def sig(v: float, figures: int = 2) -> str:
    """``v`` to ``figures`` significant figures, without exponent notation for the sizes a report shows; magnitudes
    below 0.001 (a percentage error that small is nil for a reader) as "< 0.001"."""
    if v == 0 or not math.isfinite(v):
        return f"{v:g}"
    if abs(v) < 1e-3:
        return "< 0.001"
    digits = max(0, figures - 1 - int(math.floor(math.log10(abs(v)))))
    return f"{v:.{digits}f}"


def requirement_value(r: dict) -> str:
    """A requirement row's value for people, by its kind: margins signed to 3 decimals, factors to 3 decimals,
    error estimates to 2 significant figures, lengths to 0.1 mm, areas to 1 mm^2."""
    v, kind = r["value"], r.get("kind", "geometry")
    if v is None:
        return "does not buckle"
    if not isinstance(v, (int, float)):
        return str(v)
    if kind == "margin":
        return f"{v:+.3f}"
    if kind == "buckling":
        return f"{v:.3f}"
    if kind == "accuracy":
        return sig(v, 2)
    if kind == "mass":
        return sig(v, 3)
    return f"{v:.0f}" if "mm^2" in r["requirement"] else f"{v:.1f}"
