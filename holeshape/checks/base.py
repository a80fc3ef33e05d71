"""The one seam every assessment of a design goes through.

A *check* is one module: a :class:`Check` subclass registered in :data:`holeshape.checks.CHECKS` that says whether
it applies to a study, runs on a :class:`Design` (the study, the placed cutout and, at the ``"solved"`` stage, its
plane-stress :class:`~holeshape.evaluate.Evaluation`) and returns a frozen :class:`CheckResult`: its own typed
numbers (``to_dict`` for the JSON), the :class:`Requirement` rows it sets, warnings, and a :class:`Section` the
text summary and the report print without knowing the check. The search's constraint values, the gradient's
geometric rows, the verdicts, the text, the JSON and the report all read the same requirement list, and
:func:`meets_every_requirement` decides, once, whether a design passes.

Adding a check: write the module (a ``Check`` and its ``CheckResult``), add it to ``CHECKS``, and, if it reads a
table of its own from the study file, name it in ``Check.table`` with its parser (``parse_table``); nothing else
changes (DEVELOPERS.md, "Adding a check").
"""

from __future__ import annotations

import math
from abc import ABC, abstractmethod
from dataclasses import asdict, dataclass, field
from typing import TYPE_CHECKING, Any, ClassVar

if TYPE_CHECKING:
    from collections.abc import Iterable

    import numpy as np

    from holeshape.geometry import Cutout
    from holeshape.study import Study

RELATIONS = (">=", "<=", "=")


# kinds of requirement on the solved design's strength or stability; a new check whose rows a goal's move can address
# (a fatigue life read as a margin) uses one of them
STRUCTURAL_KINDS = ("margin", "buckling", "fatigue")


@dataclass(frozen=True)
class Requirement:
    """One requirement of the study checked on one design.

    ``name`` is the key the search records its constraint under (several rows may share it: the margin of every
    load case is ``"margin"``; the search keeps the worst). ``value`` is what the design achieves (None where the
    quantity does not exist: a case that does not buckle), ``limit`` and ``relation`` what is required, ``unit``
    the unit of both. ``constraint`` is the scaled shortfall the search records (<= 0 met, of comparable size
    across requirements so a sampler can rank the misses), None for evidence the search does not steer by (the
    mesh error estimate). ``reason`` (set when not met) and ``advice`` are one line each for people. ``listed``
    False keeps a row implied by another out of the verdict tables while it is met."""

    name: str
    label: str
    value: float | None
    limit: float
    relation: str
    met: bool
    unit: str = ""
    kind: str = "geometry"
    constraint: float | None = None
    load_case: str | None = None
    reason: str | None = None
    advice: str | None = None
    check: str = ""
    listed: bool = True
    to_mesh: bool = False  # the mesher needs it met: a design that misses it cannot be solved at all

    @property
    def structural(self) -> bool:
        """A requirement on the solved design's strength or stability (a margin, a buckling factor): the kind a
        goal's move back (a smaller opening, a larger reinforcement) addresses; not the geometry or the accuracy."""
        return self.kind in STRUCTURAL_KINDS

    @property
    def limit_text(self) -> str:
        """What is required, as the tables print it (``">= 25"``, ``">= +0"`` for a margin)."""
        lim = f"{self.limit:+g}" if self.kind == "margin" else f"{self.limit:g}"
        return f"{self.relation} {lim}"

    @property
    def shortfall(self) -> float:
        """How far the design misses (0 when met), in the units of the value."""
        if self.met or self.value is None:
            return 0.0
        return abs(self.limit - self.value)

    def to_dict(self) -> dict[str, Any]:
        d = asdict(self)
        d["requirement"] = d.pop("label")
        d["limit_value"] = d.pop("limit")
        d["limit"] = self.limit_text
        return d

    @classmethod
    def from_dict(cls, d: dict[str, Any]) -> Requirement:
        """Read back a stored row (older runs stored only requirement, value, limit as text, met, kind, load case)."""
        limit = d.get("limit_value")
        relation = d.get("relation")
        if limit is None:  # an older run: the limit as text only
            text = str(d.get("limit", "")).split()
            relation = relation or (text[0] if text else "")
            try:
                limit = float(text[1]) if len(text) > 1 else math.nan
            except ValueError:
                limit = math.nan
        names = {f for f in cls.__dataclass_fields__}
        kw = {k: v for k, v in d.items() if k in names and k not in ("limit", "label", "relation")}
        return cls(label=d.get("requirement", d.get("label", "")), limit=float(limit), relation=relation or "",
                   **kw)


