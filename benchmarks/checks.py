"""What each check of the seam costs beside the plane-stress evaluation it reads, on the bundled studies.

Run:  .venv/bin/python benchmarks/checks.py [draft|standard|fine]
Prints a Markdown table: per study, the evaluation's time (the baseline of the row, 1.00x) and each check's own time
as a ratio to it, then what a search trial adds (the checks it steers by, purpose "search") and what the final check
adds (every check). Best of three, one thread, the unperforated panel's buckling cached as in a run.
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

from timing import best_of

from holeshape.checks import CHECKS, Design, assess
from holeshape.evaluate import evaluate
from holeshape.study import Measure
from holeshape.studyfile import load_study

ROOT = Path(__file__).resolve().parents[1]
STUDIES = ("rib-web-check", "floor-beam-service-opening", "floor-beam-lightening-row", "floor-beam-flanged-access",
           "bulkhead-cable-transit")


def main(accuracy: str = "standard") -> None:
    print(f"| study ({accuracy}) | evaluation (s) | " + " | ".join(c.name for c in CHECKS)
          + " | search trial adds | final check adds |")
    print("|---|---|" + "---|" * len(CHECKS) + "---|---|")
    for name in STUDIES:
        study = load_study(ROOT / "studies" / f"{name}.toml")
        cut = study.cutout.build(study.cutout.nominal())
        m = Measure(study.measure.stress, accuracy)
        t_ev, ev = best_of(lambda s=study, c=cut, m=m: evaluate(s.panel, s.material, s.load_cases, c, m))
        cache: dict = {}
        assess(study, cut, ev, accuracy=accuracy, cache=cache)  # the unperforated panel, once per run
        cells = []
        for cls in CHECKS:
            design = Design(study=study, cutout=cut, evaluation=ev, accuracy=accuracy, cache=cache)
            check = cls()
            if not check.relevant(design):
                cells.append("-")
                continue
            t, _ = best_of(lambda k=check, d=design: k.run(d))
            cells.append(f"{t / t_ev:.2f}x")
        t_search, _ = best_of(lambda s=study, c=cut, e=ev, k=cache: assess(s, c, e, accuracy=accuracy, purpose="search",
                                                                           cache=k))
        t_final, _ = best_of(lambda s=study, c=cut, e=ev, k=cache: assess(s, c, e, accuracy=accuracy, cache=k))
        print(f"| {name} | {t_ev:.2f} (1.00x) | " + " | ".join(cells)
              + f" | {t_search / t_ev:.2f}x | {t_final / t_ev:.2f}x |")


if __name__ == "__main__":
    t0 = time.perf_counter()
    main(sys.argv[1] if len(sys.argv) > 1 else "standard")
    print(f"\n({time.perf_counter() - t0:.0f} s)")
