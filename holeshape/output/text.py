"""Human-readable summaries (plain text, units stated): of one checked design, and of a search run, whether it
recommends a design or has none (then with the reasons by count, the nearest misses and what to change). Every
check's own section is printed the same way, from its plain-data :class:`~holeshape.checks.Section`."""

from __future__ import annotations

import textwrap
from collections.abc import Sequence
from typing import Any

from holeshape import cautions
from holeshape.checks.base import Requirement, Section, verdict
from holeshape.evaluate import STRESS_LABELS
from holeshape.output.numbers import fmt, limit_value, requirement_value, stored_value
from holeshape.record import RunRecord

WIDTH = 118
INDENT = "                "


def factor_text(f: float | None) -> str:
    """A buckling load factor for people (None: the case does not buckle below the factor ceiling)."""
    return "does not buckle" if f is None else f"{f:.3f}"


def wrap(head: str, text: str) -> list[str]:
    """``text`` after a 14-character label (a longer one takes its own line), wrapped under itself."""
    if len(head) > 13:
        return [f"  {head}"] + textwrap.wrap(text, WIDTH, initial_indent=INDENT, subsequent_indent=INDENT)
    return textwrap.wrap(text, WIDTH, initial_indent=f"  {head:<14}", subsequent_indent=INDENT) or [f"  {head}"]


def table_lines(columns: Sequence[tuple[str, str]], rows: Sequence[dict[str, Any]], indent: str = "    "
                ) -> list[str]:
    """A fixed-width table: headings, then each row's cells formatted by their column key."""
    cells = [[fmt(k, r.get(k)) for k, _ in columns] for r in rows]
    widths = [max([len(h)] + [len(c[i]) for c in cells]) for i, (_, h) in enumerate(columns)]
    out = [indent + "  ".join(h.ljust(w) if i == 0 else h.rjust(w) for i, ((_, h), w) in
                              enumerate(zip(columns, widths)))]
    for c in cells:
        out.append(indent + "  ".join(x.ljust(w) if i == 0 else x.rjust(w) for i, (x, w) in
                                      enumerate(zip(c, widths))))
    return out


def section_lines(section: Section | dict) -> list[str]:
    """A check's section: its title, paragraphs (a warning marked) and tables."""
    s = section if isinstance(section, Section) else Section.from_dict(section)
    lines = ["", f"  {s.title.upper()}"]
    for i, p in enumerate(s.paragraphs):
        lines += textwrap.wrap(("WARNING: " if s.warn and i == 0 else "") + p, WIDTH, initial_indent="    ",
                               subsequent_indent="    ")
    for t in s.tables:
        lines += table_lines(t.columns, t.rows)
    return lines


def requirement_lines(reqs: list[Requirement] | tuple[Requirement, ...]) -> list[str]:
    """The verdict and every requirement (rows implied by a listed one shown only when they fail)."""
    if not reqs:
        return []
    shown = [r for r in reqs if r.listed or not r.met]
    failed = [r for r in reqs if not r.met]
    hidden = len(reqs) - len(shown)
    implied = f" ({hidden} implied by the rows shown)" if hidden else ""
    head = "MEETS every requirement of the study" if not failed else \
        f"FAILS {len(failed)} of {len(reqs)} requirements{implied}"
    lines = ["", f"  verdict       {head}"]
    for r in shown:
        lines.append(f"    {'ok  ' if r.met else 'FAIL'} {r.label[:58]:<58} {requirement_value(r):>16}"
                     f"  required {limit_value(r)}")
    for a in verdict(reqs).advice:
        lines += wrap("to change", a)
    return lines


def _fmt_mos(m: float | None) -> str:
    return "n/a (no allowable given)" if m is None else f"{m:+.3f}{'  << NEGATIVE' if m < 0 else ''}"


