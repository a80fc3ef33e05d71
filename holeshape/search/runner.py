"""Running a shape search: an Optuna study in a storage file (or database), resumable, with parallel workers.

Strategy (measured, see benchmarks/search.py): the standard shapes that the family can represent first, then a
global phase with Optuna's TPE sampler (multivariate, with constraints), then a Nelder-Mead refinement from the best
feasible design. Every trial: geometry constraints first (an infeasible design never reaches the mesher); then a
"draft" evaluation. A mesh or solver failure marks that trial failed with its reason; the study goes on.
"""

from __future__ import annotations

import hashlib
import logging
import math
import time
from collections.abc import Callable, Generator
from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np

from holeshape.errors import GeometryError, HoleshapeError, StorageError
from holeshape.goals import GOALS
from holeshape.search.gradient import chosen_method
from holeshape.search.space import DesignSpace
from holeshape.search.trial import TrialRecord, compact
from holeshape.study import ACCURACIES, Measure, Study
from holeshape.studyfile import load_study

if TYPE_CHECKING:
    from holeshape.evaluate import Evaluation

# optuna's studies, trials and storages are typed Any (``study`` below is an optuna study, ``t`` a trial)

log = logging.getLogger("holeshape.search")

SEARCH_ACCURACY = ACCURACIES[0]  # trials are screened at the coarsest level
TRIAL_TIME_LIMIT_S = 60.0  # per evaluation in a search; a design that needs longer is recorded as failed


def study_fingerprint(path: str | Path) -> str:
    return hashlib.sha256(Path(path).read_bytes()).hexdigest()[:16]


def storage_for(out_dir: Path, url: str | None) -> tuple[Any, str]:
    """Optuna storage: a journal file in the output folder (robust for several processes on one machine) or the
    database at ``url`` (PostgreSQL for several machines). A trial left running by a worker that died is ignored
    by the budget after STALE_AFTER_S (ask/tell studies get no heartbeat retry)."""
    import optuna

    if url:
        url = _with_driver(url)
        last: Exception | None = None
        for attempt in range(6):  # several machines creating the tables at one moment race; the loser retries
            try:
                return optuna.storages.RDBStorage(url), url
            except Exception as err:  # noqa: BLE001 - database drivers raise their own types
                last = err
                if "IntegrityError" not in type(err).__name__ and "already exists" not in str(err):
                    break
                time.sleep(0.3 * (attempt + 1))
        msg = " ".join(str(last).split())[:300]
        raise StorageError(f"--storage {url!r} cannot be opened: {type(last).__name__}: {msg}") from last
    from optuna.storages.journal import JournalFileBackend, JournalFileOpenLock

    path = out_dir / "study.journal"
    backend = JournalFileBackend(str(path), lock_obj=JournalFileOpenLock(str(path)))
    return optuna.storages.JournalStorage(backend), str(path)


def _with_driver(url: str) -> str:
    """``postgresql://`` means the psycopg2 driver to SQLAlchemy; use psycopg (3) when only that is installed."""
    import importlib.util

    if url.startswith("postgresql://") and importlib.util.find_spec("psycopg2") is None \
            and importlib.util.find_spec("psycopg") is not None:
        return "postgresql+psycopg://" + url[len("postgresql://"):]
    return url


