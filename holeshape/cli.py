"""Command line: ``holeshape check STUDY [--json] [--plots DIR]``.

``main(argv=None) -> int`` so tests call it in-process. Errors become one line on stderr and an exit code:
2 bad input (study file, geometry), 3 mesh or solver failure, 4 storage failure, 5 the search gives no answer (no
feasible design, a worker stopped), 1 anything unexpected (a bug: the message asks for a report), 130 Ctrl-C.
Tracebacks only with ``--debug``. The command line is the only place that sets process-wide state: logging levels
(ours, scikit-fem's, Optuna's) and matplotlib's non-interactive backend.
"""

from __future__ import annotations

import argparse
import json
import logging
import sys
import traceback
from pathlib import Path

from holeshape import CAUTIONS, __version__, cautions
from holeshape.errors import GeometryError, HoleshapeError, MeshError, SearchError, SolveError, StorageError, StudyError
from holeshape.study import ACCURACIES

EXIT_OK, EXIT_INTERNAL, EXIT_INPUT, EXIT_COMPUTE, EXIT_STORAGE, EXIT_SEARCH, EXIT_INTERRUPTED = 0, 1, 2, 3, 4, 5, 130
BUG_REPORT = ("this is a bug in holeshape, not in your study: please report it with the study file and the output of"
              " the same command with --debug; completed trials are kept and the run resumes")

EDGE_NOTES = {
    "traction": "remote stress applied as edge tractions",
    "displacement": "remote strain imposed on the panel edges",
    "beam": "edge tractions from the beam-theory stresses (and the remote stresses of any other case)",
}


def _parser() -> argparse.ArgumentParser:
    common = argparse.ArgumentParser(add_help=False)
    common.add_argument("--debug", action="store_true", help="show tracebacks on errors")
    common.add_argument("-v", "--verbose", action="store_true", help="log progress to stderr")
    common.add_argument("-q", "--quiet", action="store_true", help="print only the result")
    ap = argparse.ArgumentParser(prog="holeshape", description="Lowest-peak-stress cutouts in thin loaded plates "
                                 "(linear-elastic plane stress; mm, N, MPa).", parents=[common])
    ap.add_argument("--version", action="version", version=f"holeshape {__version__}")
    sub = ap.add_subparsers(dest="command", required=True, metavar="COMMAND")
    ck = sub.add_parser("check", parents=[common], help="verified peak stress of the study's cutout",
                        description="Peak stress on the cutout edge for every load case, with a mesh-convergence "
                        "error estimate.")
    ck.add_argument("study", help="study file (TOML)")
    ck.add_argument("--json", action="store_true", help="machine-readable result on stdout")
    ck.add_argument("--plots", metavar="DIR", help="write PNG plots to DIR")
    ck.add_argument("--accuracy", choices=ACCURACIES, help="override [measure] accuracy")
    op = sub.add_parser("optimise", aliases=["optimize"], parents=[common],
                        help="search the cutout ranges for the lowest peak stress under the constraints",
                        description="Runs or resumes a shape search; writes best.dxf, best.csv, summary.json and "
                        "plots to --out.")
    op.add_argument("study", help="study file (TOML) with ranges in [cutout]")
    op.add_argument("--out", help="run folder (default: runs/<study file name>)")
    op.add_argument("--workers", type=int, default=1, help="worker processes on this machine (default 1)")
    op.add_argument("--storage", metavar="URL", help="database URL shared by workers on several machines, e.g. "
                    "postgresql://user@host/db (default: a journal file in --out)")
    op.add_argument("--trade-off", action="store_true", help="two objectives: peak stress down, removed area up")
    op.add_argument("--json", action="store_true", help="summary on stdout as JSON")
    cp = sub.add_parser("compare", parents=[common], help="best of every shape family under the same constraints",
                        description="Runs the search for circle, ellipse, rounded rectangle, slot, superellipse and "
                        "spline with the study's constraints and load cases, ranks them and writes report.html.")
    cp.add_argument("study", help="study file (TOML)")
    cp.add_argument("--out", help="run folder (default: runs/<study file name>-compare)")
    cp.add_argument("--workers", type=int, default=1, help="worker processes per search (default 1)")
    cp.add_argument("--json", action="store_true", help="ranking on stdout as JSON")
    sw = sub.add_parser("sweep", parents=[common], help="peak stress, Kt and area over a grid of one or two parameters",
                        description="Evaluates the study's design with one parameter (or two) varied over a grid; "
                        "writes sweep.json, sweep.png and report.html.")
    sw.add_argument("study", help="study file (TOML)")
    sw.add_argument("--vary", action="append", required=True, metavar="NAME=LOW:HIGH:COUNT",
                    help="parameter to vary, e.g. b=20:60:9 (give twice for a 2-D map)")
    sw.add_argument("--out", help="run folder (default: runs/<study file name>-sweep)")
    sw.add_argument("--json", action="store_true", help="points on stdout as JSON")
    rp = sub.add_parser("report", parents=[common], help="(re)build the reviewer's report from a finished run",
                        description="Builds report.html (self-contained) or report.md from a run folder's stored "
                        "results, without solving.")
    rp.add_argument("run", help="run folder (the --out of optimise)")
    rp.add_argument("--format", choices=("html", "markdown"), default="html")
    return ap


