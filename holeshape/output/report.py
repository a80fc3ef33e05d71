"""The reviewer's report: one self-contained HTML file (images embedded, opens offline, prints to PDF), or Markdown
with the figures beside it. Built only from a run folder's stored results (no solving), so it is fast and
deterministic. Every check's own section is rendered from its stored plain data; a run with no answer gets the
same report with the reasons, the nearest misses and what to change in place of a recommendation."""

from __future__ import annotations

import html
import json
from collections.abc import Sequence
from pathlib import Path
from typing import TYPE_CHECKING

from holeshape.goals import GOALS
from holeshape.output.numbers import limit_value, requirement_value, sig, stored_value
from holeshape.output.page import Page, describe_constraints, describe_params, describe_value, render_table
from holeshape.record import DesignCheck, RunInputs, RunRecord, SweepRecord

if TYPE_CHECKING:
    from holeshape.elastic import Elastic

SECTIONS = ("The job", "Study inputs", "Recommendation", "Comparison", "Stress", "Stability", "Evidence of accuracy",
            "Validation appendix", "Search history", "Assumptions and cautions")
JOB = ("This report records how a cutout in a thin loaded panel was chosen: the opening was searched for {aim} over "
       "every load case that still meets the study's requirements (access, area, ligament, radius, margin and "
       "buckling, as set), compared with the standard shapes a handbook would offer, and checked with a "
       "mesh-convergence estimate and against published solutions computed by the same pipeline.")
STRESS_MEASURES = {"von_mises": "von Mises stress on the cutout edge (on a free edge it equals the hoop stress in"
                                " magnitude)",
                   "max_principal": "largest principal stress on the cutout edge",
                   "hoop": "magnitude of the hoop (tangential) stress on the cutout edge"}


def build_report(run_dir: str | Path, fmt: str = "html") -> Path:
    """report.html (or report.md) of a finished run, from its stored record only: the sections of SECTIONS, with
    the checks' own sections between Stress and the evidence."""
    run = Path(run_dir)
    if (run / "sweep.json").exists() and not (run / "summary.json").exists():
        return build_sweep_report(run, fmt)
    try:
        rec = RunRecord.from_summary(json.loads((run / "summary.json").read_text()))
        inputs = RunInputs.from_dict(json.loads((run / "inputs.json").read_text()))
    except FileNotFoundError as err:
        from holeshape.errors import StudyError

        raise StudyError(f"{str(run)!r} holds no finished run (summary.json and inputs.json are written at the end of"
                         " holeshape optimise)") from err
    validation = json.loads((run / "validation.json").read_text()) if (run / "validation.json").exists() else []
    page = Page(run, fmt == "markdown")
    title = inputs.title
    goal = GOALS.get(rec.goal, GOALS["lowest_peak"])
    page.raw(f"# {title}: cutout design report\n" if page.md else
             f"<h1>{html.escape(title)}: cutout design report</h1>")
    page.para(f"holeshape {rec.holeshape_version}; run folder {run}; generated from the stored results of the "
              f"run finished {inputs.finished}.")
    page.raw(_summary_box(rec, page.md))
    page.h2(SECTIONS[0])
    page.para(JOB.format(aim=goal.aim))
    section_inputs(page, inputs, rec)
    b = rec.best
    if b is None:
        section_no_design(page, rec)
    else:
        section_recommendation(page, b)
    section_comparison(page, rec)
    page.h2(SECTIONS[4])
    if b is None:
        page.para("No design is recommended, so no stress field is shown; the nearest misses above give their"
                  " values against each limit.")
    page.img("best_stress_field.png", "stress field of the recommended design, governing load case")
    page.img("best_boundary_stress.png", "stress along the cutout edge, every load case, allowable drawn in")
    if b is not None:
        section_bare_opening(page, b)
        for s in b.sections:
            page.section(s)
    else:
        page.h2(SECTIONS[5])
        page.para("Assessed on every trial of the search that reached the solve; see the reasons above.")
    section_evidence(page, b)
    section_validation(page, validation)
    page.h2(SECTIONS[8])
    page.img("search_history.png", "search history, best so far against trial")
    page.img("search_outlines.png", "outline of each new best design (free-form search), overlaid about the centre")
    page.img("trade_off_front.png", "trade-off front, removed area against peak stress")
    page.para(f"{rec.trials.completed} trials completed ({rec.trials.infeasible} infeasible"
              f"{rec.trials.probe_note}), {rec.trials.failed} failed; storage {rec.storage}.")
    section_cautions(page, inputs, rec.cautions)
    return page.write(title)


