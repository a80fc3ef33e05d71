"""``holeshape optimise``: run or resume a shape search, re-check the winner at the fine level, write the outputs.

Outputs in the run folder (all written atomically): best.dxf, best.csv, summary.json, plots (search history, best
shape over the standard shapes and the access envelope, stress field and edge stress of the best design), and with
``trade_off`` the front plot and one DXF per front member.
"""

from __future__ import annotations

import fcntl
import logging
import math
import multiprocessing
import time
from pathlib import Path

import numpy as np

from holeshape.errors import SearchError, StorageError, StudyError
from holeshape.finish import finish_run
from holeshape.search.baselines import standard_shapes
from holeshape.search.runner import (
    WORKER_BUG_EXIT,
    Objective,
    add_record,
    finished,
    is_feasible,
    run_worker,
    shown_value,
    storage_for,
    study_fingerprint,
    worker_error_path,
    worker_process,
)
from holeshape.search.space import DesignSpace
from holeshape.study import flat_name, split_flat_name
from holeshape.studyfile import load_study

log = logging.getLogger("holeshape.optimise")


class RunLock:
    """One ``optimise`` per run folder at a time (its worker processes excepted)."""

    def __init__(self, out_dir: Path):
        self.path = out_dir / ".holeshape.lock"
        self.fh = None

    def __enter__(self):
        self.fh = open(self.path, "w")
        try:
            fcntl.flock(self.fh, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except OSError as err:
            self.fh.close()
            raise StudyError(f"--out {str(self.path.parent)!r} is in use by another holeshape optimise; wait for it"
                             " or choose another folder (use --workers to run in parallel)") from err
        return self

    def __exit__(self, *exc):
        fcntl.flock(self.fh, fcntl.LOCK_UN)
        self.fh.close()


def _family_params(study_family: str, base_family: str, cut, space: DesignSpace) -> dict | None:
    """The search parameters that reproduce a standard shape in the study's family, or None if it cannot."""
    sh = cut.shape
    vals: dict[str, float] = {}
    if study_family == base_family:
        vals = {k: v for k, v in sh.parameters().items() if not isinstance(v, (tuple, list, str))}
    elif study_family == "superellipse" and base_family in ("circle", "ellipse"):
        a = sh.radius if base_family == "circle" else sh.a
        b = sh.radius if base_family == "circle" else sh.b
        vals = {"a": a, "b": b, "exponent": 2.0}
    elif study_family == "ellipse" and base_family == "circle":
        vals = {"a": sh.radius, "b": sh.radius}
    elif study_family == "spline":
        vals = _spline_radii(cut, space)
    else:
        return None
    vals.update({"center[0]": cut.center[0], "center[1]": cut.center[1], "rotation": cut.rotation})
    if study_family == "spline" and base_family != "circle":
        vals["rotation"] = _spline_rotation(cut, space)
    dims = space.dimensions
    out = {}
    for k, r in dims.items():
        if k not in vals:
            return None
        v = vals[k]
        if space.constraints.area is None and not (r.min <= v <= r.max):
            return None
        out[k] = min(max(v, r.min), r.max)
    # fixed (non-searched) values must agree with the standard shape
    for k, v in vals.items():
        if k in dims:
            continue
        base, idx = split_flat_name(k)
        fixed = space.values({}).get(base)
        if isinstance(fixed, list) and idx is not None:
            fixed = fixed[idx]
        if fixed is not None and not isinstance(fixed, (list, str)) and abs(float(fixed) - v) > 1e-9 * max(1, abs(v)):
            if space.constraints.area is None or k in ("center[0]", "center[1]", "rotation", "exponent"):
                return None
    return out


def _spline_rotation(cut, space: DesignSpace) -> float:
    """The rotation a spline start takes: the standard shape's where the study searches it, else the study's."""
    fixed = space.values({}).get("rotation", 0.0)
    return cut.rotation if "rotation" in space.dimensions or isinstance(fixed, (list, str)) else float(fixed)


def _spline_radii(cut, space: DesignSpace) -> dict[str, float]:
    """The spline radii through a standard shape's outline (its polar radius about its centre at the spline's
    angles, in the spline's own frame): the same shape for a circle, a close one otherwise (a start)."""
    spec_radii = space.spec.values["radii"]
    n = len(spec_radii)
    sym = space.values({}).get("symmetry", "none")
    span = {"none": 2 * math.pi * (n - 1) / n, "x": math.pi, "xy": math.pi / 2}[sym]
    theta = np.linspace(0.0, span, n) + math.radians(_spline_rotation(cut, space))
    p = cut.sampling.points
    phi = np.arctan2(p[1] - cut.center[1], p[0] - cut.center[0])
    rho = np.hypot(p[0] - cut.center[0], p[1] - cut.center[1])
    order = np.argsort(phi)
    r = np.interp(np.mod(theta + math.pi, 2 * math.pi) - math.pi, phi[order], rho[order], period=2 * math.pi)
    return {flat_name("radii", i): float(v) for i, v in enumerate(r)}


def run_optimise(study_path: str, out: str, workers: int = 1, storage_url: str | None = None,
                 trade_off: bool = False, progress: bool = True, cache: dict | None = None) -> dict:
    """Run or resume the search of one study file and write its outputs to ``out``; returns the summary.
    ``cache``: a dict for results shared between runs on one panel (``compare`` passes one for all families)."""
    import optuna

    t0 = time.perf_counter()
    cache = {} if cache is None else cache
    study_def = load_study(study_path)
    space = DesignSpace(study_def.cutout, study_def.constraints)
    space.check()
    if study_def.search.method == "gradient" and not trade_off:
        from holeshape.search.gradient import not_applicable

        why = not_applicable(study_def)
        if why is not None:
            raise StudyError(f"search.method = \"gradient\" cannot be used for this study: {why}; use \"auto\" or"
                             " \"sampler_simplex\"")
    if workers < 1 or workers > 64:
        raise StudyError(f"--workers must be between 1 and 64, got {workers}")
    out_dir = Path(out)
    try:
        out_dir.mkdir(parents=True, exist_ok=True)
    except OSError as err:
        raise StudyError(f"--out {out!r} cannot be created: {err.strerror}") from err
    with RunLock(out_dir):
        if storage_url is None:
            repair_journal(out_dir / "study.journal")
        storage, storage_name = storage_for(out_dir, storage_url)
        name = "holeshape-trade-off" if trade_off else "holeshape"
        directions = ["minimize", "maximize"] if trade_off else ["minimize"]
        study, created = _create_or_load(optuna, name, storage, directions)
        fp = study_fingerprint(study_path)
        known = study.user_attrs.get("study_fingerprint")
        if known is None:
            study.set_user_attr("study_fingerprint", fp)
            study.set_user_attr("study_title", study_def.title)
        elif known != fp:
            raise StudyError(f"the search in {storage_name!r} was started from a different study file; use a new --out"
                             " (or restore the original study file) to keep results consistent")
        if storage_url is None:
            fail_stale(study, storage, name)
        baselines = standard_shapes(study_def.cutout.values, study_def.panel, study_def.constraints,
                                    study_def.material.density)
        if created:  # only the process that created the study seeds it: machines starting together add nothing twice
            objective = Objective(study_def, space, trade_off, cache)
            own = {k: r.value for k, r in space.dimensions.items()}
            if all(v is not None for v in own.values()):  # the study's current design first
                rec = objective(own)
                rec["user_attrs"]["standard_shape"] = "study design"
                add_record(study, space, rec, trade_off)
            for family, cut, _ in baselines:
                if cut is None:
                    continue
                params = _family_params(study_def.cutout.shape, family, cut, space)
                if params is not None:
                    rec = objective(params)
                    rec["user_attrs"]["standard_shape"] = family
                    add_record(study, space, rec, trade_off)
        _run_workers(study_path, storage_url, out_dir, name, workers, trade_off, study_def.search.trials, progress,
                     study_def.search.goal)
        return finish_run(study_def, study, space, baselines, out_dir, storage_name, trade_off, t0, cache, workers)


def _create_or_load(optuna, name: str, storage, directions: list[str]):
    """(study, created): create the study, or load it when it exists. The storage's unique study name decides
    which of several machines starting at once is the creator."""
    from optuna.exceptions import DuplicatedStudyError

    last: Exception | None = None
    for attempt in range(5):
        try:
            return optuna.create_study(study_name=name, storage=storage, directions=directions), True
        except DuplicatedStudyError:
            return optuna.load_study(study_name=name, storage=storage), False
        except Exception as err:  # noqa: BLE001 - a creation race can also surface as an integrity error
            last = err
            time.sleep(0.2 * (attempt + 1))
    raise StorageError(f"the study {name!r} could not be created or loaded: {last}") from last


def repair_journal(path: Path) -> None:
    """After a kill: drop a half-written last record and a lock left behind. Safe because the run lock makes this
    process the only user of the folder until it starts its own workers."""
    lock = Path(str(path) + ".lock")
    if lock.exists():
        lock.unlink()
    if not path.exists() or path.stat().st_size == 0:
        return
    with open(path, "rb+") as fh:
        fh.seek(-1, 2)
        if fh.read(1) == b"\n":
            return
        data = path.read_bytes()
        fh.truncate(data.rfind(b"\n") + 1)
        log.warning("dropped a half-written record at the end of %s (the previous run was killed)", path)


def fail_stale(study, storage, name: str) -> None:
    """Trials left RUNNING by a killed local run can never finish: mark them failed, with the reason (through the
    storage's public interface; they do not count towards the budget and are re-run)."""
    from optuna.trial import TrialState

    running = study.get_trials(deepcopy=False, states=(TrialState.RUNNING,))
    if not running:
        return
    study_id = storage.get_study_id_from_name(name)
    for t in running:
        trial_id = storage.get_trial_id_from_study_id_trial_number(study_id, t.number)
        storage.set_trial_user_attr(trial_id, "failure", "interrupted: the run was stopped mid-trial")
        storage.set_trial_state_values(trial_id, TrialState.FAIL)


def _progress_bar(total: int, enabled: bool):
    from tqdm import tqdm

    return tqdm(total=total, disable=not enabled, unit="trial", desc="search", dynamic_ncols=True, leave=True,
                mininterval=0.5)


def _update(bar, study, goal: str = "lowest_peak") -> None:
    done = finished(study)
    feas = [t for t in done if is_feasible(t)]
    best = min((t.values[0] for t in feas), default=None)
    n = min(len(done), bar.total)
    if n == bar.n and n < bar.total:
        return
    if len(study.directions) > 1:
        goal = "lowest_peak"  # the trade-off's first objective is the peak
    bar.set_postfix_str(f"best {shown_value(best, goal)}, {len(feas)} feasible" if best is not None
                        else "no feasible yet", refresh=False)
    bar.update(n - bar.n)


def _run_workers(study_path, storage_url, out_dir, name, workers, trade_off, total, progress,
                 goal: str = "lowest_peak") -> None:
    import optuna

    bar = _progress_bar(total, progress)
    try:
        if workers == 1:
            run_worker(study_path, storage_url, str(out_dir), name, 0, trade_off,
                       on_trial=lambda s: _update(bar, s, goal))
            return
        ctx = multiprocessing.get_context("spawn")
        for w in range(workers):
            worker_error_path(out_dir, w).unlink(missing_ok=True)
        procs = [ctx.Process(target=worker_process, args=(study_path, storage_url, str(out_dir), name, w, trade_off),
                             daemon=True) for w in range(workers)]
        for p in procs:
            p.start()
        storage, _ = storage_for(out_dir, storage_url)
        study = optuna.load_study(study_name=name, storage=storage)
        while any(p.is_alive() for p in procs):
            _update(bar, study, goal)
            time.sleep(0.5)
        _update(bar, study, goal)
        bad = [(w, p.exitcode) for w, p in enumerate(procs) if p.exitcode != 0]
        messages = [worker_error_path(out_dir, w).read_text().splitlines()[0] for w, _ in bad
                    if worker_error_path(out_dir, w).exists()]
        if any(code == WORKER_BUG_EXIT for _, code in bad):
            raise RuntimeError(f"a worker process stopped on an unexpected error: {messages[0] if messages else ''}")
        if bad:
            why = f": {messages[0]}" if messages else ""
            raise SearchError(f"{len(bad)} of {workers} worker processes stopped with an error (exit codes "
                              f"{[c for _, c in bad]}){why}; rerun to resume (completed trials are kept)")
    finally:
        bar.close()

