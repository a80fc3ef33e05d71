"""Human-readable summary of an evaluation (plain text, units stated)."""

from __future__ import annotations

from holeshape import CAUTIONS
from holeshape.evaluate import STRESS_LABELS, Evaluation


def _fmt_mos(m: float | None) -> str:
    return "n/a (no allowable given)" if m is None else f"{m:+.3f}{'  << NEGATIVE' if m < 0 else ''}"


def check_summary(title: str, family: str, params: dict, ev: Evaluation, edges_note: str) -> str:
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
    for w in ev.warnings:
        lines.append(f"  WARNING       {w}")
    lines += ["", "  CAUTION: " + CAUTIONS]
    return "\n".join(lines)


def optimise_summary(s: dict) -> str:
    b = s["best"]
    dims = ", ".join(f"{k} = {_num(v)}" for k, v in b["params"].items())
    x0, y0, x1, y1 = b["bounds_mm"]
    lines = [
        f"holeshape optimise: {s['study']}",
        f"  trials        {s['trials_completed']} completed ({s['trials_infeasible']} infeasible, not solved),"
        f" {s['trials_failed']} failed; storage {s['storage']}",
        f"  best          {b['shape']}: {dims}",
        f"  size          {x1 - x0:.1f} x {y1 - y0:.1f} mm overall, smallest radius {b['min_radius_mm']:.2f} mm,"
        f" removed area {b['area_mm2']:.0f} mm^2",
        f"  peak          {b['peak_stress_mpa']:.2f} MPa, Kt {b['kt']:.3f} ({b['kt_reference']}), error estimate"
        f" {b['error_estimate_pct']:.3f} % at the {b['accuracy']} level",
        f"  margin        {_fmt_mos(b['margin_of_safety'])}",
    ]
    for r in b["load_cases"]:
        mos = "" if r["margin_of_safety"] is None else f", MoS {r['margin_of_safety']:+.3f}"
        lines.append(f"    {r['name']}: {r['peak_stress_mpa']:.2f} MPa at ({r['x_mm']:.1f}, {r['y_mm']:.1f}) mm{mos}")
    lines.append("  standard shapes (same constraints, fine level):")
    for row in s["baselines"]:
        if row.get("feasible"):
            imp = s["improvement_over_baselines_pct"][row["shape"]]
            lines.append(f"    {row['shape']:<18} {row['peak_stress_mpa']:8.2f} MPa, area {row['area_mm2']:.0f} mm^2;"
                         f" best is {imp:+.1f} % {'lower' if imp >= 0 else 'higher'}")
        else:
            lines.append(f"    {row['shape']:<18} cannot meet the constraints: {row['reason']}")
    if s.get("front"):
        lines.append(f"  trade-off     {len(s['front'])} designs on the front (draft level), one DXF each")
    for w in b["warnings"]:
        lines.append(f"  WARNING       {w}")
    lines.append(f"  profile       {b['dxf']} ({b['dxf_vertices']} vertices,"
                 f" chord error {b['dxf_chord_error_mm']:.4f} mm)")
    lines += ["", "  CAUTION: " + CAUTIONS]
    return "\n".join(lines)


def _num(v) -> str:
    if isinstance(v, list):
        return "[" + ", ".join(_num(x) for x in v) + "]"
    return f"{v:.4g}" if isinstance(v, float) else str(v)
