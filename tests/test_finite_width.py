"""Central circular hole in a strip under tension: Howland (1930) and the curve fit of Pilkey & Pilkey, Chart 4.1.

Sources: Howland, Phil. Trans. R. Soc. A 229 (1930) 49-86 (gross-section Kt, infinitely long strip); curve fit
from Pilkey & Pilkey, Peterson's Stress Concentration Factors, 3rd ed. (2008), Chart 4.1 (agrees with Howland to
~0.5 %). The strip is modelled 10 widths long, so the loaded ends are 5 widths from the hole.
Tolerance 1 %: Howland's table is given to 3 figures (up to 0.3 % in its last figure) and the curve fit agrees with
it to ~0.5 %; the mesh error at standard is under 0.05 %.
"""

import pytest
from conftest import ALUMINIUM

from holeshape.evaluate import evaluate
from holeshape.geometry import Circle, Cutout
from holeshape.study import LoadCase, Measure, Panel

WIDTH = 100.0
STRIP = Panel(width=10 * WIDTH, height=WIDTH, thickness=1.0)


def strip_kt(d_over_w: float) -> tuple[float, object]:
    c = Cutout(Circle(radius=d_over_w * WIDTH / 2), (STRIP.width / 2, STRIP.height / 2))
    ev = evaluate(STRIP, ALUMINIUM, (LoadCase("tension", sigma_x=100.0),), c, Measure("hoop", "standard"))
    return ev.peak_stress_mpa / 100.0, ev


@pytest.mark.parametrize("d_over_w,howland", [(0.2, 3.14), (0.3, 3.36), (0.4, 3.74), (0.5, 4.32)])
def test_howland_table(d_over_w, howland):
    kt, ev = strip_kt(d_over_w)
    assert ev.model == "quarter"
    assert kt == pytest.approx(howland, rel=0.01)  # Howland (1930) gross-section Kt, 1 % (see module docstring)
    fit_net = 2 + 0.284 * (1 - d_over_w) - 0.600 * (1 - d_over_w) ** 2 + 1.32 * (1 - d_over_w) ** 3
    assert kt * (1 - d_over_w) == pytest.approx(fit_net, rel=0.01)  # Chart 4.1 fit (Pilkey & Pilkey 2008), 1 %


def test_net_section_stress_is_equilibrium():
    # the mean stress across the two ligaments must carry the whole load: sigma_net = s W / (W - d) (statics)
    from conftest import checked

    c = Cutout(Circle(radius=0.4 * WIDTH / 2), (STRIP.width / 2, STRIP.height / 2))
    res = checked(c, [LoadCase("tension", sigma_x=100.0)], panel=STRIP, stress="hoop")
    net = res.result("net_section")
    assert net.ligament.width_mm == pytest.approx(30.0, rel=1e-9)
    cut = net.sections[net.governing["tension"]]
    assert cut.normal_deg == pytest.approx(0.0) and cut.net_length_mm == pytest.approx(60.0, rel=1e-6)
    # tolerance 0.3 %: Gauss quadrature of the FE stress across the ligament (coarser interior mesh)
    assert cut.mean_normal_mpa == pytest.approx(100.0 / 0.6, rel=3e-3)
    assert abs(cut.mean_shear_mpa) < 1e-3 * 100.0  # a symmetric strip in tension carries no net shear
