"""What a search is for: each goal is a registered class (``GOALS``) that knows the number the search minimises,
how a person reads it, its plot axis, what the study must give for it to make sense, and how a design that sits
on a solved requirement is moved back along the goal until it passes (the end of a run).

The objective is always "lower is better": the peak (MPa), minus the removed area (mm^2), the reinforcement's
volume (mm^3).
"""

from __future__ import annotations

from abc import ABC, abstractmethod
from typing import TYPE_CHECKING, Any, ClassVar

if TYPE_CHECKING:
    from holeshape.geometry import Cutout
    from holeshape.parameters import CutoutSpec, Param, Range
    from holeshape.study import Study

# ``evaluation`` below is a holeshape.evaluate.Evaluation: a higher layer, so typed Any here




class Goal(ABC):
    name: ClassVar[str] = ""
    aim: ClassVar[str] = ""  # "the lowest peak stress", as the report's opening says it
    label: ClassVar[str] = ""  # the goal in one line
    axis_label: ClassVar[str] = ""  # the search history's y axis
    grows: ClassVar[bool] = False  # the quantity a person reads grows as the objective falls (area)
    smooth: ClassVar[bool] = False  # the free-form gradient refinement applies (it lowers the peak only)
    retreat_note: ClassVar[str] = ""  # how a design is moved back along the goal
    bare_goal: ClassVar[str | None] = None  # the goal of the same study without a reinforcement (None: this one)

    @abstractmethod
    def objective(self, evaluation: Any, cutout: Cutout, study: Study, assessment: Any = None) -> float:
        """The number the search minimises for one solved design (``assessment``: its checks' results, a
        :class:`holeshape.checks.Assessment`)."""

    def readable(self, value: float) -> float:
        """The quantity a person reads from an objective value (in its unit)."""
        return value

    @abstractmethod
    def shown(self, value: float) -> str:
        """An objective value as a person reads it, with its unit."""

    def requires(self, study: Study, limits: list[str]) -> str | None:
        """Why this goal cannot be used by the study (None: it can); ``limits``: the registered checks that set a
        structural requirement on it (:meth:`holeshape.checks.Check.bounds`)."""
        return None

    def retreat(self, spec: CutoutSpec, point: dict[Param, float], t: float,
                ranges: dict[Param, Range]) -> tuple[dict[Param, float], float] | None:
        """The search point (typed :class:`~holeshape.parameters.Param` keys) moved back along the goal by ``t``
        in (0, 1] (1: as far as the goal allows) and the scale of the outline's lengths that goes with it, or
        None where the ranges end first. None for a goal whose optimum does not sit on a requirement by
        construction (the lowest peak)."""
        return None

    def rank_key(self, row: dict[str, Any]) -> tuple:
        """How a comparison of designs (dicts with ``peak_stress_mpa``, ``area_mm2``, ``reinforcement``) ranks them
        for this goal, best first."""
        return (row["peak_stress_mpa"],)

    def improvement_pct(self, a: dict[str, Any], b: dict[str, Any]) -> float:
        """How much better ``a`` is than ``b`` in this goal's terms, percent (positive: better)."""
        return 100.0 * (1.0 - a["peak_stress_mpa"] / b["peak_stress_mpa"])

    def better(self, a: dict[str, Any], b: dict[str, Any]) -> str:
        """How design ``a`` compares with ``b`` (dicts with ``peak_stress_mpa`` and ``area_mm2``), in words with the
        direction stated: "12.3 % lower peak than" or "8.0 % more area removed than"."""
        return relative(a["peak_stress_mpa"], b["peak_stress_mpa"], "peak", "lower", "higher")


def relative(a: float, b: float, what: str, less: str, more: str) -> str:
    """``a`` against ``b`` as "x.y % <less|more> <what> than" (the direction in words, never a signed number)."""
    if b == 0:
        return f"the same {what} as"
    pct = 100.0 * (a / b - 1.0)
    if abs(pct) < 0.05:
        return f"the same {what} (within 0.05 %) as"
    return f"{abs(pct):.1f} % {less if pct < 0 else more} {what} than"


