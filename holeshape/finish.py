"""The end of a run: the final-level checks (holeshape.final), the profiles, plots, the typed run record, the report;
or, when nothing meets every requirement, the record that says why (reasons by count, the nearest misses, what to
change), written before the run stops with exit code 5.

Everything here reads a finished Optuna study and the parsed :class:`~holeshape.study.Study`; it never searches.
"""

from __future__ import annotations

import multiprocessing
import time
from dataclasses import asdict
from pathlib import Path
from typing import TYPE_CHECKING, Any, NoReturn

from holeshape import __version__, cautions
from holeshape.checks.compose import case_fields, sections
from holeshape.checks.outline import OutlineResult
from holeshape.checks.reinforcement import ReinforcementResult
from holeshape.checks.stability import BucklingResult
from holeshape.checks.stress import StressResult
from holeshape.errors import NoDesignError
from holeshape.final import (
    FINAL_ACCURACY,
    FINAL_TRIES,
    Checked,
    Choice,
    FinalChecks,
    check_standard_shapes,
    choose,
    standard_key,
)
from holeshape.progress import QUIET, Progress
from holeshape.record import CaseCheck, DesignCheck, LevelCheck, RunInputs, RunRecord, TrialCounts
from holeshape.search.runner import SEARCH_ACCURACY, finished, is_feasible
from holeshape.search.summary import bound_advice, failure_reasons, nearest_misses, trial_reasons
from holeshape.study import ACCURACIES, Measure, Study

if TYPE_CHECKING:
    from concurrent.futures import Future

    from holeshape.evaluate import Evaluation
    from holeshape.geometry import Cutout
    from holeshape.parameters import Param
    from holeshape.progress import Bar
    from holeshape.record import Baseline
    from holeshape.search.space import DesignSpace

# ``study`` below is the optuna study of the run (``study_def`` the holeshape Study), its trials optuna's: Any
Baselines = list[tuple[str, "Cutout | None", str]]  # standard_shapes: (family, cutout or None, note)


def trial_counts(study: Any) -> TrialCounts:
    """The trials of a study by outcome, as the summary reports them."""
    from optuna.trial import TrialState

    trials = study.get_trials(deepcopy=False)
    complete = [t for t in trials if t.state == TrialState.COMPLETE]
    counted = {t.number for t in finished(study)}
    failed = [t for t in trials if t.state == TrialState.FAIL and t.number in counted]
    interrupted = [t for t in trials if t.state == TrialState.FAIL and t.number not in counted]
    probes = [t for t in complete if t.user_attrs.get("probe")]
    return TrialCounts(completed=len(complete), probes=len(probes),
                       infeasible=len([t for t in complete if not is_feasible(t) and not t.user_attrs.get("probe")]),
                       failed=len(failed), interrupted=len(interrupted),
                       refused_after_solve=_refused_after_solve(complete),
                       failures=tuple(sorted({str(t.user_attrs.get("failure")) for t in failed})[:10]))


def write_profiles(out_dir: Path, study_def: Study, best: Checked, own: Checked | None) -> tuple[dict, dict | None]:
    """best.dxf / best.csv (and the family's own best when a standard shape won): (DXF info, its files)."""
    from holeshape.output import files

    size = (study_def.panel.width, study_def.panel.height)
    dxf_info = files.write_dxf(out_dir / "best.dxf", best.cutout, size, study_def.title,
                               study_def.panel.thickness)
    files.write_csv(out_dir / "best.csv", best.cutout)
    if own is None:
        return dxf_info, None
    files.write_csv(out_dir / "family_best.csv", own.cutout)
    files.write_dxf(out_dir / "family_best.dxf", own.cutout, size, study_def.title, study_def.panel.thickness)
    return dxf_info, {"dxf": str(out_dir / "family_best.dxf"), "csv": str(out_dir / "family_best.csv")}


