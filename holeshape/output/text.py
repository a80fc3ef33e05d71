"""Human-readable summary of an evaluation (plain text, units stated)."""

from __future__ import annotations

from dataclasses import asdict

from holeshape import cautions
from holeshape.evaluate import STRESS_LABELS, Evaluation
from holeshape.record import RunRecord
from holeshape.search.constraints import requirement_value
from holeshape.stability import FACTOR_MEANING, SUPPORT_NOTES


def factor_text(f: float | None) -> str:
    """A buckling load factor for people (None: the case does not buckle below the factor ceiling)."""
    return "does not buckle" if f is None else f"{f:.3f}"


def stability_lines(st) -> list[str]:
    """The stability block of a text summary."""
    g = st.governing
    lines = [
        "",
        f"  stability     linear buckling, panel edges {SUPPORT_NOTES[st.edge_support]}, cutout edge {st.cutout_edge};"
        f" in-plane edges '{st.in_plane_edges}': {FACTOR_MEANING[st.in_plane_edges]}",
        f"                {st.accuracy}: estimated error {st.error_estimate_pct:.2g} % (target"
        f" {st.accuracy_target_pct:g} %), plate DOFs per level {', '.join(str(n) for n in st.level_dofs)}",
        f"  {'load case':<34} {'buckling factor':>16} {'reserve':>9} {'error est.':>11} {'no cutout':>10}",
    ]
    for c in st.cases:
        res = "-" if c.reserve is None else f"{c.reserve:.3f}"
        err = "-" if c.error_estimate_pct is None else f"{c.error_estimate_pct:.2g} %"
        flag = "  << BELOW REQUIRED" if c.reserve is not None and c.reserve < 1.0 else ""
        lines.append(f"  {c.name[:34]:<34} {factor_text(c.load_factor):>16} {res:>9} {err:>11}"
                     f" {factor_text(c.unperforated_factor):>10}{flag}")
    if g is None:
        lines.append("  buckling      no load case buckles the web below the factor ceiling (no compression)")
    else:
        lines.append(f"  buckling      lowest load factor {g.load_factor:.3f} ({g.name}); required"
                     f" {st.required_factor:g}, reserve {st.reserve:.3f}; without the cutout"
                     f" {factor_text(st.unperforated_factor)}")
    return lines


REINFORCEMENT_NOTES = {
    "flange": "formed flange standing on the cutout edge (an edge member in plane, a beam out of plane)",
    "ring": "doubler ring bonded over the web round the cutout",
}


def reinforcement_lines(ev: Evaluation) -> list[str]:
    """The reinforcement block of a check summary: what it is, what it weighs, the peak at every location."""
    r = ev.reinforcement
    sizes = " x ".join(f"{k} {v:.1f} mm" for k, v in r.sizes.items() if k != "youngs_modulus")
    mass = "" if r.added_mass_kg is None else f", added mass {r.added_mass_kg:.4f} kg"
    lines = ["", f"  reinforcement {r.kind}: {REINFORCEMENT_NOTES[r.kind]}",
             f"                {sizes}; cross-section {r.cross_section_mm2:.1f} mm^2{mass}"]
    if "youngs_modulus" in r.sizes:
        lines.append(f"                Young's modulus {r.sizes['youngs_modulus']:g} MPa")
    names = list(r.peak_stress_mpa)
    lines.append(f"  {'load case':<34} " + " ".join(f"{n:>30}" for n in names) + "   governs at")
    for c in ev.load_cases:
        by = {loc.location: loc.peak_stress_mpa for loc in c.locations}
        lines.append(f"  {c.name[:34]:<34} " + " ".join(f"{by[n]:>26.2f} MPa" for n in names)
                     + f"   {c.peak_location}")
    return lines


def requirement_lines(rows: list[dict]) -> list[str]:
    if not rows:
        return []
    from holeshape.search.constraints import verdict

    failed = [r for r in rows if not r["met"]]
    head = "MEETS every requirement of the study" if not failed else \
        f"FAILS {len(failed)} of {len(rows)} requirements"
    lines = ["", f"  verdict       {head}"]
    for r in rows:
        lines.append(f"    {'ok  ' if r['met'] else 'FAIL'} {r['requirement']:<52} {requirement_value(r):>14}"
                     f"  required {r['limit']}")
    for a in verdict(rows)["advice"]:
        lines.append(f"  what to change {a}")
    return lines


def _fmt_mos(m: float | None) -> str:
    return "n/a (no allowable given)" if m is None else f"{m:+.3f}{'  << NEGATIVE' if m < 0 else ''}"


SHEAR_NOTES = {"uniform": "the web carries the whole shear force, nearly evenly (built-up beam; the caps carry most"
                           " of the bending)",
               "parabolic": "parabolic shear over the depth (the panel is a solid rectangular section)"}


