"""The end of a run: the final-level checks of the search's best designs and of the standard shapes, the choice
of the recommendation, the profiles, plots, the typed run record and the report.

Everything here reads a finished Optuna study and the parsed :class:`~holeshape.study.Study`; it never searches.
"""

from __future__ import annotations

import multiprocessing
import time
from dataclasses import asdict, dataclass
from pathlib import Path

from holeshape import __version__, cautions
from holeshape.errors import SearchError
from holeshape.evaluate import evaluate
from holeshape.record import (
    Baseline,
    CaseCheck,
    DesignCheck,
    LevelCheck,
    Requirement,
    RunInputs,
    RunRecord,
    TrialCounts,
)
from holeshape.search.constraints import edge_gaps, requirement_rows, solved_constraint_values, verdict
from holeshape.search.runner import SEARCH_ACCURACY, finished, is_feasible, objective_value
from holeshape.study import ACCURACIES, Measure

FINAL_ACCURACY = ACCURACIES[-1]  # the finest level: the reported figures
FINAL_TRIES = 3  # best search designs re-checked at the final level when one misses a requirement there


@dataclass(frozen=True)
class Candidate:
    """A design checked at the final level: its objective (lower is better), family, outline, evaluation, fields
    for plots and the trial it came from (None for a standard shape)."""

    score: float
    family: str
    cutout: object
    evaluation: object
    fields: object
    trial: int | None


@dataclass(frozen=True)
class FinalChecks:
    """How the final level is run for one study: the level, the study, the run's cache."""

    study: object
    cache: dict

    @property
    def measure(self) -> Measure:
        return Measure(self.study.measure.stress, FINAL_ACCURACY)

    def evaluate(self, cut, keep: bool = False):
        s = self.study
        return evaluate(s.panel, s.material, s.load_cases, cut, self.measure, keep_fields=keep,
                        stability=s.stability, cache=self.cache)

    def candidate(self, cut, family: str, trial: int | None) -> Candidate:
        ev, fields = self.evaluate(cut, keep=True)
        return Candidate(objective_value(ev, self.study.search.goal), family, cut, ev, fields, trial)


def trial_counts(study) -> TrialCounts:
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


def check_standard_shapes(checks: FinalChecks, baselines) -> tuple[list[Baseline], list[tuple]]:
    """The standard shapes at the final level against every requirement: their rows, and (family, cutout,
    evaluation) for those that meet them."""
    s = checks.study
    rows, usable = [], []
    for family, cut, note in baselines:
        if cut is None:
            rows.append(Baseline(shape=family, feasible=False, reason=note))
            continue
        ev = _standard_shape_evaluation(s.panel, s.material, s.load_cases, cut, checks.measure, s.stability,
                                        checks.cache)
        reasons = solved_constraint_values(ev, s.constraints)[1]
        rows.append(Baseline(shape=family, feasible=not reasons, reason="; ".join(reasons) or None,
                             peak_stress_mpa=ev.peak_stress_mpa, area_mm2=ev.area_mm2, kt=ev.kt,
                             error_estimate_pct=ev.error_estimate_pct, params=cut.parameters(),
                             buckling_load_factor=None if ev.stability is None else ev.stability.load_factor))
        if not reasons:
            usable.append((family, cut, ev))
    return rows, usable


def choose_recommendation(checks: FinalChecks, study, space, usable_baselines
                          ) -> tuple[Candidate, Candidate | None, list[str]]:
    """(the recommended design, the study family's own best or None, warnings): the best trials re-checked at the
    final level until one still meets every requirement; a standard shape that does better wins."""
    s = checks.study
    ranked = sorted((t for t in finished(study) if is_feasible(t)), key=lambda t: t.values[0])
    own, fallback, warnings = None, None, []
    for t in ranked[:FINAL_TRIES]:
        cand = checks.candidate(space.decode(t.params)[0], s.cutout.shape, t.number)
        reasons = solved_constraint_values(cand.evaluation, s.constraints)[1]
        if not reasons:
            own = cand
            break
        fallback = fallback or (cand, reasons)
    if callable(usable_baselines):  # checked meanwhile in another process (see finish_run)
        usable_baselines = usable_baselines()
    if own is None and fallback is not None and not usable_baselines:
        own = fallback[0]
        warnings.append(f"the best design found misses a requirement at the {FINAL_ACCURACY} level: "
                        + "; ".join(fallback[1]) + " (it met it at the search's draft level)")
    if own is None and not usable_baselines:
        raise SearchError(f"no feasible design among {len(study.get_trials(deepcopy=False))} trials and no standard"
                          " shape meets the constraints; widen the ranges or relax the constraints (see summary of"
                          " trials)")
    candidates = [own] if own is not None else []
    for family, cut, ev in usable_baselines:
        if not candidates or objective_value(ev, s.search.goal) < candidates[0].score:
            candidates.append(checks.candidate(cut, family, None))
    best = min(candidates, key=lambda c: c.score)
    return best, own, list(best.evaluation.warnings) + warnings