def family_block(c: Checked | None, files: dict | None, chosen: bool) -> dict | None:
    """The searched family's best at the final level, as summary.json's ``family_best`` shows it."""
    if c is None:
        return None
    e = c.evaluation
    s = c.summary()
    st = c.assessment.result("stability")
    out = {"shape": c.family, "trial": c.trial, "peak_stress_mpa": e.peak_stress_mpa, "kt": e.kt,
           "area_mm2": e.area_mm2, "error_estimate_pct": e.error_estimate_pct,
           "params": _jsonable(c.cutout.parameters()),
           "governing_load_case": e.governing_load_case, "margin_of_safety": s["margin_of_safety"],
           "buckling_load_factor": st.stability.load_factor if isinstance(st, BucklingResult) else None,
           "reinforcement": s["reinforcement"], "meets_every_requirement": c.passes,
           "verdict_reasons": s["verdict_reasons"], "recommended": chosen, "moved": c.moved,
           **{k: v for res in c.assessment.results for k, v in res.row_fields().items()}}
    if files:
        out.update(files)
    return out


def write_plots(out_dir: Path, study_def: Study, trials: list[Any], best: Checked, usable: list[Checked], goal: str,
                own: Checked | None = None) -> list[Path]:
    """Search history, the shape over the standard shapes, stress field, edge stress, buckling mode, VTK field."""
    from holeshape.output import files, plots, search_plots

    ev, cut = best.evaluation, best.cutout
    fields = ev.fields
    assert fields is not None  # the recommendation is checked with its fields (finish_run)
    size = (study_def.panel.width, study_def.panel.height)
    paths = [
        search_plots.plot_history(out_dir / "search_history.png", trials, study_def.title, goal),
        search_plots.plot_shapes(out_dir / "best_shape.png", cut,
                                 [(c.family, c.cutout) for c in usable if c.cutout is not cut],
                                 study_def.panel, study_def.constraints, study_def.title, ev.peak_stress_mpa,
                                 {c.family: c.evaluation.peak_stress_mpa for c in usable},
                                 searched=None if own is None or own.trial == best.trial and own.family == best.family
                                 else (own.family, own.cutout, own.evaluation.peak_stress_mpa)),
    ]
    if study_def.cutout.shape == "spline":
        radii = search_plots.plot_radii_history(out_dir / "search_outlines.png", trials, study_def.title)
        paths += [radii] if radii is not None else []
    gov = [r.name for r in ev.load_cases].index(ev.governing_load_case)
    outlines = [o.T for o in cut.outlines(720)]
    paths.append(plots.plot_stress_field(out_dir / "best_stress_field.png", ev, fields, outlines, gov, size,
                                         study_def.title))
    paths.append(plots.plot_boundary_stress(out_dir / "best_boundary_stress.png", ev, fields,
                                            study_def.material.allowable_stress, study_def.title))
    st = best.assessment.result("stability")
    if isinstance(st, BucklingResult):
        paths.append(plots.plot_buckling_mode(out_dir / "best_buckling_mode.png", st.stability, st.fields,
                                              outlines, study_def.panel, study_def.title))
    for res in best.assessment.results:
        for chart in res.charts():
            paths.append(plots.plot_chart(out_dir / chart.file, chart, study_def.title))
    files.write_vtk(out_dir / "best_stress_field.vtu", fields, [r.name for r in ev.load_cases])
    return paths


def bare_comparison(checks: FinalChecks, best: Checked) -> dict | None:
    """The reinforcement block of the recommendation with the same outline checked bare at the final level (what
    the reinforcement buys). None for a bare opening."""
    rf = best.assessment.result("reinforcement")
    if not isinstance(rf, ReinforcementResult):
        return None
    bare = checks.check(best.cutout.bare, best.family, None)
    st = bare.assessment.result("stability")
    stress = bare.assessment.result("stress")
    v = bare.assessment.verdict()
    out = rf.to_dict()
    out["bare_opening"] = {
        "peak_stress_mpa": bare.evaluation.peak_stress_mpa,
        "margin_of_safety": stress.lowest_margin if isinstance(stress, StressResult) else None,
        "buckling_load_factor": st.stability.load_factor if isinstance(st, BucklingResult) else None,
        "governing_load_case": bare.evaluation.governing_load_case, "verdict": "pass" if v.passed else "fail",
        "verdict_reasons": list(v.reasons), "error_estimate_pct": bare.evaluation.error_estimate_pct}
    return out