@dataclass(frozen=True)
class Objective:
    """Evaluates one point of the design space: the geometric checks, then the draft solve and the checks a
    search steers by. Returns a :class:`TrialRecord`."""

    study: Study
    space: DesignSpace
    trade_off: bool = False
    cache: dict = field(default_factory=dict, compare=False, hash=False)  # shared results of this run

    def __call__(self, params: dict[str, float]) -> TrialRecord:
        return self.evaluate(params)[0]

    def evaluate(self, params: dict[str, float]) -> tuple[TrialRecord, Evaluation | None]:
        """(the record, the draft evaluation with its fields when the design was solved, else None)."""
        from holeshape.checks import assess
        from holeshape.checks.stability import BucklingResult
        from holeshape.checks.stress import StressResult
        from holeshape.evaluate import evaluate

        t0 = time.perf_counter()
        study = self.study
        try:
            cutout = self.space.decode(params)
        except GeometryError as err:
            return TrialRecord.refused(params, {"outline": 1.0}, " ".join(str(err).split())), None
        dims = {k: (list(v) if isinstance(v, (list, tuple)) else v) for k, v in cutout.parameters().items()}
        attrs = {"area_mm2": cutout.area, "dims": dims, "min_radius_mm": cutout.min_radius}
        geo = assess(study, cutout, accuracy=SEARCH_ACCURACY, purpose="search")
        if not geo.meets_every_requirement:
            return TrialRecord.refused(params, geo.constraint_values(), "; ".join(geo.reasons()), **attrs,
                                       requirements=compact(geo.requirements)), None
        try:
            ev = evaluate(study.panel, study.material, study.load_cases, cutout,
                          Measure(study.measure.stress, SEARCH_ACCURACY), time_limit_s=TRIAL_TIME_LIMIT_S)
            left = max(1.0, TRIAL_TIME_LIMIT_S - (time.perf_counter() - t0))
            full = assess(study, cutout, ev, accuracy=SEARCH_ACCURACY, purpose="search", cache=self.cache,
                          time_limit_s=left)
        except HoleshapeError as err:
            # the project's own errors (mesh, solve, geometry) belong to the design: record it failed, with its
            # reason, and go on; anything else is a bug and stops the study (see run_worker)
            log.debug("trial failed", exc_info=True)
            return TrialRecord.failure(params, f"{type(err).__name__}: {' '.join(str(err).split())}", **attrs), None
        value = ev.peak_stress_mpa if self.trade_off else GOALS[study.search.goal].objective(ev, cutout, study, full)
        attrs.update(peak_stress_mpa=ev.peak_stress_mpa, kt=ev.kt, error_estimate_pct=ev.error_estimate_pct,
                     governing=ev.governing_load_case, dofs=ev.dofs, seconds=time.perf_counter() - t0,
                     requirements=compact(full.requirements))
        stress = full.result("stress")
        if isinstance(stress, StressResult) and stress.lowest_margin is not None:
            attrs["margin_of_safety"] = stress.lowest_margin
        stab = full.result("stability")
        if isinstance(stab, BucklingResult):
            attrs["buckling_load_factor"] = stab.stability.load_factor
        if not full.meets_every_requirement:
            attrs["reason"] = "; ".join(full.reasons())
        rec = TrialRecord(dict(params), "complete", value=value, constraints=full.constraint_values(),
                          feasible=full.meets_every_requirement, attrs=attrs)
        return rec, ev


def shown_value(value: float, goal: str) -> str:
    """A trial's objective value as a person reads it."""
    return GOALS[goal].shown(value)


def _values(rec: TrialRecord, trade_off: bool) -> float | list[float]:
    v = rec.sampler_value
    return [v, rec.attrs.get("area_mm2", 0.0)] if trade_off else v


def _record(study: Any, trial: Any, rec: TrialRecord, trade_off: bool) -> None:
    """Tell the study the outcome of an asked trial."""
    from optuna.trial import TrialState

    for k, v in rec.constraints.items():
        trial.set_constraint(k, float(v))
    for k, v in rec.user_attrs().items():
        trial.set_user_attr(k, v)
    if rec.state == "failed":
        study.tell(trial, state=TrialState.FAIL)
    else:
        study.tell(trial, _values(rec, trade_off))


def add_record(study: Any, space: DesignSpace, rec: TrialRecord, trade_off: bool) -> None:
    """Record an evaluation made outside the sampler (standard shapes, simplex steps) as a finished trial."""
    from optuna.trial import TrialState, create_trial

    failed = rec.state == "failed"
    v = None if failed else _values(rec, trade_off)
    study.add_trial(create_trial(  # v: None (failed), one value (a float), or the trade-off's pair (a list)
        state=TrialState.FAIL if failed else TrialState.COMPLETE,
        value=v if isinstance(v, float) else None, values=v if isinstance(v, list) else None,
        params=rec.params, distributions=space.distributions(), user_attrs=rec.user_attrs(),
        constraints=rec.constraints or None))


def finished(study: Any) -> list:
    """Trials that count towards the budget: complete, or failed for a reason of their own (a trial cut short by a
    killed run does not count; it is re-run)."""
    from optuna.trial import TrialState

    return [t for t in study.get_trials(deepcopy=False, states=(TrialState.COMPLETE, TrialState.FAIL))
            if not str(t.user_attrs.get("failure", "")).startswith("interrupted")]


STALE_AFTER_S = 600.0  # a trial running this long belongs to a worker that died (an evaluation takes seconds)


