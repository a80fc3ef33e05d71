"""The record a run leaves for its reader: what went in, in the form the run folder stores it (``inputs.json``).

Frozen, built once from the parsed :class:`~holeshape.study.Study` and written as JSON; the report and the text
summaries read it back without solving. Units as in the study: mm, N, MPa.
"""

from __future__ import annotations

from dataclasses import asdict, dataclass
from datetime import datetime, timezone

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

    @classmethod
    def from_study(cls, study: Study, finished: datetime | None = None) -> RunInputs:
        when = (finished or datetime.now(timezone.utc)).strftime("%Y-%m-%d %H:%M UTC")
        return cls(title=study.title, source=study.source, panel=asdict(study.panel),
                   material=asdict(study.material), load_cases=tuple(asdict(c) for c in study.load_cases),
                   constraints=asdict(study.constraints), search=asdict(study.search),
                   measure=asdict(study.measure),
                   stability=None if study.stability is None else asdict(study.stability), finished=when)

    @classmethod
    def from_dict(cls, d: dict) -> RunInputs:
        """Read back a stored ``inputs.json`` (tables a run of an older version did not store are None)."""
        return cls(title=d["title"], source=d.get("source", ""), panel=d["panel"], material=d["material"],
                   load_cases=tuple(d["load_cases"]), constraints=d.get("constraints", {}),
                   search=d.get("search", {}), measure=d.get("measure", {}), stability=d.get("stability"),
                   finished=d.get("finished", ""))

    def to_dict(self) -> dict:
        d = asdict(self)
        d["load_cases"] = list(self.load_cases)
        return d