def within_estimate(label: str, value: float | None, limit: float, estimate_pct: float | None) -> str | None:
    """A warning when a structural requirement is met by less than the mesh error estimate of its quantity: the
    verdict is the mesh's, and a finer mesh could turn it. ``value`` and ``limit`` in the quantity's own terms (a
    peak against the stress the margin allows, a factor against the required factor), larger is better."""
    if value is None or estimate_pct is None or limit <= 0 or value < limit:
        return None
    headroom = 100.0 * (value / limit - 1.0)
    if headroom >= estimate_pct:
        return None
    return (f"{label} meets its requirement by {headroom:.2g} %, less than its mesh error estimate of"
            f" {estimate_pct:.2g} %: the pass rests on the mesh; check it at a finer level or keep more margin")


def requirement(name: str, label: str, value: float | None, limit: float, relation: str, *, scale: float | None,
                unit: str = "", kind: str = "geometry", load_case: str | None = None, advice: str | None = None,
                check: str = "", listed: bool = True, tolerance: float = 0.0, reason: str | None = None,
                to_mesh: bool = False) -> Requirement:
    """A requirement row with its verdict and scaled constraint: ``value relation limit`` (``tolerance`` in the
    value's units is granted, for instance the chord sag of a sampled outline); ``scale`` divides the shortfall
    into the constraint the search records (None: not a search constraint). ``value`` None is met (the quantity
    does not arise). ``reason`` overrides the default one-line reason."""
    if relation not in RELATIONS:
        raise ValueError(f"relation must be one of {RELATIONS}, got {relation!r}")
    if value is None:
        met, miss = True, -1.0
    elif relation == ">=":
        met, miss = value + tolerance >= limit, limit - value - tolerance
    elif relation == "<=":
        met, miss = value - tolerance <= limit, value - tolerance - limit
    else:
        met = abs(value - limit) <= max(tolerance, 1e-6 * abs(limit))
        miss = abs(value - limit) - max(tolerance, 1e-6 * abs(limit))
    constraint = None if scale is None else (miss / scale if value is not None else -1.0)
    if not met and reason is None:
        unit_text = f" {unit}" if unit and unit != "%" else (" %" if unit == "%" else "")
        word = {">=": "<", "<=": ">", "=": "!="}[relation]
        shown = f"{value:+.3f}" if kind == "margin" else f"{value:.4g}"
        lim = f"{limit:+g}" if kind == "margin" else f"{limit:g}"
        reason = f"{label} {shown}{unit_text} {word} {lim}{unit_text}"
    return Requirement(name=name, label=label, value=None if value is None else float(value), limit=float(limit),
                       relation=relation, met=bool(met), unit=unit, kind=kind, constraint=constraint,
                       load_case=load_case, reason=None if met else reason, advice=advice, check=check,
                       listed=listed, to_mesh=to_mesh)


@dataclass(frozen=True)
class Verdict:
    """Pass or fail over a set of requirements: each failed one with its value against its limit, and what to
    change (each advice once)."""

    passed: bool
    reasons: tuple[str, ...] = ()
    advice: tuple[str, ...] = ()

    def to_dict(self) -> dict[str, Any]:
        return {"verdict": "pass" if self.passed else "fail", "verdict_reasons": list(self.reasons),
                "advice": list(self.advice)}


def meets_every_requirement(requirements: Iterable[Requirement]) -> bool:
    """The one definition of a design that passes: every requirement met."""
    return all(r.met for r in requirements)


def verdict(requirements: Iterable[Requirement], load_case: str | None = None) -> Verdict:
    """The verdict over ``requirements`` (those of one load case with ``load_case``)."""
    sel = [r for r in requirements if load_case is None or r.load_case == load_case]
    failed = [r for r in sel if not r.met]
    return Verdict(passed=not failed, reasons=tuple(r.reason or r.label for r in failed),
                   advice=tuple(dict.fromkeys(r.advice for r in failed if r.advice)))


def constraint_values(requirements: Iterable[Requirement]) -> dict[str, float]:
    """The scaled constraint values the search records, by name (the worst row of each name)."""
    out: dict[str, float] = {}
    for r in requirements:
        if r.constraint is not None:
            out[r.name] = max(out.get(r.name, -math.inf), float(r.constraint))
    return out


