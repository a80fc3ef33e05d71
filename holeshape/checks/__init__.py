"""Every assessment of a design, one module each, behind the protocol of :mod:`holeshape.checks.base`.

``CHECKS`` is the registry, in the order the outputs list them: the geometric checks first (a design that fails
one is never meshed), then those that read the solved design. Adding a check is its module and one line here.
"""

from __future__ import annotations

import time
from typing import TYPE_CHECKING

from holeshape.checks.access import AccessCheck
from holeshape.checks.area import AreaCheck
from holeshape.checks.base import (
    Assessment,
    Chart,
    ChartAxes,
    Check,
    CheckResult,
    Design,
    Requirement,
    Section,
    Series,
    Table,
    Verdict,
    constraint_values,
    meets_every_requirement,
    requirement,
    verdict,
)
from holeshape.checks.fatigue import FatigueCheck
from holeshape.checks.net_section import NetSectionCheck
from holeshape.checks.outline import OutlineCheck
from holeshape.checks.reinforcement import ReinforcementCheck, ReinforcementGeometryCheck
from holeshape.checks.stability import BucklingCheck
from holeshape.checks.stiffness import StiffnessCheck
from holeshape.checks.stress import StressCheck
from holeshape.checks.tees import TeeCheck

if TYPE_CHECKING:
    from holeshape.evaluate import Evaluation
    from holeshape.geometry import Cutout
    from holeshape.study import Study

CHECKS: tuple[type[Check], ...] = (
    OutlineCheck, AccessCheck, AreaCheck, ReinforcementGeometryCheck,
    StressCheck, NetSectionCheck, TeeCheck, ReinforcementCheck, BucklingCheck, FatigueCheck,
    StiffnessCheck,
)


def registered(stage: str | None = None) -> list[type[Check]]:
    """The registered checks (of one stage)."""
    return [c for c in CHECKS if stage is None or c.stage == stage]


def assess(study: Study, cutout: Cutout, evaluation: Evaluation | None = None, *, accuracy: str = "standard",
           purpose: str = "final", cache: dict | None = None, time_limit_s: float | None = None,
           keep_fields: bool = False, checks: tuple[type[Check], ...] | None = None) -> Assessment:
    """Run every check that applies to ``study`` on one design: the geometric ones alone when ``evaluation`` is
    None, every stage otherwise. ``purpose="search"`` runs only the checks a search trial steers by.
    ``checks`` replaces the registry (a test's own check)."""
    deadline = None if time_limit_s is None else time.perf_counter() + time_limit_s
    design = Design(study=study, cutout=cutout, evaluation=evaluation, accuracy=accuracy, purpose=purpose,
                    cache={} if cache is None else cache, deadline=deadline, keep_fields=keep_fields)
    results = []
    for cls in CHECKS if checks is None else checks:
        if cls.stage != "geometry" and evaluation is None:
            continue
        if purpose == "search" and not cls.in_search(study):
            continue
        check = cls()
        if check.relevant(design):
            results.append(check.run(design))
    return Assessment(results=tuple(results), stage="geometry" if evaluation is None else "solved")


def absent_sections(study: Study) -> list[Section]:
    """What the outputs say of the checks a reader looks for that do not apply ("not assessed", and how to ask)."""
    out = []
    for cls in CHECKS:
        if not cls.applies(study):
            s = cls.absent(study)
            if s is not None:
                out.append(s)
    return out


__all__ = ["CHECKS", "Assessment", "Chart", "ChartAxes", "Check", "CheckResult", "Design", "Requirement", "Section",
           "Series", "Table", "Verdict",
           "absent_sections", "assess", "constraint_values", "meets_every_requirement", "registered", "requirement",
           "verdict"]