def main(argv: list[str] | None = None) -> int:
    args = _parser().parse_args(argv)
    level = logging.DEBUG if args.verbose else logging.WARNING
    logging.basicConfig(level=level, format="holeshape: %(message)s", stream=sys.stderr)
    logging.getLogger("skfem").setLevel(logging.ERROR)  # its info/warnings are not for our users
    import os

    os.environ.setdefault("MPLBACKEND", "Agg")  # the command line draws to files only
    try:
        if args.command == "check":
            return _check(args)
        if args.command in ("optimise", "optimize"):
            return _optimise(args)
        if args.command == "compare":
            return _compare(args)
        if args.command == "sweep":
            return _sweep(args)
        if args.command == "report":
            from holeshape.output.report import build_report

            print(build_report(args.run, args.format))
            return 0
        raise AssertionError(args.command)
    except (StudyError, GeometryError) as err:
        return _fail(args, err, EXIT_INPUT)
    except (MeshError, SolveError) as err:
        return _fail(args, err, EXIT_COMPUTE)
    except StorageError as err:
        return _fail(args, err, EXIT_STORAGE)
    except SearchError as err:
        return _fail(args, err, EXIT_SEARCH)
    except HoleshapeError as err:
        return _fail(args, err, EXIT_COMPUTE)
    except KeyboardInterrupt:
        print("holeshape: interrupted (completed trials are kept; run the same command again to resume)",
              file=sys.stderr)
        return EXIT_INTERRUPTED
    except Exception as err:  # noqa: BLE001 - the one place that turns surprises into one line
        return _fail(args, err, EXIT_INTERNAL, internal=True)


def _fail(args: argparse.Namespace, err: BaseException, code: int, internal: bool = False) -> int:
    if args.debug:
        traceback.print_exc()
    msg = " ".join(str(err).split()) or type(err).__name__
    if internal:
        msg = f"internal error ({type(err).__name__}): {msg}; {BUG_REPORT}"
    print(f"holeshape: error: {msg}", file=sys.stderr)
    return code


