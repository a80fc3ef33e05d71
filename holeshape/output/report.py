"""The reviewer's report: one self-contained HTML file (images embedded, opens offline, prints to PDF), or Markdown
with the figures beside it. Built only from a run folder's stored results (no solving), so it is fast and
deterministic."""

from __future__ import annotations

import base64
import html
import json
from dataclasses import asdict
from pathlib import Path

from holeshape.output.files import atomic_write
from holeshape.output.text import factor_text
from holeshape.record import DesignCheck, RunInputs, RunRecord, SweepRecord
from holeshape.search.constraints import requirement_value, sig, verdict
from holeshape.stability import FACTOR_MEANING, SUPPORT_NOTES

SECTIONS = ("The job", "Study inputs", "Recommendation", "Comparison", "Stress", "Stability", "Evidence of accuracy",
            "Validation appendix", "Search history", "Assumptions and cautions")



JOB = ("This report records how a cutout in a thin loaded panel was chosen: the opening was searched for {aim} over "
       "every load case that still meets the study's requirements (access, area, ligament, radius, margin and "
       "buckling, as set), compared with the standard shapes a handbook would offer, and checked with a "
       "mesh-convergence estimate and against published solutions computed by the same pipeline.")
AIMS = {"lowest_peak": "the lowest peak stress", "largest_opening": "the largest removed area",
        "lightest_reinforcement": "the least reinforcement (by volume, hence mass)"}
GOAL_LABELS = {"lowest_peak": "lowest peak stress within every constraint",
               "largest_opening": "largest opening within every constraint",
               "lightest_reinforcement": "least reinforcement that meets every requirement"}
REINFORCEMENT_SECTION = "Reinforcement"
REINFORCEMENT_IDEALISATION = {
    "flange": "A formed flange standing on the whole cutout edge, fully effective, the bend radius not modelled: in "
              "plane an edge member carrying hoop force (axial stiffness E A along the outline); out of plane a beam "
              "along the edge with the flange's own bending stiffness E t h^3 / 12 (the web's share ignored, which "
              "errs low) and its axial force in the geometric stiffness.",
    "ring": "A doubler ring bonded over the web between the outline and its offset, perfectly bonded and of the web's "
            "Poisson's ratio: in plane the region's membrane stiffness is the web's plus the doubler's; out of plane "
            "the stack bends about its own neutral plane (one-sided doubler; the membrane-bending coupling is "
            "neglected). The peak is looked for at the cutout edge and in the web at the ring's outer edge.",
}

CSS = """body{font-family:sans-serif;max-width:60em;margin:2em auto;color:#111;line-height:1.4}
h1{font-size:1.6em}h2{font-size:1.25em;border-bottom:1px solid #888;margin-top:1.6em}
table{border-collapse:collapse;margin:.6em 0}td,th{border:1px solid #999;padding:.25em .6em;text-align:left}
th{background:#eee}img{max-width:100%;border:1px solid #ccc;margin:.4em 0}.warn{color:#a00;font-weight:bold}
.caution{border:2px solid #333;padding:.6em 1em}.summary{border:2px solid #333;padding:.2em 1em;margin:1em 0}
.pass{color:#060;font-weight:bold}@media print{h2{page-break-after:avoid}img{page-break-inside:avoid}}"""


# marks every image once the page has loaded, so a headless browser's DOM dump shows whether each one decoded
LOAD_CHECK = ("<script>window.addEventListener('load',function(){var n=0;document.querySelectorAll('img')"
              ".forEach(function(i){var ok=i.complete&&i.naturalWidth>0;i.setAttribute('data-loaded',ok?'yes':'no');"
              "if(ok){n++;}});document.body.setAttribute('data-images-loaded',String(n));});</script>")


