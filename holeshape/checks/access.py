"""The access envelope the opening must clear, with its clearance (mm). Geometry only: shapely's containment and
distance on the outline sampled at 720 points, the chord sag of that sampling granted."""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np

from holeshape.checks.base import Check, CheckResult, Design, requirement

if TYPE_CHECKING:
    from holeshape.geometry import Cutout
    from holeshape.study import Constraints, Study

ADVICE = "to clear the access envelope: a larger opening round it, or search within the ranges"


def access_margin(cutout: Cutout, cons: Constraints, poly: Any = None) -> float:
    """Signed margin (mm) by which the outline clears the access envelope grown by the clearance:
    >= 0 the envelope is inside with that much to spare; < 0 the envelope pokes out by that much."""
    from shapely.geometry import Point, Polygon

    poly = poly if poly is not None else Polygon(cutout.polygon(720))
    assert cons.access is not None  # the check applies with an access envelope only
    env = cons.access.polygon(cutout.center, cons.clearance)
    if poly.contains(env):
        return float(poly.exterior.distance(env))
    ring = np.asarray(env.exterior.coords)
    return -max(float(poly.distance(Point(*p))) for p in ring)


def access_tolerance(cutout: Cutout, n: int = 720) -> float:
    """How far (mm) the ``n``-gon of an outline falls inside the curve between its vertices (the chord sagitta on
    the smallest radius): an envelope touching the true outline is accepted to this much."""
    perimeter = cutout.sampling.perimeter
    return (perimeter / n) ** 2 / (8.0 * max(cutout.min_radius, 1e-9))


@dataclass(frozen=True, kw_only=True)
class AccessResult(CheckResult):
    """The clearance between the outline and the access envelope (mm; negative where the envelope pokes out)."""

    check = "access"
    clearance_mm: float
    required_clearance_mm: float


class AccessCheck(Check):
    name = "access"
    title = "Access"
    stage = "geometry"

    @classmethod
    def applies(cls, study: Study) -> bool:
        return study.constraints.access is not None

    def run(self, design: Design) -> AccessResult:
        cutout, cons = design.cutout, design.study.constraints
        m = access_margin(cutout, cons)
        tol = access_tolerance(cutout)
        size = math.sqrt(max(cutout.area, 1e-12))
        req = requirement("access", "clearance round the access envelope", m + cons.clearance, cons.clearance, ">=",
                          scale=size, unit="mm", advice=ADVICE, check=self.name, tolerance=tol,
                          reason=f"the access envelope (with {cons.clearance:g} mm clearance) pokes out by"
                                 f" {-(m + tol):.3g} mm")
        return AccessResult(requirements=(req,), clearance_mm=m + cons.clearance,
                            required_clearance_mm=cons.clearance)

    @classmethod
    def linear_rows(cls, study: Study, cutout: Cutout) -> np.ndarray | None:
        """The access envelope's points inside the outline, radially (an outline star-shaped about its centre, as
        the free-form spline is), in outline sizes."""
        if not hasattr(cutout.shape, "radius_at"):
            return None
        import shapely

        cons = study.constraints
        assert cons.access is not None  # the check applies with an access envelope only
        size = math.sqrt(max(cutout.area, 1e-12))
        env = cons.access.polygon(cutout.center, cons.clearance)
        q = np.asarray(shapely.segmentize(env, max(env.length / 128.0, 1e-9)).exterior.coords).T
        c, s = math.cos(math.radians(cutout.rotation)), math.sin(math.radians(cutout.rotation))
        dx, dy = q[0] - cutout.center[0], q[1] - cutout.center[1]
        lx, ly = c * dx + s * dy, -s * dx + c * dy
        r = cutout.shape.radius_at(np.mod(np.arctan2(ly, lx), 2 * math.pi))
        return (np.hypot(lx, ly) - r) / size
