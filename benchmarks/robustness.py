"""Robustness figures: malformed studies per class, random draws inside searches of every family, random kills.

Run:  .venv/bin/python benchmarks/robustness.py [draws]   (default 2000 draws)
Prints, per class of bad input, the cases tried, the clear one-line errors (exit 2, field named) and the crashes;
for the random draws, how many ended complete, infeasible (with reason) or failed (with reason) and how many escaped
as crashes; for the kills, trials completed before each kill and trials lost.
"""

from __future__ import annotations

import contextlib
import io
import json
import os
import random
import signal
import subprocess
import sys
import tempfile
import time
from collections import Counter
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "tests"))

from hypothesis import HealthCheck, given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402
from robust_cases import CLASSES, to_toml  # noqa: E402

from holeshape.cli import main as cli  # noqa: E402


def malformed(per_class: int = 60) -> None:
    print("| bad input class | cases | one-line error naming the field, exit 2 | crashes or other exits |")
    print("|---|---|---|---|")
    total = Counter()
    for name, strategy in CLASSES.items():
        counts = Counter()

        @settings(max_examples=per_class, deadline=None, database=None,
                  suppress_health_check=list(HealthCheck))
        @given(case=strategy, command=st.sampled_from(["check", "optimise"]))
        def run(case, command):
            doc, field, fragment = case
            with tempfile.TemporaryDirectory() as tmp:
                p = Path(tmp) / "bad.toml"
                p.write_text(to_toml(doc))
                err, out = io.StringIO(), io.StringIO()
                try:
                    with contextlib.redirect_stderr(err), contextlib.redirect_stdout(out):
                        code = cli([command, str(p), "--out" if command == "optimise" else "--plots",
                                    str(Path(tmp) / "o")])
                except BaseException:  # noqa: BLE001 - counted as a crash
                    counts["crash"] += 1  # noqa: B023 - run() is called at once, in this loop pass
                    return
                lines = err.getvalue().strip().splitlines()
                ok = code == 2 and len(lines) == 1 and field in lines[0] and "Traceback" not in err.getvalue()
                counts["ok" if ok else "crash"] += 1  # noqa: B023 - as above

        run()
        tried = counts["ok"] + counts["crash"]
        total.update(counts)
        print(f"| {name} | {tried} | {counts['ok']} | {counts['crash']} |")
    print(f"| **all** | {total['ok'] + total['crash']} | {total['ok']} | {total['crash']} |\n")


def draws(n: int) -> None:
    import numpy as np
    from test_robustness import WIDE, _study

    from holeshape.search.runner import Objective
    from holeshape.search.space import DesignSpace
    from holeshape.studyfile import load_study

    rng = np.random.default_rng(1)
    states, crashes, reasons = Counter(), 0, Counter()
    t0 = time.perf_counter()
    with tempfile.TemporaryDirectory() as tmp:
        for i in range(n):
            family = list(WIDE)[i % len(WIDE)]
            s = load_study(_study(Path(tmp), family, trials=1))
            space = DesignSpace(s.cutout, s.constraints)
            try:
                rec = Objective(s, space)(space.from_unit(list(rng.random(len(space.dimensions)))))
            except BaseException:  # noqa: BLE001
                crashes += 1
                continue
            states[rec["state"]] += 1
            if rec["state"] != "complete":
                text = rec["user_attrs"].get("reason") or rec["user_attrs"].get("failure") or ""
                if not text:
                    crashes += 1
                reasons[text.split(" ")[0] if rec["state"] == "failed" else text.split(";")[0][:40]] += 1
    dt = time.perf_counter() - t0
    print(f"Random draws across all six families: {n} in {dt:.0f} s: {states['complete']} complete, "
          f"{states['infeasible']} infeasible with a reason, {states['failed']} failed with a reason, "
          f"{crashes} crashes or reasonless endings.\n")


def kills(times: int = 5) -> None:
    from test_robustness import _study, _trials

    rng = random.Random(3)
    with tempfile.TemporaryDirectory() as tmp:
        study = _study(Path(tmp), "ellipse", trials=40)
        out = Path(tmp) / "run"
        cmd = [sys.executable, "-m", "holeshape.cli", "optimise", str(study), "--out", str(out), "-q"]
        seen: dict = {}
        lost = 0
        done_before = []
        for _ in range(times):
            proc = subprocess.Popen(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, start_new_session=True)
            time.sleep(rng.uniform(1.0, 4.0))
            os.killpg(proc.pid, signal.SIGKILL)
            proc.wait()
            if not (out / "study.journal").exists():
                continue
            from holeshape.optimise import repair_journal

            repair_journal(out / "study.journal")
            now = {t.number: dict(t.params) for t in _trials(out) if t.state.name == "COMPLETE"}
            lost += sum(1 for k, v in seen.items() if now.get(k) != v)
            seen = now
            done_before.append(len(now))
        r = subprocess.run(cmd + ["--json"], capture_output=True, text=True)
        d = json.loads(r.stdout)
        final = {t.number: dict(t.params) for t in _trials(out) if t.state.name == "COMPLETE"}
        lost += sum(1 for k, v in seen.items() if final.get(k) != v)
        print(f"Kills (SIGKILL at random moments, {times} times, then one run to the end): completed trials before "
              f"each kill {done_before}; trials lost {lost}; final count {d['trials_completed'] + d['trials_failed']}"
              f" of 40; interrupted trials re-run {d['trials_interrupted']}.")


if __name__ == "__main__":
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 2000
    malformed()
    draws(n)
    kills()