class LowestPeak(Goal):
    smooth = True  # the peak is what the gradient refinement lowers
    name = "lowest_peak"
    aim = "the lowest peak stress"
    label = "lowest peak stress within every constraint"
    axis_label = "peak stress over all load cases (MPa)"

    def objective(self, evaluation: Any, cutout: Cutout, study: Study, assessment: Any = None) -> float:
        return evaluation.peak_stress_mpa

    def shown(self, value: float) -> str:
        return f"{value:.1f} MPa"


class LargestOpening(Goal):
    name = "largest_opening"
    aim = "the largest removed area"
    label = "largest opening within every constraint"
    axis_label = "removed area (mm^2)"
    grows = True
    retreat_note = "the opening scaled down about its centre (every length of the outline; a row keeps its pitch)"
    SPAN = 0.25  # t = 1 scales the outline to 75 % of its size

    def objective(self, evaluation: Any, cutout: Cutout, study: Study, assessment: Any = None) -> float:
        return -cutout.area

    def readable(self, value: float) -> float:
        return -value

    def shown(self, value: float) -> str:
        return f"{-value:.0f} mm^2 removed"

    def requires(self, study: Study, limits: list[str]) -> str | None:
        c = study.constraints
        if c.area is not None:
            return (f'search.goal = "largest_opening" cannot be combined with constraints.area = {c.area!r} (a fixed'
                    " area leaves nothing to enlarge); use min_area / max_area")
        if not limits:
            return ('search.goal = "largest_opening" needs a structural limit that bounds the opening: give'
                    " material.allowable_stress (the margin of safety must then reach constraints.min_margin,"
                    " default 0), material.net_section_allowable, and/or a [stability] table (the buckling factor"
                    " must reach its required_factor)")
        return None

    def retreat(self, spec: CutoutSpec, point: dict[Param, float], t: float,
                ranges: dict[Param, Range]) -> tuple[dict[Param, float], float] | None:
        k = 1.0 - self.SPAN * t
        if any(p.is_length and point[p] * k < r.min for p, r in ranges.items()):
            return None
        return dict(point), k  # every length of the outline, searched or fixed, times k

    def rank_key(self, row: dict[str, Any]) -> tuple:
        return (-row["area_mm2"],)

    def improvement_pct(self, a: dict[str, Any], b: dict[str, Any]) -> float:
        return 100.0 * (a["area_mm2"] / b["area_mm2"] - 1.0)

    def better(self, a: dict[str, Any], b: dict[str, Any]) -> str:
        return relative(a["area_mm2"], b["area_mm2"], "area removed", "less", "more")


