"""``holeshape sweep``: the classic parameter study. One ``--vary name=lo:hi:n`` gives peak stress, Kt and removed
area against the parameter; a second gives a 2-D map. Every point is a verified evaluation at the study's
accuracy level; points that break the geometry or the constraints are kept with their reason."""

from __future__ import annotations

import re
import time
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING

import numpy as np

from holeshape.checks.stability import required_factor
from holeshape.errors import GeometryError, HoleshapeError, StudyError
from holeshape.studyfile import load_study

if TYPE_CHECKING:
    from holeshape.checks import Assessment
    from holeshape.evaluate import Evaluation
    from holeshape.parameters import CutoutSpec, Param
    from holeshape.study import Study

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


def run_sweep(study_path: str, out: str, vary_texts: list[str], progress: bool = False) -> dict:
    """Evaluate and assess the study's design at every point of the grid (at the study's accuracy); write
    sweep.json, sweep.png, inputs.json, the validation appendix and the report; return the points."""
    from holeshape.checks import assess
    from holeshape.evaluate import evaluate
    from holeshape.output import files
    from holeshape.output.report import build_report
    from holeshape.output.search_plots import plot_sweep
    from holeshape.progress import Progress
    from holeshape.record import RunInputs, SweepRecord
    from holeshape.validation import run_validation

    study = load_study(study_path)
    spec = study.cutout
    keys = {p.flat: p for p in spec.numeric()}
    allowed = list(keys)
    if not 1 <= len(vary_texts) <= 2:
        raise StudyError(f"give one or two --vary options, got {len(vary_texts)}")
    varies = [parse_vary(t, allowed) for t in vary_texts]
    if len(varies) == 2 and varies[0].name == varies[1].name:
        raise StudyError(f"the two --vary options name the same parameter {varies[0].name!r}")
    if int(np.prod([v.n for v in varies])) > MAX_POINTS:
        raise StudyError(f"--vary gives {int(np.prod([v.n for v in varies]))} points; at most {MAX_POINTS}")
    varied = {keys[v.name] for v in varies}
    for p, r in spec.ranges.items():
        if r.value is None and p not in varied:
            raise StudyError(f"{p.key} is a range without a value; give value = ... or vary it")
    out_dir = Path(out)
    out_dir.mkdir(parents=True, exist_ok=True)
    t0 = time.perf_counter()
    points = []
    cache: dict = {}  # the unperforated panel's buckling, the same for every point
    grids = [v.values for v in varies]
    n_points = int(np.prod([len(g) for g in grids]))
    with Progress(progress).bar(n_points + 2, "sweep", "point") as bar:
        for idx in np.ndindex(*[len(g) for g in grids]):
            point, coords = {}, {}
            for vary, g, i in zip(varies, grids, idx):
                x = float(g[i])
                coords[vary.name] = x
                point[keys[vary.name]] = x
            bar.note(", ".join(f"{k} = {v:.4g}" for k, v in coords.items()))
            points.append(_point(study, spec, point, coords, cache, assess, evaluate))
            bar.update()
        record = SweepRecord(
            study=study.title, vary=tuple(dict(v.__dict__) for v in varies), points=tuple(points),
            accuracy=study.measure.accuracy, elapsed_s=time.perf_counter() - t0,
            required_buckling_factor=None if study.stability is None else required_factor(study))
        result = record.to_dict()
        files.write_json(out_dir / "sweep.json", result)
        plot_sweep(out_dir / "sweep.png", result, study.material.allowable_stress)
        files.write_json(out_dir / "inputs.json", RunInputs.from_study(study).to_dict())
        bar.update()
        if not (out_dir / "validation.json").exists():
            bar.note("validation appendix")
            files.write_json(out_dir / "validation.json", run_validation(study.measure.accuracy,
                                                                          stability=study.stability is not None,
                                                                          fatigue=study.table("fatigue") is not None))
        result["report"] = str(build_report(out_dir))
        bar.update()
    return result


def _point(study: Study, spec: CutoutSpec, point: dict[Param, float], coords: dict[str, float], cache: dict,
           assess: Callable[..., Assessment], evaluate: Callable[..., Evaluation]) -> dict:
    """One point of a sweep: its geometry checked, then (where it can be meshed) solved and assessed."""
    from holeshape.checks.stability import BucklingResult
    from holeshape.checks.stress import StressResult

    row: dict = {"coords": coords, "feasible": False}
    try:
        cut = spec.build(point)
        geo = assess(study, cut)
        row["area_mm2"] = cut.area
        row["constraints_met"] = geo.meets_every_requirement
        if not geo.meets_every_requirement:
            row["reason"] = "; ".join(geo.reasons())
        if geo.can_mesh:
            ev = evaluate(study.panel, study.material, study.load_cases, cut, study.measure)
            full = assess(study, cut, ev, accuracy=study.measure.accuracy, cache=cache)
            if not full.meets_every_requirement:
                row["reason"] = "; ".join(full.reasons())
            row.update(feasible=full.meets_every_requirement, solved=True, peak_stress_mpa=ev.peak_stress_mpa,
                       kt=ev.kt, error_estimate_pct=ev.error_estimate_pct,
                       governing_load_case=ev.governing_load_case, warnings=list(ev.warnings))
            st = full.result("stability")
            if isinstance(st, BucklingResult):
                row.update(buckling_load_factor=st.stability.load_factor,
                           buckling_governing_load_case=getattr(st.stability.governing, "name", None),
                           buckling_error_estimate_pct=st.stability.error_estimate_pct)
            stress = full.result("stress")
            if isinstance(stress, StressResult) and stress.lowest_margin is not None:
                row["margin_of_safety"] = stress.lowest_margin
            for res in full.results:
                row.update(res.row_fields())
    except (GeometryError, StudyError) as err:
        row["reason"] = " ".join(str(err).split())
    except HoleshapeError as err:
        row["reason"] = f"{type(err).__name__}: {' '.join(str(err).split())}"
    return row
