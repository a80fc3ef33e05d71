"""Contract tests over every shape family: closed, counter-clockwise, simple, area and radius against closed forms."""

import math

import numpy as np
import pytest
from shapely.geometry import Polygon

from holeshape.errors import GeometryError
from holeshape.geometry import FAMILIES, Circle, Cutout, Ellipse, RoundedRectangle, Slot, Spline, Superellipse

EXAMPLES = [
    Circle(radius=12.0),
    Ellipse(a=30.0, b=10.0),
    Superellipse(a=30.0, b=20.0, exponent=4.0),
    Superellipse(a=30.0, b=20.0, exponent=1.6),
    Slot(length=50.0, width=14.0),
    RoundedRectangle(a=40.0, b=25.0, corner_radius=8.0),
    Spline(radii=(20.0, 24.0, 18.0, 22.0, 20.0, 17.0), symmetry="none"),
    Spline(radii=(20.0, 26.0, 15.0), symmetry="xy"),
    Spline(radii=(20.0, 26.0, 15.0, 22.0), symmetry="x"),
]


def test_every_family_has_an_example():
    assert {s.family for s in EXAMPLES} == set(FAMILIES)


@pytest.mark.parametrize("shape", EXAMPLES, ids=lambda s: f"{s.family}")
def test_contract(shape):
    shape.check()
    pts = shape.boundary(400)
    assert pts.shape == (400, 2)
    poly = Polygon(pts)
    assert poly.is_valid, "outline must not cross itself"
    # counter-clockwise: positive signed area; tolerance: 400-point polygon vs the exact curve, chord error ~1e-4
    assert poly.exterior.is_ccw
    assert poly.area == pytest.approx(shape.area, rel=2e-3)
    # closes on itself: the last point is one arc-length step from the first
    step = np.hypot(*np.diff(pts, axis=0).T)
    assert np.hypot(*(pts[0] - pts[-1])) == pytest.approx(step.mean(), rel=0.05)


@pytest.mark.parametrize("shape,exact", [
    (Circle(radius=12.0), math.pi * 144),
    (Ellipse(a=30.0, b=10.0), math.pi * 300),
    # superellipse area 4ab Gamma(1+1/n)^2 / Gamma(1+2/n) (standard closed form; n = 4 gives 3.7081 ab)
    (Superellipse(a=30.0, b=20.0, exponent=4.0), 3.708149354602744 * 600),
    (Slot(length=50.0, width=14.0), math.pi * 49 + 36 * 14),
    (RoundedRectangle(a=40.0, b=25.0, corner_radius=8.0), 4000 - (4 - math.pi) * 64),
])
def test_sampled_area_matches_closed_form(shape, exact):
    # tolerance 1e-6: dense 8192-point sampling of the exact curve (chord error ~ perimeter^2 / n^2 / rho)
    assert shape.sampling.area == pytest.approx(exact, rel=1e-6)
    assert shape.area == pytest.approx(exact, rel=1e-12)


@pytest.mark.parametrize("shape,radius", [
    (Circle(radius=12.0), 12.0),
    (Ellipse(a=30.0, b=10.0), 10.0**2 / 30.0),  # b^2 / a at the end of the long axis
    (Slot(length=50.0, width=14.0), 7.0),
    (RoundedRectangle(a=40.0, b=25.0, corner_radius=8.0), 8.0),
])
def test_min_radius(shape, radius):
    # finite-difference curvature of the exact parameterisation: relative error ~1e-5 or better
    assert shape.sampling.min_radius == pytest.approx(radius, rel=1e-4)


def test_superellipse_exponent_two_is_the_ellipse():
    s = Superellipse(a=30.0, b=12.0, exponent=2.0)
    e = Ellipse(a=30.0, b=12.0)
    assert s.area == pytest.approx(e.area, rel=1e-12)
    assert s.sampling.min_radius == pytest.approx(e.min_radius, rel=1e-4)


@pytest.mark.parametrize("shape", [s for s in EXAMPLES if s.symmetric_about_x and s.symmetric_about_y],
                         ids=lambda s: s.family)
def test_axis_points_at_quarter_parameters(shape):
    """Doubly symmetric families put t = 0, pi/2, pi, 3pi/2 on the axes (reduced models rely on it)."""
    p = shape.local_xy(np.array([0.0, math.pi / 2, math.pi, 1.5 * math.pi]))
    assert np.allclose([p[1, 0], p[0, 1], p[1, 2], p[0, 3]], 0.0, atol=1e-9)
    assert p[0, 0] > 0 and p[1, 1] > 0 and p[0, 2] < 0 and p[1, 3] < 0


def test_rotation_and_symmetry_of_placement():
    c = Cutout(Ellipse(a=30.0, b=10.0), (100.0, 50.0), 90.0)
    x0, y0, x1, y1 = c.bounds
    assert (x1 - x0, y1 - y0) == pytest.approx((20.0, 60.0), rel=1e-6)
    assert c.panel_symmetry() == (True, True)
    assert Cutout(Ellipse(a=30.0, b=10.0), (0, 0), 30.0).panel_symmetry() == (False, False)
    assert Cutout(Spline((20.0, 26.0, 15.0, 22.0), "x"), (0, 0), 0.0).panel_symmetry() == (True, False)
    assert Cutout(Spline((20.0, 26.0, 15.0, 22.0), "x"), (0, 0), 90.0).panel_symmetry() == (False, True)


@pytest.mark.parametrize("shape,field", [
    (Circle(radius=-1.0), "cutout.radius"),
    (Ellipse(a=10.0, b=0.0), "cutout.b"),
    (Superellipse(a=10.0, b=5.0, exponent=1.2), "cutout.exponent"),
    (Slot(length=10.0, width=12.0), "cutout.length"),
    (RoundedRectangle(a=10.0, b=5.0, corner_radius=6.0), "cutout.corner_radius"),
    (Spline(radii=(10.0, 10.0, 1.0, 1.0, 10.0, 10.0, 10.0, 10.0), symmetry="none"), "cutout.radii"),  # r < 0: crosses
    (Spline(radii=(10.0, 12.0), symmetry="sideways"), "cutout.symmetry"),
])
def test_bad_parameters_name_the_field(shape, field):
    with pytest.raises(GeometryError, match=field.replace(".", r"\.")):
        shape.check()