def fmt(key: str, v) -> str:
    """One value for people, by what it is (the key's unit suffix): stresses to 0.1 MPa, percentages to 2
    significant figures, lengths to 0.1 mm, areas to 1 mm^2, factors and Kt to 3 decimals."""
    if v is None:
        return "-"
    if isinstance(v, bool):
        return "yes" if v else "NO"
    if isinstance(v, int):
        return str(v)
    if not isinstance(v, float):
        return str(v)
    if key.endswith("_pct") or key in ("error_pct", "tolerance_pct"):
        return sig(v, 2)
    if key.endswith("_mpa") or key in ("published", "holeshape", "youngs_modulus", "allowable_stress", "sigma_x",
                                       "sigma_y", "tau_xy"):
        return f"{v:.1f}"
    if key.endswith("_mm2"):
        return f"{v:.0f}"
    if key.endswith("_mm") or key in ("width", "height", "thickness"):
        return f"{v:.1f}"
    if key in ("margin_of_safety",):
        return f"{v:+.3f}"
    if key in ("kt",) or "factor" in key or "reserve" in key:
        return f"{v:.3f}"
    return f"{v:.4g}"


def _table(rows: list[dict], cols: list[tuple[str, str]], md: bool) -> str:
    def cell_of(r, k):
        return fmt(k, r.get(k))

    if md:
        head = "| " + " | ".join(t for _, t in cols) + " |\n|" + "---|" * len(cols) + "\n"
        return head + "\n".join("| " + " | ".join(cell_of(r, k) for k, _ in cols) + " |" for r in rows) + "\n"
    out = "<table><tr>" + "".join(f"<th>{html.escape(t)}</th>" for _, t in cols) + "</tr>"
    for r in rows:
        out += "<tr>" + "".join(f"<td>{html.escape(cell_of(r, k))}</td>" for k, _ in cols) + "</tr>"
    return out + "</table>"


LENGTH_KEYS = ("radius", "a", "b", "length", "width", "corner_radius", "radii", "center")


def describe_params(params: dict) -> str:
    """Shape parameters for people: lengths to 0.1 mm, angles to 0.1 degree, the exponent to 3 figures."""
    def one(k, v):
        if k.startswith("reinforcement."):
            return f"{v:.1f} mm" if isinstance(v, float) and not k.endswith("youngs_modulus") else f"{v}"
        if isinstance(v, list):
            return "(" + ", ".join(one(k, x) for x in v) + ")"
        if not isinstance(v, (int, float)) or isinstance(v, bool):
            return str(v)
        if k in ("rotation", "direction") or k.endswith((".rotation", ".direction")):
            return f"{v:.1f} deg"
        if k == "count":
            return f"{int(v)}"
        if k == "pitch":
            return f"{v:.1f} mm"
        if k == "exponent":
            return f"{v:.2f}"
        return f"{v:.1f} mm" if k in LENGTH_KEYS and k != "center" else f"{v:.1f}"
    kind = params.get("reinforcement.kind")

    def label(k):
        if k.startswith("reinforcement."):
            return f"{kind} {k.split('.', 1)[1].replace('_', ' ')}"
        return k.replace("_", " ")
    return ", ".join(f"{label(k)} {one(k, v)}" + (" mm" if k == "center" else "")
                     for k, v in params.items() if k != "reinforcement.kind")


def _describe_range(v) -> str:
    if isinstance(v, dict):
        out = f"searched from {v['min']:g} to {v['max']:g}"
        return out + (f" (current design {v['value']:g})" if v.get("value") is not None else "")
    return f"{v:g}" if isinstance(v, float) else str(v)


def describe_constraints(cons: dict) -> list[dict]:
    """The study's constraints as labelled rows (requirement, value with its unit)."""
    rows = []
    labels = {"min_area": ("removed area at least", "mm^2"), "max_area": ("removed area at most", "mm^2"),
              "area": ("removed area exactly", "mm^2"), "clearance": ("clearance round the access envelope", "mm"),
              "min_ligament": ("ligament to every panel edge at least", "mm"),
              "min_radius": ("smallest radius of the outline at least", "mm"),
              "min_margin": ("margin of safety at least", ""), "min_buckling_factor": ("buckling factor at least", ""),
              "max_added_mass": ("added mass of the reinforcement at most", "kg"),
              "max_reinforcement_area": ("reinforcement cross-section at most", "mm^2")}
    acc = cons.get("access")
    if acc:
        where = ("centred on the cutout" if acc.get("center") is None
                 else f"centred at ({acc['center'][0]:.1f}, {acc['center'][1]:.1f}) mm")
        size = (f"circle of diameter {acc['diameter']:.1f} mm" if acc.get("diameter") is not None
                else f"{acc['width']:.1f} x {acc['height']:.1f} mm rectangle")
        rot = f", turned {acc['rotation']:.1f} deg" if acc.get("rotation") else ""
        rows.append({"constraint": "access envelope the opening must contain", "value": f"{size}, {where}{rot}"})
    for k, (label, unit) in labels.items():
        v = cons.get(k)
        if v is None or (k == "clearance" and not v):
            continue
        shown = f"{v:+.2f}" if k == "min_margin" else (f"{v:.0f}" if unit == "mm^2" else f"{v:g}")
        rows.append({"constraint": label, "value": f"{shown} {unit}".strip()})
    return rows