def row_lines(ev: Evaluation) -> list[str]:
    """Several openings (a row or separate tables): the web between them and every opening's peak per load case."""
    if not ev.ligaments_between_mm:
        return []
    n = len(ev.load_cases[0].locations)
    lines = ["", f"  openings      {n}; narrowest web between openings {min(ev.ligaments_between_mm):.1f} mm (each: "
                 + ", ".join(f"{w:.1f}" for w in ev.ligaments_between_mm) + " mm)"]
    for c in ev.load_cases:
        lines.append(f"    {c.name}: " + ", ".join(f"{loc.location} {loc.peak_stress_mpa:.1f}" for loc in c.locations)
                     + f" MPa; governs at {c.peak_location}")
    return lines


def beam_lines(ev: Evaluation, beam_cases: dict) -> list[str]:
    """The beam-load block: each beam case's forces, the reference stress and the tee sections' mean stresses.
    ``beam_cases``: name -> (shear force N, bending moment N mm, shear distribution)."""
    if not beam_cases:
        return []
    lines = ["", "  beam loads    edge tractions from the beam theory stresses (sigma_x = M y / I, dM/dx = V); Kt"
                 f" reference: {ev.kt_reference if 'beam' in ev.kt_reference else 'see each case'}"]
    for r in ev.load_cases:
        if r.name not in beam_cases:
            continue
        v, m, dist = beam_cases[r.name]
        lines.append(f"    {r.name}: V = {v:g} N, M = {m:g} N mm at the panel's x-centre; {SHEAR_NOTES[dist]};"
                     f" reference stress {r.reference_stress_mpa:.2f} MPa")
        lines.append(f"      tee above the opening: mean sigma_x {r.tee_above_mpa:.2f} MPa, mean shear"
                     f" {r.tee_above_shear_mpa:.2f} MPa; below: {r.tee_below_mpa:.2f} MPa, {r.tee_below_shear_mpa:.2f}"
                     " MPa")
    return lines


def check_summary(title: str, family: str, params: dict, ev: Evaluation, edges_note: str,
                  requirements: list[dict] | None = None, beam_cases: dict | None = None) -> str:
    label = STRESS_LABELS[ev.stress_measure]
    lines = [
        f"holeshape check: {title}",
        f"  cutout        {family} " + ", ".join(f"{k} = {v}" for k, v in params.items()),
        f"  removed area  {ev.area_mm2:.1f} mm^2   smallest radius {ev.min_radius_mm:.3g} mm",
        f"  model         {ev.model} panel, {ev.dofs} DOFs, P2 on curved quadratic triangles, {edges_note}",
        f"  accuracy      {ev.accuracy}: estimated discretisation error {ev.error_estimate_pct:.3f} %"
        f" (target {ev.accuracy_target_pct:g} %; levels "
        + ", ".join(f"{n} DOFs -> {p:.3f} MPa" for n, p in ev.levels) + ")",
        "",
        f"  {'load case':<34} {'peak ' + label:>28} {'Kt':>7} {'at x, y (mm)':>18} {'net-section':>12} {'MoS':>8}",
    ]
    for r in ev.load_cases:
        mos = "-" if r.margin_of_safety is None else f"{r.margin_of_safety:+.3f}"
        lines.append(f"  {r.name[:34]:<34} {r.peak_stress_mpa:>24.2f} MPa {r.kt:>7.3f} "
                     f"{f'{r.x_mm:.1f}, {r.y_mm:.1f}':>18} {r.net_section_stress_mpa:>8.1f} MPa {mos:>8}")
    lig = ev.ligament
    lines += [
        "",
        f"  governing     {ev.governing_load_case}: peak {ev.peak_stress_mpa:.2f} MPa, Kt = {ev.kt:.3f}"
        f" (reference: {ev.kt_reference})",
        f"  margin        {_fmt_mos(ev.margin_of_safety)}",
        f"  ligament      narrowest {lig.width_mm:.1f} mm, to the {lig.edge} edge (net-section stress per load case"
        " above: mean normal stress across it)",
    ]
    lines += row_lines(ev)
    lines += beam_lines(ev, beam_cases or {})
    if ev.reinforcement is not None:
        lines += reinforcement_lines(ev)
    if ev.stability is not None:
        lines += stability_lines(ev.stability)
    lines += requirement_lines(requirements or [])
    for w in ev.warnings:
        lines.append(f"  WARNING       {w}")
    lines += ["", "  CAUTION: " + cautions(ev.stability is not None, ev.reinforcement is not None)]
    return "\n".join(lines)