def _summary_box(rec: RunRecord, md: bool) -> str:
    """The one-screen summary at the top: the verdict, the shape and why, peak, margin and buckling per case, the
    DXF; or, for a run with no answer, that there is none and the most frequent reason."""
    b = rec.best
    goal = GOALS.get(rec.goal, GOALS["lowest_peak"])
    if b is None:
        lines = ["Verdict: NO DESIGN meets every requirement at the fine level: nothing is recommended (exit code 5).",
                 rec.choice[0].upper() + rec.choice[1:] + "." if rec.choice else ""]
        if rec.trial_reasons:
            g = rec.trial_reasons[0]
            lines.append(f"Most frequent reason: {g['requirement']} ({g['trials']} trials).")
        if rec.advice:
            lines.append("What to change: " + "; ".join(rec.advice) + ".")
        rows, cols = [], []
    else:
        reqs = b.requirements
        failed = [r for r in reqs if not r.met]
        head = (f"FAILS {len(failed)} of {len(reqs)} requirements (some implied by others and listed only when they"
                f" fail): " + "; ".join(r.reason or r.label for r in failed)
                if failed else f"Meets every requirement of the study ({len(reqs)} checked at the {b.accuracy}"
                " level).")
        rows = [{"name": c.name, "peak_stress_mpa": c.peak_stress_mpa, "margin_of_safety": c.margin_of_safety,
                 "buckling_load_factor": c.buckling_load_factor, "verdict": c.verdict} for c in b.load_cases]
        cols = [("name", "load case"), ("peak_stress_mpa", "peak (MPa)"), ("margin_of_safety", "margin of safety")]
        if b.stability is not None:
            cols.append(("buckling_load_factor", "buckling factor"))
        cols.append(("verdict", "verdict"))
        lines = [f"Verdict: {head}", f"Shape ({goal.label}): {b.shape.replace('_', ' ')}: {describe_params(b.params)};"
                 f" removed area {b.area_mm2:.0f} mm^2."]
        if rec.choice:
            lines.append("Why: " + rec.choice + ".")
        if b.moved is not None:
            lines.append("Moved to pass: " + b.moved["note"] + ".")
        r = b.reinforcement
        if r is not None:
            mass = "" if r["added_mass_kg"] is None else f", {r['added_mass_kg']:.4f} kg added"
            lines.append(f"Reinforcement: {r['kind']} ({_sizes(r['sizes'])}; cross-section "
                         f"{r['cross_section_mm2']:.1f} mm^2{mass}).")
        lines.append(f"Profile for CAD: {Path(b.dxf).name}.")
        failed = [r for r in reqs if not r.met]
    lines = [t for t in lines if t]
    warn = b is None or bool([r for r in b.requirements if not r.met])
    if md:
        return "\n" + "\n\n".join(f"**{t}**" if i == 0 else t for i, t in enumerate(lines)) + "\n\n" + \
            (render_table(rows, cols, md) if rows else "")
    return (f'<div class="summary"><p class="{"warn" if warn else "pass"}">{html.escape(lines[0])}</p>'
            + "".join(f"<p>{html.escape(t)}</p>" for t in lines[1:]) + (render_table(rows, cols, md) if rows else "")
            + "</div>")


