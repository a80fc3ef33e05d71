"""The final level: the search's best designs and the standard shapes checked at the finest accuracy against every
requirement (the same checks as every trial, with their evidence), the choice of the recommendation, and the design
moved back along the goal when the best draft designs sit on a solved requirement.

The rule: the recommended design meets every requirement at the final level, or there is none (the run then says
why). Nothing here writes a file.
"""

from __future__ import annotations

import logging
from collections.abc import Callable
from dataclasses import dataclass, field, replace
from typing import TYPE_CHECKING, Any

from holeshape.checks import Assessment, assess
from holeshape.checks.stability import BucklingResult
from holeshape.checks.stress import StressResult
from holeshape.errors import GeometryError, MeshError, SolveError
from holeshape.evaluate import Evaluation, evaluate
from holeshape.goals import GOALS
from holeshape.progress import QUIET, Progress
from holeshape.search.runner import finished, is_feasible
from holeshape.study import ACCURACIES, Measure, Study

if TYPE_CHECKING:
    from holeshape.geometry import Cutout
    from holeshape.goals import Goal
    from holeshape.progress import Bar
    from holeshape.record import Baseline
    from holeshape.search.space import DesignSpace

# ``study`` and ``trial`` below, where they are not a holeshape Study, are optuna's: typed Any

log = logging.getLogger("holeshape.final")

FINAL_ACCURACY = ACCURACIES[-1]  # the finest level: the reported figures
FINAL_TRIES = 3  # best search designs checked at the final level before moving one back along the goal
# moving back along the goal (Goal.retreat): the first step, its growth while the design still fails, the most
# final-level checks, and when to stop halving between the last failing and the first passing step (a share of the
# passing step, or a quarter of the first step, whichever is larger)
RETREAT_START = 0.02
RETREAT_GROWTH = 3.0
RETREAT_STEPS = 7
RETREAT_TOLERANCE = 0.25
RETREAT_PROBES = 12  # steps tried beyond a range's end (no check spent on them) before giving up


@dataclass(frozen=True)
class Checked:
    """A design checked at the final level: its family, outline, evaluation (with fields when kept), assessment,
    the trial it came from (None for a standard shape), its objective, and how it was moved back along the goal."""

    family: str
    cutout: Cutout
    evaluation: Evaluation
    assessment: Assessment
    trial: int | None
    score: float
    moved: dict | None = None

    @property
    def passes(self) -> bool:
        return self.assessment.meets_every_requirement

    def summary(self) -> dict:
        """The figures the comparison of designs reads."""
        st = self.assessment.result("stability")
        rf = self.assessment.result("reinforcement")
        stress = self.assessment.result("stress")
        return {"shape": self.family, "trial": self.trial, "peak_stress_mpa": self.evaluation.peak_stress_mpa,
                "kt": self.evaluation.kt, "area_mm2": self.evaluation.area_mm2,
                "error_estimate_pct": self.evaluation.error_estimate_pct,
                "margin_of_safety": stress.lowest_margin if isinstance(stress, StressResult) else None,
                "buckling_load_factor": st.stability.load_factor if isinstance(st, BucklingResult) else None,
                "reinforcement": None if rf is None else rf.to_dict(),
                "meets_every_requirement": self.passes, "verdict_reasons": self.assessment.reasons(),
                **{k: v for res in self.assessment.results for k, v in res.row_fields().items()}}