def optimise_summary(rec: RunRecord) -> str:
    """The text summary of a search run, from its typed record."""
    b = rec.best
    dims = ", ".join(f"{k} = {_num(v)}" for k, v in b.params.items())
    x0, y0, x1, y1 = b.bounds_mm
    t = rec.trials
    lines = [
        f"holeshape optimise: {rec.study}",
        f"  trials        {t.completed} completed ({t.infeasible} infeasible{t.probe_note}), {t.failed} failed;"
        f" storage {rec.storage}",
        f"  best          {b.shape}: {dims}",
        f"  size          {x1 - x0:.1f} x {y1 - y0:.1f} mm overall, smallest radius {b.min_radius_mm:.2f} mm,"
        f" removed area {b.area_mm2:.0f} mm^2",
        f"  peak          {b.peak_stress_mpa:.2f} MPa, Kt {b.kt:.3f} ({b.kt_reference}), error estimate"
        f" {b.error_estimate_pct:.3f} % at the {b.accuracy} level",
        f"  margin        {_fmt_mos(b.margin_of_safety)}",
    ]
    if rec.goal == "largest_opening":
        mass = "" if b.mass_saved_kg is None else f" ({b.mass_saved_kg:.3f} kg saved)"
        lines.insert(2, f"  goal          largest opening within every constraint: {b.area_mm2:.0f} mm^2"
                        f" removed{mass}")
    r = b.reinforcement
    if rec.goal == "lightest_reinforcement":
        lines.insert(2, "  goal          the least reinforcement that meets every requirement")
    if r is not None:
        sizes = ", ".join(f"{k} {v:.2f} mm" for k, v in r["sizes"].items() if k != "youngs_modulus")
        mass = "" if r["added_mass_kg"] is None else f", adds {r['added_mass_kg']:.4f} kg"
        lines.append(f"  reinforcement {r['kind']}: {sizes}; cross-section {r['cross_section_mm2']:.1f} mm^2{mass};"
                     " peaks " + ", ".join(f"{k} {v:.1f} MPa" for k, v in r["peak_stress_mpa"].items()))
        bare = r.get("bare_opening")
        if bare is not None:
            f = bare["buckling_load_factor"]
            mos = "" if bare["margin_of_safety"] is None else f", margin {bare['margin_of_safety']:+.3f}"
            lines.append(f"  bare opening  the same outline without it: peak {bare['peak_stress_mpa']:.1f} MPa{mos}"
                         + ("" if b.stability is None else f", buckling factor {factor_text(f)}")
                         + f"; {'meets' if bare['verdict'] == 'pass' else 'FAILS'} the requirements"
                         + ("" if bare["verdict"] == "pass" else f" ({'; '.join(bare['verdict_reasons'])})"))
    for r in b.load_cases:
        mos = "" if r.margin_of_safety is None else f", MoS {r.margin_of_safety:+.3f}"
        lines.append(f"    {r.name}: {r.peak_stress_mpa:.2f} MPa at ({r.x_mm:.1f}, {r.y_mm:.1f}) mm{mos}")
        if r.locations:
            lines.append("      " + ", ".join(f"{loc['location']} {loc['peak_stress_mpa']:.1f}" for loc in r.locations)
                         + " MPa")
    if rec.baselines:
        lines.append("  standard shapes (same constraints, fine level):")
    for row in rec.baselines:
        if row.feasible:
            imp = rec.improvement_over_baselines_pct[row.shape]
            lines.append(f"    {row.shape:<18} {row.peak_stress_mpa:8.2f} MPa, area {row.area_mm2:.0f} mm^2;"
                         f" best is {imp:+.1f} % {'lower' if imp >= 0 else 'higher'}")
        else:
            lines.append(f"    {row.shape:<18} cannot meet the constraints: {row.reason}")
    if rec.front:
        lines.append(f"  trade-off     {len(rec.front)} designs on the front (draft level), one DXF each")
    st = b.stability
    if st is not None:
        lines.append(f"  stability     lowest buckling factor {factor_text(st['buckling_load_factor'])}"
                     f" ({st['buckling_governing_load_case'] or 'no case buckles'}), required"
                     f" {st['required_factor']:g}; without the cutout"
                     f" {factor_text(st['buckling_load_factor_unperforated'])};"
                     f" estimated error {st['buckling_error_estimate_pct']:.2g} %")
        for c in st["cases"]:
            lines.append(f"    {c['name']}: factor {factor_text(c['load_factor'])}, without the cutout"
                         f" {factor_text(c['unperforated_factor'])}")
    refused = t.refused_after_solve
    if refused.get("buckling"):
        lines.append(f"  refused       {refused['buckling']} solved designs that met every geometric constraint"
                     " buckled below the required factor")
    if refused.get("margin"):
        lines.append(f"  refused       {refused['margin']} solved designs that met every geometric constraint"
                     " missed the margin")
    lines += requirement_lines([asdict(r) for r in b.requirements])
    for w in b.warnings:
        lines.append(f"  WARNING       {w}")
    lines.append(f"  profile       {b.dxf} ({b.dxf_vertices} vertices, chord error {b.dxf_chord_error_mm:.4f} mm)")
    lines += ["", "  CAUTION: " + (rec.cautions or cautions(False))]
    return "\n".join(lines)


def _num(v) -> str:
    if isinstance(v, list):
        return "[" + ", ".join(_num(x) for x in v) + "]"
    return f"{v:.4g}" if isinstance(v, float) else str(v)
