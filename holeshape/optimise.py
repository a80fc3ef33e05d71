"""``holeshape optimise``: run or resume a shape search, re-check the winner at the fine level, write the outputs.

Outputs in the run folder (all written atomically): best.dxf, best.csv, summary.json, plots (search history, best
shape over the standard shapes and the access envelope, stress field and edge stress of the best design), and with
``trade_off`` the front plot and one DXF per front member.
"""

from __future__ import annotations

import fcntl
import logging
import multiprocessing
import time
from pathlib import Path
from typing import Any, TextIO

from holeshape.errors import NoDesignError, SearchError, StorageError, StudyError
from holeshape.finish import finish_run
from holeshape.progress import Progress
from holeshape.search.baselines import family_point, standard_shapes
from holeshape.search.gradient import chosen_method
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
from holeshape.studyfile import load_study

log = logging.getLogger("holeshape.optimise")

# optuna (the module, its studies and storages) and tqdm's bars are typed Any


class RunLock:
    """One ``optimise`` per run folder at a time (its worker processes excepted)."""

    def __init__(self, out_dir: Path) -> None:
        self.path = out_dir / ".holeshape.lock"
        self.fh: TextIO | None = None

    def __enter__(self) -> RunLock:
        self.fh = open(self.path, "w")
        try:
            fcntl.flock(self.fh, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except OSError as err:
            self.fh.close()
            raise StudyError(f"--out {str(self.path.parent)!r} is in use by another holeshape optimise; wait for it"
                             " or choose another folder (use --workers to run in parallel)") from err
        return self

    def __exit__(self, *exc: object) -> None:
        assert self.fh is not None  # opened by __enter__
        fcntl.flock(self.fh, fcntl.LOCK_UN)
        self.fh.close()


def run_optimise(study_path: str, out: str, workers: int = 1, storage_url: str | None = None,
                 trade_off: bool = False, progress: bool | Progress = True, cache: dict | None = None,
                 label: str = "search") -> dict:
    """Run or resume the search of one study file and write its outputs to ``out``; returns the summary, or raises
    :class:`~holeshape.errors.NoDesignError` (its summary written) when nothing meets every requirement. A run
    whose budget is spent and whose summary is on disk for the same study file is not finished again: the stored
    summary is returned at once. ``cache``: a dict for results shared between runs on one panel (``compare`` passes
    one for all families); ``label`` names the search bar."""
    import optuna

    if not isinstance(progress, Progress):
        progress = Progress(bool(progress))
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
        done = stored_summary(out_dir, study, fp, study_def.search.trials)
        if done is not None:
            return done
        baselines = standard_shapes(study_def)
        # the seeds (the study's own design, the standard shapes) that are not in the storage yet: all of them in a
        # new study; on a local journal (the run lock keeps other processes out) also those a run killed while
        # seeding never added. On a shared database only the process that created the study seeds it, so machines
        # starting together add nothing twice
        seeded = {t.user_attrs.get("standard_shape") for t in study.get_trials(deepcopy=False)}
        if created or storage_url is None:
            objective = Objective(study_def, space, trade_off, cache)
            own = {k: r.value for k, r in space.dimensions.items() if r.value is not None}
            if len(own) == len(space.dimensions) and "study design" not in seeded:  # every range has its value
                rec = objective(own).with_attrs(standard_shape="study design")
                add_record(study, space, rec, trade_off)
            for family, cut, _ in baselines:
                if cut is None or family in seeded:
                    continue
                params = family_point(family, cut, space)
                if params is not None:
                    rec = objective(params).with_attrs(standard_shape=family)
                    add_record(study, space, rec, trade_off)
        _run_workers(study_path, storage_url, out_dir, name, workers, trade_off, study_def.search.trials,
                     progress.enabled, study_def.search.goal, label)
        method = "sampler_simplex" if trade_off else chosen_method(study_def)
        return finish_run(study_def, study, space, baselines, out_dir, storage_name, trade_off, t0, cache, workers,
                          progress, fp, method)


def stored_summary(out_dir: Path, study: Any, fingerprint: str, trials: int) -> dict | None:
    """The summary of a run that is already finished (budget spent, nothing added since, same study file and
    version), or None; a stored run with no answer raises its NoDesignError again."""
    import json

    from holeshape import __version__

    path = out_dir / "summary.json"
    if not path.exists() or len(finished(study)) < trials:
        return None
    try:
        d = json.loads(path.read_text())
    except (OSError, ValueError):
        return None
    if d.get("study_fingerprint") != fingerprint or d.get("trials_finished") != len(finished(study)) \
            or d.get("holeshape_version") != __version__ or not (out_dir / "report.html").exists():
        return None
    d["report"] = str(out_dir / "report.html")
    if d.get("outcome") == "no_design":
        raise NoDesignError(f"no design meets every requirement (a finished run: {path} and"
                            f" {out_dir / 'summary.txt'} say why and name the nearest misses)", d)
    return d


def _create_or_load(optuna: Any, name: str, storage: Any, directions: list[str]) -> tuple[Any, bool]:
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


def fail_stale(study: Any, storage: Any, name: str) -> None:
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


def _progress_bar(total: int, enabled: bool, label: str = "search") -> Any:
    from tqdm import tqdm

    return tqdm(total=total, disable=not enabled, unit="trial", desc=label, dynamic_ncols=True, leave=True,
                mininterval=0.5)


def _update(bar: Any, study: Any, goal: str = "lowest_peak") -> None:
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


def _run_workers(study_path: str, storage_url: str | None, out_dir: Path, name: str, workers: int, trade_off: bool,
                 total: int, progress: bool, goal: str = "lowest_peak", label: str = "search") -> None:
    import optuna

    bar = _progress_bar(total, progress, label)
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

