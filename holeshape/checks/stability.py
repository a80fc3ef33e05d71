"""Buckling of the web with its opening: the linear (eigenvalue) load factor of every load case against the required
factor, with its error estimate (holeshape.stability does the plate analysis)."""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from typing import TYPE_CHECKING

from holeshape.checks.base import Check, CheckResult, Design, Section, Table, requirement, within_estimate

if TYPE_CHECKING:
    from holeshape.stability import StabilityFields, StabilityResult
    from holeshape.study import Study

ADVICE = ("to raise the buckling factor: a smaller or better-shaped opening (search with"
          " constraints.min_buckling_factor), a thicker web, stiffeners, or a flanged or reinforced opening")
ADVICE_ACCURACY = "to meet the accuracy target: use a finer accuracy level (--accuracy fine)"


def _factor(f: float | None) -> str:
    return "does not buckle" if f is None else f"{f:.3f}"


def required_factor(study: Study) -> float:
    """The buckling factor every load case must reach: the larger of [stability] required_factor and
    constraints.min_buckling_factor."""
    assert study.stability is not None  # the check applies with a [stability] table only
    return max(study.stability.required_factor, study.constraints.min_buckling_factor or 0.0)


@dataclass(frozen=True, kw_only=True)
class BucklingResult(CheckResult):
    """The :class:`~holeshape.stability.StabilityResult` of the design, and the mode shapes for the plots."""

    check = "stability"
    stability: StabilityResult
    fields: StabilityFields | None = field(default=None, compare=False, repr=False)

    def to_dict(self) -> dict:
        return self.stability.to_dict()

    def top_fields(self) -> dict:
        from holeshape.stability import DESIGN_KEYS

        st = self.stability.to_dict()
        return {k: st[k] for k in DESIGN_KEYS}

    def section(self) -> Section:
        from holeshape.stability import FACTOR_MEANING, SUPPORT_NOTES

        st = self.stability
        rows = []
        for c in st.cases:
            f, fu = c.load_factor, c.unperforated_factor
            rows.append({"name": c.name, "factor": _factor(f), "reserve": c.reserve,
                         "estimate_pct": c.error_estimate_pct, "plain": _factor(fu),
                         "lost": None if f is None or fu is None else f"{100 * (1 - f / fu):.0f} %",
                         "levels": ", ".join(_factor(x) for x in c.level_factors)})
        paras = [f"Linear (eigenvalue) buckling of the panel with its cutout: Kirchhoff plate of the panel's thickness"
                 f" under the plane-stress prestress of each load case; panel edges {SUPPORT_NOTES[st.edge_support]},"
                 f" cutout edge {st.cutout_edge}; in-plane edges '{st.in_plane_edges}':"
                 f" {FACTOR_MEANING[st.in_plane_edges]}. Required factor {st.required_factor:g}."]
        g = st.governing
        warn = False
        if g is None:
            paras.append("No load case buckles the web below the factor ceiling (no compression to buckle it).")
        else:
            meets = st.meets_required
            warn = not meets
            paras.append(f"Lowest buckling load factor {g.load_factor:.3f} ({g.name}, estimated error"
                         f" {g.error_estimate_pct:.2g} %): {'meets' if meets else 'DOES NOT meet'} the required"
                         f" {st.required_factor:g}. Reported factors are Richardson extrapolations of the two finest"
                         f" plate meshes (Morley elements, {', '.join(str(n) for n in st.level_dofs)} DOFs); the"
                         " estimate is the whole extrapolation step plus a measured floor.")
        table = Table((("name", "load case"), ("factor", "buckling load factor"),
                       ("reserve", "reserve (factor / required)"), ("estimate_pct", "error estimate (%)"),
                       ("plain", "without the cutout"), ("lost", "lost to the opening"),
                       ("levels", "factor per plate mesh (coarse to fine)")), tuple(rows))
        return Section("Stability", tuple(paras), (table,), warn=warn,
                       images=(("best_buckling_mode.png", "buckling mode shape of the governing load case"),))

    def case_fields(self, load_case: str) -> dict:
        c = next(c for c in self.stability.cases if c.name == load_case)
        return {"buckling_load_factor": c.load_factor, "buckling_error_estimate_pct": c.error_estimate_pct,
                "buckling_reserve": c.reserve, "buckling_load_factor_unperforated": c.unperforated_factor}


class BucklingCheck(Check):
    name = "stability"
    title = "Stability"
    # [stability] is a table of the study itself (Study.stability: the buckling solver and the sweep read it), not
    # one parsed through ``Check.table``

    @classmethod
    def applies(cls, study: Study) -> bool:
        return study.stability is not None

    @classmethod
    def bounds(cls, study: Study) -> bool:
        return study.stability is not None

    def run(self, design: Design) -> BucklingResult:
        from holeshape.stability import buckling

        study = design.study
        need = required_factor(study)
        assert study.stability is not None  # the check applies with a [stability] table only
        settings = replace(study.stability, required_factor=need)  # one required factor: reserve, text and verdict
        st = buckling(study.panel, study.material, study.load_cases, design.cutout, settings, design.accuracy,
                      time_limit_s=design.time_left_s, keep_fields=design.keep_fields, cache=design.cache)
        reqs = [requirement("buckling", f"buckling load factor, {c.name}", c.load_factor, need, ">=", scale=need,
                            kind="buckling", load_case=c.name, advice=ADVICE, check=self.name,
                            reason=f"buckling load factor {c.load_factor or 0:.3g} < {need:g} ({c.name})")
                for c in st.cases]
        if design.purpose != "search":
            reqs.append(requirement("buckling_accuracy", "mesh error estimate of the buckling factor",
                                    st.error_estimate_pct, st.accuracy_target_pct, "<=", scale=None, unit="%",
                                    kind="accuracy", advice=ADVICE_ACCURACY, check=self.name))
        close = [within_estimate(f"the buckling load factor of {c.name}", c.load_factor, need, c.error_estimate_pct)
                 for c in st.cases]
        return BucklingResult(requirements=tuple(reqs), warnings=tuple(st.warnings) + tuple(w for w in close if w),
                              stability=st, fields=st.fields)

    @classmethod
    def absent(cls, study: Study) -> Section:
        return Section("Stability", ("Not assessed: the study has no [stability] table, so whether the web buckles"
                                     " under these loads is not checked here. In a thin web the opening often governs"
                                     " through buckling before the peak stress reaches the allowable: add [stability]"
                                     " to the study to check it.",), warn=True)