def _summary_box(b: DesignCheck, rec: RunRecord, md: bool) -> str:
    """The one-screen summary at the top: the verdict, the shape, peak, margin and buckling per case, the DXF."""
    reqs = [asdict(r) for r in b.requirements]
    failed = [r for r in reqs if not r["met"]]
    if not reqs:
        head = "No requirements were set beyond the geometry of the search."
    elif failed:
        head = (f"FAILS {len(failed)} of {len(reqs)} requirements: "
                + "; ".join(verdict(reqs)["verdict_reasons"]))
    else:
        head = f"Meets every requirement of the study ({len(reqs)} checked at the {b.accuracy} level)."
    rows = [{"name": c["name"], "peak_stress_mpa": c["peak_stress_mpa"], "margin_of_safety": c["margin_of_safety"],
             "buckling_load_factor": c.get("buckling_load_factor"), "verdict": c.get("verdict", "-")}
            for c in [c.to_dict() for c in b.load_cases]]
    cols = [("name", "load case"), ("peak_stress_mpa", "peak (MPa)"), ("margin_of_safety", "margin of safety")]
    if b.stability is not None:
        cols.append(("buckling_load_factor", "buckling factor"))
    cols.append(("verdict", "verdict"))
    shape = f"{b.shape.replace('_', ' ')}: {describe_params(b.params)}"
    goal = GOAL_LABELS.get(rec.goal, GOAL_LABELS["lowest_peak"])
    lines = [f"Verdict: {head}", f"Shape ({goal}): {shape}; removed area {b.area_mm2:.0f} mm^2.",
             f"Profile for CAD: {Path(b.dxf).name}."]
    r = b.reinforcement
    if r is not None:
        mass = "" if r["added_mass_kg"] is None else f", {r['added_mass_kg']:.4f} kg added"
        lines.insert(2, f"Reinforcement: {r['kind']} ({describe_sizes(r['sizes'])}; cross-section "
                        f"{r['cross_section_mm2']:.1f} mm^2{mass}).")
    if md:
        return "\n" + "\n\n".join(f"**{t}**" if i == 0 else t for i, t in enumerate(lines)) + "\n\n" + \
            _table(rows, cols, md)
    cls = "warn" if failed else "pass"
    return (f'<div class="summary"><p class="{cls}">{html.escape(lines[0])}</p>'
            + "".join(f"<p>{html.escape(t)}</p>" for t in lines[1:]) + _table(rows, cols, md) + "</div>")


class Page:
    """The report being written: HTML or Markdown blocks in order, images embedded (HTML) or beside it (Markdown)."""

    def __init__(self, run: Path, md: bool):
        self.run, self.md, self.parts = run, md, []

    def h2(self, t: str) -> None:
        self.parts.append(f"\n## {t}\n" if self.md else
                          f'<h2 id="{t.lower().replace(" ", "-")}">{html.escape(t)}</h2>')

    def para(self, t: str, cls: str | None = None) -> None:
        self.parts.append(f"\n{t}\n" if self.md else
                          f"<p{f' class={chr(34)}{cls}{chr(34)}' if cls else ''}>{html.escape(t)}</p>")

    def table(self, rows: list[dict], cols: list[tuple[str, str]]) -> None:
        self.parts.append(_table(rows, cols, self.md))

    def raw(self, block: str) -> None:
        self.parts.append(block)

    def img(self, name: str, alt: str) -> None:
        p = self.run / name
        if not p.exists():
            return
        if self.md:
            self.parts.append(f"\n![{alt}]({name})\n")
        else:
            data = base64.b64encode(p.read_bytes()).decode()
            self.parts.append(f'<img alt="{html.escape(alt)}" src="data:image/png;base64,{data}">')

    def write(self, title: str, stem: str = "report") -> Path:
        if self.md:
            return atomic_write(self.run / f"{stem}.md", "\n".join(self.parts))
        doc = (f"<!DOCTYPE html><html lang=\"en\"><head><meta charset=\"utf-8\"><title>{html.escape(title)}</title>"
               f"<style>{CSS}</style></head><body>" + "\n".join(self.parts) + LOAD_CHECK + "</body></html>\n")
        return atomic_write(self.run / f"{stem}.html", doc)