def design_check(study_def: Study, best: Checked, out_dir: Path, dxf_info: dict, warnings: list[str],
                 reinforcement: dict | None = None, levels: list[dict] | None = None) -> DesignCheck:
    """The typed ``best`` block: the recommended design at the final level with its evidence and verdicts;
    ``reinforcement`` the block :func:`bare_comparison` gives, ``levels`` the evidence table."""
    ev, cut, a = best.evaluation, best.cutout, best.assessment
    reqs = a.requirements
    stab = a.result("stability")
    stress = a.result("stress")
    outline = a.result("outline")
    assert isinstance(outline, OutlineResult)  # the outline check runs on every design
    cases = []
    for r in ev.load_cases:
        v = a.verdict(r.name)
        extra = case_fields(a, r.name)
        cases.append(CaseCheck(
            name=r.name, peak_stress_mpa=r.peak_stress_mpa, kt=r.kt, x_mm=r.x_mm, y_mm=r.y_mm,
            margin_of_safety=extra.pop("margin_of_safety", None), error_estimate_pct=r.error_estimate_pct,
            verdict="pass" if v.passed else "fail", verdict_reasons=v.reasons, advice=v.advice,
            buckling_load_factor=extra.pop("buckling_load_factor", None),
            buckling_error_estimate_pct=extra.pop("buckling_error_estimate_pct", None),
            buckling_reserve=extra.pop("buckling_reserve", None),
            buckling_load_factor_unperforated=extra.pop("buckling_load_factor_unperforated", None),
            with_stability=stab is not None, locations=tuple(asdict(loc) for loc in r.locations if cut.count > 1),
            extra=extra))
    density = study_def.material.density
    from holeshape.checks.compose import blocks, top_fields
    from holeshape.stability import DESIGN_KEYS

    return DesignCheck(
        peak_stress_mpa=ev.peak_stress_mpa, kt=ev.kt, kt_reference=ev.kt_reference, area_mm2=ev.area_mm2,
        error_estimate_pct=ev.error_estimate_pct, params=_jsonable(cut.parameters()), shape=best.family,
        dxf=str(out_dir / "best.dxf"), trial=best.trial,
        margin_of_safety=stress.margin_of_safety if isinstance(stress, StressResult) else None,
        accuracy=FINAL_ACCURACY, min_radius_mm=cut.min_radius, min_radius_at_mm=outline.min_radius_at_mm,
        bounds_mm=cut.bounds, load_cases=tuple(cases), dxf_vertices=dxf_info["vertices"],
        dxf_chord_error_mm=dxf_info["chord_error_mm"], warnings=tuple(warnings),
        levels=tuple(LevelCheck(**row) for row in (levels or [])), ligaments_mm=dict(outline.ligaments_mm),
        mass_saved_kg=density * ev.area_mm2 * study_def.panel.thickness * 1e-9 if density else None,
        vtk=str(out_dir / "best_stress_field.vtu"), requirements=reqs,
        stability=stab.stability.to_dict() if isinstance(stab, BucklingResult) else None, reinforcement=reinforcement,
        assessments={k: v for k, v in blocks(a).items() if k not in ("stability", "reinforcement")},
        sections=tuple(s.to_dict() for s in sections(a, study_def)), moved=best.moved,
        top={k: v for k, v in top_fields(a).items() if k not in DesignCheck.__dataclass_fields__
             and k not in DESIGN_KEYS})


def side_checks(study_def: Study, baselines: Baselines, validate: bool
                ) -> tuple[list[Baseline], list[Checked], list[dict] | None]:
    """The final checks that do not depend on the search's winner, run in a process of their own when the study has
    several workers: the standard shapes at the final level, and the validation appendix."""
    from holeshape.validation import run_validation

    rows, usable = check_standard_shapes(FinalChecks(study_def, {}), baselines)
    return rows, usable, run_validation(FINAL_ACCURACY, stability=study_def.stability is not None,
                                        fatigue=study_def.table("fatigue") is not None) \
        if validate else None