def write_profiles(out_dir: Path, study_def, best: Candidate, own: Candidate | None) -> tuple[dict, dict | None]:
    """best.dxf / best.csv (and the family's own best when a standard shape won): (DXF info, family best)."""
    from holeshape.output import files

    size = (study_def.panel.width, study_def.panel.height)
    dxf_info = files.write_dxf(out_dir / "best.dxf", best.cutout, size, study_def.title,
                               study_def.panel.thickness)
    files.write_csv(out_dir / "best.csv", best.cutout)
    if own is None:
        return dxf_info, None
    files.write_csv(out_dir / "family_best.csv", own.cutout)
    files.write_dxf(out_dir / "family_best.dxf", own.cutout, size, study_def.title, study_def.panel.thickness)
    e = own.evaluation
    return dxf_info, {"shape": own.family, "peak_stress_mpa": e.peak_stress_mpa, "kt": e.kt, "area_mm2": e.area_mm2,
                      "error_estimate_pct": e.error_estimate_pct, "params": _jsonable(own.cutout.parameters()),
                      "governing_load_case": e.governing_load_case, "dxf": str(out_dir / "family_best.dxf"),
                      "buckling_load_factor": None if e.stability is None else e.stability.load_factor,
                      "reinforcement": None if e.reinforcement is None else e.reinforcement.to_dict()}


