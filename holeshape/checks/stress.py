"""The peak stress against the allowable: the margin of safety of every load case, and the evidence that the mesh
resolves the peak (the error estimate against the accuracy level's target). MPa, percent."""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

from holeshape.checks.base import Check, CheckResult, Design, Section, requirement, within_estimate

if TYPE_CHECKING:
    from holeshape.study import Study

ADVICE_BARE = ("to lower the peak: another shape or larger radii (wider ranges for the search), a thicker web, or a"
               " reinforcement round the opening")
ADVICE_REINFORCED = ("to lower the peak: a larger reinforcement (search its sizes: ranges in [reinforcement]), larger"
                     " radii or a thicker web; where the reinforcement's own stress governs, more cross-section")
ADVICE_ACCURACY = "to meet the accuracy target: use a finer accuracy level (--accuracy fine)"


@dataclass(frozen=True, kw_only=True)
class StressResult(CheckResult):
    """Margins of safety (allowable / peak - 1) by load case, None without an allowable; the governing case's
    margin is the design's."""

    check = "stress"
    allowable_mpa: float | None
    margins: dict[str, float | None]
    margin_of_safety: float | None
    lowest_margin: float | None

    def top_fields(self) -> dict:
        return {"margin_of_safety": self.margin_of_safety}

    def case_fields(self, load_case: str) -> dict:
        return {"margin_of_safety": self.margins.get(load_case)}

    def section(self) -> Section | None:
        if self.allowable_mpa is None:
            return Section("Margin of safety", ("No allowable stress given (material.allowable_stress): no margin of"
                                                " safety is computed.",), warn=True)
        return None


class StressCheck(Check):
    name = "stress"
    title = "Peak stress"

    @classmethod
    def bounds(cls, study: Study) -> bool:
        return study.material.allowable_stress is not None

    def run(self, design: Design) -> StressResult:
        study, ev = design.study, design.evaluation
        allow = study.material.allowable_stress
        limit = study.constraints.min_margin if study.constraints.min_margin is not None else 0.0
        advice = ADVICE_REINFORCED if design.cutout.reinforcement is not None else ADVICE_BARE
        margins = {c.name: (allow / c.peak_stress_mpa - 1.0 if allow else None) for c in ev.load_cases}
        reqs = []
        if allow:
            for c in ev.load_cases:
                reqs.append(requirement("margin", f"margin of safety, {c.name}", margins[c.name], limit, ">=",
                                        scale=1.0, kind="margin", load_case=c.name, advice=advice, check=self.name,
                                        reason=f"margin of safety {margins[c.name]:+.3f} < {limit:+g} ({c.name})"))
        if design.purpose != "search":  # evidence for the final answer; a search trial is screened, not signed
            reqs.append(requirement("accuracy", "mesh error estimate of the peak", ev.error_estimate_pct,
                                    ev.accuracy_target_pct, "<=", scale=None, unit="%", kind="accuracy",
                                    advice=ADVICE_ACCURACY, check=self.name))
        known = [m for m in margins.values() if m is not None]
        close = [] if not allow else [within_estimate(f"the margin of safety of {c.name}", allow / (1.0 + limit),
                                                      c.peak_stress_mpa, ev.error_estimate_pct)
                                      for c in ev.load_cases]
        return StressResult(requirements=tuple(reqs), warnings=tuple(w for w in close if w), allowable_mpa=allow,
                            margins=margins,
                            margin_of_safety=margins[ev.governing_load_case],
                            lowest_margin=min(known) if known else None)
