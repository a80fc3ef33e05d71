"""``holeshape check``: one design, verified: the plane-stress evaluation at the study's accuracy and every check
of the seam (geometry, margins, net section, tee sections, buckling, stiffness, reinforcement), with plots.

Also the Python API for a design built in code: ``check_design(Study.of(panel, material, cases, cutout))``.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import TYPE_CHECKING

from holeshape.checks import Assessment, CheckResult, assess
from holeshape.checks.compose import design_json
from holeshape.errors import StudyError
from holeshape.evaluate import Evaluation, evaluate
from holeshape.study import Study

if TYPE_CHECKING:
    from holeshape.geometry import Cutout


@dataclass(frozen=True)
class DesignResult:
    """A design with its evaluation and assessment; ``plots`` the files drawn for it."""

    study: Study
    cutout: Cutout
    evaluation: Evaluation
    assessment: Assessment
    plots: tuple[str, ...] = field(default=())

    @property
    def meets_every_requirement(self) -> bool:
        return self.assessment.meets_every_requirement

    def result(self, name: str) -> CheckResult | None:
        """One check's result by its name (``"stress"``, ``"stability"``, ``"net_section"``, ...), or None."""
        return self.assessment.result(name)

    @property
    def warnings(self) -> tuple[str, ...]:
        return tuple(dict.fromkeys(self.study.warnings + self.evaluation.warnings + self.assessment.warnings))

    def to_dict(self) -> dict:
        from holeshape import __version__, cautions

        d = design_json(self.evaluation, self.assessment, self.study)
        d.update({"title": self.study.title, "shape": self.cutout.family, "params": self.cutout.parameters(),
                  "holeshape_version": __version__, "plots": list(self.plots),
                  "cautions": cautions(self.result("stability") is not None, self.result("reinforcement") is not None,
                                       self.result("fatigue") is not None)})
        return d


def check_design(study: Study, cutout: Cutout | None = None, accuracy: str | None = None, keep_fields: bool = False,
                 cache: dict | None = None) -> DesignResult:
    """Evaluate and assess one design of ``study`` (its own current design when ``cutout`` is None) at
    ``accuracy`` (default the study's)."""
    from holeshape.study import Measure

    cutout = study.cutout.build() if cutout is None else cutout
    measure = Measure(study.measure.stress, accuracy or study.measure.accuracy)
    ev = evaluate(study.panel, study.material, study.load_cases, cutout, measure)
    a = assess(study, cutout, ev, accuracy=measure.accuracy, cache=cache, keep_fields=keep_fields)
    return DesignResult(study, cutout, ev if keep_fields else ev.without_fields(), a)


def run_check(study_path: str, accuracy: str | None = None, plots: str | None = None) -> DesignResult:
    """Check the study file's current design; with ``plots`` draw the stress field, the edge stress, the mesh and
    the buckling mode into that folder."""
    from holeshape.studyfile import load_study

    study = load_study(study_path)
    plot_dir = None
    if plots:
        plot_dir = Path(plots)
        try:
            plot_dir.mkdir(parents=True, exist_ok=True)
        except OSError as err:
            raise StudyError(f"--plots {plots!r} cannot be created: {err.strerror}") from err
    res = check_design(study, accuracy=accuracy, keep_fields=plot_dir is not None)
    if plot_dir is None:
        return res
    from holeshape.checks.stability import BucklingResult
    from holeshape.output import plots as P

    ev, cutout = res.evaluation, res.cutout
    fields = ev.fields
    assert fields is not None  # kept for the plots
    gov = [r.name for r in ev.load_cases].index(ev.governing_load_case)
    size = (study.panel.width, study.panel.height)
    outline = [o.T for o in cutout.outlines(720)]
    drawn = [
        P.plot_stress_field(plot_dir / "stress_field.png", ev, fields, outline, gov, size, study.title),
        P.plot_boundary_stress(plot_dir / "boundary_stress.png", ev, fields, study.material.allowable_stress,
                               study.title),
        P.plot_mesh(plot_dir / "mesh_near_cutout.png", fields, cutout.bounds, study.title),
    ]
    st = res.result("stability")
    if isinstance(st, BucklingResult):
        drawn.append(P.plot_buckling_mode(plot_dir / "buckling_mode.png", st.stability, st.fields, outline,
                                          study.panel, study.title))
    for r in res.assessment.results:
        for chart in r.charts():
            drawn.append(P.plot_chart(plot_dir / chart.file.removeprefix("best_"), chart, study.title))
    return replace(res, plots=tuple(str(p) for p in drawn))