def _check(args: argparse.Namespace) -> int:
    from holeshape.checkrun import run_check

    res = run_check(args.study, accuracy=args.accuracy, plots=args.plots)
    if args.json:
        print(json.dumps(res.to_dict(), indent=2))
        return 0
    from holeshape.output.text import check_summary

    ev = res.evaluation
    if not args.quiet:
        note = EDGE_NOTES["beam" if any(lc.is_beam for lc in res.study.load_cases) else res.study.panel.edges]
        print(check_summary(res, note))
        for p in res.plots:
            print(f"  plot          {p}")
    else:
        line = f"{ev.peak_stress_mpa:.3f} MPa (Kt {ev.kt:.4f}, error estimate {ev.error_estimate_pct:.3f} %)"
        from holeshape.checks.stability import BucklingResult

        st = res.result("stability")
        if isinstance(st, BucklingResult):
            f = st.stability.load_factor
            line += ("; does not buckle" if f is None else
                     f"; buckling factor {f:.3f} (error estimate {st.stability.error_estimate_pct:.2g} %)")
        print(line)
    for w in res.study.warnings:
        print(f"holeshape: warning: {w}", file=sys.stderr)
    return 0


def _run_folder(args: argparse.Namespace, suffix: str) -> str:
    """--out, or runs/<study file name><suffix> with the name made safe as a folder name."""
    from holeshape.output.files import safe_name

    return args.out or str(Path("runs") / (safe_name(Path(args.study).stem) + suffix))


def _sweep(args: argparse.Namespace) -> int:
    from holeshape.sweep import run_sweep

    out = _run_folder(args, "-sweep")
    res = run_sweep(args.study, out, args.vary, progress=not args.quiet)
    if args.json:
        print(json.dumps(res, indent=2))
        return 0
    from holeshape.output.text import sweep_lines

    print("\n".join(sweep_lines(res)))
    print(f"  report        {res['report']}")
    fatigue = any("fatigue_reserve_factor" in p for p in res.get("points", []))
    print("\n  CAUTION: " + cautions("required_buckling_factor" in res, fatigue_computed=fatigue))
    return 0


def _compare(args: argparse.Namespace) -> int:
    from holeshape.compare import run_compare

    _quiet_optuna(args)
    out = _run_folder(args, "-compare")
    top = run_compare(args.study, out, workers=args.workers, progress=not args.quiet)
    if args.json:
        print(json.dumps({"comparison": top["comparison"], "best": top["best"], "report": top["report"]}, indent=2))
        return 0
    print(f"holeshape compare: {top['study']}")
    for r in top["comparison"]:
        if r["feasible"]:
            vs = "" if r.get("against_circle") is None else f"; {r['against_circle']}"
            buck = "" if r.get("buckling_load_factor") is None else f", buckling factor {r['buckling_load_factor']:.3f}"
            print(f"  {r['rank']}. {r['shape']:<18} {r['peak_stress_mpa']:8.2f} MPa, Kt {r['kt']:.3f},"
                  f" area {r['area_mm2']:.0f} mm^2{buck}{vs}")
        else:
            print(f"  -  {r['shape']:<18} no feasible design: {r['reason']}")
    print(f"  report        {top['report']}")
    print("\n  CAUTION: " + top.get("cautions", CAUTIONS))
    return 0


def _quiet_optuna(args: argparse.Namespace) -> None:
    """Optuna configures its own logger on import (level INFO): set ours after it is imported."""
    import optuna

    optuna.logging.set_verbosity(optuna.logging.DEBUG if args.verbose else optuna.logging.WARNING)


def _optimise(args: argparse.Namespace) -> int:
    from holeshape.optimise import run_optimise

    _quiet_optuna(args)
    out = _run_folder(args, "")
    from holeshape.errors import NoDesignError
    from holeshape.output.text import optimise_summary
    from holeshape.record import RunRecord

    try:
        summary = run_optimise(args.study, out, workers=args.workers, storage_url=args.storage,
                               trade_off=args.trade_off, progress=not args.quiet)
    except NoDesignError as err:  # the run's own account of why, then the one-line error and exit code 5
        if err.summary:
            print(json.dumps(err.summary, indent=2) if args.json else optimise_summary(RunRecord.from_summary(
                err.summary)))
        raise
    if args.json:
        print(json.dumps(summary, indent=2))
        return 0
    print(optimise_summary(RunRecord.from_summary(summary)))
    return 0


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