def build_report(run_dir: str | Path, fmt: str = "html") -> Path:
    """report.html (or report.md) of a finished run, from its stored record only: the sections of SECTIONS."""
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
    page.raw(f"# {title}: cutout design report\n" if page.md else
             f"<h1>{html.escape(title)}: cutout design report</h1>")
    page.para(f"holeshape {rec.holeshape_version}; run folder {run}; generated from the stored results of the "
              f"run finished {inputs.finished}.")
    page.raw(_summary_box(rec.best, rec, page.md))
    page.h2(SECTIONS[0])
    page.para(JOB.format(aim=AIMS.get(rec.goal, AIMS["lowest_peak"])))
    section_inputs(page, inputs)
    section_recommendation(page, rec.best)
    section_reinforcement(page, rec.best)
    section_comparison(page, rec)
    page.h2(SECTIONS[4])
    page.img("best_stress_field.png", "stress field of the recommended design, governing load case")
    page.img("best_boundary_stress.png", "stress along the cutout edge, every load case, allowable drawn in")
    section_stability(page, rec.best.stability)
    section_evidence(page, rec.best)
    section_validation(page, validation)
    page.h2(SECTIONS[8])
    page.img("search_history.png", "search history, best so far against trial")
    page.img("search_outlines.png", "outline of each new best design (free-form search), overlaid about the centre")
    page.img("trade_off_front.png", "trade-off front, removed area against peak stress")
    page.para(f"{rec.trials.completed} trials completed ({rec.trials.infeasible} infeasible"
              f"{rec.trials.probe_note}), "
              f"{rec.trials.failed} failed; storage {rec.storage}.")
    section_cautions(page, inputs, rec.cautions)
    return page.write(title)


def section_inputs(page: Page, inputs: RunInputs) -> None:
    page.h2(SECTIONS[1])
    page.table([inputs.panel], [("width", "width (mm)"), ("height", "height (mm)"), ("thickness", "thickness (mm)"),
                                ("edges", "edge condition")])
    page.table([inputs.material], [("name", "material"), ("youngs_modulus", "E (MPa)"),
                                   ("poisson_ratio", "Poisson's ratio"), ("allowable_stress", "allowable (MPa)")])
    page.table(list(inputs.load_cases), load_case_columns(inputs.load_cases))
    if any(c.get("shear_force") is not None or c.get("bending_moment") is not None for c in inputs.load_cases):
        p = inputs.panel
        page.para(f"Beam load cases: the web belongs to a beam section of second moment of area "
                  f"{p.get('section_inertia'):.6g} mm^4 about a neutral axis at y = "
                  f"{p.get('neutral_axis_y') if p.get('neutral_axis_y') is not None else p['height'] / 2:g} mm; the "
                  f"edge tractions follow the beam theory (sigma_x = M y / I with dM/dx = V, the moment given at the "
                  f"panel's x-centre), shear carried {p.get('shear_distribution', 'uniform')}.")
    cons = describe_constraints(inputs.constraints)
    if cons:
        page.table(cons, [("constraint", "requirement"), ("value", "value")])
    if inputs.search.get("goal") == "largest_opening":
        page.para("Goal: the largest removed area that meets every constraint (a weight-reduction study).")
    if inputs.search.get("goal") == "lightest_reinforcement":
        page.para("Goal: the least reinforcement (by volume, hence mass) that meets every requirement.")
    if inputs.reinforcement:
        page.table([{"key": k, "value": _describe_range(v)} for k, v in inputs.reinforcement.items()],
                   [("key", "reinforcement"), ("value", "value (mm, MPa)")])
    stab_in = inputs.stability
    if stab_in:
        page.table([{**stab_in, "edge_support": stab_in["edge_support"].replace("_", " ")}],
                   [("edge_support", "buckling: panel edge support"), ("required_factor", "required buckling factor"),
                    ("modes", "mode shapes plotted")])


