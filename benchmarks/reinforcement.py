"""Cost of a reinforced opening against the bare one, measured in the same run (the bare opening is the baseline).

Run:  .venv/bin/python benchmarks/reinforcement.py
The bundled floor-beam study's 120 mm hole, standard accuracy: plane stress alone, then with the buckling check;
bare, with a formed flange, with a doubler ring. Prints a Markdown table of best-of-3 wall times and the ratios.
"""

from __future__ import annotations

from pathlib import Path

from timing import best_of, with_buckling

from holeshape.evaluate import evaluate
from holeshape.geometry import Flange, Ring
from holeshape.study import Measure
from holeshape.studyfile import load_study

STUDY = Path(__file__).resolve().parents[1] / "studies" / "floor-beam-flanged-access.toml"


def main() -> None:
    from dataclasses import replace

    study = load_study(STUDY)
    base = study.cutout.build()
    designs = {"bare": base.bare, "flange 11 mm": replace(base, reinforcement=Flange(height=11.0)),
               "ring 20 x 1.6 mm": replace(base, reinforcement=Ring(width=20.0, thickness=1.6))}
    print("| design | plane stress (s) | ratio | DOFs | with buckling (s) | ratio | buckling factor |")
    print("|---|---|---|---|---|---|---|")
    ref = {}
    for name, cut in designs.items():
        cache: dict = {}
        t_ps, ev = best_of(lambda c=cut: evaluate(study.panel, study.material, study.load_cases, c,
                                                  Measure(study.measure.stress, "standard")))
        t_st, st = best_of(lambda c=cut, k=cache: with_buckling(study, c, Measure(study.measure.stress, "standard"),
                                                                k))
        ref.setdefault("ps", t_ps)
        ref.setdefault("st", t_st)
        print(f"| {name} | {t_ps:.2f} | {t_ps / ref['ps']:.2f}x | {ev.dofs} | {t_st:.2f} | {t_st / ref['st']:.2f}x |"
              f" {st.load_factor:.3f} |")


if __name__ == "__main__":
    main()