def _sizes(sizes: dict) -> str:
    from holeshape.geometry.reinforcement import values_text

    return values_text(sizes)


def load_case_rows(cases: Sequence[dict]) -> tuple[list[dict], list[tuple[str, str]]]:
    """The load-case table: remote stresses for remote-stress cases, beam forces (N, N mm) for beam cases; a value
    that does not belong to the case's kind is left blank rather than shown as zero."""
    beam = any(c.get("shear_force") is not None or c.get("bending_moment") is not None for c in cases)
    rows = []
    for c in cases:
        is_beam = c.get("shear_force") is not None or c.get("bending_moment") is not None
        row = {"name": c["name"]}
        if is_beam:
            row.update(shear_force=c.get("shear_force"), bending_moment=c.get("bending_moment"),
                       kind="beam forces (shear force, bending moment at the panel's x-centre)")
        else:
            row.update(sigma_x=c["sigma_x"], sigma_y=c["sigma_y"], tau_xy=c["tau_xy"], kind="remote stresses")
        rows.append(row)
    cols = [("name", "load case"), ("kind", "given as"), ("sigma_x", "sigma_x (MPa)"), ("sigma_y", "sigma_y (MPa)"),
            ("tau_xy", "tau_xy (MPa)")]
    if beam:
        cols += [("shear_force", "shear force V (N)"), ("bending_moment", "bending moment M (N mm)")]
    return rows, cols


def elastic_kind(material: dict) -> type[Elastic]:
    """The material kind of a stored material (runs written before kinds existed are isotropic)."""
    from holeshape.elastic import ELASTIC_KINDS

    return ELASTIC_KINDS[material.get("kind", "isotropic")]


def elastic_columns(material: dict) -> list[tuple[str, str]]:
    """The material kind's own values as table columns (key, heading with its unit)."""
    return list(elastic_kind(material).headings.items())


def section_inputs(page: Page, inputs: RunInputs, rec: RunRecord | None = None) -> None:
    """Everything the run was given: panel, material, loads, requirements, the searched parameters and how."""
    page.h2(SECTIONS[1])
    page.table([inputs.panel], [("width", "width (mm)"), ("height", "height (mm)"), ("thickness", "thickness (mm)"),
                                ("edges", "in-plane edge condition")])
    m = inputs.material
    page.table([m], [("name", "material"), *elastic_columns(m), ("allowable_stress", "allowable (MPa)"),
                     ("net_section_allowable", "net-section allowable (MPa)"), ("density", "density (kg/m^3)")])
    rows, cols = load_case_rows(inputs.load_cases)
    page.table(rows, cols)
    if any(r.get("shear_force") is not None for r in rows):
        p = inputs.panel
        page.para(f"Beam load cases: the web belongs to a beam section of second moment of area "
                  f"{p.get('section_inertia'):.6g} mm^4 about a neutral axis at y = "
                  f"{p.get('neutral_axis_y') if p.get('neutral_axis_y') is not None else p['height'] / 2:g} mm; the "
                  f"edge tractions follow the beam theory (sigma_x = M y / I with dM/dx = V, the moment given at the "
                  f"panel's x-centre), shear carried {p.get('shear_distribution', 'uniform')}.")
    cons = describe_constraints(inputs.constraints)
    if cons:
        page.table(cons, [("constraint", "requirement"), ("value", "value")])
    section_search(page, inputs, rec)
    if inputs.reinforcement:
        page.table([{"key": k, "value": describe_value(v)} for k, v in inputs.reinforcement.items()],
                   [("key", "reinforcement"), ("value", "value (mm, MPa)")])
    stab_in = inputs.stability
    if stab_in:
        page.table([{**stab_in, "edge_support": stab_in["edge_support"].replace("_", " ")}],
                   [("edge_support", "buckling: panel edge support"), ("required_factor", "required buckling factor"),
                    ("modes", "mode shapes plotted")])
    for w in inputs.warnings:
        page.para("WARNING: " + w, "warn")