def finish_run(study_def: Study, study: Any, space: DesignSpace, baselines: Baselines, out_dir: Path, storage_name: str,
               trade_off: bool, t0: float, cache: dict, workers: int = 1, progress: Progress = QUIET,
               fingerprint: str = "", method: str = "") -> dict:
    """The end of a run, in named steps: final checks, choice, profiles, plots, the typed record, the files.
    With several workers the standard shapes and the validation appendix are checked in a second process while
    this one checks the search's best designs. Raises :class:`~holeshape.errors.NoDesignError` (after writing the
    summary, the text and the report) when nothing meets every requirement at the final level."""
    from holeshape.output import files

    checks = FinalChecks(study_def, cache, progress)
    goal = study_def.search.goal
    trials = study.get_trials(deepcopy=False)
    validate = not (out_dir / "validation.json").exists()
    side: Future | None = None
    cached = all(c is None or standard_key(study_def, c) in cache for _, c, _ in baselines)
    if workers > 1 and not (cached and not validate):
        from concurrent.futures import ProcessPoolExecutor

        pool = ProcessPoolExecutor(max_workers=1, mp_context=multiprocessing.get_context("spawn"))
        side = pool.submit(side_checks, study_def, baselines, validate)
        pool.shutdown(wait=False)
    got: dict = {}
    n_feasible = min(FINAL_TRIES, len([t for t in finished(study) if is_feasible(t)]))
    bar = progress.open(n_feasible + (len(baselines) if side is None else 0) + 4, "finish", "check")
    try:
        def side_result() -> list[Checked]:
            assert side is not None  # asked for only when the second process runs
            if "rows" not in got:
                bar.note("standard shapes and validation (second process)")
                rows, usable, valid = side.result()
                got.update(rows=rows, usable=usable, validation=valid)
                for c in usable:  # later families of a compare run reuse them
                    cache[standard_key(study_def, c.cutout)] = c
            return got["usable"]

        if side is None:
            base_rows, usable = check_standard_shapes(checks, baselines, bar)
            choice = choose(checks, study, space, usable, bar, len([b for b in baselines if b[1] is not None]))
        else:
            choice = choose(checks, study, space, side_result, bar, len([b for b in baselines if b[1] is not None]))
            usable, base_rows = side_result(), got["rows"]
            if got["validation"] is not None:
                files.write_json(out_dir / "validation.json", got["validation"])
        inputs = RunInputs.from_study(study_def, method=method)
        files.write_json(out_dir / "inputs.json", inputs.to_dict())
        if not (out_dir / "validation.json").exists():
            bar.note("validation appendix")
            from holeshape.validation import run_validation

            files.write_json(out_dir / "validation.json",
                             run_validation(FINAL_ACCURACY, stability=study_def.stability is not None,
                                            fatigue=study_def.table("fatigue") is not None))
        bar.update()
        common: dict[str, Any] = dict(
            goal=goal, trials=trial_counts(study), storage=storage_name, study=study_def.title,
            search_accuracy=SEARCH_ACCURACY, holeshape_version=__version__, study_fingerprint=fingerprint,
            trials_finished=len(finished(study)), warnings=study_def.warnings,
            trial_reasons=tuple(trial_reasons(study)) + tuple(failure_reasons(study)))
        if choice.best is None:
            return _no_design(study_def, study, space, choice, base_rows, out_dir, t0, common, bar)
        best = choice.best
        if best.evaluation.fields is None:  # a standard shape won: its fields for the plots and the VTK file
            bar.grow(1)
            bar.note(f"the standard {best.family} again, with its fields")
            best = checks.check(best.cutout, best.family, None, keep=True)
            bar.update()
        bar.note("profiles and plots")
        dxf_info, fam_files = write_profiles(out_dir, study_def, best, choice.own)
        plot_paths = write_plots(out_dir, study_def, trials, best, usable, "lowest_peak" if trade_off else goal,
                                 choice.own)
        front = None
        if trade_off:
            from holeshape.output import search_plots

            front = tuple(_front(study, space, study_def, out_dir))
            plot_paths.append(search_plots.plot_front(out_dir / "trade_off_front.png", trials, list(front),
                                                      study_def.title))
        bar.update()
        bar.note("evidence at every level")
        levels = _levels(study_def, best.cutout, best.evaluation)
        reinforcement = bare_comparison(checks, best)
        warnings = list(study_def.warnings) + list(best.evaluation.warnings) + list(best.assessment.warnings) \
            + bound_warnings(study_def, best)
        if best.moved is not None:
            warnings.append("the search's best sat on a requirement: " + best.moved["note"])
        warnings += [f"trial {n}, among the search's best, could not be checked at the {FINAL_ACCURACY} level ({why})"
                     for n, why in choice.unsolved]
        ev = best.evaluation
        fam = choice.own or choice.nearest
        record = RunRecord(
            best=design_check(study_def, best, out_dir, dxf_info, list(dict.fromkeys(warnings)), reinforcement,
                              levels),
            family_best=family_block(fam, fam_files, fam is best), baselines=tuple(base_rows),
            improvement_over_baselines_pct={b.shape: 100.0 * (1 - ev.peak_stress_mpa / b.peak_stress_mpa)
                                            for b in base_rows if b.feasible and b.peak_stress_mpa is not None},
            elapsed_s=time.perf_counter() - t0, plots=tuple(str(p) for p in plot_paths),
            cautions=cautions(best.assessment.result("stability") is not None,
                              best.assessment.result("reinforcement") is not None,
                              best.assessment.result("fatigue") is not None),
            front=front, choice=choice.reason, **common)
        bar.update()
        return _write(record, out_dir, bar)
    finally:
        bar.update(max(0, bar.total - bar.n))  # steps planned but not needed (a first candidate that passed)
        bar.close()


