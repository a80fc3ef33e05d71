"""Reinforcement round a cutout: a formed flange (an edge member) or a doubler ring (a band of extra thickness).

Geometry only (numpy): sizes in mm, the outline of a ring's outer edge, cross-section and added volume. The
stiffness each kind adds is the solve and stability layers' business; they read it from here.

Idealisation (README "Reinforced openings"):
- ``flange``: a strip of ``height`` x ``thickness`` standing normal to the web along the whole cutout edge, fully
  effective, the bend radius not modelled. In plane it is an edge member carrying hoop force only (axial stiffness
  E A along the outline, A = height x thickness); out of plane it adds its bending stiffness about its own centroid.
- ``ring``: a doubler of ``width`` (normal to the outline) and ``thickness`` over the web, perfectly bonded (rivet
  rows, fastener flexibility and bond are not modelled): a region between the outline and its offset whose
  membrane stiffness is the web's plus the doubler's.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from holeshape.errors import GeometryError
from holeshape.geometry.base import Shape

KINDS = ("flange", "ring")
# a flange is formed by stretching the sheet round the hole: its free edge stretches by height / radius. The
# outline's smallest radius of curvature must be at least this many flange heights (a stretch of at most 25 %;
# common practice, no source). Concave parts of an outline are refused (the flange would have to shrink).
FLANGE_RADIUS_PER_HEIGHT = 4.0


@dataclass(frozen=True)
class Reinforcement:
    """Sizes of a reinforcement (mm) and its Young's modulus (MPa; None: the panel's material).

    ``kind`` "flange": ``height`` and ``thickness`` (None: the web's); ``kind`` "ring": ``width`` and ``thickness``.
    """

    kind: str
    height: float | None = None
    width: float | None = None
    thickness: float | None = None
    youngs_modulus: float | None = None

    def check(self) -> None:
        if self.kind not in KINDS:
            raise GeometryError(f"reinforcement.kind must be one of {', '.join(KINDS)}, got {self.kind!r}")
        need = ("height",) if self.kind == "flange" else ("width", "thickness")
        for name in need:
            v = getattr(self, name)
            if v is None or not math.isfinite(v) or v <= 0:
                raise GeometryError(f"reinforcement.{name} must be a finite number > 0 mm for a {self.kind},"
                                    f" got {v!r}")
        for name in ("thickness", "youngs_modulus"):
            v = getattr(self, name)
            if v is not None and (not math.isfinite(v) or v <= 0):
                raise GeometryError(f"reinforcement.{name} must be a finite number > 0, got {v!r}")

    def member_thickness(self, web_thickness: float) -> float:
        return float(self.thickness if self.thickness is not None else web_thickness)

    def modulus(self, panel_modulus: float) -> float:
        return float(self.youngs_modulus if self.youngs_modulus is not None else panel_modulus)

    def cross_section_mm2(self, web_thickness: float) -> float:
        """Area of the reinforcement's cross-section normal to the outline, mm^2 (height x thickness for a flange,
        width x thickness for a ring)."""
        size = self.height if self.kind == "flange" else self.width
        return float(size) * self.member_thickness(web_thickness)

    def parameters(self) -> dict[str, object]:
        out: dict[str, object] = {"kind": self.kind}
        for name in ("height", "width", "thickness", "youngs_modulus"):
            v = getattr(self, name)
            if v is not None:
                out[name] = float(v)
        return out


@dataclass(frozen=True)
class OffsetShape(Shape):
    """The outline ``base`` moved outward by ``distance`` (mm) along its normal: a ring's outer edge. Keeps the base
    family's parameterisation, so its symmetry points sit at the same curve parameters."""

    family = "offset"
    base: Shape = None  # type: ignore[assignment]
    distance: float = 0.0

    @property
    def symmetric_about_x(self) -> bool:  # type: ignore[override]
        return self.base.symmetric_about_x

    @property
    def symmetric_about_y(self) -> bool:  # type: ignore[override]
        return self.base.symmetric_about_y

    def local_xy(self, t: np.ndarray) -> np.ndarray:
        t = np.asarray(t, dtype=float)
        p = np.asarray(self.base.local_xy(t))
        d = 1e-6
        dp = (np.asarray(self.base.local_xy(t + d)) - np.asarray(self.base.local_xy(t - d))) / (2 * d)
        speed = np.hypot(dp[0], dp[1])
        # outward normal of a counter-clockwise curve: the tangent turned clockwise
        return p + self.distance * np.array([dp[1], -dp[0]]) / speed

    def parameters(self) -> dict[str, object]:
        return {"distance": self.distance}


