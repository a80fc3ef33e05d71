"""The record a run leaves for its reader: what went in, in the form the run folder stores it (``inputs.json``).

Frozen, built once from the parsed :class:`~holeshape.study.Study` and written as JSON; the report and the text
summaries read it back without solving. Units as in the study: mm, N, MPa.
"""

from __future__ import annotations

from dataclasses import asdict, dataclass, field, is_dataclass
from datetime import datetime, timezone
from typing import Any

from holeshape.checks.base import Requirement, verdict
from holeshape.stability import CASE_KEYS, DESIGN_KEYS
from holeshape.study import Study


@dataclass(frozen=True)
class RunInputs:
    """The study as run: every table as plain data, and when the run finished (UTC)."""

    title: str
    source: str
    panel: dict
    material: dict
    load_cases: tuple[dict, ...]
    constraints: dict
    search: dict
    measure: dict
    stability: dict | None
    finished: str
    reinforcement: dict | None = None  # the [reinforcement] table: kind and sizes (ranges as min/max/value)
    cutout: tuple[dict, ...] = ()  # every design parameter: fixed value or range (CutoutSpec.describe)
    shape: str = ""  # the study's family (the first opening's)
    warnings: tuple[str, ...] = ()  # the study's plausibility warnings
    tables: dict = field(default_factory=dict)  # the tables registered checks read ([fatigue]), as parsed

    @classmethod
    def from_study(cls, study: Study, finished: datetime | None = None, method: str | None = None) -> RunInputs:
        """``method``: the search method the run used (search.method "auto" resolved)."""
        when = (finished or datetime.now(timezone.utc)).strftime("%Y-%m-%d %H:%M UTC")
        search = asdict(study.search)
        if method is not None:
            search["method_used"] = method
        return cls(title=study.title, source=study.source, panel=asdict(study.panel),
                   material=study.material.to_dict(), load_cases=tuple(asdict(c) for c in study.load_cases),
                   constraints=asdict(study.constraints), search=search, measure=asdict(study.measure),
                   stability=None if study.stability is None else asdict(study.stability), finished=when,
                   reinforcement=reinforcement_table(study), cutout=tuple(study.cutout.describe()),
                   shape=study.cutout.shape, warnings=study.warnings,
                   tables={k: asdict(v) if is_dataclass(v) and not isinstance(v, type) else v
                           for k, v in study.tables})

    @classmethod
    def from_dict(cls, d: dict) -> RunInputs:
        """Read back a stored ``inputs.json`` (tables a run of an older version did not store are None)."""
        return cls(title=d["title"], source=d.get("source", ""), panel=d["panel"], material=d["material"],
                   load_cases=tuple(d["load_cases"]), constraints=d.get("constraints", {}),
                   search=d.get("search", {}), measure=d.get("measure", {}), stability=d.get("stability"),
                   finished=d.get("finished", ""), reinforcement=d.get("reinforcement"),
                   cutout=tuple(d.get("cutout", ())), shape=d.get("shape", ""), warnings=tuple(d.get("warnings", ())),
                   tables=d.get("tables", {}))

    def to_dict(self) -> dict:
        d = asdict(self)
        d["load_cases"] = list(self.load_cases)
        d["cutout"] = list(self.cutout)
        d["warnings"] = list(self.warnings)
        if d["reinforcement"] is None:
            d.pop("reinforcement")
        if not d["tables"]:
            d.pop("tables")
        return d


def reinforcement_table(study: Study) -> dict | None:
    """The study's [reinforcement] as plain data (None without one)."""
    from holeshape.study import Range

    r = study.cutout.reinforcement
    if r is None:
        return None
    out: dict = {"kind": r.kind}
    out.update({k: asdict(v) if isinstance(v, Range) else v for k, v in r.sizes})
    return out


REINFORCED_SUFFIX = ", reinforced"  # compare's row of the study's own family with its [reinforcement]


def folder_name(row_name: str) -> str:
    """The sub-folder of a compare row's search (the family's name; the reinforced row's own folder)."""
    return row_name.replace(REINFORCED_SUFFIX, "_reinforced")


# ----- what a search run found ------------------------------------------------------------------------------------
def _drop_none(d: dict, keys: tuple[str, ...]) -> dict:
    """``d`` without those of ``keys`` that are None (optional blocks a study without them does not store)."""
    return {k: v for k, v in d.items() if not (k in keys and v is None)}