def _write(record: RunRecord, out_dir: Path, bar: Bar) -> dict:
    """summary.json, summary.txt and the report of a run."""
    from holeshape.output import files
    from holeshape.output.report import build_report
    from holeshape.output.text import optimise_summary

    bar.note("summary and report")
    summary = record.to_summary()
    files.write_json(out_dir / "summary.json", summary)
    files.atomic_write(out_dir / "summary.txt", optimise_summary(record) + "\n")
    summary["report"] = str(build_report(out_dir))
    bar.update()
    return summary


def _no_design(study_def: Study, study: Any, space: DesignSpace, choice: Choice, base_rows: list[Baseline],
               out_dir: Path, t0: float, common: dict, bar: Bar) -> NoReturn:
    """The record of a run with no answer: written in full, then NoDesignError."""
    misses = [{**_checked_miss(c), "level": FINAL_ACCURACY} for c in choice.misses]
    misses += nearest_misses(study)
    advice = bound_advice(misses, space)
    for c in choice.misses:
        advice += [a for a in c.assessment.verdict().advice if a not in advice]
    for g in common["trial_reasons"]:
        for a in _advice_for(g):
            if a not in advice:
                advice.append(a)
    record = RunRecord(best=None, family_best=family_block(choice.nearest, None, False), baselines=tuple(base_rows),
                       improvement_over_baselines_pct={}, elapsed_s=time.perf_counter() - t0, plots=(),
                       cautions=cautions(study_def.stability is not None, study_def.cutout.reinforcement is not None,
                                         study_def.table("fatigue") is not None),
                       outcome="no_design", choice=choice.reason, nearest_misses=tuple(misses),
                       advice=tuple(advice), **common)
    summary = _write(record, out_dir, bar)
    top = common["trial_reasons"][0] if common["trial_reasons"] else None
    why = "" if top is None else f"; most often: {top['requirement']} ({top['trials']} trials)"
    raise NoDesignError(f"no design meets every requirement at the {FINAL_ACCURACY} level among"
                        f" {len(study.get_trials(deepcopy=False))} trials and the standard shapes{why}; see"
                        f" {out_dir / 'summary.txt'} for the nearest misses and what to change", summary)


def _checked_miss(c: Checked) -> dict:
    return {"trial": c.trial, "params": _jsonable(c.cutout.parameters()), "area_mm2": c.evaluation.area_mm2,
            "peak_stress_mpa": c.evaluation.peak_stress_mpa, "shape": c.family,
            "missed": [{"label": r.label, "value": r.value, "limit": r.limit, "relation": r.relation,
                        "unit": r.unit, "kind": r.kind, "load_case": r.load_case} for r in c.assessment.failed]}