def started(study: Any) -> int:
    """Finished trials plus those running now (not counting ones abandoned by a worker that died)."""
    import datetime

    from optuna.trial import TrialState

    now = datetime.datetime.now()
    running = [t for t in study.get_trials(deepcopy=False, states=(TrialState.RUNNING,))
               if t.datetime_start is not None and (now - t.datetime_start).total_seconds() < STALE_AFTER_S]
    return len(finished(study)) + len(running)


def is_feasible(t: Any) -> bool:
    """A candidate: complete, meeting every constraint, and a full evaluation (not a gradient probe)."""
    from optuna.trial import TrialState

    return t.state == TrialState.COMPLETE and t.user_attrs.get("feasible", False) and \
        not t.user_attrs.get("probe", False) and all(v <= 0 for v in t.constraints.values())


def best_feasible(study: Any) -> Any:
    cands = [t for t in finished(study) if is_feasible(t)]
    if not cands:
        return None
    key = (lambda t: t.values[0]) if len(study.directions) > 1 else (lambda t: t.value)
    return min(cands, key=key)


class BudgetGate:
    """Serialises 'is there budget left? then record' between the worker processes of one machine, so several
    workers never record more trials than the study asks for. (Across machines the window is milliseconds.)"""

    def __init__(self, out_dir: str) -> None:
        self.path = Path(out_dir) / ".holeshape.budget"

    def __enter__(self) -> BudgetGate:
        import fcntl

        self.fh = open(self.path, "a")
        fcntl.flock(self.fh, fcntl.LOCK_EX)
        return self

    def __exit__(self, *exc: object) -> None:
        import fcntl

        fcntl.flock(self.fh, fcntl.LOCK_UN)
        self.fh.close()


OVER_BUDGET = "interrupted: the trial budget was reached by another worker first"


def _penalised(rec: TrialRecord, reference: float) -> float:
    """The value the simplex sees: the objective of a feasible design; otherwise worse than ``reference`` (the
    best so far, which may be negative: minus an area) in proportion to the summed violation."""
    if rec.acceptable:  # the one rule for a record (is_feasible for a stored trial): every search requirement met
        return rec.sampler_value
    viol = sum(max(0.0, v) for v in rec.constraints.values() if v == v)  # a NaN row counts as a miss of 1
    return reference + abs(reference) * (viol or 1.0) + 1.0


def run_worker(study_path: str, storage_url: str | None, out_dir: str, study_name: str, worker: int,
               trade_off: bool, on_trial: Callable[[Any], None] | None = None) -> None:
    """One search process: asks, evaluates and records trials until the study holds ``trials`` finished ones.

    Raises whatever is not one of the project's own errors (a bug), after giving back the trial in hand."""
    import optuna
    from optuna.trial import TrialState

    study_def = load_study(study_path)
    space = DesignSpace(study_def.cutout, study_def.constraints)
    storage, _ = storage_for(Path(out_dir), storage_url)
    settings = study_def.search
    seed = settings.seed + 1000 * worker
    if storage_url:  # every process on every machine sharing a database must sample its own points
        import os
        import socket

        seed += int(hashlib.sha256(f"{socket.gethostname()}-{os.getpid()}".encode()).hexdigest()[:6], 16)
    sampler = optuna.samplers.TPESampler(seed=seed, multivariate=True, constant_liar=True,
                                         n_startup_trials=max(4, min(10, int(settings.trials * 0.15))))
    study = optuna.load_study(study_name=study_name, storage=storage, sampler=sampler)
    objective = Objective(study_def, space, trade_off)
    n_global = max(1, int(math.ceil(settings.global_fraction * settings.trials)))
    method = "sampler_simplex" if trade_off else chosen_method(study_def)
    dists = space.distributions()
    simplex = None
    pending = None
    gate = BudgetGate(out_dir)
    while True:
        done = len(finished(study))
        if on_trial is not None:
            on_trial(study)
        if started(study) >= settings.trials:  # counting running ones too: workers do not overshoot the budget
            return
        sampler_phase = done < n_global and method != "gradient"
        if trade_off or sampler_phase or len(dists) == 0 or best_feasible(study) is None:
            trial = study.ask(dists)
            try:
                rec = objective(trial.params)
            except BaseException:
                # a bug or Ctrl-C: the trial is given back (not counted, re-run on resume); every completed trial is
                # already stored
                trial.set_user_attr("failure", "interrupted: the evaluation stopped on an unexpected error")
                study.tell(trial, state=TrialState.FAIL)
                raise
            with gate:
                if len(finished(study)) >= settings.trials:
                    rec = TrialRecord.failure(trial.params, OVER_BUDGET)
                _record(study, trial, rec, trade_off)
            continue
        if method == "gradient":
            _refine(study, study_def, space, objective, gate, worker, seed, on_trial)
            method = "sampler_simplex"  # a refinement that stopped before the budget: the simplex takes the rest
            continue
        # local refinement from the best feasible design; each worker starts its simplex differently
        if simplex is None:
            best = best_feasible(study)
            names = local_dimensions(space)
            base = dict(best.params)
            x0 = np.array(space.to_unit({k: base[k] for k in names}, names))
            simplex = _start_simplex(x0, worker, seed if storage_url else None)
            next(simplex)  # the start vertex is the best trial itself: give its value, do not evaluate it again
            reference = best.value
            point = simplex.send(reference)
        else:
            assert pending is not None  # the previous step's value, set below before the simplex is asked again
            point = simplex.send(pending)
        params = dict(base)
        params.update(space.from_unit(list(point), names))
        rec = objective(params)
        with gate:
            if len(finished(study)) >= settings.trials:
                return
            add_record(study, space, rec, trade_off)
        pending = _penalised(rec, reference)
        if rec.complete and rec.feasible:
            reference = min(reference, rec.sampler_value)