class LightestReinforcement(Goal):
    name = "lightest_reinforcement"
    aim = "the least reinforcement (by volume, hence mass)"
    label = "least reinforcement that meets every requirement"
    axis_label = "reinforcement volume (cm^3)"
    retreat_note = "every searched size of the reinforcement enlarged in proportion"
    bare_goal = "lowest_peak"  # a bare opening that meets every requirement needs no reinforcement at all
    SPAN = 1.0  # t = 1 doubles the searched sizes

    def objective(self, evaluation: Any, cutout: Cutout, study: Study, assessment: Any = None) -> float:
        r = cutout.reinforcement
        return 0.0 if r is None else r.sizes(cutout, study.panel.thickness).volume_mm3

    def readable(self, value: float) -> float:
        return value / 1000.0

    def shown(self, value: float) -> str:
        return f"{value / 1000.0:.2f} cm^3 of reinforcement"

    def requires(self, study: Study, limits: list[str]) -> str | None:
        if study.cutout.reinforcement is None or not any(p.part == "reinforcement" for p in study.cutout.ranges):
            return ('search.goal = "lightest_reinforcement" needs a [reinforcement] table with at least one size'
                    " given as a range ({min = ..., max = ...}) to search")
        if not limits:
            return ('search.goal = "lightest_reinforcement" needs a requirement the reinforcement must meet: give'
                    " material.allowable_stress (the margin of safety must then reach constraints.min_margin,"
                    " default 0), material.net_section_allowable, and/or a [stability] table")
        return None

    def retreat(self, spec: CutoutSpec, point: dict[Param, float], t: float,
                ranges: dict[Param, Range]) -> tuple[dict[Param, float], float] | None:
        from holeshape.geometry.reinforcement import value_unit

        k = 1.0 + self.SPAN * t
        out = dict(point)
        for p, r in ranges.items():
            if p.part == "reinforcement" and value_unit(p.name) == "mm":  # every size, not a modulus
                if point[p] * k > r.max:
                    return None
                out[p] = point[p] * k
        return out, 1.0

    def rank_key(self, row: dict[str, Any]) -> tuple:
        # no reinforcement at all (a bare opening that passes) first, then by volume, then by peak
        return ((row.get("reinforcement") or {}).get("added_volume_mm3", 0.0), row["peak_stress_mpa"])

    def better(self, a: dict[str, Any], b: dict[str, Any]) -> str:
        va = (a.get("reinforcement") or {}).get("added_volume_mm3", 0.0)
        vb = (b.get("reinforcement") or {}).get("added_volume_mm3", 0.0)
        return relative(va, vb, "reinforcement", "less", "more") if vb else super().better(a, b)


class LongestLife(Goal):
    """The longest fatigue life: the largest fatigue reserve factor (the factor on every stress of the spectrum the
    design survives for the required life; it orders lives and stays finite below an endurance limit). The lowest
    peak is not the longest life when the load cases' ranges and means differ."""

    name = "longest_life"
    aim = "the longest fatigue life (the largest fatigue reserve factor)"
    label = "longest fatigue life within every constraint"
    axis_label = "fatigue reserve factor (higher is better; plotted as its negative)"
    RESERVE_CEILING = 1e3  # a design that does no damage even at this factor on the spectrum

    def objective(self, evaluation: Any, cutout: Cutout, study: Study, assessment: Any = None) -> float:
        res = None if assessment is None else assessment.result("fatigue")
        reserve = getattr(res, "reserve_factor", None)
        if res is None:
            raise ValueError("the longest_life goal needs the fatigue check's result")
        return -(self.RESERVE_CEILING if reserve is None else float(reserve))

    def readable(self, value: float) -> float:
        return -value

    def shown(self, value: float) -> str:
        return f"fatigue reserve {-value:.3f}"

    def requires(self, study: Study, limits: list[str]) -> str | None:
        if study.table("fatigue") is None:
            return ('search.goal = "longest_life" needs a [fatigue] table (the load states, the cycles per unit and'
                    " the material curve) to compute a life")
        return None

    def rank_key(self, row: dict[str, Any]) -> tuple:
        r = row.get("fatigue_reserve_factor")
        return (-(self.RESERVE_CEILING if r is None else r), row["peak_stress_mpa"])

    def improvement_pct(self, a: dict[str, Any], b: dict[str, Any]) -> float:
        ra = a.get("fatigue_reserve_factor") or self.RESERVE_CEILING
        rb = b.get("fatigue_reserve_factor") or self.RESERVE_CEILING
        return 100.0 * (ra / rb - 1.0)

    def better(self, a: dict[str, Any], b: dict[str, Any]) -> str:
        ra = a.get("fatigue_reserve_factor") or self.RESERVE_CEILING
        rb = b.get("fatigue_reserve_factor") or self.RESERVE_CEILING
        return relative(ra, rb, "fatigue reserve", "less", "more")


GOALS: dict[str, Goal] = {g.name: g for g in (LowestPeak(), LargestOpening(), LightestReinforcement(), LongestLife())}