@dataclass(frozen=True)
class CaseCheck:
    """One load case of the recommended design at the final level (MPa, mm)."""

    name: str
    peak_stress_mpa: float
    kt: float
    x_mm: float
    y_mm: float
    margin_of_safety: float | None
    error_estimate_pct: float
    verdict: str = "pass"
    verdict_reasons: tuple[str, ...] = ()
    advice: tuple[str, ...] = ()
    buckling_load_factor: float | None = None
    buckling_error_estimate_pct: float | None = None
    buckling_reserve: float | None = None
    buckling_load_factor_unperforated: float | None = None
    with_stability: bool = False
    # several openings: each opening's peak (LocationPeak as a dict: location, peak_stress_mpa, x_mm, y_mm,
    # error_estimate_pct); empty for one opening
    locations: tuple[dict, ...] = ()
    # what the other checks add to this load case (net section, tee sections, ...), by key
    extra: dict = field(default_factory=dict)

    def to_dict(self) -> dict:
        d = asdict(self)
        d.pop("with_stability")
        d.update(d.pop("extra"))
        d["locations"] = list(self.locations)
        if not self.locations:
            d.pop("locations")
        d["verdict_reasons"], d["advice"] = list(self.verdict_reasons), list(self.advice)
        if not self.with_stability:
            for k in CASE_KEYS:
                d.pop(k)
        return d

    @classmethod
    def from_dict(cls, d: dict) -> CaseCheck:
        own = {f for f in cls.__dataclass_fields__}
        kw: dict[str, Any] = {k: (tuple(v) if k in ("verdict_reasons", "advice", "locations") else v)
                              for k, v in d.items() if k in own}
        kw.pop("extra", None)
        return cls(**kw, with_stability="buckling_load_factor" in d,
                   extra={k: v for k, v in d.items() if k not in own})


@dataclass(frozen=True)
class LevelCheck:
    """The recommended design at one accuracy level (the evidence table)."""

    accuracy: str
    dofs: int
    peak_stress_mpa: float
    change_pct: float
    error_estimate_pct: float


@dataclass(frozen=True)
class DesignCheck:
    """The recommended design as checked at the final level: the ``best`` block of summary.json."""

    peak_stress_mpa: float
    kt: float
    kt_reference: str
    area_mm2: float
    error_estimate_pct: float
    params: dict
    shape: str
    dxf: str
    trial: int | None
    margin_of_safety: float | None
    accuracy: str
    min_radius_mm: float
    min_radius_at_mm: tuple[float, float]
    bounds_mm: tuple[float, float, float, float]
    load_cases: tuple[CaseCheck, ...]
    dxf_vertices: int
    dxf_chord_error_mm: float
    warnings: tuple[str, ...]
    levels: tuple[LevelCheck, ...]
    ligaments_mm: dict
    mass_saved_kg: float | None
    vtk: str
    requirements: tuple[Requirement, ...]
    stability: dict | None = None  # StabilityResult.to_dict() of the final check, None without [stability]
    feasible: bool = True
    # ReinforcementResult.to_dict() of the final check with "bare_opening": the same outline without it (None for a
    # bare opening)
    reinforcement: dict | None = None
    # every check's own block (by check name) and what the text and the report show of them (Section dicts, the
    # sections of checks that do not apply included where a reader looks for them)
    assessments: dict = field(default_factory=dict)
    sections: tuple[dict, ...] = ()
    # when the design was moved back along the goal to pass at the final level: how far, from which trial
    moved: dict | None = None
    # what the registered checks add to the top level (CheckResult.top_fields) beyond the fields above
    top: dict = field(default_factory=dict)

    @property
    def meets_every_requirement(self) -> bool:
        from holeshape.checks.base import meets_every_requirement

        return meets_every_requirement(self.requirements)

    @property
    def failed_requirements(self) -> tuple[Requirement, ...]:
        return tuple(r for r in self.requirements if not r.met)

    @property
    def buckling_load_factor(self) -> float | None:
        return None if self.stability is None else self.stability["buckling_load_factor"]

    def verdict(self, load_case: str | None = None) -> dict:
        return verdict(self.requirements, load_case).to_dict()

    def to_dict(self) -> dict:
        d = {f: getattr(self, f) for f in self.__dataclass_fields__}
        d.update(load_cases=[c.to_dict() for c in self.load_cases], levels=[asdict(x) for x in self.levels],
                 requirements=[r.to_dict() for r in self.requirements], warnings=list(self.warnings),
                 min_radius_at_mm=list(self.min_radius_at_mm), bounds_mm=list(self.bounds_mm),
                 sections=list(self.sections))
        stab = d.pop("stability")
        if stab is not None:
            d.update({k: stab[k] for k in DESIGN_KEYS}, stability=stab)
        if d["reinforcement"] is None:
            d.pop("reinforcement")
        if d["moved"] is None:
            d.pop("moved")
        top = d.pop("top")
        for k, v in top.items():
            d.setdefault(k, v)
        d["check_fields"] = list(top)
        d["meets_every_requirement"] = self.meets_every_requirement
        d["feasible"] = self.meets_every_requirement  # the recommendation is feasible exactly when it passes
        d.update(self.verdict())
        return d

    @classmethod
    def from_dict(cls, d: dict) -> DesignCheck:
        names = set(cls.__dataclass_fields__)
        kw = {k: v for k, v in d.items() if k in names}
        kw.update(load_cases=tuple(CaseCheck.from_dict(c) for c in d["load_cases"]),
                  levels=tuple(LevelCheck(**x) for x in d.get("levels", [])),
                  requirements=tuple(Requirement.from_dict(r) for r in d.get("requirements", [])),
                  warnings=tuple(d.get("warnings", [])), min_radius_at_mm=tuple(d.get("min_radius_at_mm") or (0, 0)),
                  bounds_mm=tuple(d["bounds_mm"]), stability=d.get("stability"),
                  reinforcement=d.get("reinforcement"), sections=tuple(d.get("sections", ())),
                  assessments=d.get("assessments", {}), moved=d.get("moved"),
                  top={k: d.get(k) for k in d.get("check_fields", [])})
        return cls(**kw)


