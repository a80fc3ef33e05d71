"""Buckling of a thin web with a lightening hole, through the Python API.

An invented scenario: a 200 x 200 mm bay of a 1.2 mm aluminium floor web, simply supported at its edges, in shear of
10 MPa, with and without a 60 mm lightening hole. Prints the buckling load factors with their error estimates and
the shear buckling coefficient of the uncut bay beside the published 9.34 (Stein & Neff, simply supported square).
Run: .venv/bin/python examples/web_buckling.py
"""

from holeshape.checkrun import check_design
from holeshape.elastic import Isotropic
from holeshape.geometry import Circle, Cutout
from holeshape.stability import critical_stress_coefficient
from holeshape.study import LoadCase, Material, Measure, Panel, StabilitySettings, Study


def main() -> dict:
    web = Panel(width=200.0, height=200.0, thickness=1.2, edges="traction")
    alloy = Material(name="aluminium alloy sheet", elastic=Isotropic(71000.0, 0.33),
                     allowable_stress=250.0)
    shear = (LoadCase("floor shear", tau_xy=10.0),)
    hole = Cutout(Circle(radius=30.0), center=(100.0, 100.0))
    study = Study.of(web, alloy, shear, hole, measure=Measure("von_mises", "standard"), title="floor web bay",
                     stability=StabilitySettings("simply_supported", required_factor=1.5))
    res = check_design(study)
    ev, st = res.evaluation, res.result("stability").stability
    k_plain = critical_stress_coefficient(10.0 * st.unperforated_factor, 200.0, 1.2, 71000.0, 0.33)
    print(f"peak {ev.peak_stress_mpa:.1f} MPa (error estimate {ev.error_estimate_pct:.2f} %), margin "
          f"{res.result('stress').margin_of_safety:+.3f}")
    print(f"buckling load factor {st.load_factor:.3f} with the hole (error estimate {st.error_estimate_pct:.2g} %),"
          f" {st.unperforated_factor:.3f} without it (k = {k_plain:.3f}; Stein & Neff 9.34); reserve against the"
          f" required 1.5: {st.reserve:.3f}")
    return {"factor": st.load_factor, "unperforated": st.unperforated_factor, "k_plain": k_plain,
            "reserve": st.reserve}


if __name__ == "__main__":
    main()