# ----- what a result shows ------------------------------------------------------------------------------------------
@dataclass(frozen=True)
class Table:
    """A table for people: ``columns`` (key, heading with its unit), ``rows`` of plain values by key."""

    columns: tuple[tuple[str, str], ...]
    rows: tuple[dict[str, Any], ...]

    def to_dict(self) -> dict[str, Any]:
        return {"columns": [list(c) for c in self.columns], "rows": [dict(r) for r in self.rows]}

    @classmethod
    def from_dict(cls, d: dict[str, Any]) -> Table:
        return cls(columns=tuple((c[0], c[1]) for c in d["columns"]), rows=tuple(d["rows"]))


@dataclass(frozen=True)
class Section:
    """What a check says in the text summary and the report: a title, paragraphs and tables, plain data (the
    report is rebuilt from the stored JSON, so a section must survive it)."""

    title: str
    paragraphs: tuple[str, ...] = ()
    tables: tuple[Table, ...] = ()
    warn: bool = False  # the first paragraph is a warning (a check that was not made, a figure in doubt)
    images: tuple[tuple[str, str], ...] = ()  # (file name in a run folder, what it shows) the report embeds

    def to_dict(self) -> dict[str, Any]:
        return {"title": self.title, "paragraphs": list(self.paragraphs), "tables": [t.to_dict() for t in self.tables],
                "warn": self.warn, "images": [list(i) for i in self.images]}

    @classmethod
    def from_dict(cls, d: dict[str, Any]) -> Section:
        return cls(title=d["title"], paragraphs=tuple(d.get("paragraphs", ())),
                   tables=tuple(Table.from_dict(t) for t in d.get("tables", ())), warn=d.get("warn", False),
                   images=tuple((i[0], i[1]) for i in d.get("images", ())))


@dataclass(frozen=True)
class Series:
    """One line (``style`` "line") or set of markers ("points") of a chart, plain numbers."""

    label: str
    x: tuple[float, ...]
    y: tuple[float, ...]
    style: str = "line"


@dataclass(frozen=True)
class ChartAxes:
    """One pair of axes of a chart: labels with units, the series, logarithmic axes, a title."""

    x_label: str
    y_label: str
    series: tuple[Series, ...]
    log_x: bool = False
    log_y: bool = False
    title: str = ""


@dataclass(frozen=True)
class Chart:
    """A figure a check asks for (its data only; the output layer draws it): the file it goes to in a run folder
    (a ``Section`` names the same file to embed it), a title, one or more axes side by side."""

    file: str
    title: str
    axes: tuple[ChartAxes, ...]


@dataclass(frozen=True, kw_only=True)
class CheckResult:
    """Base of every check's frozen result: its requirement rows and warnings; subclasses add their numbers."""

    check: ClassVar[str] = ""
    requirements: tuple[Requirement, ...] = ()
    warnings: tuple[str, ...] = ()

    def to_dict(self) -> dict[str, Any] | None:
        """The result's own block of the JSON (its numbers; the requirements are listed once, with the others), or
        None when the check has no block of its own."""
        d = asdict(self)
        d.pop("requirements")
        d.pop("warnings")
        return d

    def top_fields(self) -> dict[str, Any]:
        """Keys the result adds to the top level of a design's JSON (kept where earlier versions put them)."""
        return {}

    def case_fields(self, load_case: str) -> dict[str, Any]:
        """Keys the result adds to one load case's entry of the JSON."""
        return {}

    def section(self) -> Section | None:
        """What the text summary and the report show of the result (None: nothing beyond the requirements)."""
        return None

    def row_fields(self) -> dict[str, Any]:
        """The few numbers a comparison or sweep row shows for this result (key: value; headings in
        ``Check.columns``)."""
        return {}

    def charts(self) -> tuple[Chart, ...]:
        """Figures of the result the outputs draw for the recommended or checked design (plain data)."""
        return ()