@dataclass(frozen=True)
class Baseline:
    """A standard shape checked at the final level (``feasible`` False with the reason when it cannot meet the
    requirements)."""

    shape: str
    feasible: bool
    reason: str | None = None
    peak_stress_mpa: float | None = None
    area_mm2: float | None = None
    kt: float | None = None
    error_estimate_pct: float | None = None
    params: dict | None = None
    buckling_load_factor: float | None = None
    margin_of_safety: float | None = None
    added_mass_kg: float | None = None  # the reinforcement the standard shape carries (a reinforced study)
    added_volume_mm3: float | None = None
    figures: dict = field(default_factory=dict)  # what the registered checks add to a comparison row (row_fields)

    def to_dict(self) -> dict:
        d = _drop_none(asdict(self), ("reason", "peak_stress_mpa", "area_mm2", "kt", "error_estimate_pct",
                                      "params", "buckling_load_factor", "margin_of_safety", "added_mass_kg",
                                      "added_volume_mm3"))
        if not d["figures"]:
            d.pop("figures")
        return d

    @classmethod
    def from_dict(cls, d: dict) -> Baseline:
        return cls(**{k: v for k, v in d.items() if k in cls.__dataclass_fields__})


@dataclass(frozen=True)
class TrialCounts:
    completed: int
    infeasible: int
    failed: int
    interrupted: int
    refused_after_solve: dict
    failures: tuple[str, ...]
    probes: int = 0  # gradient probes among the completed trials (one mesh level each; no candidates)

    @property
    def probe_note(self) -> str:
        """' (of them k gradient probes)' for the outputs, or ''."""
        return f", {self.probes} of them gradient probes" if self.probes else ""


OUTCOMES = ("recommended", "no_design")


