"""``holeshape sweep``: the classic parameter study. One ``--vary name=lo:hi:n`` gives peak stress, Kt and removed
area against the parameter; a second gives a 2-D map. Every point is a verified evaluation at the study's
accuracy level; points that break the geometry or the constraints are kept with their reason."""

from __future__ import annotations

import re
import time
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from holeshape.errors import GeometryError, HoleshapeError, StudyError
from holeshape.study import Range, flat_name, set_flat, split_flat_name
from holeshape.studyfile import load_study

MAX_POINTS = 400


@dataclass(frozen=True)
class Vary:
    name: str
    lo: float
    hi: float
    n: int

    @property
    def values(self) -> np.ndarray:
        return np.linspace(self.lo, self.hi, self.n)


def parse_vary(text: str, allowed: list[str]) -> Vary:
    m = re.fullmatch(r"\s*([A-Za-z_][A-Za-z_.0-9\[\]]*?(?:\[\d+\])?)\s*=\s*([-+0-9.eE]+):([-+0-9.eE]+):(\d+)\s*", text)
    if not m:
        raise StudyError(f"--vary {text!r} must read name=low:high:count, for example b=20:60:9")
    name, lo, hi, n = m.group(1), float(m.group(2)), float(m.group(3)), int(m.group(4))
    if name not in allowed:
        raise StudyError(f"--vary {name!r} is not a parameter of this cutout; allowed: {', '.join(allowed)}")
    if not lo < hi or not 2 <= n <= 200:
        raise StudyError(f"--vary {text!r} needs low < high and 2 <= count <= 200")
    return Vary(name, lo, hi, n)


def _base_values(study) -> dict:
    vals = {}
    for k, v in study.cutout.values.items():
        if isinstance(v, list):
            vals[k] = [x.value if isinstance(x, Range) else x for x in v]
        else:
            vals[k] = v.value if isinstance(v, Range) else v
    return vals


def run_sweep(study_path: str, out: str, vary_texts: list[str]) -> dict:
    from holeshape.evaluate import evaluate
    from holeshape.output import files
    from holeshape.output.report import build_report
    from holeshape.output.search_plots import plot_sweep
    from holeshape.record import RunInputs, SweepRecord
    from holeshape.search.constraints import constraint_values, solved_constraint_values
    from holeshape.validation import run_validation

    study = load_study(study_path)
    base = _base_values(study)
    allowed = [k for k, v in base.items() if isinstance(v, (int, float)) and not isinstance(v, bool)]
    allowed += [flat_name(k, i) for k, v in base.items() if isinstance(v, list) for i in range(len(v))]
    if not 1 <= len(vary_texts) <= 2:
        raise StudyError(f"give one or two --vary options, got {len(vary_texts)}")
    varies = [parse_vary(t, allowed) for t in vary_texts]
    if len(varies) == 2 and varies[0].name == varies[1].name:
        raise StudyError(f"the two --vary options name the same parameter {varies[0].name!r}")
    if int(np.prod([v.n for v in varies])) > MAX_POINTS:
        raise StudyError(f"--vary gives {int(np.prod([v.n for v in varies]))} points; at most {MAX_POINTS}")
    for k, v in base.items():
        if v is None or (isinstance(v, list) and any(x is None for x in v)):
            if k not in [split_flat_name(x.name)[0] for x in varies]:
                raise StudyError(f"cutout.{k} is a range without a value; give value = ... or vary it")
    out_dir = Path(out)
    out_dir.mkdir(parents=True, exist_ok=True)
    t0 = time.perf_counter()
    points = []
    cache: dict = {}  # the unperforated panel's buckling, the same for every point
    grids = [v.values for v in varies]
    for idx in np.ndindex(*[len(g) for g in grids]):
        vals = {k: (list(v) if isinstance(v, list) else v) for k, v in base.items()}
        coords = {}
        for vary, g, i in zip(varies, grids, idx):
            x = float(g[i])
            coords[vary.name] = x
            set_flat(vals, vary.name, x)
        row = {"coords": coords, "feasible": False}
        try:
            cut = study.cutout.build(vals)
            cons, reasons = constraint_values(cut, study.panel, study.constraints, study.material.density)
            row["area_mm2"] = cut.area
            row["constraints_met"] = not reasons
            if reasons:
                row["reason"] = "; ".join(reasons)
            if cons.get("inside_panel", 1.0) < 0 and "outline" not in cons:
                ev = evaluate(study.panel, study.material, study.load_cases, cut, study.measure,
                              stability=study.stability, cache=cache)
                post = solved_constraint_values(ev, study.constraints)[1]
                if post:
                    row["reason"] = "; ".join(reasons + post)
                row.update(feasible=not reasons and not post, solved=True, peak_stress_mpa=ev.peak_stress_mpa,
                           kt=ev.kt, error_estimate_pct=ev.error_estimate_pct,
                           governing_load_case=ev.governing_load_case, warnings=list(ev.warnings))
                if ev.stability is not None:
                    row.update(buckling_load_factor=ev.stability.load_factor,
                               buckling_governing_load_case=getattr(ev.stability.governing, "name", None),
                               buckling_error_estimate_pct=ev.stability.error_estimate_pct)
        except (GeometryError, StudyError) as err:
            row["reason"] = " ".join(str(err).split())
        except HoleshapeError as err:
            row["reason"] = f"{type(err).__name__}: {' '.join(str(err).split())}"
        points.append(row)
    record = SweepRecord(
        study=study.title, vary=tuple(dict(v.__dict__) for v in varies), points=tuple(points),
        accuracy=study.measure.accuracy, elapsed_s=time.perf_counter() - t0,
        required_buckling_factor=None if study.stability is None else max(
            study.stability.required_factor, study.constraints.min_buckling_factor or 0.0))
    result = record.to_dict()
    files.write_json(out_dir / "sweep.json", result)
    plot_sweep(out_dir / "sweep.png", result, study.material.allowable_stress)
    files.write_json(out_dir / "inputs.json", RunInputs.from_study(study).to_dict())
    if not (out_dir / "validation.json").exists():
        files.write_json(out_dir / "validation.json", run_validation(study.measure.accuracy))
    result["report"] = str(build_report(out_dir))
    return result