@dataclass(frozen=True)
class Design:
    """What a check runs on: the study, the placed cutout, and at the solved stage the plane-stress evaluation
    (with its fields). ``accuracy`` is the level the evaluation was made at, ``purpose`` ``"search"`` (a trial:
    only the checks the search steers by) or ``"final"``; ``cache`` the run's shared results; ``deadline`` a
    ``time.perf_counter()`` value no further work may start after; ``keep_fields`` asks for what the plots need."""

    study: Any
    cutout: Any
    evaluation: Any = None
    accuracy: str = "standard"
    purpose: str = "final"
    cache: dict = field(default_factory=dict, compare=False, hash=False)
    deadline: float | None = None
    keep_fields: bool = False

    @property
    def time_left_s(self) -> float | None:
        import time

        return None if self.deadline is None else max(1.0, self.deadline - time.perf_counter())


class Check(ABC):
    """The contract of a check. ``name`` is its registry key and the key of its block in the JSON; ``stage``
    ``"geometry"`` (runs before any mesh: a design that fails one is never solved) or ``"solved"``; ``table`` the
    study-file table it reads (parsed by :meth:`parse_table` into ``Study.tables[name]``), if any."""

    name: ClassVar[str] = ""
    title: ClassVar[str] = ""
    stage: ClassVar[str] = "solved"
    table: ClassVar[str | None] = None
    # keys of the study's [constraints] table the check reads (numbers > 0; the check's parse_table gets them in
    # ``study_parts["constraints"]``; given without the check's table they are an error)
    constraint_keys: ClassVar[tuple[str, ...]] = ()
    # the row_fields a comparison or sweep table shows, with their headings
    columns: ClassVar[tuple[tuple[str, str], ...]] = ()

    @classmethod
    def applies(cls, study: Study) -> bool:
        """Whether the check has anything to say about this study."""
        return True

    def relevant(self, design: Design) -> bool:
        """Whether to run on this design (default: the check applies to the study; a check of a part the design
        may lack, such as a reinforcement on the same outline checked bare, also asks the design)."""
        return self.applies(design.study)

    @classmethod
    def bounds(cls, study: Study) -> bool:
        """Whether it sets a structural requirement on this study (a limit that bounds a goal growing the opening
        or shrinking the reinforcement: an allowable stress, a buckling factor)."""
        return False

    @classmethod
    def in_search(cls, study: Study) -> bool:
        """Whether a search trial runs it: it sets a requirement the search must respect."""
        return cls.applies(study)

    @abstractmethod
    def run(self, design: Design) -> CheckResult:
        """Assess one design."""

    @classmethod
    def absent(cls, study: Study) -> Section | None:
        """What the outputs say when the check does not apply (a check a reader would look for: "not
        assessed", and how to ask for it). None: nothing."""
        return None

    @classmethod
    def parse_table(cls, table: dict, study_parts: dict) -> Any:
        """Read the check's own study-file table (``table``; ``study_parts`` the parsed panel, material, load
        cases) into frozen settings; raise ``StudyError`` naming the field."""
        raise NotImplementedError

    @classmethod
    def linear_rows(cls, study: Study, cutout: Cutout) -> np.ndarray | None:
        """Smooth geometric constraint rows (an array, each <= 0 met) for the gradient refinement, or None: the
        same requirements as :meth:`run`, resolved point by point so a linearisation sees every one."""
        return None


@dataclass(frozen=True)
class Assessment:
    """Every check's result for one design, in registry order, and the requirement list they make together."""

    results: tuple[CheckResult, ...]
    stage: str = "solved"

    @property
    def requirements(self) -> tuple[Requirement, ...]:
        return tuple(r for res in self.results for r in res.requirements)

    @property
    def meets_every_requirement(self) -> bool:
        return meets_every_requirement(self.requirements)

    @property
    def failed(self) -> tuple[Requirement, ...]:
        return tuple(r for r in self.requirements if not r.met)

    @property
    def can_mesh(self) -> bool:
        """Every requirement the mesher needs is met (the design can be solved, whatever else it misses)."""
        return all(r.met for r in self.requirements if r.to_mesh)

    @property
    def warnings(self) -> tuple[str, ...]:
        return tuple(dict.fromkeys(w for res in self.results for w in res.warnings))

    def result(self, name: str) -> CheckResult | None:
        return next((r for r in self.results if r.check == name), None)

    def constraint_values(self) -> dict[str, float]:
        return constraint_values(self.requirements)

    def verdict(self, load_case: str | None = None) -> Verdict:
        return verdict(self.requirements, load_case)

    def reasons(self) -> list[str]:
        return [r.reason or r.label for r in self.failed]