def write_plots(out_dir: Path, study_def, trials, best: Candidate, usable_baselines, goal: str) -> list[Path]:
    """Search history, the shape over the standard shapes, stress field, edge stress, buckling mode, VTK field."""
    from holeshape.output import files, plots, search_plots

    ev, fields, cut = best.evaluation, best.fields, best.cutout
    size = (study_def.panel.width, study_def.panel.height)
    paths = [
        search_plots.plot_history(out_dir / "search_history.png", trials, study_def.title, goal),
        search_plots.plot_shapes(out_dir / "best_shape.png", cut, [(f, c) for f, c, _ in usable_baselines],
                                 study_def.panel, study_def.constraints, study_def.title, ev.peak_stress_mpa,
                                 {f: e.peak_stress_mpa for f, _, e in usable_baselines}),
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
    if ev.stability is not None:
        paths.append(plots.plot_buckling_mode(out_dir / "best_buckling_mode.png", ev.stability, fields.stability,
                                              [o.T for o in cut.outlines(720)], study_def.panel, study_def.title))
    files.write_vtk(out_dir / "best_stress_field.vtu", fields, [r.name for r in ev.load_cases])
    return paths


def bare_comparison(checks: FinalChecks, best: Candidate) -> dict | None:
    """The reinforcement block of the recommendation with the same outline checked bare at the final level (what
    the reinforcement buys). None for a bare opening."""
    ev = best.evaluation
    if ev.reinforcement is None:
        return None
    s = checks.study
    bare = checks.evaluate(best.cutout.bare)
    rows = requirement_rows(bare, best.cutout.bare, s.panel, s.constraints, s.material)
    v = verdict(rows)
    out = ev.reinforcement.to_dict()
    out["bare_opening"] = {
        "peak_stress_mpa": bare.peak_stress_mpa, "margin_of_safety": bare.lowest_margin,
        "buckling_load_factor": None if bare.stability is None else bare.stability.load_factor,
        "governing_load_case": bare.governing_load_case, "verdict": v["verdict"],
        "verdict_reasons": v["verdict_reasons"], "error_estimate_pct": bare.error_estimate_pct}
    return out


def design_check(study_def, best: Candidate, out_dir: Path, dxf_info: dict, warnings: list[str],
                 reinforcement: dict | None = None) -> DesignCheck:
    """The typed ``best`` block: the recommended design at the final level with its evidence and verdicts;
    ``reinforcement`` the block :func:`bare_comparison` gives."""
    ev, cut = best.evaluation, best.cutout
    reqs = tuple(Requirement(**r) for r in requirement_rows(ev, cut, study_def.panel, study_def.constraints,
                                                            study_def.material))
    req_dicts = [asdict(r) for r in reqs]
    with_stab = ev.stability is not None
    cases = []
    for r in ev.load_cases:
        v = verdict(req_dicts, r.name)
        cases.append(CaseCheck(
            name=r.name, peak_stress_mpa=r.peak_stress_mpa, kt=r.kt, x_mm=r.x_mm, y_mm=r.y_mm,
            margin_of_safety=r.margin_of_safety, error_estimate_pct=r.error_estimate_pct, verdict=v["verdict"],
            verdict_reasons=tuple(v["verdict_reasons"]), advice=tuple(v["advice"]),
            buckling_load_factor=r.buckling_load_factor, buckling_error_estimate_pct=r.buckling_error_estimate_pct,
            buckling_reserve=r.buckling_reserve, buckling_load_factor_unperforated=r.buckling_load_factor_unperforated,
            with_stability=with_stab, locations=tuple(asdict(loc) for loc in r.locations if cut.count > 1)))
    density = study_def.material.density
    return DesignCheck(
        peak_stress_mpa=ev.peak_stress_mpa, kt=ev.kt, kt_reference=ev.kt_reference, area_mm2=ev.area_mm2,
        error_estimate_pct=ev.error_estimate_pct, params=_jsonable(cut.parameters()), shape=best.family,
        dxf=str(out_dir / "best.dxf"), trial=best.trial, margin_of_safety=ev.margin_of_safety,
        accuracy=FINAL_ACCURACY, min_radius_mm=cut.min_radius, min_radius_at_mm=tuple(_min_radius_at(cut)),
        bounds_mm=tuple(cut.bounds), load_cases=tuple(cases), dxf_vertices=dxf_info["vertices"],
        dxf_chord_error_mm=dxf_info["chord_error_mm"], warnings=tuple(warnings),
        levels=tuple(LevelCheck(**row) for row in _levels(study_def, cut, ev)),
        ligaments_mm={k: round(v, 3) for k, v in edge_gaps(cut, study_def.panel).items()},
        mass_saved_kg=density * ev.area_mm2 * study_def.panel.thickness * 1e-9 if density else None,
        vtk=str(out_dir / "best_stress_field.vtu"), requirements=reqs,
        stability=None if ev.stability is None else ev.stability.to_dict(), reinforcement=reinforcement)


def side_checks(study_def, baselines, validate: bool):
    """The final checks that do not depend on the search's winner, run in a process of their own when the study has
    several workers: the standard shapes at the final level, and the validation appendix."""
    from holeshape.validation import run_validation

    rows, usable = check_standard_shapes(FinalChecks(study_def, {}), baselines)
    return rows, usable, run_validation(FINAL_ACCURACY) if validate else None


def finish_run(study_def, study, space, baselines, out_dir: Path, storage_name: str, trade_off: bool, t0: float,
            cache: dict, workers: int = 1) -> dict:
    """The end of a run, in named steps: final checks, choice, profiles, plots, the typed record, the files.
    With several workers the standard shapes and the validation appendix are checked in a second process while
    this one checks the search's best designs."""
    from holeshape.output import files, search_plots
    from holeshape.output.report import build_report

    checks = FinalChecks(study_def, cache)
    goal = study_def.search.goal
    trials = study.get_trials(deepcopy=False)
    validate = not (out_dir / "validation.json").exists()
    side = None
    cached = all(c is None or _standard_key(study_def, c, checks.measure) in cache for _, c, _ in baselines)
    if workers > 1 and not (cached and not validate):
        from concurrent.futures import ProcessPoolExecutor

        pool = ProcessPoolExecutor(max_workers=1, mp_context=multiprocessing.get_context("spawn"))
        side = pool.submit(side_checks, study_def, baselines, validate)
        pool.shutdown(wait=False)
    got: dict = {}

    def side_result():
        if "rows" not in got:
            rows, usable, valid = side.result()
            got.update(rows=rows, usable=usable, validation=valid)
            for _, cut, ev in usable:  # later families of a compare run reuse them
                cache[_standard_key(study_def, cut, checks.measure)] = ev
        return got["usable"]

    if side is None:
        base_rows, usable = check_standard_shapes(checks, baselines)
        best, own, warnings = choose_recommendation(checks, study, space, usable)
    else:
        best, own, warnings = choose_recommendation(checks, study, space, side_result)
        usable, base_rows = side_result(), got["rows"]
        if got["validation"] is not None:
            files.write_json(out_dir / "validation.json", got["validation"])
    dxf_info, family_best = write_profiles(out_dir, study_def, best, own)
    plot_paths = write_plots(out_dir, study_def, trials, best, usable, "lowest_peak" if trade_off else goal)
    ev = best.evaluation
    front = None
    if trade_off:
        front = tuple(_front(study, space, study_def, out_dir))
        plot_paths.append(search_plots.plot_front(out_dir / "trade_off_front.png", trials, list(front),
                                                  study_def.title))
    record = RunRecord(
        best=design_check(study_def, best, out_dir, dxf_info, warnings, bare_comparison(checks, best)),
        family_best=family_best,
        baselines=tuple(base_rows),
        improvement_over_baselines_pct={b.shape: 100.0 * (1 - ev.peak_stress_mpa / b.peak_stress_mpa)
                                        for b in base_rows if b.feasible},
        goal=goal, trials=trial_counts(study), storage=storage_name, study=study_def.title,
        search_accuracy=SEARCH_ACCURACY, elapsed_s=time.perf_counter() - t0, plots=tuple(str(p) for p in plot_paths),
        holeshape_version=__version__, cautions=cautions(ev.stability is not None, ev.reinforcement is not None),
        front=front)
    files.write_json(out_dir / "inputs.json", RunInputs.from_study(study_def).to_dict())
    if not (out_dir / "validation.json").exists():
        from holeshape.validation import run_validation

        files.write_json(out_dir / "validation.json", run_validation(FINAL_ACCURACY))
    summary = record.to_summary()
    files.write_json(out_dir / "summary.json", summary)
    summary["report"] = str(build_report(out_dir))
    return summary


def _standard_shape_evaluation(panel, material, load_cases, cutout, measure, stability, cache: dict):
    """The standard shapes are the same for every family that ``compare`` searches: evaluate each once per run
    (``cache`` belongs to the run)."""
    key = ("standard shape", panel, material, load_cases, cutout, measure, stability)  # as _standard_key
    if key not in cache:
        cache[key] = evaluate(panel, material, load_cases, cutout, measure, stability=stability, cache=cache)
    return cache[key]


def _standard_key(study_def, cutout, measure) -> tuple:
    s = study_def
    return ("standard shape", s.panel, s.material, s.load_cases, cutout, measure, s.stability)


def _refused_after_solve(complete) -> dict:
    """How many solved designs that met every geometric constraint were refused for each solved requirement: the
    evidence that (for instance) the buckling check changed the answer."""
    out = {"buckling": 0, "margin": 0}
    for t in complete:
        c = t.constraints or {}
        geometric_ok = all(v <= 0 for k, v in c.items() if k not in out)
        for k in out:
            if geometric_ok and c.get(k, -1.0) > 0:
                out[k] += 1
    return out


def _min_radius_at(cut) -> list[float]:
    """Panel coordinates (mm) of the point of smallest radius of curvature on the outline."""
    import numpy as np

    smp = cut.sampling
    i = int(np.argmax(np.abs(smp.curvature)))
    return [float(smp.points[0, i]), float(smp.points[1, i])]


def _levels(study_def, cut, ev_fine) -> list[dict]:
    """The recommended design at the three accuracy levels (evidence for the reviewer)."""
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


def _front(study, space, study_def, out_dir: Path) -> list[dict]:
    from holeshape.output import files

    front = [t for t in study.best_trials if is_feasible(t)]
    front.sort(key=lambda t: t.values[1])
    rows = []
    for i, t in enumerate(front):
        cut, _ = space.decode(t.params)
        path = out_dir / f"front_{i:02d}.dxf"
        files.write_dxf(path, cut, (study_def.panel.width, study_def.panel.height), study_def.title,
                        study_def.panel.thickness)
        rows.append({"trial": t.number, "peak_stress_mpa": t.values[0], "area_mm2": t.values[1],
                     "params": _jsonable(cut.parameters()), "dxf": str(path), "accuracy": SEARCH_ACCURACY,
                     "buckling_load_factor": t.user_attrs.get("buckling_load_factor")})
    return rows


def _jsonable(d: dict) -> dict:
    return {k: (list(v) if isinstance(v, tuple) else v) for k, v in d.items()}

