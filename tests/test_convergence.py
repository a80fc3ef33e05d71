"""Mesh convergence: observed rate of the boundary stress error, and the error estimate bracketing the true error.

Exact answers: Kirsch (1898) and Inglis (1913), see test_kirsch.py and test_inglis.py for the formulas.
"""

import numpy as np
import pytest
from conftest import ALUMINIUM, BIG, big_panel, centred, run

from holeshape.mesh import MeshSpec, Region, mesh_panel
from holeshape.solve import solve_panel


def test_observed_rate_of_the_boundary_stress_error():
    """Every size halved twice (uniform refinement of one mesh family): the largest hoop-stress error round the
    hole must fall at a rate of at least 1.5 (P2 stress converges like h^2 on the curved boundary; a polygonal
    boundary would stall near h^1)."""
    c = centred("circle", radius=10.0)
    region = Region(BIG, BIG, True, True)
    errors, sizes = [], []
    base = MeshSpec(boundary_ratio=8.0, growth=0.4, max_fraction=0.2, min_segments=32)
    for k in range(3):
        spec = base.coarsened(0.5**k)
        pm = mesh_panel(BIG, BIG, c, region, spec)
        sol = solve_panel(pm, ALUMINIUM.elastic, np.array([[100.0, 0, 0]]),
                          "traction", BIG, BIG)
        bs = sol.cutout
        theta = np.arctan2(bs.xy[1] - BIG / 2, bs.xy[0] - BIG / 2)
        exact = 100.0 * (1 - 2 * np.cos(2 * theta))  # Kirsch (1898)
        errors.append(np.abs(bs.hoop[:, 0] - exact).max())
        sizes.append(1.0 / spec.boundary_ratio)
    rate = np.polyfit(np.log(sizes), np.log(errors), 1)[0]
    assert rate >= 1.5, f"observed rate {rate:.2f}, errors {errors}"


@pytest.mark.parametrize("accuracy", ["draft", "standard", "fine"])
@pytest.mark.parametrize("case", ["kirsch shear", "inglis a/b=2 across", "inglis a/b=4 across", "inglis a/b=8 along"])
def test_error_estimate_brackets_the_true_error(accuracy, case):
    if case == "kirsch shear":
        c, load, exact = centred("circle", radius=10.0), (0.0, 0.0, 100.0), 400.0  # Kirsch: 4 t
    elif case == "inglis a/b=2 across":
        c, load, exact = centred("ellipse", a=10.0, b=5.0), (0.0, 100.0, 0.0), 500.0  # Inglis: 1 + 2a/b
    elif case == "inglis a/b=4 across":
        c, load, exact = centred("ellipse", a=10.0, b=2.5), (0.0, 100.0, 0.0), 900.0  # Inglis: 1 + 2a/b
    else:
        c, load, exact = centred("ellipse", a=10.0, b=1.25), (100.0, 0.0, 0.0), 125.0  # Inglis: 1 + 2b/a
    ev = run(c, load, panel=big_panel(), accuracy=accuracy, stress="hoop")
    true_pct = 100 * abs(ev.peak_stress_mpa / exact - 1)
    assert ev.error_estimate_pct >= true_pct
    # and it is not uselessly pessimistic: within the level's own target
    assert ev.error_estimate_pct <= ev.accuracy_target_pct