def _refine(study: Any, study_def: Study, space: DesignSpace, objective: Objective, gate: BudgetGate, worker: int,
            seed: int, on_trial: Callable[[Any], None] | None = None) -> None:
    """The gradient refinement (holeshape.search.gradient) from a feasible design: worker k starts from the k-th
    best distinct one (the standard shapes and any sampled design), so two workers do not walk the same path."""
    from holeshape.search.gradient import Refinement

    trials = study_def.search.trials

    def record(rec: TrialRecord) -> bool:
        with gate:
            if len(finished(study)) >= trials:
                return False
            add_record(study, space, rec, False)
        if on_trial is not None:
            on_trial(study)
        return True

    starts = sorted((t for t in finished(study) if is_feasible(t)), key=lambda t: t.value)
    distinct = [t for i, t in enumerate(starts) if all(abs(t.value - u.value) > 1e-9 for u in starts[:i])]
    start = distinct[worker % len(distinct)]
    Refinement(study_def, space, objective, record, list(space.dimensions), seed).run(dict(start.params))


WORKER_BUG_EXIT = 70  # a worker process stopped on an error that is not one of the project's own


def worker_error_path(out_dir: str | Path, worker: int) -> Path:
    return Path(out_dir) / f".holeshape.worker-{worker}.error"


def worker_process(study_path: str, storage_url: str | None, out_dir: str, study_name: str, worker: int,
                   trade_off: bool) -> None:
    """Entry point of a spawned worker process: quiet Optuna logging in this process of our own, then
    :func:`run_worker`; an error is written to :func:`worker_error_path` for the parent to report."""
    import sys
    import traceback

    import optuna

    optuna.logging.set_verbosity(optuna.logging.WARNING)
    try:
        run_worker(study_path, storage_url, out_dir, study_name, worker, trade_off)
    except HoleshapeError as err:
        worker_error_path(out_dir, worker).write_text(f"{type(err).__name__}: {err}")
        sys.exit(3)
    except Exception as err:  # noqa: BLE001 - handed to the parent, which stops the study as a bug
        worker_error_path(out_dir, worker).write_text(
            f"{type(err).__name__}: {err}\n{traceback.format_exc()}")
        sys.exit(WORKER_BUG_EXIT)


def local_dimensions(space: DesignSpace) -> list[str]:
    """The dimensions the simplex moves. With the area fixed every design is scaled to it, so one searched length
    is redundant (it only sets a scale that the area then undoes): it is held at the best design's value, which
    keeps the simplex from degenerating along a flat direction."""
    names = list(space.dimensions)
    if space.constraints.area is not None:
        lengths = space.lengths()
        if len(lengths) >= 2:
            names.remove(lengths[0])
    return names


def _start_simplex(x0: np.ndarray, worker: int, shared_seed: int | None = None
                   ) -> Generator[np.ndarray, float, None]:
    """The local workers of one machine differ by step size; processes sharing a database also by a random
    turn of the start simplex (else two machines would walk the same points)."""
    from holeshape.search.local import nelder_mead

    step = 0.08 / (1 + worker)
    if shared_seed is None:
        return nelder_mead(x0, step)
    rng = np.random.default_rng(shared_seed)
    return nelder_mead(x0, step * rng.uniform(0.6, 1.4), signs=rng.choice([-1.0, 1.0], size=len(x0)))