@dataclass(frozen=True)
class FinalChecks:
    """How the final level is run for one study: the study, the run's cache, the progress to report to."""

    study: Study
    cache: dict = field(default_factory=dict, compare=False)
    progress: Progress = field(default=QUIET, compare=False)

    @property
    def measure(self) -> Measure:
        return Measure(self.study.measure.stress, FINAL_ACCURACY)

    def check(self, cut: Cutout, family: str, trial: int | None, keep: bool = False) -> Checked:
        """Evaluate and assess one design at the final level; ``keep`` keeps the fields the plots need."""
        s = self.study
        ev = evaluate(s.panel, s.material, s.load_cases, cut, self.measure)
        a = assess(s, cut, ev, accuracy=FINAL_ACCURACY, cache=self.cache, keep_fields=keep)
        score = GOALS[s.search.goal].objective(ev, cut, s, a)
        return Checked(family, cut, ev if keep else ev.without_fields(), a, trial, score)

    def attempt(self, cut: Cutout, family: str, trial: int | None, keep: bool = False) -> Checked | str:
        """:meth:`check`, or why the design could not be checked at the final level (its outline fails a
        requirement the mesher needs, or the mesher or solver gave up on it): one line, the run goes on."""
        geo = assess(self.study, cut)
        if not geo.can_mesh:
            return "; ".join(r.reason or r.label for r in geo.failed if r.to_mesh)
        try:
            return self.check(cut, family, trial, keep)
        except (MeshError, SolveError) as err:
            return f"not solved at the {FINAL_ACCURACY} level: " + " ".join(str(err).split())

    def standard(self, cut: Cutout, family: str) -> Checked | str:
        """A standard shape, checked once per run (``compare`` checks the same ones for every family); a string
        says why it could not be checked."""
        key = standard_key(self.study, cut)
        if key not in self.cache:
            self.cache[key] = self.attempt(cut, family, None)
        return self.cache[key]


def standard_key(study: Study, cutout: Cutout) -> tuple:
    """What a standard shape's final check depends on (compare reuses it across families of one study)."""
    s = study
    return ("standard shape", s.panel, s.material, s.load_cases, cutout, s.measure.stress, s.stability,
            s.constraints, s.tables, s.search.goal)


def check_standard_shapes(checks: FinalChecks, baselines: list[tuple[str, Cutout | None, str]], bar: Bar | None = None
                          ) -> tuple[list[Baseline], list[Checked]]:
    """The standard shapes at the final level against every requirement: their rows (``record.Baseline``), and
    those that pass."""
    from holeshape.record import Baseline

    rows: list[Baseline] = []
    usable: list[Checked] = []
    for family, cut, note in baselines:
        if bar is not None:
            bar.note(f"standard {family.replace('_', ' ')}")
        if cut is None:
            rows.append(Baseline(shape=family, feasible=False, reason=note))
        else:
            c = checks.standard(cut, family)
            if isinstance(c, str):
                rows.append(Baseline(shape=family, feasible=False, reason=c, params=cut.parameters()))
                if bar is not None:
                    bar.update()
                continue
            s = c.summary()
            r = s["reinforcement"] or {}
            rows.append(Baseline(shape=family, feasible=c.passes, reason="; ".join(s["verdict_reasons"]) or None,
                                 peak_stress_mpa=s["peak_stress_mpa"], area_mm2=s["area_mm2"], kt=s["kt"],
                                 error_estimate_pct=s["error_estimate_pct"], params=cut.parameters(),
                                 buckling_load_factor=s["buckling_load_factor"],
                                 margin_of_safety=s["margin_of_safety"], added_mass_kg=r.get("added_mass_kg"),
                                 added_volume_mm3=r.get("added_volume_mm3"),
                                 figures={k: v for res in c.assessment.results for k, v in res.row_fields().items()}))
            if c.passes:
                usable.append(c)
        if bar is not None:
            bar.update()
    return rows, usable


@dataclass(frozen=True)
class Choice:
    """The recommendation (None: nothing passes), the searched family's best at the final level (``own``: the best
    that passes; ``nearest``: its best miss when none does), the misses checked, why, and the best trials the final
    level could not check."""

    best: Checked | None
    own: Checked | None
    nearest: Checked | None
    misses: tuple[Checked, ...]
    reason: str
    unsolved: tuple[tuple[int, str], ...] = ()  # best trials that could not be checked at the final level, and why


