"""The removed area against the study's limits (the total of every opening, mm^2). Geometry only."""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from holeshape.checks.base import Check, CheckResult, Design, requirement

if TYPE_CHECKING:
    from holeshape.geometry import Cutout
    from holeshape.study import Study

ADVICE = "to meet the area requirement: change the design or search within the ranges"


@dataclass(frozen=True, kw_only=True)
class AreaResult(CheckResult):
    check = "area"
    area_mm2: float


class AreaCheck(Check):
    name = "area"
    title = "Removed area"
    stage = "geometry"

    @classmethod
    def applies(cls, study: Study) -> bool:
        c = study.constraints
        return c.area is not None or c.min_area is not None or c.max_area is not None

    def run(self, design: Design) -> AreaResult:
        c, a = design.study.constraints, design.cutout.area
        reqs = []
        if c.area is not None:  # every design is scaled to it: evidence, not a constraint
            reqs.append(requirement("area", "removed area", a, c.area, "=", scale=None, unit="mm^2", kind="area",
                                    advice=ADVICE, check=self.name))
        if c.min_area is not None:
            reqs.append(requirement("min_area", "removed area", a, c.min_area, ">=", scale=c.min_area, unit="mm^2",
                                    kind="area", advice=ADVICE, check=self.name))
        if c.max_area is not None:
            reqs.append(requirement("max_area", "removed area", a, c.max_area, "<=", scale=c.max_area, unit="mm^2",
                                    kind="area", advice=ADVICE, check=self.name))
        return AreaResult(requirements=tuple(reqs), area_mm2=a)

    @classmethod
    def linear_rows(cls, study: Study, cutout: Cutout) -> np.ndarray | None:
        c, a = study.constraints, cutout.area
        rows = []
        if c.min_area is not None:
            rows.append((c.min_area - a) / c.min_area)
        if c.max_area is not None:
            rows.append((a - c.max_area) / c.max_area)
        return np.array(rows)