def check_summary(result: Any, edges_note: str) -> str:
    """The text of ``holeshape check``: one :class:`~holeshape.checkrun.DesignResult` (a higher layer: Any)."""
    ev, a, study, cutout = result.evaluation, result.assessment, result.study, result.cutout
    label = STRESS_LABELS[ev.stress_measure]
    stress = a.result("stress")
    net = a.result("net_section")
    params = ", ".join(f"{k} = {_num(v)}" for k, v in cutout.parameters().items())
    lines = [f"holeshape check: {study.title}"]
    lines += wrap("cutout", f"{cutout.family} {params}")
    lines += [
        f"  removed area  {ev.area_mm2:.1f} mm^2   smallest radius {ev.min_radius_mm:.3g} mm",
        f"  model         {ev.model} panel, {ev.dofs} DOFs, P2 on curved quadratic triangles, {edges_note}",
    ]
    levels = ", ".join(f"{n} DOFs -> {p:.3f} MPa" for n, p in ev.levels)
    lines += wrap("accuracy", f"{ev.accuracy}: estimated discretisation error {ev.error_estimate_pct:.3f} % (target"
                  f" {ev.accuracy_target_pct:g} %; levels {levels})")
    lines += ["", f"  {'load case':<34} {'peak ' + label:>28} {'Kt':>7} {'at x, y (mm)':>18} {'net section':>14}"
                  f" {'MoS':>8}"]
    for r in ev.load_cases:
        mos = None if stress is None else stress.margins.get(r.name)
        ns = "-" if net is None else f"{net.sections[net.governing[r.name]].equivalent_mpa:.1f} MPa"
        lines.append(f"  {r.name[:34]:<34} {r.peak_stress_mpa:>24.2f} MPa {r.kt:>7.3f} "
                     f"{f'{r.x_mm:.1f}, {r.y_mm:.1f}':>18} {ns:>14} {'-' if mos is None else f'{mos:+.3f}':>8}")
    lines += ["", f"  governing     {ev.governing_load_case}: peak {ev.peak_stress_mpa:.2f} MPa, Kt = {ev.kt:.3f}"]
    lines += wrap("Kt reference", ev.kt_reference)
    lines.append(f"  margin        {_fmt_mos(None if stress is None else stress.margin_of_safety)}")
    if ev.load_cases[0].locations:
        for c in ev.load_cases:
            lines += wrap("peaks" if c is ev.load_cases[0] else "", f"{c.name}: " + ", ".join(
                f"{loc.location} {loc.peak_stress_mpa:.1f}" for loc in c.locations) + f" MPa; governs at"
                f" {c.peak_location}")
    beams = [lc for lc in study.load_cases if lc.is_beam]
    for lc in beams:
        lines += wrap("beam load" if lc is beams[0] else "", f"{lc.name}: shear force V = {lc.shear_force or 0:.4g} N,"
                      f" bending moment M = {lc.bending_moment or 0:.4g} N mm at the panel's x-centre (edge tractions"
                      " from sigma_x = M y / I, dM/dx = V)")
    from holeshape.checks.compose import sections

    for s in sections(a, study):
        lines += section_lines(s)
    lines += requirement_lines(a.requirements)
    for w in result.warnings:
        lines += wrap("WARNING", w)
    lines += [""] + wrap("CAUTION", cautions(a.result("stability") is not None,
                                            a.result("reinforcement") is not None,
                                            a.result("fatigue") is not None))
    return "\n".join(lines)


