"""The record of one evaluation in a search, as the storage keeps it: :class:`TrialRecord` instead of a dict that
every caller fills by convention. Its ``attrs`` are the user attributes the journal stores beside the parameters,
constraints and value (area, peak, reasons, the requirement rows that decided, and so on)."""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from collections.abc import Iterable

    from holeshape.checks import Requirement

INFEASIBLE_VALUE = 1.0e9  # objective recorded for infeasible designs (never solved); samplers rank them by constraints
STATES = ("complete", "infeasible", "failed")


def compact(requirements: Iterable[Requirement]) -> list[dict[str, Any]]:
    """The requirement rows as the journal keeps them (enough to name the nearest misses of a run later, the check
    that set each, and what to change for a row that is not met)."""
    return [{"name": r.name, "label": r.label, "value": r.value, "limit": r.limit, "relation": r.relation,
             "met": r.met, "unit": r.unit, "kind": r.kind, "load_case": r.load_case, "check": r.check}
            | ({} if r.met or not r.advice else {"advice": r.advice}) for r in requirements]


@dataclass(frozen=True)
class TrialRecord:
    """One evaluated point of the design space. ``state``: ``"complete"`` (solved; ``feasible`` says whether it
    met every requirement the search steers by), ``"infeasible"`` (refused before any mesh), ``"failed"`` (the
    mesher or solver gave up on it: ``failure`` says why). ``value`` is the objective (lower is better),
    ``constraints`` the scaled values by requirement name (<= 0 met)."""

    params: dict[str, float]
    state: str
    value: float | None = None
    constraints: dict[str, float] = field(default_factory=dict)
    feasible: bool = False
    attrs: dict[str, Any] = field(default_factory=dict)

    def __post_init__(self) -> None:
        if self.state not in STATES:
            raise ValueError(f"state must be one of {STATES}, got {self.state!r}")

    @property
    def complete(self) -> bool:
        return self.state == "complete"

    @property
    def acceptable(self) -> bool:
        """Solved and meeting every requirement the search steers by."""
        return self.complete and self.feasible and all(v <= 0 for v in self.constraints.values())

    @property
    def sampler_value(self) -> float:
        return INFEASIBLE_VALUE if self.value is None else float(self.value)

    def with_attrs(self, **attrs: Any) -> TrialRecord:
        return replace(self, attrs={**self.attrs, **attrs})

    def user_attrs(self) -> dict[str, Any]:
        """What the storage keeps beside the trial: the attributes and whether it was feasible."""
        return {**self.attrs, "feasible": self.feasible}

    @classmethod
    def refused(cls, params: dict[str, float], constraints: dict[str, float], reason: str,
                **attrs: Any) -> TrialRecord:
        return cls(dict(params), "infeasible", constraints=dict(constraints), attrs={**attrs, "reason": reason})

    @classmethod
    def failure(cls, params: dict[str, float], failure: str, **attrs: Any) -> TrialRecord:
        # a failed design counts as feasible for the sampler: it broke no requirement, the numerics gave up on it
        return cls(dict(params), "failed", feasible=True, attrs={**attrs, "failure": failure})