def ring_outline(cutout, width: float):
    """The placed outer edge of a ring of ``width`` round ``cutout`` (a ``Cutout`` of an :class:`OffsetShape`).

    Raises :class:`GeometryError` when the offset would fold over itself (a concave part of the outline with a
    radius of curvature no larger than the width)."""
    from dataclasses import replace

    curv = cutout.sampling.curvature
    concave = curv[curv < 0]
    if concave.size and 1.0 / float(-concave.min()) <= width:
        raise GeometryError(
            f"reinforcement.width = {width:g} mm folds the ring over itself where the outline is concave (radius"
            f" {1.0 / float(-concave.min()):.3g} mm there); the width must be smaller than every concave radius")
    return replace(cutout, shape=OffsetShape(base=cutout.shape, distance=float(width)), reinforcement=None)


@dataclass(frozen=True)
class ReinforcedSizes:
    """What a reinforcement adds to a placed cutout: cross-section (mm^2), volume (mm^3), the ring's area over the
    web (mm^2, 0 for a flange) and the length of the edge it follows (mm)."""

    cross_section_mm2: float
    volume_mm3: float
    ring_area_mm2: float
    edge_length_mm: float

    def mass_kg(self, density: float | None) -> float | None:
        """Added mass for a density in kg/m^3 (None without one)."""
        return None if density is None else self.volume_mm3 * 1e-9 * density


def reinforced_sizes(cutout, web_thickness: float) -> ReinforcedSizes | None:
    r = cutout.reinforcement
    if r is None:
        return None
    perimeter = cutout.sampling.perimeter
    a = r.cross_section_mm2(web_thickness)
    if r.kind == "flange":
        return ReinforcedSizes(a, a * perimeter, 0.0, perimeter)
    outer = ring_outline(cutout, r.width)
    ring_area = outer.sampling.area - cutout.sampling.area
    return ReinforcedSizes(a, ring_area * r.member_thickness(web_thickness), ring_area, perimeter)


def check_formable(cutout) -> None:
    """A flange needs a convex outline whose radii are all at least FLANGE_RADIUS_PER_HEIGHT flange heights."""
    r = cutout.reinforcement
    if r is None or r.kind != "flange":
        return
    curv = cutout.sampling.curvature
    if np.any(curv < -1e-9):
        raise GeometryError(f"reinforcement.kind = \"flange\" needs a convex outline; this {cutout.family} is"
                            f" concave in places (radius {1.0 / float(-curv.min()):.3g} mm): use a ring instead")
    rmin = cutout.min_radius
    if rmin < FLANGE_RADIUS_PER_HEIGHT * r.height:
        raise GeometryError(
            f"reinforcement.height = {r.height:g} mm cannot be formed round a {rmin:.3g} mm radius of the outline:"
            f" every radius must be at least {FLANGE_RADIUS_PER_HEIGHT:g} x the flange height (a free-edge stretch"
            f" of at most 25 %), i.e. height <= {rmin / FLANGE_RADIUS_PER_HEIGHT:.3g} mm here")


__all__ = ["KINDS", "OffsetShape", "ReinforcedSizes", "Reinforcement", "check_formable", "reinforced_sizes",
           "ring_outline"]