def optimise_summary(rec: RunRecord) -> str:
    """The text summary of a search run, from its typed record."""
    if rec.best is None:
        return no_design_summary(rec)
    b = rec.best
    dims = ", ".join(f"{k} = {_num(v)}" for k, v in b.params.items())
    x0, y0, x1, y1 = b.bounds_mm
    t = rec.trials
    from holeshape.goals import GOALS

    goal = GOALS.get(rec.goal, GOALS["lowest_peak"])
    lines = [f"holeshape optimise: {rec.study}",
             f"  goal          {goal.label}",
             f"  trials        {t.completed} completed ({t.infeasible} infeasible{t.probe_note}), {t.failed} failed;"
             f" storage {rec.storage}"]
    lines += wrap("recommended", f"{b.shape}: {dims}")
    lines += wrap("why", rec.choice) if rec.choice else []
    lines += [
        f"  size          {x1 - x0:.1f} x {y1 - y0:.1f} mm overall, smallest radius {b.min_radius_mm:.2f} mm,"
        f" removed area {b.area_mm2:.0f} mm^2" + ("" if b.mass_saved_kg is None else
                                                 f" ({b.mass_saved_kg:.3f} kg saved)"),
        f"  peak          {b.peak_stress_mpa:.2f} MPa, Kt {b.kt:.3f}, error estimate {b.error_estimate_pct:.3f} %"
        f" at the {b.accuracy} level",
    ]
    lines += wrap("Kt reference", b.kt_reference)
    lines.append(f"  margin        {_fmt_mos(b.margin_of_safety)}")
    if b.moved is not None:
        lines += wrap("moved", b.moved["note"])
    r = b.reinforcement
    if r is not None:
        from holeshape.geometry.reinforcement import value_unit, values_text

        sizes = values_text({k: v for k, v in r["sizes"].items() if value_unit(k) == "mm"}, digits=2)
        mass = "" if r["added_mass_kg"] is None else f", adds {r['added_mass_kg']:.4f} kg"
        lines += wrap("reinforcement", f"{r['kind']}: {sizes}; cross-section {r['cross_section_mm2']:.1f} mm^2{mass};"
                      " peaks " + ", ".join(f"{k} {v:.1f} MPa" for k, v in r["peak_stress_mpa"].items()))
        bare = r.get("bare_opening")
        if bare is not None:
            f = bare["buckling_load_factor"]
            mos = "" if bare["margin_of_safety"] is None else f", margin {bare['margin_of_safety']:+.3f}"
            lines += wrap("bare opening", f"the same outline without it: peak {bare['peak_stress_mpa']:.1f} MPa{mos}"
                          + ("" if b.stability is None else f", buckling factor {factor_text(f)}")
                          + f"; {'meets' if bare['verdict'] == 'pass' else 'FAILS'} the requirements"
                          + ("" if bare["verdict"] == "pass" else f" ({'; '.join(bare['verdict_reasons'])})"))
    for c in b.load_cases:
        mos = "" if c.margin_of_safety is None else f", MoS {c.margin_of_safety:+.3f}"
        buck = "" if not c.with_stability else f", buckling factor {factor_text(c.buckling_load_factor)}"
        lines.append(f"    {c.name}: {c.peak_stress_mpa:.2f} MPa at ({c.x_mm:.1f}, {c.y_mm:.1f}) mm{mos}{buck}")
        if c.locations:
            lines.append("      " + ", ".join(f"{loc['location']} {loc['peak_stress_mpa']:.1f}" for loc in c.locations)
                         + " MPa")
    lines += comparison_lines(rec)
    if rec.front:
        lines.append(f"  trade-off     {len(rec.front)} designs on the front (draft level), one DXF each")
    refused = t.refused_after_solve
    for k, what in (("buckling", "buckled below the required factor"), ("margin", "missed the margin")):
        if refused.get(k):
            n = refused[k]
            lines.append(f"  refused       {n} solved design{'s' if n != 1 else ''} that met every geometric"
                         f" requirement {what}")
    for s in b.sections:
        lines += section_lines(s)
    lines += requirement_lines(list(b.requirements))
    for w in b.warnings:
        lines += wrap("WARNING", w)
    lines.append(f"  profile       {b.dxf} ({b.dxf_vertices} vertices, chord error {b.dxf_chord_error_mm:.4f} mm)")
    lines += [""] + wrap("CAUTION", rec.cautions or cautions(False))
    return "\n".join(lines)


def comparison_lines(rec: RunRecord) -> list[str]:
    """The recommendation beside the searched family's best and the standard shapes, directions in words."""
    from holeshape.goals import GOALS

    goal = GOALS.get(rec.goal, GOALS["lowest_peak"])
    b = rec.best
    assert b is not None  # only a run that recommends a design is compared
    mine = {"peak_stress_mpa": b.peak_stress_mpa, "area_mm2": b.area_mm2, "reinforcement": b.reinforcement, **b.top}
    if rec.family_best is None or rec.family_best.get("recommended"):
        if not rec.baselines:
            return ["", "  compared       no standard shape applies (no access envelope or area requirement to size"
                        " one by)"]
    lines = ["", "  compared at the fine level, same requirements:"]
    fam = rec.family_best
    if fam is not None and not fam.get("recommended"):
        state = "meets every requirement" if fam["meets_every_requirement"] else \
            "FAILS: " + "; ".join(fam["verdict_reasons"])
        lines += wrap("", f"searched {fam['shape'].replace('_', ' ')} best (trial {fam['trial']}):"
                      f" {fam['peak_stress_mpa']:.2f} MPa, area {fam['area_mm2']:.0f} mm^2; {state}; the recommended"
                      f" design has {goal.better(mine, fam)} it")
    for row in rec.baselines:
        name = row.shape.replace("_", " ")
        if row.peak_stress_mpa is None:
            lines += wrap("", f"standard {name}: cannot be drawn within the requirements ({row.reason})")
            continue
        other = {"peak_stress_mpa": row.peak_stress_mpa, "area_mm2": row.area_mm2,
                 "reinforcement": None if row.added_volume_mm3 is None else {"added_volume_mm3": row.added_volume_mm3},
                 **row.figures}
        mass = "" if row.added_mass_kg is None else f", reinforcement {row.added_mass_kg:.4f} kg"
        mass += "".join(f", {head} {_num(row.figures[k])}" for k, head in check_columns()
                        if row.figures.get(k) is not None)
        state = "meets every requirement" if row.feasible else f"FAILS: {row.reason}"
        than = "it is the recommended design" if b.trial is None and row.shape == b.shape and \
            row.params == b.params else f"the recommended design has {goal.better(mine, other)} it"
        lines += wrap("", f"standard {name}: {row.peak_stress_mpa:.2f} MPa, area {row.area_mm2:.0f} mm^2{mass};"
                      f" {state}; {than}")
    return lines