def choose(checks: FinalChecks, study: Any, space: DesignSpace, usable: list[Checked] | Callable[[], list[Checked]],
           bar: Bar | None = None, standard_count: int = 0) -> Choice:
    """The best feasible trials checked at the final level until one passes; when none does and the failures are
    the ones the goal can move away from, the best moved back along the goal until it passes; then the lower of it
    and the passing standard shapes. ``usable``: the passing standard shapes, or a callable giving them (they are
    checked in another process meanwhile)."""
    s = checks.study
    goal = GOALS[s.search.goal]
    family = s.cutout.shape
    ranked = sorted((t for t in finished(study) if is_feasible(t)), key=lambda t: t.values[0])
    own, misses = None, []
    unsolved: list[tuple[int, str]] = []
    for t in ranked[:FINAL_TRIES]:
        if bar is not None:
            bar.note(f"trial {t.number} at the {FINAL_ACCURACY} level")
        c = checks.attempt(space.decode(t.params), family, t.number, keep=True)
        if bar is not None:
            bar.update()
        if isinstance(c, str):  # solved at the draft level, not at the final one: a miss with its reason
            log.warning("trial %d could not be checked at the %s level: %s", t.number, FINAL_ACCURACY, c)
            unsolved.append((t.number, c))
            continue
        if c.passes:
            own = c
            break
        misses.append(c)
    if own is None and misses and all(r.structural for r in misses[0].assessment.failed):
        t0 = next(t for t in ranked if t.number == misses[0].trial)
        own = retreat(checks, goal, space, t0, misses[0], bar)
    if callable(usable):
        usable = usable()
    candidates = ([own] if own is not None else []) + list(usable)
    nearest = None if own is not None or not misses else min(misses, key=lambda c: _miss_size(c))
    if not candidates:
        std = "no standard shape applies (no access envelope or area requirement to size one by)" \
            if standard_count == 0 else "none of the standard shapes meets them either"
        lost = "" if not unsolved else "; " + "; ".join(f"trial {n}: {why}" for n, why in unsolved)
        return Choice(None, None, nearest, tuple(misses), f"nothing the search found meets every requirement at the"
                      f" {FINAL_ACCURACY} level, and {std}{lost}", tuple(unsolved))
    best = min(candidates, key=lambda c: c.score)
    return Choice(best, own, nearest, tuple(misses), _why(best, own, nearest, list(usable), goal, family),
                  tuple(unsolved))


def _miss_size(c: Checked) -> float:
    return sum(max(0.0, r.constraint or 0.0) for r in c.assessment.failed) + 1e-3 * len(c.assessment.failed)


def _why(best: Checked, own: Checked | None, nearest: Checked | None, usable: list[Checked], goal: Goal,
         family: str) -> str:
    """One sentence: why the recommendation is the one it is, the comparison's direction in words."""
    fam = family.replace("_", " ")
    if best is own:
        rivals = [c for c in usable if c is not best]
        if not rivals:
            return (f"the searched {fam}'s best (trial {best.trial}) is recommended: it meets every requirement at the"
                    f" {FINAL_ACCURACY} level and no standard shape does")
        top = min(rivals, key=lambda c: c.score)
        than = goal.better(best.summary(), top.summary())
        return (f"the searched {fam}'s best (trial {best.trial}) is recommended: {than} the best standard shape that"
                f" passes (the {top.family.replace('_', ' ')})")
    shape = best.family.replace("_", " ")
    if own is not None:
        return (f"the standard {shape} is recommended: {goal.better(best.summary(), own.summary())} the searched"
                f" {fam}'s best (trial {own.trial}), which also meets every requirement")
    if nearest is not None:
        return (f"the standard {shape} is recommended: the searched {fam}'s best designs miss a requirement at the"
                f" {FINAL_ACCURACY} level (trial {nearest.trial}: {'; '.join(nearest.assessment.reasons())})")
    return f"the standard {shape} is recommended: the search found no {fam} that meets every requirement"


