"""``holeshape compare``: the best of every shape family under the study's constraints and load cases, ranked.

Each family gets search ranges derived from the panel, the ligament and the access envelope (so the families are
compared on equal terms), and its own search in ``--out/<family>/``; the overall best is copied to the top of the
run folder with a comparison table and an overlay of every family's best, and the report is written.
"""

from __future__ import annotations

import json
import math
import shutil
from dataclasses import replace
from pathlib import Path
from typing import Any

from holeshape.checks import CHECKS
from holeshape.errors import HoleshapeError, NoDesignError, SearchError, StudyError
from holeshape.goals import GOALS
from holeshape.record import REINFORCED_SUFFIX, RunInputs, RunRecord, folder_name
from holeshape.study import Range, Study
from holeshape.studyfile import dump_toml, load_study

FAMILY_ORDER = ("circle", "ellipse", "rounded_rectangle", "slot", "superellipse", "spline")
REINFORCEMENT_LIMITS = ("max_added_mass", "max_reinforcement_area")


def bare_document(doc: dict) -> dict:
    """The study document without its [reinforcement] (and the limits that need one): the bare families' study.
    The least-reinforcement goal becomes the lowest peak (a bare opening that meets every requirement needs
    nothing)."""
    out = {k: v for k, v in doc.items() if k != "reinforcement"}
    if "constraints" in out:
        out["constraints"] = {k: v for k, v in out["constraints"].items() if k not in REINFORCEMENT_LIMITS}
    goal = GOALS.get(str(out.get("search", {}).get("goal", "lowest_peak")))
    if goal is not None and goal.bare_goal is not None:
        out["search"] = {**out["search"], "goal": goal.bare_goal}
    return out


def _r(lo: float, hi: float) -> dict:
    lo, hi = float(lo), float(hi)
    return {"min": round(min(lo, hi), 4), "max": round(max(lo, hi), 4)}


def family_ranges(study: Study, raw_cutout: dict) -> dict[str, dict]:
    """[cutout] tables for every family, on the study's centre and rotation, sized to the panel and envelope."""
    panel, cons = study.panel, study.constraints
    center = study.cutout.openings[0].center
    cx = center[0].max if isinstance(center[0], Range) else center[0]
    cy = center[1].max if isinstance(center[1], Range) else center[1]
    lig = cons.min_ligament or 0.0
    pmax = max(1.0, min(cx, panel.width - cx) - lig) * 0.999
    qmax = max(1.0, min(cy, panel.height - cy) - lig) * 0.999
    if cons.access is not None:
        p, q = cons.access.half_sizes
        p, q = p + cons.clearance, q + cons.clearance
    else:
        p, q = 0.1 * pmax, 0.1 * qmax
    rmin = max(cons.min_radius or 0.0, 0.5)
    common = {"center": raw_cutout.get("center", [panel.width / 2, panel.height / 2])}
    if "count" in raw_cutout:  # a row: every family as the same row, each opening no wider than the pitch allows
        common.update({k: raw_cutout[k] for k in ("count", "pitch", "direction") if k in raw_cutout})
        row = study.cutout.row
        if row is not None:  # count = 1 is one opening (no row, no pitch to fit)
            pitch = row.pitch
            half = 0.5 * (pitch.min if isinstance(pitch, Range) else pitch) * 0.999
            pmax, qmax = min(pmax, half), min(qmax, half)
            p, q = min(p, 0.5 * pmax), min(q, 0.5 * qmax)
    rot = raw_cutout.get("rotation", 0.0)
    out = {
        "circle": {"radius": _r(min(math.hypot(p, q), min(pmax, qmax)), min(pmax, qmax))},
        "ellipse": {"a": _r(p, pmax), "b": _r(q, qmax), "rotation": rot},
        "rounded_rectangle": {"a": _r(p, pmax), "b": _r(q, qmax),
                              "corner_radius": _r(rmin, max(rmin * 1.01, min(pmax, qmax))), "rotation": rot},
        "slot": {"length": _r(2 * max(p, q), 2 * pmax), "width": _r(2 * min(p, q), 2 * qmax), "rotation": rot},
        "superellipse": {"a": _r(p, pmax), "b": _r(q, qmax), "exponent": _r(2.0, 8.0), "rotation": rot},
        "spline": {"radii": {**_r(0.9 * min(p, q), max(pmax, qmax)), "count": 8}, "symmetry": "none",
                   "rotation": 0.0},
    }
    for fam, table in out.items():
        table.update(common)
        table["shape"] = fam
    return out