def section_search(page: Page, inputs: RunInputs, rec: RunRecord | None) -> None:
    """The searched family and every parameter (fixed or its range), the budget, seed, method, stress measure and
    the Kt definition: what a checker needs to repeat the run."""
    s = inputs.search
    goal = GOALS.get(s.get("goal", "lowest_peak"), GOALS["lowest_peak"])
    fam = (inputs.shape or "").replace("_", " ")
    method = s.get("method_used", s.get("method", "auto"))
    share = "" if method == "gradient" else f", global sampler share {s.get('global_fraction', 0.25):g}"
    page.para(f"Searched family: {fam or 'as given'}; goal: {goal.label}. Budget {s.get('trials')} evaluations"
              f" (seed {s.get('seed')}; method {method}{share}); trials screened at the"
              f" {rec.search_accuracy if rec else 'draft'} level, the recommendation and the comparison checked at the"
              " fine level.")
    if inputs.cutout:
        rows = []
        for r in inputs.cutout:
            unit = f" {r['unit']}" if r.get("unit") else ""
            if r.get("searched"):
                v = f"from {r['min']:g} to {r['max']:g}{unit}" + ("" if r.get("value") is None else
                                                                   f" (current design {r['value']:g}{unit})")
            else:
                v = f"{r['value']:g}{unit}" if isinstance(r["value"], (int, float)) else str(r["value"])
            rows.append({"parameter": r["parameter"], "how": "searched" if r.get("searched") else "fixed",
                         "value": v})
        page.table(rows, [("parameter", "design parameter"), ("how", ""), ("value", "value or range")])
    measure = inputs.measure.get("stress", "von_mises")
    kt_ref = (rec.best.kt_reference if rec is not None and rec.best is not None else None)
    page.para(f"Stress measure: {STRESS_MEASURES.get(measure, measure)}. Kt = the peak of that measure over the"
              f" cutout edge divided by the reference stress"
              + (f" ({kt_ref})" if kt_ref else "") + ". Margin of safety = allowable / peak - 1.")


def section_recommendation(page: Page, b: DesignCheck) -> None:
    page.h2(SECTIONS[2])
    x0, y0, x1, y1 = b.bounds_mm
    page.para(f"Recommended: {b.shape.replace('_', ' ')} ({describe_params(b.params)}); overall {x1 - x0:.1f} x "
              f"{y1 - y0:.1f} mm; smallest radius {b.min_radius_mm:.1f} mm"
              + (f" at ({b.min_radius_at_mm[0]:.1f}, {b.min_radius_at_mm[1]:.1f}) mm" if b.min_radius_at_mm else "")
              + f"; removed area {b.area_mm2:.0f} mm^2"
              + (f" ({b.mass_saved_kg:.3f} kg saved)" if b.mass_saved_kg is not None else "")
              + f"; profile {Path(b.dxf).name}.")
    if b.moved is not None:
        page.para("Moved back along the goal to pass at the fine level: " + b.moved["note"] + ".")
    page.table([c.to_dict() for c in b.load_cases], [
        ("name", "load case"), ("peak_stress_mpa", "peak (MPa)"), ("kt", "Kt"), ("x_mm", "x (mm)"),
        ("y_mm", "y (mm)"), ("margin_of_safety", "margin of safety"),
        ("net_section_equivalent_mpa", "net section, equivalent (MPa)")])
    per_opening = [{"name": c.name, **loc} for c in b.load_cases for loc in c.locations
                   if loc["location"].startswith("opening")]
    if per_opening:
        page.para("Every opening, every load case (the peak of each opening's edge, with its mesh error estimate):")
        page.table(per_opening, [("name", "load case"), ("location", "opening"), ("peak_stress_mpa", "peak (MPa)"),
                                 ("x_mm", "x (mm)"), ("y_mm", "y (mm)"), ("error_estimate_pct", "error estimate (%)")])
    section_requirements(page, b)
    for w in b.warnings:
        page.para("WARNING: " + w, "warn")
    page.img("best_shape.png", "recommended profile in the panel with the access envelope and the standard shapes")


