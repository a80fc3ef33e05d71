"""The reinforcement (``Reinforcement`` kinds of holeshape.geometry): its geometry in the panel, its cross-section
and added mass against the study's limits (before any mesh), and, once solved, what it is, what it weighs and the
peak at each place it names. mm, mm^2, kg, MPa."""

from __future__ import annotations

from dataclasses import asdict, dataclass
from typing import TYPE_CHECKING

from holeshape.checks.base import Check, CheckResult, Design, Section, Table, requirement

if TYPE_CHECKING:
    from holeshape.study import Study

ADVICE_GEOMETRY = "to fit the reinforcement: a narrower ring, or search its sizes within their ranges"
ADVICE_MASS = "to lighten the reinforcement: a smaller flange or ring, or search its sizes (ranges in [reinforcement])"


@dataclass(frozen=True, kw_only=True)
class ReinforcementGeometry(CheckResult):
    check = "reinforcement_geometry"
    cross_section_mm2: float | None
    added_mass_kg: float | None

    def to_dict(self) -> None:
        return None


class ReinforcementGeometryCheck(Check):
    name = "reinforcement_geometry"
    title = "Reinforcement geometry"
    stage = "geometry"

    @classmethod
    def applies(cls, study: Study) -> bool:
        return study.cutout.reinforcement is not None

    def relevant(self, design: Design) -> bool:
        return design.cutout.reinforcement is not None

    def run(self, design: Design) -> ReinforcementGeometry:
        from shapely.geometry import Polygon

        from holeshape.errors import GeometryError

        study, cutout = design.study, design.cutout
        r = cutout.reinforcement
        panel, cons = study.panel, study.constraints
        short = min(panel.width, panel.height)
        reqs = []
        try:
            outer = r.interior_outline(cutout)
        except GeometryError as err:  # the kind cannot be made on this outline (a ring folding over itself)
            reqs.append(requirement("reinforcement_outline", "the reinforcement can be made on the outline", 0.0,
                                    1.0, ">=", scale=1.0, advice=ADVICE_GEOMETRY, check=self.name, to_mesh=True,
                                    reason=" ".join(str(err).split())))
            return ReinforcementGeometry(requirements=tuple(reqs), cross_section_mm2=None, added_mass_kg=None)
        if outer is not None:
            simple = Polygon(outer.polygon(720)).is_valid
            reqs.append(requirement("reinforcement_outline", "the reinforcement's outer edge is a simple curve",
                                    1.0 if simple else 0.0, 1.0, ">=", scale=1.0, advice=ADVICE_GEOMETRY,
                                    check=self.name, listed=False, to_mesh=True,
                                    reason=f"the {r.kind}'s outer edge crosses itself"))
            gap = min(outer.edge_gaps(panel.width, panel.height).values())
            reqs.append(requirement("reinforcement_inside_panel", f"web beyond the {r.kind}'s outer edge", gap,
                                    1e-3 * short, ">=", scale=short, unit="mm", advice=ADVICE_GEOMETRY,
                                    check=self.name, listed=False, to_mesh=True,
                                    reason=f"the {r.kind}'s outer edge comes within {gap:.3g} mm of a panel edge"))
        sizes = r.sizes(cutout, panel.thickness)
        mass = sizes.mass_kg(study.material.density)
        if cons.max_reinforcement_area is not None:
            lim = cons.max_reinforcement_area
            reqs.append(requirement("reinforcement_area", "reinforcement cross-section", sizes.cross_section_mm2,
                                    lim, "<=", scale=lim, unit="mm^2", kind="area", advice=ADVICE_MASS,
                                    check=self.name))
        if cons.max_added_mass is not None and mass is not None:
            lim = cons.max_added_mass
            reqs.append(requirement("added_mass", "added mass of the reinforcement", mass, lim, "<=", scale=lim,
                                    unit="kg", kind="mass", advice=ADVICE_MASS, check=self.name))
        return ReinforcementGeometry(requirements=tuple(reqs), cross_section_mm2=sizes.cross_section_mm2,
                                     added_mass_kg=mass)


@dataclass(frozen=True, kw_only=True)
class ReinforcementResult(CheckResult):
    """What the reinforcement is and what it does: sizes (mm, MPa), cross-section (mm^2), ring area (mm^2), added
    volume (mm^3) and mass (kg, None without a density), and the peak at each location over the load cases (MPa)."""

    check = "reinforcement"
    kind: str
    sizes: dict
    cross_section_mm2: float
    ring_area_mm2: float
    added_volume_mm3: float
    added_mass_kg: float | None
    peak_stress_mpa: dict  # location -> largest peak over the load cases

    def to_dict(self) -> dict:
        d = asdict(self)
        d.pop("requirements")
        d.pop("warnings")
        return d

    def section(self) -> Section:
        from holeshape.geometry.reinforcement import REINFORCEMENTS, values_text

        sizes = values_text(self.sizes)
        mass = "" if self.added_mass_kg is None else f"; added mass {self.added_mass_kg:.4f} kg"
        return Section("Reinforcement", (
            REINFORCEMENTS[self.kind].idealisation,
            f"{self.kind}: {sizes}; cross-section {self.cross_section_mm2:.1f} mm^2{mass}. The peak stress reported"
            " for the design is the largest over every place below: the reinforcement's own stress may govern it."),
            (Table((("location", "where"), ("peak_stress_mpa", "largest peak over the load cases (MPa)")),
                   tuple({"location": k, "peak_stress_mpa": v} for k, v in self.peak_stress_mpa.items())),))


class ReinforcementCheck(Check):
    name = "reinforcement"
    title = "Reinforcement"

    @classmethod
    def applies(cls, study: Study) -> bool:
        return study.cutout.reinforcement is not None

    @classmethod
    def in_search(cls, study: Study) -> bool:
        return False  # its stresses are among the evaluation's locations; its limits are geometric

    def relevant(self, design: Design) -> bool:
        return design.cutout.reinforcement is not None

    def run(self, design: Design) -> ReinforcementResult:
        cutout, panel = design.cutout, design.study.panel
        r = cutout.reinforcement
        sizes = r.sizes(cutout, panel.thickness)
        peaks: dict[str, float] = {}
        for res in design.evaluation.load_cases:
            for loc in res.locations:
                peaks[loc.location] = max(peaks.get(loc.location, 0.0), loc.peak_stress_mpa)
        params = r.parameters()
        params.pop("kind")
        params.setdefault("thickness", r.member_thickness(panel.thickness))
        return ReinforcementResult(kind=r.kind, sizes=params, cross_section_mm2=sizes.cross_section_mm2,
                                   ring_area_mm2=sizes.ring_area_mm2, added_volume_mm3=sizes.volume_mm3,
                                   added_mass_kg=sizes.mass_kg(design.study.material.density), peak_stress_mpa=peaks)