def no_design_summary(rec: RunRecord) -> str:
    """A run with no answer: why, by count; the nearest misses, value against limit; what to change."""
    t = rec.trials
    lines = [f"holeshape optimise: {rec.study}",
             "  NO DESIGN meets every requirement at the fine level (exit code 5): nothing is recommended",
             f"  trials        {t.completed} completed ({t.infeasible} refused{t.probe_note}), {t.failed} failed;"
             f" storage {rec.storage}"]
    lines += wrap("why", rec.choice) if rec.choice else []
    if rec.trial_reasons:
        lines += ["", "  refused designs by the requirement they missed (draft level):"]
        for g in rec.trial_reasons[:8]:
            if "failure" in g:
                lines.append(f"    {g['trials']:>5} {'trial' if g['trials'] == 1 else 'trials'} failed in the numerics"
                             f" ({g['failure']})")
                continue
            rng = ""
            if "lowest" in g:
                lo, hi = stored_value(g, g["lowest"]), stored_value(g, g["highest"])
                rng = f": {lo}" if lo == hi else f": {lo} to {hi}"
                rng += f" (required {g['relation']} {stored_value(g, g['limit'], limit=True)})"
            word = "trial " if g["trials"] == 1 else "trials"
            lines.append(f"    {g['trials']:>5} {word}  {g['requirement']}{rng}")
    if rec.nearest_misses:
        lines += ["", "  nearest misses:"]
        for m in rec.nearest_misses[:6]:
            who = "a standard shape" if m.get("trial") is None else f"trial {m['trial']}"
            dims = ", ".join(f"{k} = {_num(v)}" for k, v in m["params"].items() if not isinstance(v, str))
            unsolved = "" if m.get("peak_stress_mpa") is not None else \
                "; refused on its geometry before any mesh, so its stress was not evaluated"
            lines += wrap("", f"{who} ({m.get('level', 'draft')} level{unsolved}): {dims}")
            for r in m["missed"]:
                got = "-" if r.get("value") is None else stored_value(r, r["value"])
                need = "" if r.get("limit") is None else \
                    f", required {r['relation']} {stored_value(r, r['limit'], limit=True)}"
                lines.append(f"{INDENT}misses {r['label']}: {got}{need}")
    if rec.baselines:
        lines += ["", "  standard shapes at the fine level:"]
        for row in rec.baselines:
            lines += wrap("", f"{row.shape.replace('_', ' ')}: " + ("meets every requirement" if row.feasible else
                                                                   f"fails: {row.reason}"))
    for a in rec.advice:
        lines += wrap("to change", a)
    lines += [""] + wrap("CAUTION", rec.cautions or cautions(False))
    return "\n".join(lines)


def check_columns() -> list[tuple[str, str]]:
    """The figures the registered checks add to a sweep or comparison row (``Check.columns``)."""
    from holeshape.checks import CHECKS

    return [c for k in CHECKS for c in k.columns]


def sweep_lines(res: dict) -> list[str]:
    """The points of a sweep."""
    lines = [f"holeshape sweep: {res['study']} ({res['accuracy']} level, {res['elapsed_s']:.1f} s)"]
    for p in res["points"]:
        where = ", ".join(f"{k} = {v:.4g}" for k, v in p["coords"].items())
        if p.get("solved"):
            flag = "" if p["feasible"] else f"  [breaks: {p.get('reason', '')}]"
            buck = "" if "buckling_load_factor" not in p else \
                f", buckling factor {factor_text(p['buckling_load_factor'])}"
            more = "".join(f", {head} {_num(p[key])}" for key, head in check_columns() if p.get(key) is not None)
            lines.append(f"  {where:<28} peak {p['peak_stress_mpa']:8.2f} MPa, Kt {p['kt']:.3f},"
                         f" area {p['area_mm2']:.0f} mm^2{buck}{more}{flag}")
        else:
            lines.append(f"  {where:<28} not solved: {p.get('reason', '')}")
    return lines


def _num(v: Any) -> str:
    if isinstance(v, list):
        return "[" + ", ".join(_num(x) for x in v) + "]"
    return f"{v:.4g}" if isinstance(v, float) else str(v)