def section_requirements(page: Page, b: DesignCheck) -> None:
    reqs = list(b.requirements)
    if not reqs:
        return
    failed = [r for r in reqs if not r.met]
    if failed:
        v = b.verdict()
        page.para(f"The design FAILS {len(failed)} of {len(reqs)} requirements of the study: "
                  + "; ".join(v["verdict_reasons"]) + ". What can change: " + "; ".join(v["advice"]) + ".", "warn")
    else:
        page.para(f"The recommended design meets every requirement of the study ({len(reqs)} checked at the "
                  f"{b.accuracy} level).")
    page.table([{"requirement": r.label, "value": requirement_value(r), "limit": limit_value(r),
                 "met": "yes" if r.met else "NO"} for r in reqs if r.listed or not r.met],
               [("requirement", "requirement"), ("value", "design"), ("limit", "required"), ("met", "met")])


def section_no_design(page: Page, rec: RunRecord) -> None:
    """In place of a recommendation: why there is none, by count, the nearest misses, what to change."""
    page.h2(SECTIONS[2])
    page.para("No design is recommended: nothing the search found, and none of the standard shapes, meets every"
              " requirement at the fine level. " + (rec.choice[0].upper() + rec.choice[1:] + "." if rec.choice else ""),
              "warn")
    if rec.trial_reasons:
        rows = []
        for g in rec.trial_reasons:
            if "failure" in g:
                rows.append({"reason": f"the numerics gave up ({g['failure']})", "trials": g["trials"]})
                continue
            rng = ""
            if "lowest" in g:
                lo, hi = stored_value(g, g["lowest"]), stored_value(g, g["highest"])
                rng = lo if lo == hi else f"{lo} to {hi}"
            rows.append({"reason": g["requirement"], "trials": g["trials"], "values": rng,
                         "limit": f"{g.get('relation', '')} {stored_value(g, g.get('limit'), limit=True)}".strip()})
        page.para("Designs refused, by the requirement they missed (the search's draft level):")
        page.table(rows, [("reason", "requirement missed"), ("trials", "trials"), ("values", "values found"),
                          ("limit", "required")])
    if rec.nearest_misses:
        page.para("The nearest misses (least summed shortfall), each with every requirement it misses:")
        rows = []
        for m in rec.nearest_misses:
            who = "standard shape" if m.get("trial") is None else f"trial {m['trial']}"
            for r in m["missed"]:
                rows.append({"design": f"{who} ({m.get('level', 'draft')})", "params": describe_params(
                    {k: v for k, v in m["params"].items() if not isinstance(v, str)}),
                    "missed": r["label"], "value": stored_value(r, r.get("value")),
                    "limit": "" if r.get("limit") is None else
                    f"{r['relation']} {stored_value(r, r['limit'], limit=True)}"})
        page.table(rows, [("design", "design (level)"), ("params", "parameters"), ("missed", "misses"),
                          ("value", "value"), ("limit", "required")])
    if rec.advice:
        page.para("What to change: " + "; ".join(rec.advice) + ".")


def check_columns(rows: list[dict]) -> list[tuple[str, str]]:
    """The columns the registered checks add to a comparison or sweep table (``Check.columns``), where any row has
    a value for them."""
    from holeshape.checks import CHECKS

    return [(k, h) for c in CHECKS for k, h in c.columns if any(r.get(k) is not None for r in rows)]