def section_recommendation(page: Page, b: DesignCheck) -> None:
    page.h2(SECTIONS[2])
    x0, y0, x1, y1 = b.bounds_mm
    page.para(f"Recommended: {b.shape.replace('_', ' ')} ({describe_params(b.params)}); overall {x1 - x0:.1f} x "
              f"{y1 - y0:.1f} mm; smallest radius {b.min_radius_mm:.1f} mm"
              + (f" at ({b.min_radius_at_mm[0]:.1f}, {b.min_radius_at_mm[1]:.1f}) mm" if b.min_radius_at_mm else "")
              + f"; removed area {b.area_mm2:.0f} mm^2"
              + (f" ({b.mass_saved_kg:.3f} kg saved)" if b.mass_saved_kg is not None else "")
              + f"; profile {Path(b.dxf).name}.")
    ligs = [{"edge": k, "ligament_mm": v} for k, v in b.ligaments_mm.items()]
    if ligs:
        page.table(ligs, [("edge", "panel edge"), ("ligament_mm", "ligament from the opening (mm)")])
    page.table([c.to_dict() for c in b.load_cases], [
        ("name", "load case"), ("peak_stress_mpa", "peak (MPa)"), ("kt", "Kt"), ("x_mm", "x (mm)"),
        ("y_mm", "y (mm)"), ("margin_of_safety", "margin of safety")])
    per_opening = [{"name": c.name, **loc} for c in b.load_cases for loc in c.locations
                   if loc["location"].startswith("opening")]
    if per_opening:
        page.para("Every opening, every load case (the peak of each opening's edge, with its mesh error estimate):")
        page.table(per_opening, [("name", "load case"), ("location", "opening"), ("peak_stress_mpa", "peak (MPa)"),
                                 ("x_mm", "x (mm)"), ("y_mm", "y (mm)"), ("error_estimate_pct", "error estimate (%)")])
    reqs = [asdict(r) for r in b.requirements]
    if reqs:
        failed = [r for r in reqs if not r["met"]]
        if failed:
            v = verdict(reqs)
            page.para(f"The recommended design FAILS {len(failed)} of {len(reqs)} requirements of the study: "
                      + "; ".join(v["verdict_reasons"]) + ". It is the best the search found, not a design that"
                      " passes. What can change: " + "; ".join(v["advice"]) + ".", "warn")
        else:
            page.para(f"The recommended design meets every requirement of the study ({len(reqs)} checked at the "
                      f"{b.accuracy} level).")
        page.table([{**r, "value": requirement_value(r), "met": "yes" if r["met"] else "NO"} for r in reqs],
                   [("requirement", "requirement"), ("value", "design"), ("limit", "required"), ("met", "met")])
    for w in b.warnings:
        page.para("WARNING: " + w, "warn")
    page.img("best_shape.png", "recommended profile in the panel with the access envelope and the standard shapes")


def load_case_columns(cases) -> list[tuple[str, str]]:
    """The load-case table's columns: remote stresses, and beam forces where a case gives them."""
    cols = [("name", "load case"), ("sigma_x", "sigma_x (MPa)"), ("sigma_y", "sigma_y (MPa)"),
            ("tau_xy", "tau_xy (MPa)")]
    if any(c.get("shear_force") is not None or c.get("bending_moment") is not None for c in cases):
        cols += [("shear_force", "shear force (N)"), ("bending_moment", "bending moment (N mm)")]
    return cols


def describe_sizes(sizes: dict) -> str:
    return ", ".join(f"{k.replace('_', ' ')} {v:g} MPa" if k == "youngs_modulus" else f"{k} {v:.1f} mm"
                     for k, v in sizes.items())