def retreat(checks: FinalChecks, goal: Goal, space: DesignSpace, trial: Any, first: Checked, bar: Bar | None = None
            ) -> Checked | None:
    """Move the trial's design back along the goal (a smaller opening, a larger reinforcement) until it meets every
    requirement at the final level: steps growing from RETREAT_START while it fails (halving back from a range's
    end when a step runs past one), then halving between the last failing and the first passing step. Returns the
    passing design with how far it moved, or None (the ranges end, the geometry or the mesher refuses the moved
    design, or the checks run out first)."""
    spec = space.spec
    point = space.point(trial.params)
    ranges = spec.ranges
    family = spec.shape
    t, t_fail, t_pass, t_beyond = RETREAT_START, 0.0, None, None
    best: Checked | None = None
    checked = probes = 0
    close = 0.25 * RETREAT_START  # steps closer than this are the same design for the purpose
    while checked < RETREAT_STEPS and probes < RETREAT_PROBES:
        moved = goal.retreat(spec, point, t, ranges)
        if moved is None:  # past the end of a range: no check spent; look between the last failure and here
            probes += 1
            t_beyond = t
        else:
            pt, scale = moved
            try:
                cut = spec.build(pt, scale=scale)
            except GeometryError:
                break
            if bar is not None:
                bar.grow(1)
                bar.note(f"trial {trial.number} moved back along the goal")
            c = checks.attempt(cut, family, trial.number, keep=True)
            checked += 1
            if bar is not None:
                bar.update()
            if isinstance(c, str):  # moving further makes the outline or the reinforcement worse, not better
                log.info("trial %d moved back by %.3g: %s", trial.number, t, c)
                break
            if c.passes:
                t_pass, best = t, replace(c, moved=_moved(first, c, t, scale, goal, trial.number))
            elif any(not r.structural for r in c.assessment.failed):  # the move broke a geometric requirement
                break
            else:
                t_fail = t
        if t_pass is not None:
            if t_pass - t_fail <= max(RETREAT_TOLERANCE * t_pass, close):
                break
            t = 0.5 * (t_fail + t_pass)
        elif t_beyond is not None:
            if t_beyond - t_fail <= close:  # the range ends right past the last failing step
                break
            t = 0.5 * (t_fail + t_beyond)
        elif t >= 1.0:
            break
        else:
            t = min(1.0, t * RETREAT_GROWTH)
    return best


def _moved(first: Checked, now: Checked, t: float, scale: float, goal: Goal, trial: int) -> dict:
    """How far a design was moved back along the goal to pass: in the goal's own terms and in words."""
    a0, a1 = first.evaluation.area_mm2, now.evaluation.area_mm2
    out: dict[str, Any] = {
        "from_trial": trial, "step": t, "length_scale": scale, "area_mm2_before": a0, "area_mm2_after": a1,
        "objective_before": first.score, "objective_after": now.score,
        "failed_before": [r.reason or r.label for r in first.assessment.failed], "how": goal.retreat_note}
    if scale != 1.0:
        out["note"] = (f"trial {trial} missed {'; '.join(out['failed_before'])} at the {FINAL_ACCURACY} level; the"
                       f" outline was scaled by {scale:.4f} ({100 * (1 - scale):.2f} % smaller in every length, removed"
                       f" area {100 * (1 - a1 / a0):.2f} % smaller) until it met every requirement")
    else:
        v0, v1 = first.score, now.score
        grow = f"{100 * (v1 / v0 - 1):.1f} % more reinforcement volume" if v0 > 0 else "a larger reinforcement"
        out["note"] = (f"trial {trial} missed {'; '.join(out['failed_before'])} at the {FINAL_ACCURACY} level;"
                       f" {goal.retreat_note} ({grow}) until it met every requirement")
    return out
