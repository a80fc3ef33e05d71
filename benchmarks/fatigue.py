"""What the fatigue check costs: beside the plane-stress evaluation it reads (the check at standard, the baseline
1.00x measured in the same run), and the rainflow counting of a long sequence.

Run:  .venv/bin/python benchmarks/fatigue.py
Prints: for the bundled fatigue study, the evaluation's time, the check with and without the fatigue assessment
and the ratio; then the time to count a sequence of 10^5 load states at one point (ASTM E1049-85, the rainflow
package) and to assess a sequence study of 10^5 states. Best of three.
"""

from __future__ import annotations

import time
from dataclasses import replace
from pathlib import Path

import numpy as np
from timing import best_of

from holeshape.checks import assess
from holeshape.evaluate import evaluate
from holeshape.fatigue import closed_loop, rainflow_cycles
from holeshape.study import Measure
from holeshape.studyfile import load_study

ROOT = Path(__file__).resolve().parents[1]


def main() -> None:
    study = load_study(ROOT / "studies" / "rib-web-fatigue.toml")
    bare = replace(study, tables=tuple((k, v) for k, v in study.tables if k != "fatigue"),
                   constraints=replace(study.constraints, more=()))
    cut = study.cutout.build(study.cutout.nominal())
    m = Measure(study.measure.stress, "standard")
    t_ev, ev = best_of(lambda: evaluate(study.panel, study.material, study.load_cases, cut, m))
    t_without, _ = best_of(lambda: assess(bare, cut, ev, accuracy="standard"), n=9)
    t_with, _ = best_of(lambda: assess(study, cut, ev, accuracy="standard"), n=9)
    base = t_ev + t_without
    print("| what (rib-web-fatigue, standard) | time (s) | ratio |")
    print("|---|---|---|")
    print(f"| check without [fatigue]: evaluation + every other check (baseline) | {base:.3f} | 1.00x |")
    print(f"| check with [fatigue] (blocks; the second level's reassessment included) | {t_ev + t_with:.3f} |"
          f" {(t_ev + t_with) / base:.3f}x (the fatigue assessment alone {1000 * (t_with - t_without):+.0f} ms) |")
    rng = np.random.default_rng(1)
    seq = np.cumsum(rng.normal(size=100_000))
    t_rf, cycles = best_of(lambda: rainflow_cycles(closed_loop(seq).tolist()))
    print(f"| rainflow count of 10^5 states at one point ({len(cycles)} cycles) | {t_rf:.3f} | - |")
    import tempfile

    from holeshape.studyfile import parse_study

    text = (ROOT / "studies" / "rib-web-fatigue.toml").read_text()
    with tempfile.TemporaryDirectory() as tmp:
        f = Path(tmp) / "seq.csv"
        g = rng.normal(size=100_000)
        f.write_text("1g flight,gust increment\n" + "\n".join(f"1.0,{x:.4f}" for x in g) + "\n")
        head, tail = text.split("[[fatigue.block]]", 1)
        seq_text = head.replace("[fatigue.curve]", f'sequence = "{f}"\n[fatigue.curve]')
        import tomllib

        s2 = parse_study(tomllib.loads(seq_text), source=str(Path(tmp) / "s.toml"))
        t_seq, _ = best_of(lambda: assess(s2, cut, ev, accuracy="standard"))
        print(f"| check with a sequence of 10^5 states (8 points counted per outline, 4 on the second level) |"
              f" {t_ev + t_seq:.3f} | {(t_ev + t_seq) / base:.2f}x |")
        # strain-life on a flight-like sequence of 2000 states (Neuber and Masing with memory at every counted point
        # and at every step of the reserve's root finder)
        f.write_text("1g flight,gust increment\n" + "\n".join(f"1.0,{x:.4f}" for x in g[:2000]) + "\n")
        sl_text = seq_text.replace('unit = "flight"', 'unit = "flight"\nmethod = "strain_life"').replace(
            "surface_factor = 0.85", "ductility_coefficient = 0.35\nductility_exponent = -0.65").replace(
            'mean_stress = "goodman"', 'mean_stress = "morrow"').replace("ultimate_strength = 540.0", "") + (
            "\n[fatigue.cyclic]\nstrength_coefficient = 700.0\nhardening_exponent = 0.07\n")
        s3 = parse_study(tomllib.loads(sl_text), source=str(Path(tmp) / "s.toml"))
        t_sl, _ = best_of(lambda: assess(s3, cut, ev, accuracy="standard"), n=1)
        print(f"| check with strain-life on a sequence of 2000 states | {t_ev + t_sl:.3f} |"
              f" {(t_ev + t_sl) / base:.2f}x |")


if __name__ == "__main__":
    t0 = time.perf_counter()
    main()
    print(f"\n({time.perf_counter() - t0:.0f} s)")
