"""Peak stress at a circular lightening hole in a long flat bar, through the Python API.

An invented scenario: a 100 mm wide, 1000 mm long aluminium bar in 100 MPa tension with a 40 mm hole at mid-length.
Prints the peak, Kt and the error estimate, and compares Kt with Howland's finite-width value (3.74 at d/W = 0.4).
Run: .venv/bin/python examples/strip_with_hole.py
"""

from holeshape.checkrun import check_design
from holeshape.elastic import Isotropic
from holeshape.geometry import Circle, Cutout
from holeshape.study import LoadCase, Material, Measure, Panel, Study


def main() -> dict:
    bar = Panel(width=1000.0, height=100.0, thickness=3.0)
    alloy = Material(name="aluminium alloy bar", elastic=Isotropic(71000.0, 0.33), allowable_stress=300.0)
    hole = Cutout(Circle(radius=20.0), center=(500.0, 50.0))
    study = Study.of(bar, alloy, (LoadCase("axial tension", sigma_x=100.0),), hole,
                     measure=Measure("von_mises", "standard"), title="bar with a lightening hole")
    res = check_design(study)
    ev = res.evaluation
    margin = res.result("stress").margin_of_safety
    net = res.result("net_section")
    cut = net.sections[net.governing["axial tension"]]
    print(f"peak {ev.peak_stress_mpa:.2f} MPa, Kt {ev.kt:.3f} (Howland 3.74), error estimate "
          f"{ev.error_estimate_pct:.3f} %, {ev.model} model, {ev.dofs} DOFs, {ev.elapsed_s:.2f} s")
    print(f"net-section stress {cut.mean_normal_mpa:.1f} MPa across the {cut.net_length_mm:.0f} mm of web beside"
          f" the hole, margin of safety {margin:+.3f}; the verdict: "
          f"{'meets every requirement' if res.meets_every_requirement else 'misses a requirement'}")
    return {"kt": ev.kt, "error_estimate_pct": ev.error_estimate_pct, "margin": margin,
            "net_section_mpa": cut.mean_normal_mpa}


if __name__ == "__main__":
    main()