def section_bare_opening(page: Page, b: DesignCheck) -> None:
    """A reinforced recommendation beside the same outline checked bare: what the reinforcement buys."""
    r = b.reinforcement
    bare = None if r is None else r.get("bare_opening")
    if bare is None:
        return
    page.h2("Reinforcement against the bare opening")
    rows = [{"design": "with the reinforcement", "peak_stress_mpa": b.peak_stress_mpa,
             "margin_of_safety": b.margin_of_safety, "buckling_load_factor": b.buckling_load_factor,
             "verdict": "meets every requirement" if b.meets_every_requirement else "FAILS"},
            {"design": "the same outline bare", "peak_stress_mpa": bare["peak_stress_mpa"],
             "margin_of_safety": bare["margin_of_safety"], "buckling_load_factor": bare["buckling_load_factor"],
             "verdict": "meets every requirement" if bare["verdict"] == "pass" else
             "FAILS: " + "; ".join(bare["verdict_reasons"])}]
    cols = [("design", "opening"), ("peak_stress_mpa", "peak (MPa)"), ("margin_of_safety", "lowest margin")]
    if b.stability is not None:
        cols.append(("buckling_load_factor", "buckling factor"))
    cols.append(("verdict", "verdict"))
    page.table(rows, cols)


def section_comparison(page: Page, rec: RunRecord) -> None:
    """The recommendation, the searched family's best and the standard shapes at the fine level, each with its
    verdict and how the recommendation compares, the direction in words."""
    page.h2(SECTIONS[3])
    goal = GOALS.get(rec.goal, GOALS["lowest_peak"])
    b = rec.best
    mine = None if b is None else {"peak_stress_mpa": b.peak_stress_mpa, "area_mm2": b.area_mm2,
                                   "reinforcement": b.reinforcement, **b.top}
    rows = []
    if b is not None:
        rows.append({"shape": f"recommended: {b.shape.replace('_', ' ')}", "peak_stress_mpa": b.peak_stress_mpa,
                     "kt": b.kt, "area_mm2": b.area_mm2, "buckling_load_factor": b.buckling_load_factor,
                     "added_mass_kg": (b.reinforcement or {}).get("added_mass_kg"), "verdict": "meets every"
                     " requirement" if b.meets_every_requirement else "FAILS", "note": "", **b.top})
    fam = rec.family_best
    if fam is not None and not fam.get("recommended"):
        rows.append({"shape": f"searched {fam['shape'].replace('_', ' ')} best (trial {fam['trial']})",
                     "peak_stress_mpa": fam["peak_stress_mpa"], "kt": fam["kt"], "area_mm2": fam["area_mm2"],
                     "buckling_load_factor": fam.get("buckling_load_factor"),
                     "added_mass_kg": (fam.get("reinforcement") or {}).get("added_mass_kg"),
                     "verdict": "meets every requirement" if fam["meets_every_requirement"] else
                     "FAILS: " + "; ".join(fam["verdict_reasons"]),
                     "note": "" if mine is None else f"the recommended design has {goal.better(mine, fam)} it",
                     **{k: fam.get(k) for k, _ in check_columns([fam])}})
    for r in rec.baselines:
        other = {"peak_stress_mpa": r.peak_stress_mpa, "area_mm2": r.area_mm2,
                 "reinforcement": None if r.added_volume_mm3 is None else {"added_volume_mm3": r.added_volume_mm3},
                 **r.figures}
        note = "" if b is None or mine is None or r.peak_stress_mpa is None else \
            "the recommended design" if b.trial is None and r.shape == b.shape and r.params == b.params else \
            f"the recommended design has {goal.better(mine, other)} it"
        rows.append({"shape": f"standard {r.shape.replace('_', ' ')}", "peak_stress_mpa": r.peak_stress_mpa,
                     "kt": r.kt, "area_mm2": r.area_mm2, "buckling_load_factor": r.buckling_load_factor,
                     "added_mass_kg": r.added_mass_kg,
                     "verdict": "meets every requirement" if r.feasible else f"FAILS: {r.reason}", "note": note,
                     **r.figures})
    cols = [("shape", "design"), ("peak_stress_mpa", "peak (MPa)"), ("kt", "Kt"), ("area_mm2", "area (mm^2)")]
    cols += check_columns(rows)
    if any(r.get("buckling_load_factor") is not None for r in rows):
        cols.append(("buckling_load_factor", "buckling factor"))
    if any(r.get("added_mass_kg") is not None for r in rows):
        cols.append(("added_mass_kg", "reinforcement mass (kg)"))
    cols += [("verdict", "verdict"), ("note", "")]
    if rec.choice:
        page.para(rec.choice[0].upper() + rec.choice[1:] + ".")
    page.table(rows, cols)
    if rec.comparison:
        page.para("Best design of every shape family, same constraints and load cases, fine level:")
        page.table(list(rec.comparison), [
            ("rank", "rank"), ("shape", "family"), ("peak_stress_mpa", "peak (MPa)"), ("kt", "Kt"),
            ("area_mm2", "area (mm^2)"), ("buckling_load_factor", "buckling factor"),
            *check_columns(list(rec.comparison)),
            ("governing_load_case", "governing load case"), ("against_circle", "against the best circle"),
            ("reason", "note")])
        page.img("compare_shapes.png", "best outline of every family, overlaid")