def run_compare(study_path: str, out: str, workers: int = 1, progress: bool = True) -> dict:
    try:
        import tomllib
    except ModuleNotFoundError:  # Python 3.10
        import tomli as tomllib  # type: ignore[no-redef]

    from holeshape.optimise import run_optimise
    from holeshape.output import files, search_plots
    from holeshape.output.report import build_report

    study = load_study(study_path)
    doc = tomllib.loads(Path(study_path).read_text(encoding="utf-8"))
    if isinstance(doc.get("cutout"), list):
        if len(doc["cutout"]) > 1:
            raise StudyError(f"holeshape compare ranks shape families for one opening (or a row); this study has"
                             f" {len(doc['cutout'])} [[cutout]] tables: compare them one at a time")
        doc["cutout"] = doc["cutout"][0]
    out_dir = Path(out)
    out_dir.mkdir(parents=True, exist_ok=True)
    rows: list[dict[str, Any]] = []
    summaries: dict[str, dict] = {}
    shared: dict = {}  # the standard shapes and the unperforated panel: the same for every family
    if not (out_dir / "validation.json").exists():  # one validation appendix serves every family's search
        from holeshape.finish import FINAL_ACCURACY
        from holeshape.validation import run_validation

        files.write_json(out_dir / "validation.json", run_validation(FINAL_ACCURACY,
                                                                      stability=study.stability is not None,
                                                                      fatigue=study.table("fatigue") is not None))
    tables = {f: (bare_document(doc), t) for f, t in family_ranges(study, doc["cutout"]).items()}
    if "reinforcement" in doc:  # the study's own family and ranges, with its reinforcement
        tables[study.cutout.shape + REINFORCED_SUFFIX] = (doc, doc["cutout"])
    for number, (family, (base, table)) in enumerate(tables.items(), 1):
        fam_doc = dict(base)
        fam_doc["cutout"] = table
        fam_doc["title"] = f"{study.title} ({family.replace('_', ' ')})"
        fam_dir = out_dir / folder_name(family)
        fam_dir.mkdir(exist_ok=True)
        if not (fam_dir / "validation.json").exists():
            shutil.copyfile(out_dir / "validation.json", fam_dir / "validation.json")
        fam_study = fam_dir / "study.toml"
        text = dump_toml(fam_doc)
        if not fam_study.exists() or fam_study.read_text() != text:
            files.atomic_write(fam_study, text)
        label = f"{family.replace('_', ' ')} ({number}/{len(tables)})"
        try:
            s = run_optimise(str(fam_study), str(fam_dir), workers=workers, progress=progress, cache=shared,
                             label=label)
        except NoDesignError as err:
            fb = (err.summary or {}).get("family_best") or {}
            why = "; ".join(fb.get("verdict_reasons", [])) or "nothing met every requirement"
            rows.append({"shape": family, "feasible": False, "reason": f"no design of this family meets every"
                         f" requirement at the fine level ({why})"})
            continue
        except (HoleshapeError, StudyError) as err:
            rows.append({"shape": family, "feasible": False, "reason": " ".join(str(err).split())})
            continue
        summaries[family] = s
        fb = s.get("family_best")
        if fb is None or not fb.get("meets_every_requirement", True):
            refused = s.get("trials_refused_after_solve", {})
            whys = [f"{n} solved designs refused for {k}" for k, n in refused.items() if n]
            if fb is not None:
                whys.insert(0, "; ".join(fb.get("verdict_reasons", [])))
            rows.append({"shape": family, "feasible": False, "reason": "no design of this family meets every"
                         " requirement at the fine level" + (f" ({', '.join(whys)})" if whys else "")})
            continue
        rows.append({"shape": family, "feasible": True, **{k: fb.get(k) for k in (
            "peak_stress_mpa", "kt", "area_mm2", "governing_load_case", "params", "dxf", "error_estimate_pct",
            "buckling_load_factor", "reinforcement")},
            **{k: fb[k] for c in CHECKS for k, _ in c.columns if k in fb}})  # a check's figures where it ran
        if rows[-1]["reinforcement"] is None:
            rows[-1].pop("reinforcement")
    goal = GOALS[study.search.goal]
    # ranked by the study's goal: lowest peak first, largest removed area first, or least reinforcement first
    ok = sorted((r for r in rows if r["feasible"]), key=goal.rank_key)
    if not ok:
        raise SearchError("no shape family found a design that meets the constraints: " +
                             "; ".join(f"{r['shape']}: {r['reason']}" for r in rows))
    circle = next((r for r in rows if r["shape"] == "circle" and r["feasible"]), None)
    for rank, r in enumerate(ok, 1):
        r["rank"] = rank
        r["improvement_over_circle_pct"] = None if circle is None else goal.improvement_pct(r, circle)
        r["against_circle"] = None if circle is None or r is circle else f"{goal.better(r, circle)} the best circle"
    winner = ok[0]["shape"]
    src = out_dir / folder_name(winner)
    if (summaries[winner]["best"] or {}).get("shape") not in (None, winner):  # a standard shape is better still
        ok[0]["note"] = f"a standard {summaries[winner]['best']['shape']} is better still (see its search)"
    charts = sorted(p.name for p in src.glob("best_*.png"))  # every plot of the winner, the checks' charts included
    for name in dict.fromkeys(("best.dxf", "best.csv", "search_history.png", "best_stress_field.vtu", "inputs.json",
                               *charts)):
        if (src / name).exists():
            shutil.copyfile(src / name, out_dir / f".{name}.copy")
            (out_dir / f".{name}.copy").replace(out_dir / name)
    won = RunRecord.from_summary(summaries[winner])
    assert won.best is not None  # the winning family's run recommends a design
    comparison = tuple(ok + [r for r in rows if not r["feasible"]])
    record = replace(won, best=replace(won.best, dxf=str(out_dir / "best.dxf")), study=study.title,
                     comparison=comparison)
    search_plots.plot_family_overlay(out_dir / "compare_shapes.png", study, out_dir, ok)
    inputs = RunInputs.from_dict(json.loads((out_dir / "inputs.json").read_text()))
    files.write_json(out_dir / "inputs.json", replace(inputs, title=study.title).to_dict())
    files.write_json(out_dir / "compare.json", list(comparison))
    top = record.to_summary()
    files.write_json(out_dir / "summary.json", top)
    top["report"] = str(build_report(out_dir))
    return top