@dataclass(frozen=True)
class RunRecord:
    """Everything a search run leaves for its reader; ``summary.json`` is :meth:`to_summary` (its keys are a
    contract), and the report and the text summary are built from :meth:`from_summary`.

    ``outcome`` "recommended": ``best`` meets every requirement at the final level; "no_design": nothing the run
    found or the standard shapes meets them, ``best`` is None and ``nearest_misses``, ``trial_reasons`` and
    ``advice`` say why and what to change. ``family_best`` is the searched family's best at the final level (passing
    or its nearest miss), ``choice`` one sentence on why the recommendation is the one it is."""

    best: DesignCheck | None
    family_best: dict | None
    baselines: tuple[Baseline, ...]
    improvement_over_baselines_pct: dict
    goal: str
    trials: TrialCounts
    storage: str
    study: str
    search_accuracy: str
    elapsed_s: float
    plots: tuple[str, ...]
    holeshape_version: str
    cautions: str
    front: tuple[dict, ...] | None = None
    comparison: tuple[dict, ...] | None = None
    outcome: str = "recommended"
    choice: str = ""
    nearest_misses: tuple[dict, ...] = ()
    trial_reasons: tuple[dict, ...] = ()
    advice: tuple[str, ...] = ()
    study_fingerprint: str = ""
    trials_finished: int = 0
    warnings: tuple[str, ...] = ()

    def to_summary(self) -> dict:
        t = self.trials
        d = {"outcome": self.outcome, "best": None if self.best is None else self.best.to_dict(), "goal": self.goal,
             "choice": self.choice, "trials_refused_after_solve": t.refused_after_solve,
             "family_best": self.family_best, "baselines": [b.to_dict() for b in self.baselines],
             "improvement_over_baselines_pct": self.improvement_over_baselines_pct,
             "trials_completed": t.completed, "trials_infeasible": t.infeasible, "trials_failed": t.failed,
             "trials_interrupted": t.interrupted, "trials_probes": t.probes, "failures": list(t.failures),
             "storage": self.storage,
             "study": self.study, "search_accuracy": self.search_accuracy, "elapsed_s": self.elapsed_s,
             "plots": list(self.plots), "holeshape_version": self.holeshape_version, "cautions": self.cautions,
             "nearest_misses": list(self.nearest_misses), "trial_reasons": list(self.trial_reasons),
             "advice": list(self.advice), "study_fingerprint": self.study_fingerprint,
             "trials_finished": self.trials_finished, "warnings": list(self.warnings)}
        if self.front is not None:
            d["front"] = list(self.front)
        if self.comparison is not None:
            d["comparison"] = list(self.comparison)
        return d

    @classmethod
    def from_summary(cls, d: dict) -> RunRecord:
        trials = TrialCounts(d["trials_completed"], d["trials_infeasible"], d["trials_failed"],
                             d.get("trials_interrupted", 0), d.get("trials_refused_after_solve", {}),
                             tuple(d.get("failures", [])), d.get("trials_probes", 0))
        return cls(best=None if d.get("best") is None else DesignCheck.from_dict(d["best"]),
                   family_best=d.get("family_best"),
                   baselines=tuple(Baseline.from_dict(b) for b in d.get("baselines", [])),
                   improvement_over_baselines_pct=d.get("improvement_over_baselines_pct", {}),
                   goal=d.get("goal", "lowest_peak"), trials=trials, storage=d.get("storage", ""),
                   study=d.get("study", ""), search_accuracy=d.get("search_accuracy", ""),
                   elapsed_s=d.get("elapsed_s", 0.0), plots=tuple(d.get("plots", [])),
                   holeshape_version=d.get("holeshape_version", ""), cautions=d.get("cautions", ""),
                   front=None if d.get("front") is None else tuple(d["front"]),
                   comparison=None if d.get("comparison") is None else tuple(d["comparison"]),
                   outcome=d.get("outcome", "recommended"), choice=d.get("choice", ""),
                   nearest_misses=tuple(d.get("nearest_misses", ())), trial_reasons=tuple(d.get("trial_reasons", ())),
                   advice=tuple(d.get("advice", ())), study_fingerprint=d.get("study_fingerprint", ""),
                   trials_finished=d.get("trials_finished", 0), warnings=tuple(d.get("warnings", ())))


@dataclass(frozen=True)
class SweepRecord:
    """What a parameter sweep found (``sweep.json``): the varied parameters, every point with its evaluation or the
    reason it has none, and the level."""

    study: str
    vary: tuple[dict, ...]
    points: tuple[dict, ...]
    accuracy: str
    elapsed_s: float
    required_buckling_factor: float | None = None

    @property
    def with_stability(self) -> bool:
        return self.required_buckling_factor is not None

    def to_dict(self) -> dict:
        d = {"study": self.study, "vary": list(self.vary), "points": list(self.points), "accuracy": self.accuracy,
             "elapsed_s": self.elapsed_s}
        if self.required_buckling_factor is not None:
            d["required_buckling_factor"] = self.required_buckling_factor
        return d

    @classmethod
    def from_dict(cls, d: dict) -> SweepRecord:
        return cls(study=d["study"], vary=tuple(d["vary"]), points=tuple(d["points"]), accuracy=d["accuracy"],
                   elapsed_s=d.get("elapsed_s", 0.0), required_buckling_factor=d.get("required_buckling_factor"))