def section_evidence(page: Page, b: DesignCheck | None) -> None:
    page.h2(SECTIONS[6])
    if b is None:
        page.para("No design is recommended, so there is no convergence evidence to show.")
        return
    from dataclasses import asdict

    page.table([asdict(x) for x in b.levels], [
        ("accuracy", "accuracy level"), ("dofs", "DOFs"), ("peak_stress_mpa", "peak (MPa)"),
        ("change_pct", "change from finest (%)"), ("error_estimate_pct", "error estimate (%)")])
    page.para(convergence_words(b.levels))
    page.para(f"Reported figures are at the {b.accuracy} level; error estimate {sig(b.error_estimate_pct)} % "
              "(change of the peak to a mesh with every element size doubled, plus the measured scatter floor).")


def convergence_words(levels: tuple) -> str:
    """What the table of mesh levels says, in words: which way the peak moves as the mesh is refined, and whether
    the steps shrink (the evidence that the finest figure is converged, not merely the last one computed)."""
    peaks = [lv.peak_stress_mpa for lv in levels]
    if len(peaks) < 2:
        return "Only one mesh level was solved: there is no second level to compare it with."
    steps = [100.0 * (b / a - 1.0) for a, b in zip(peaks, peaks[1:])]
    way = "rises" if peaks[-1] > peaks[0] else "falls"
    text = (f"As the mesh is refined ({', '.join(str(lv.dofs) for lv in levels)} DOFs) the peak {way} by"
            f" {abs(100.0 * (peaks[-1] / peaks[0] - 1.0)):.2g} % in all")
    if len(steps) >= 2:
        shrinking = all(abs(b) <= abs(a) for a, b in zip(steps, steps[1:]))
        text += (f"; the step between levels goes {' then '.join(f'{x:+.2g} %' for x in steps)}"
                 + (", shrinking as the mesh refines: the finest figure is converged to about its last step."
                    if shrinking else ", not shrinking steadily: take the error estimate, not the last step, as the"
                    " measure of accuracy, and consider a finer level."))
    else:
        text += "."
    return text


def section_validation(page: Page, validation: list[dict]) -> None:
    page.h2(SECTIONS[7])
    page.para("The same pipeline at the same accuracy level on published reference cases (peak stresses in MPa;"
              " buckling cases as load factors):")
    page.table(validation, [("case", "case"), ("source", "source"), ("published", "published"),
                            ("holeshape", "holeshape"), ("error_pct", "error (%)"),
                            ("tolerance_pct", "tolerance (%)"), ("within", "within")])


