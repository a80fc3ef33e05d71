"""The outline in its panel: a simple closed curve, inside the panel, the ligament to every panel edge, the web
between openings, the smallest radius of curvature. Geometry only (mm); runs before any mesh is made."""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from holeshape.checks.base import Check, CheckResult, Design, Requirement, Section, Table, requirement

if TYPE_CHECKING:
    from holeshape.geometry import Cutout
    from holeshape.study import Study

ADVICE = "to meet the geometric requirements: change the design or search within the ranges"
INSIDE = 1e-3  # the web left to a panel edge must be at least this share of the smaller panel side (to mesh it)
BETWEEN = 1e-3  # the web between two openings must be at least this share of the smaller one's size (to mesh it)


def least_web_between(outlines: list) -> float:
    """The least web (mm) the mesher needs between two of these openings (polygons of their outlines)."""
    from shapely.geometry import Polygon

    return BETWEEN * math.sqrt(min(Polygon(p).area for p in outlines))


def neighbour_gaps(cutout: Cutout) -> tuple[float, ...]:
    """The width of web (mm) between each pair of neighbouring openings of a row, or from each of several separate
    openings to its nearest neighbour (empty for one opening)."""
    from shapely.geometry import Polygon

    polys = [Polygon(p) for p in cutout.outlines(720)]
    if len(polys) < 2:
        return ()
    if cutout.others:  # separate openings: each one's nearest neighbour (every pair is a candidate)
        return tuple(float(min(a.distance(b) for j, b in enumerate(polys) if j != i)) for i, a in enumerate(polys))
    return tuple(float(a.distance(b)) for a, b in zip(polys, polys[1:]))


def min_radius_at(cutout: Cutout) -> tuple[float, float]:
    """Panel coordinates (mm) of the point of smallest radius of curvature on the outline."""
    smp = cutout.sampling
    i = int(np.argmax(np.abs(smp.curvature)))
    return float(smp.points[0, i]), float(smp.points[1, i])


@dataclass(frozen=True, kw_only=True)
class OutlineResult(CheckResult):
    """Ligament from the openings to each panel edge (mm), the narrowest, the web between neighbouring openings
    (mm), the smallest radius of curvature and where it is (mm)."""

    check = "outline"
    ligaments_mm: dict[str, float]
    narrowest_edge: str
    between_mm: tuple[float, ...]
    min_radius_mm: float
    min_radius_at_mm: tuple[float, float]
    simple: bool

    def top_fields(self) -> dict:
        return {"ligaments_between_mm": list(self.between_mm)} if self.between_mm else {}

    def section(self) -> Section | None:
        rows = tuple({"edge": k, "ligament_mm": v} for k, v in self.ligaments_mm.items())
        paras = [f"Narrowest ligament {self.ligaments_mm[self.narrowest_edge]:.1f} mm, to the {self.narrowest_edge}"
                 f" edge; smallest radius of the outline {self.min_radius_mm:.3g} mm at"
                 f" ({self.min_radius_at_mm[0]:.1f}, {self.min_radius_at_mm[1]:.1f}) mm."]
        if self.between_mm:
            paras.append(f"Web between neighbouring openings: narrowest {min(self.between_mm):.1f} mm (each: "
                         + ", ".join(f"{w:.1f}" for w in self.between_mm) + " mm).")
        return Section("Geometry", tuple(paras), (Table((("edge", "panel edge"),
                                                         ("ligament_mm", "ligament from the openings (mm)")), rows),))


class OutlineCheck(Check):
    name = "outline"
    title = "Geometry"
    stage = "geometry"

    def run(self, design: Design) -> OutlineResult:
        from shapely.geometry import Polygon

        study, cutout = design.study, design.cutout
        panel, cons = study.panel, study.constraints
        short = min(panel.width, panel.height)
        size = math.sqrt(max(cutout.area, 1e-12))
        simple = all(Polygon(p).is_valid for p in cutout.outlines(720))
        gaps = cutout.edge_gaps(panel.width, panel.height)
        edge, gap = min(gaps.items(), key=lambda kv: kv[1])
        between = neighbour_gaps(cutout)
        reqs: list[Requirement] = [
            requirement("outline", "the outline is a simple closed curve", 1.0 if simple else 0.0, 1.0, ">=",
                        scale=1.0, unit="", advice=ADVICE, check=self.name, listed=False, to_mesh=True,
                        reason=None if simple else "the outline crosses itself"),
            requirement("inside_panel", f"web from the openings to the {edge} panel edge", gap, INSIDE * short,
                        ">=", scale=short, unit="mm", advice=ADVICE, check=self.name,
                        listed=cons.min_ligament is None, to_mesh=True,
                        reason=None if gap > 0 else f"the outline crosses the {edge} panel edge by {-gap:.3g} mm"),
        ]
        if cons.min_ligament is not None:
            reqs.append(requirement("ligament", "ligament to the panel edges", gap, cons.min_ligament, ">=",
                                    scale=cons.min_ligament, unit="mm", advice=ADVICE, check=self.name,
                                    reason=f"ligament to the {edge} edge {gap:.3g} mm < {cons.min_ligament:g} mm"
                                    if gap < cons.min_ligament else None))
        if between:
            least = min(between)
            pitch = f" (pitch {cutout.row.pitch:.3g} mm)" if cutout.row is not None else ""
            need = least_web_between(cutout.outlines(720))
            reqs.append(requirement("row_overlap", "web between neighbouring openings, enough to mesh", least, need,
                                    ">=", scale=size, unit="mm", advice=ADVICE, check=self.name,
                                    listed=cons.min_ligament is None, to_mesh=True,
                                    reason=None if least >= need else f"neighbouring openings overlap or touch{pitch}"
                                    f" (web {least:.3g} mm)"))
            if cons.min_ligament is not None:
                reqs.append(requirement("ligament_between", "ligament between neighbouring openings", least,
                                        cons.min_ligament, ">=", scale=cons.min_ligament, unit="mm", advice=ADVICE,
                                        check=self.name))
        if cons.min_radius is not None:
            reqs.append(requirement("min_radius", "smallest radius of the outline", cutout.min_radius,
                                    cons.min_radius, ">=", scale=cons.min_radius, unit="mm", advice=ADVICE,
                                    check=self.name))
        return OutlineResult(requirements=tuple(reqs), ligaments_mm={k: round(v, 3) for k, v in gaps.items()},
                             narrowest_edge=edge, between_mm=between, min_radius_mm=cutout.min_radius,
                             min_radius_at_mm=min_radius_at(cutout), simple=simple)

    @classmethod
    def linear_rows(cls, study: Study, cutout: Cutout) -> np.ndarray | None:
        """The distance of every outline point to every panel edge against the ligament, and the curvature against
        the smallest radius (in outline sizes and relative: smooth in the shape's parameters)."""
        panel, cons = study.panel, study.constraints
        size = math.sqrt(max(cutout.area, 1e-12))
        p = cutout.polygon(360).T
        need = cons.min_ligament or 0.0
        gaps = np.concatenate([p[0], p[1], panel.width - p[0], panel.height - p[1]])
        rows = [(need - gaps) / size]
        if cons.min_radius is not None:
            k = cutout.sampling.curvature[::8] * cons.min_radius
            rows += [k - 1.0, -k - 1.0]
        return np.concatenate(rows)
