"""Fatigue life at a lightening hole in a steel machine-bracket plate, through the Python API.

An invented scenario: a 12 mm steel plate, 600 x 400 mm, carries a working tension that comes and goes once per
machine cycle, 36 000 times an hour; a 30 mm radius lightening hole sits at its centre. The material curve below is
illustrative (Basquin with Goodman's mean-stress line); a real check takes it, the scatter factor and every
knock-down from the applicable code and approved data. Prints the hot spot, Kt, the life in hours, the fatigue
reserve factor, and Kirsch's hand value of the local stress range beside it.
Run: .venv/bin/python examples/bracket_fatigue.py
"""

from holeshape.checkrun import check_design
from holeshape.checks.fatigue import Block, FatigueSettings, State
from holeshape.elastic import Isotropic
from holeshape.fatigue import Curve
from holeshape.geometry import Circle, Cutout
from holeshape.study import LoadCase, Material, Measure, Panel, Study


def main() -> dict:
    plate = Panel(width=600.0, height=400.0, thickness=12.0)
    steel = Material(name="structural steel plate", elastic=Isotropic(210000.0, 0.3), allowable_stress=235.0)
    hole = Cutout(Circle(radius=30.0), center=(300.0, 200.0))
    working = LoadCase("working load", sigma_x=40.0)
    spectrum = FatigueSettings(
        unit="hour", required_life=40000.0, scatter_factor=2.0, method="stress_life", notch="none",
        notch_constant=None,
        curve=Curve("basquin", strength_coefficient=1000.0, exponent=-0.09, mean_stress="goodman",
                    ultimate_strength=510.0, surface_factor=0.8),
        blocks=(Block("machine cycle", State(), State((("working load", 1.0),)), 36000.0),))
    study = Study.of(plate, steel, (working,), hole, measure=Measure("von_mises", "standard"),
                     title="machine bracket with a lightening hole", tables={"fatigue": spectrum})
    res = check_design(study)
    f = res.result("fatigue")
    h = f.hot_spot
    print(f"hot spot ({h.x_mm:.1f}, {h.y_mm:.1f}) mm on the {h.opening}, Kt {h.kt:.3f}; local range"
          f" {f.blocks[0].range_mpa:.1f} MPa (Kirsch 3 S = 120 MPa, the plate's finite width adds a little)")
    life = "infinite" if f.life is None else f"{f.life:.3g} hours"
    print(f"life {life} against {spectrum.required_life:g} x {spectrum.scatter_factor:g} hours; fatigue reserve"
          f" factor {f.reserve_factor:.3f}; the verdict: "
          f"{'meets every requirement' if res.meets_every_requirement else 'misses a requirement'}")
    return {"kt": h.kt, "range_mpa": f.blocks[0].range_mpa, "life_h": f.life, "reserve": f.reserve_factor}


if __name__ == "__main__":
    main()