def section_reinforcement(page: Page, b: DesignCheck) -> None:
    """What reinforces the opening, what it weighs, where its peaks are, and the same outline without it."""
    r = b.reinforcement
    if r is None:
        return
    page.h2(REINFORCEMENT_SECTION)
    page.para(REINFORCEMENT_IDEALISATION[r["kind"]])
    page.table([{"kind": r["kind"], "sizes": describe_sizes(r["sizes"]), "cross_section_mm2": r["cross_section_mm2"],
                 "ring_area_mm2": r["ring_area_mm2"] if r["kind"] == "ring" else None,
                 "added_mass_kg": None if r["added_mass_kg"] is None else f"{r['added_mass_kg']:.4f}"}],
               [("kind", "reinforcement"), ("sizes", "sizes"), ("cross_section_mm2", "cross-section (mm^2)"),
                ("ring_area_mm2", "ring area over the web (mm^2)"), ("added_mass_kg", "added mass (kg)")])
    page.table([{"location": k, "peak_stress_mpa": v} for k, v in r["peak_stress_mpa"].items()],
               [("location", "where"), ("peak_stress_mpa", "largest peak over the load cases (MPa)")])
    bare = r.get("bare_opening")
    if bare is not None:
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
    b = rec.best
    page.h2(SECTIONS[3])
    rows = [{"shape": "recommended " + b.shape, "peak_stress_mpa": b.peak_stress_mpa, "kt": b.kt,
             "area_mm2": b.area_mm2, "buckling_load_factor": b.buckling_load_factor, "note": ""}]
    for r in rec.baselines:
        imp = rec.improvement_over_baselines_pct.get(r.shape)
        rows.append({"shape": r.shape, "peak_stress_mpa": r.peak_stress_mpa, "kt": r.kt, "area_mm2": r.area_mm2,
                     "buckling_load_factor": r.buckling_load_factor,
                     "note": f"recommended is {imp:+.1f} % lower" if imp is not None else (r.reason or "")})
    cols = [("shape", "design"), ("peak_stress_mpa", "peak (MPa)"), ("kt", "Kt"), ("area_mm2", "area (mm^2)"),
            ("note", "")]
    if b.stability is not None:
        cols.insert(4, ("buckling_load_factor", "buckling factor"))
    page.table(rows, cols)
    if rec.comparison:
        page.para("Best design of every shape family, same constraints and load cases, fine level:")
        page.table(list(rec.comparison), [
            ("rank", "rank"), ("shape", "family"), ("peak_stress_mpa", "peak (MPa)"), ("kt", "Kt"),
            ("area_mm2", "area (mm^2)"), ("buckling_load_factor", "buckling factor"),
            ("governing_load_case", "governing load case"),
            ("improvement_over_circle_pct", "improvement over circle (%)"), ("reason", "note")])
        page.img("compare_shapes.png", "best outline of every family, overlaid")


def section_stability(page: Page, st: dict | None) -> None:
    page.h2(SECTIONS[5])
    if st is None:
        page.para("Not assessed: the study has no [stability] table, so whether the web buckles under these loads is "
                  "not checked here. In a thin web the opening often governs through buckling before the peak stress "
                  "reaches the allowable: add [stability] to the study to check it.", "warn")
        return
    edges_ip = st["in_plane_edges"]
    page.para(f"Linear (eigenvalue) buckling of the panel with its cutout: Kirchhoff plate of the panel's thickness "
              f"under the plane-stress prestress of each load case; panel edges {SUPPORT_NOTES[st['edge_support']]}, "
              f"cutout edge {st.get('cutout_edge', 'free')}; in-plane edges '{edges_ip}': {FACTOR_MEANING[edges_ip]}."
              " Required factor "
              f"{st['required_factor']:g}.")
    rows = []
    for c in st["cases"]:
        f, fu = c["load_factor"], c["unperforated_factor"]
        cost = None if f is None or fu is None else 100 * (1 - f / fu)
        rows.append({"name": c["name"], "factor": factor_text(f), "reserve": c["reserve"],
                     "estimate_pct": c["error_estimate_pct"], "plain": factor_text(fu),
                     "cost": None if cost is None else f"{cost:.0f} %",
                     "levels": ", ".join(factor_text(x) for x in c["level_factors"])})
    page.table(rows, [("name", "load case"), ("factor", "buckling load factor"),
                      ("reserve", "reserve (factor / required)"), ("estimate_pct", "error estimate (%)"),
                      ("plain", "without the cutout"), ("cost", "lost to the opening"),
                      ("levels", "factor per plate mesh (coarse to fine)")])
    gov = st.get("buckling_governing_load_case")
    if gov is None:
        page.para("No load case buckles the web below the factor ceiling (no compression to buckle it).")
    else:
        meets = st["meets_required_factor"]
        page.para(f"Lowest buckling load factor {st['buckling_load_factor']:.3f} ({gov}): "
                  f"{'meets' if meets else 'DOES NOT meet'} the required {st['required_factor']:g}. Reported factors "
                  f"are Richardson extrapolations of the two finest plate meshes (Morley elements, "
                  f"{', '.join(str(n) for n in st['level_dofs'])} DOFs); the estimate is the whole extrapolation "
                  "step plus a measured floor.", None if meets else "warn")
    page.img("best_buckling_mode.png", "buckling mode shape of the governing load case")