def _advice_for(group: dict) -> list[str]:
    """What to change for a group of refused trials: the advice of the requirement that refused them, as its check
    gave it on the trial (a group refused before any requirement row was stored has none)."""
    return [group["advice"]] if group.get("advice") else []


def bound_warnings(study_def: Study, best: Checked) -> list[str]:
    """A searched parameter of the recommendation at the end of its range: the optimum may lie beyond it."""
    if best.trial is None or best.moved is not None:
        return []
    out = []
    params = best.cutout.parameters()
    for p, r in study_def.cutout.ranges.items():
        v = _value_of(params, p)
        if v is None or r.max <= r.min:
            continue
        span = r.max - r.min
        end = "minimum" if abs(v - r.min) <= 1e-3 * span else "maximum" if abs(v - r.max) <= 1e-3 * span else None
        if end is not None:
            unit = f" {p.unit}" if p.unit else ""
            out.append(f"the recommended {p.flat} = {v:.4g}{unit} sits at the {end} of its range ({r.min:g} to"
                       f" {r.max:g}{unit}): the best design may lie beyond it; widen the range to look")
    return out


def _value_of(params: dict, p: Param) -> float | None:
    v = params.get(p.flat.split("[")[0] if p.index is not None else p.flat)
    if isinstance(v, (list, tuple)):
        return float(v[p.index]) if p.index is not None and p.index < len(v) else None
    return float(v) if isinstance(v, (int, float)) else None


def _refused_after_solve(complete: list[Any]) -> dict:
    """How many solved designs that met every geometric requirement were refused for each requirement of a solved
    check (by requirement name): the evidence that (for instance) the buckling check changed the answer."""
    from holeshape.checks import registered

    solved = {c.name for c in registered("solved")}
    out = {"buckling": 0, "margin": 0}
    for t in complete:
        failed = [r for r in t.user_attrs.get("requirements", []) if not r.get("met", True)]
        if failed and all(r.get("check") in solved for r in failed):
            for name in dict.fromkeys(r["name"] for r in failed):
                out[name] = out.get(name, 0) + 1
    return out


def _levels(study_def: Study, cut: Cutout, ev_fine: Evaluation) -> list[dict]:
    """The recommended design at the three accuracy levels (evidence for the reviewer)."""
    from holeshape.evaluate import evaluate

    rows = []
    for acc in (a for a in ACCURACIES if a != FINAL_ACCURACY):
        e = evaluate(study_def.panel, study_def.material, study_def.load_cases, cut,
                     Measure(study_def.measure.stress, acc))
        rows.append((acc, e))
    rows.append((FINAL_ACCURACY, ev_fine))
    fine = ev_fine.peak_stress_mpa
    return [{"accuracy": a, "dofs": e.dofs, "peak_stress_mpa": e.peak_stress_mpa,
             "change_pct": 100 * (e.peak_stress_mpa / fine - 1), "error_estimate_pct": e.error_estimate_pct}
            for a, e in rows]


def _front(study: Any, space: DesignSpace, study_def: Study, out_dir: Path) -> list[dict]:
    from holeshape.output import files

    front = [t for t in study.best_trials if is_feasible(t)]
    front.sort(key=lambda t: t.values[1])
    rows = []
    for i, t in enumerate(front):
        cut = space.decode(t.params)
        path = out_dir / f"front_{i:02d}.dxf"
        files.write_dxf(path, cut, (study_def.panel.width, study_def.panel.height), study_def.title,
                        study_def.panel.thickness)
        rows.append({"trial": t.number, "peak_stress_mpa": t.values[0], "area_mm2": t.values[1],
                     "params": _jsonable(cut.parameters()), "dxf": str(path), "accuracy": SEARCH_ACCURACY,
                     "buckling_load_factor": t.user_attrs.get("buckling_load_factor")})
    return rows


def _jsonable(d: dict) -> dict:
    return {k: (list(v) if isinstance(v, tuple) else v) for k, v in d.items()}