def section_cautions(page: Page, inputs: RunInputs, cautions_text: str) -> None:
    page.h2(SECTIONS[9])
    edges = inputs.panel["edges"]
    meaning = ("remote stress applied as edge tractions: a large panel free to redistribute load" if edges == "traction"
               else "remote strain imposed on the edges: a web bounded by stiff members")
    model = elastic_kind(inputs.material).description
    page.para(f"{model[0].upper()}{model[1:]}, load cases as remote stresses or beam forces; in-plane edge condition"
              f" '{edges}' "
              f"({meaning}). The reported peak stress is the largest over every place it is looked for: with a"
              " reinforcement that includes the flange's or the doubler's own stress, which may govern.")
    page.para(cautions_text, "caution")


SWEEP_SECTIONS = ("The job", "Study inputs", "Sweep", "Validation appendix", "Assumptions and cautions")


def build_sweep_report(run: Path, fmt: str = "html") -> Path:
    """Report of a parameter sweep: inputs (panel, material, loads, requirements, every fixed and varied
    parameter), the curves or map, every point, the validation appendix, cautions."""
    from holeshape import cautions

    sweep = SweepRecord.from_dict(json.loads((run / "sweep.json").read_text()))
    inputs = RunInputs.from_dict(json.loads((run / "inputs.json").read_text()))
    validation = json.loads((run / "validation.json").read_text()) if (run / "validation.json").exists() else []
    page = Page(run, fmt == "markdown")
    title = inputs.title
    page.raw(f"# {title}: parameter sweep\n" if page.md else f"<h1>{html.escape(title)}: parameter sweep</h1>")
    page.h2(SWEEP_SECTIONS[0])
    page.para("A classic parameter study of the cutout: every point is a verified evaluation (two mesh levels, error "
              f"estimate) at the {sweep.accuracy} level, for every load case, checked against every requirement;"
              " points that break one are kept and marked.")
    page.h2(SWEEP_SECTIONS[1])
    page.table([inputs.panel], [("width", "width (mm)"), ("height", "height (mm)"), ("thickness", "thickness (mm)"),
                                ("edges", "edge condition")])
    page.table([inputs.material], [("name", "material"), *elastic_columns(inputs.material),
                                   ("allowable_stress", "allowable (MPa)"), ("density", "density (kg/m^3)")])
    rows, cols = load_case_rows(inputs.load_cases)
    page.table(rows, cols)
    cons = describe_constraints(inputs.constraints)
    if cons:
        page.table(cons, [("constraint", "requirement"), ("value", "value")])
    varied = {v["name"] for v in sweep.vary}
    page.table([{"parameter": r["parameter"], "value": f"varied from {v['lo']:g} to {v['hi']:g} in {v['n']} steps"
                 if r["parameter"] in varied else (f"{r['value']:g} {r.get('unit', '')}".strip()
                                                   if isinstance(r["value"], (int, float)) else str(r["value"]))}
                for r in inputs.cutout for v in [next((x for x in sweep.vary if x["name"] == r["parameter"]), {})]],
               [("parameter", "design parameter"), ("value", "fixed value or sweep")])
    page.h2(SWEEP_SECTIONS[2])
    page.img("sweep.png", "the swept quantities against the varied parameters")
    rows = [{"point": ", ".join(f"{k} = {v:.4g}" for k, v in pt["coords"].items()), **pt} for pt in sweep.points]
    cols = [("point", "parameters"), ("peak_stress_mpa", "peak (MPa)"), ("kt", "Kt"),
            ("area_mm2", "area (mm^2)"), ("margin_of_safety", "lowest margin"),
            ("error_estimate_pct", "error estimate (%)"), ("feasible", "meets every requirement"), ("reason", "note")]
    if any("buckling_load_factor" in r for r in rows):
        cols.insert(3, ("buckling_load_factor", "buckling load factor"))
    cols[-3:-3] = check_columns(rows)
    page.table(rows, cols)
    section_validation(page, validation)
    page.h2(SWEEP_SECTIONS[4])
    page.para(cautions(sweep.with_stability, fatigue_computed=any("fatigue_reserve_factor" in r for r in rows)),
              "caution")
    return page.write(title)
