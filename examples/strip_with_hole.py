"""Peak stress at a circular lightening hole in a long flat bar, through the Python API.

An invented scenario: a 100 mm wide, 1000 mm long aluminium bar in 100 MPa tension with a 40 mm hole at mid-length.
Prints the peak, Kt and the error estimate, and compares Kt with Howland's finite-width value (3.74 at d/W = 0.4).
Run: .venv/bin/python examples/strip_with_hole.py
"""

from holeshape.evaluate import evaluate
from holeshape.geometry import Circle, Cutout
from holeshape.study import LoadCase, Material, Measure, Panel


def main() -> dict:
    bar = Panel(width=1000.0, height=100.0, thickness=3.0)
    alloy = Material(name="aluminium alloy bar", youngs_modulus=71000.0, poisson_ratio=0.33, allowable_stress=300.0)
    hole = Cutout(Circle(radius=20.0), center=(500.0, 50.0))
    ev = evaluate(bar, alloy, (LoadCase("axial tension", sigma_x=100.0),), hole, Measure("von_mises", "standard"))
    print(f"peak {ev.peak_stress_mpa:.2f} MPa, Kt {ev.kt:.3f} (Howland 3.74), error estimate "
          f"{ev.error_estimate_pct:.3f} %, {ev.model} model, {ev.dofs} DOFs, {ev.elapsed_s:.2f} s")
    print(f"net-section stress {ev.load_cases[0].net_section_stress_mpa:.1f} MPa across the {ev.ligament.width_mm:.0f}"
          f" mm ligament, margin of safety {ev.margin_of_safety:+.3f}")
    return {"kt": ev.kt, "error_estimate_pct": ev.error_estimate_pct, "margin": ev.margin_of_safety}


if __name__ == "__main__":
    main()
