"""Cost of a row of openings against one opening, measured in the same run (one opening is the baseline).

Run:  .venv/bin/python benchmarks/rows.py
The bundled floor-beam lightening row (five 50 mm holes at 160 mm in a 900 x 250 mm web, beam shear and bending),
standard accuracy, plane stress and then with the buckling check; best of 3 wall times and ratios.
"""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

from timing import best_of, with_buckling

from holeshape.evaluate import evaluate
from holeshape.study import Measure
from holeshape.studyfile import load_study

STUDY = Path(__file__).resolve().parents[1] / "studies" / "floor-beam-lightening-row.toml"


def main() -> None:
    study = load_study(STUDY)
    row = study.cutout.build()
    single = replace(row, row=None)
    print("| design | plane stress (s) | ratio | DOFs | with buckling (s) | ratio |")
    print("|---|---|---|---|---|---|")
    ref = {}
    m = Measure(study.measure.stress, "standard")
    for name, cut in (("one opening", single), (f"row of {row.count}", row)):
        t_ps, ev = best_of(lambda c=cut: evaluate(study.panel, study.material, study.load_cases, c, m))
        cache: dict = {}
        t_st, _ = best_of(lambda c=cut, k=cache: with_buckling(study, c, m, k))
        ref.setdefault("ps", t_ps)
        ref.setdefault("st", t_st)
        print(f"| {name} | {t_ps:.2f} | {t_ps / ref['ps']:.2f}x | {ev.dofs} | {t_st:.2f} | {t_st / ref['st']:.2f}x |")


if __name__ == "__main__":
    main()