def section_evidence(page: Page, b: DesignCheck) -> None:
    page.h2(SECTIONS[6])
    page.table([asdict(x) for x in b.levels], [
        ("accuracy", "accuracy level"), ("dofs", "DOFs"), ("peak_stress_mpa", "peak (MPa)"),
        ("change_pct", "change from finest (%)"), ("error_estimate_pct", "error estimate (%)")])
    page.para(f"Reported figures are at the {b.accuracy} level; error estimate {sig(b.error_estimate_pct)} % "
              "(change of the peak to a mesh with every element size doubled, plus the measured scatter floor).")


def section_validation(page: Page, validation: list[dict]) -> None:
    page.h2(SECTIONS[7])
    page.para("The same pipeline at the same accuracy level on published reference cases:")
    page.table(validation, [("case", "case"), ("source", "source"), ("published", "published (MPa)"),
                            ("holeshape", "holeshape (MPa)"), ("error_pct", "error (%)"),
                            ("tolerance_pct", "tolerance (%)"), ("within", "within")])


def section_cautions(page: Page, inputs: RunInputs, cautions_text: str) -> None:
    page.h2(SECTIONS[9])
    edges = inputs.panel["edges"]
    meaning = ("remote stress applied as edge tractions: a large panel free to redistribute load" if edges == "traction"
               else "remote strain imposed on the edges: a web bounded by stiff members")
    page.para(f"Isotropic material, uniform remote stresses per load case; in-plane edge condition '{edges}' "
              f"({meaning}).")
    page.para(cautions_text, "caution")


SWEEP_SECTIONS = ("The job", "Study inputs", "Sweep", "Validation appendix", "Assumptions and cautions")


def build_sweep_report(run: Path, fmt: str = "html") -> Path:
    """Report of a parameter sweep: inputs, the curves or map, every point, the validation appendix, cautions."""
    from holeshape import cautions

    sweep = SweepRecord.from_dict(json.loads((run / "sweep.json").read_text()))
    inputs = RunInputs.from_dict(json.loads((run / "inputs.json").read_text()))
    validation = json.loads((run / "validation.json").read_text()) if (run / "validation.json").exists() else []
    page = Page(run, fmt == "markdown")
    title = inputs.title
    page.raw(f"# {title}: parameter sweep\n" if page.md else f"<h1>{html.escape(title)}: parameter sweep</h1>")
    page.h2(SWEEP_SECTIONS[0])
    page.para("A classic parameter study of the cutout: every point is a verified evaluation (two mesh levels, error "
              f"estimate) at the {sweep.accuracy} level, for every load case; points that break a constraint are"
              " kept and marked.")
    page.h2(SWEEP_SECTIONS[1])
    page.table([inputs.panel], [("width", "width (mm)"), ("height", "height (mm)"), ("thickness", "thickness (mm)"),
                                ("edges", "edge condition")])
    page.table(list(inputs.load_cases), load_case_columns(inputs.load_cases))
    page.h2(SWEEP_SECTIONS[2])
    page.img("sweep.png", "the swept quantities against the varied parameters")
    rows = [{"point": ", ".join(f"{k} = {v:.4g}" for k, v in pt["coords"].items()), **pt} for pt in sweep.points]
    cols = [("point", "parameters"), ("peak_stress_mpa", "peak (MPa)"), ("kt", "Kt"),
            ("area_mm2", "area (mm^2)"), ("error_estimate_pct", "error estimate (%)"),
            ("feasible", "meets constraints"), ("reason", "note")]
    if any("buckling_load_factor" in r for r in rows):
        cols.insert(3, ("buckling_load_factor", "buckling load factor"))
    page.table(rows, cols)
    section_validation(page, validation)
    page.h2(SWEEP_SECTIONS[4])
    page.para(cautions(sweep.with_stability), "caution")
    return page.write(title)
