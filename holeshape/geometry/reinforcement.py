"""Reinforcement round a cutout: a formed flange (an edge member) or a doubler ring (a band of extra thickness).

Each kind is a frozen dataclass registered in :data:`REINFORCEMENTS` (the way ``FAMILIES`` holds the shape
families): its fields are the study-file keys of ``[reinforcement]``, and it answers, as numbers and outlines,
every question the lower layers ask (the mesh: an interior outline to follow; the solve: the stiffness of its region
and of an edge member; the plate: the bending of its region and of an edge beam; the evaluation: where its own
stress is read), so no layer switches on the kind. Adding a kind is one class here and one registry line.

Geometry only (numpy): sizes in mm, moduli MPa, the outline of a ring's outer edge, cross-section and added volume.

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
from dataclasses import dataclass, fields, replace
from typing import Any, ClassVar

import numpy as np

from holeshape.errors import GeometryError
from holeshape.geometry.base import Cutout, Shape

# a flange is formed by stretching the sheet round the hole: its free edge stretches by height / radius. The
# outline's smallest radius of curvature must be at least this many flange heights (a stretch of at most 25 %;
# common practice, no source). Concave parts of an outline are refused (the flange would have to shrink).
FLANGE_RADIUS_PER_HEIGHT = 4.0

# where a peak is looked for (location names in every output)
CUTOUT_EDGE = "cutout edge"
RING_EDGE = "web at the ring's outer edge"
FLANGE = "flange"
DOUBLER = "doubler at the cutout edge"


@dataclass(frozen=True)
class StressLocation:
    """A place whose stress the evaluation reads besides the cutout edge, and how: ``"interior_edge"`` the web's
    stress along the reinforcement's interior outline; ``"edge_member"`` the axial stress of a member bonded along
    the cutout edge (its strain is the web's along the edge; ``modulus`` MPa); ``"cutout_scaled"`` the cutout edge's
    stress times ``factor`` (a doubler of another modulus strained with the web)."""

    name: str
    source: str
    modulus: float = 0.0
    factor: float = 1.0


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


MODULUS_KEYS = ("youngs_modulus",)  # the values of [reinforcement] that are a modulus (MPa), not a size (mm)


def value_unit(name: str) -> str:
    """The unit of one value of [reinforcement]: MPa for a modulus, mm for every size."""
    return "MPa" if name in MODULUS_KEYS else "mm"


def value_text(name: str, value: float, digits: int = 1) -> str:
    """One value of [reinforcement] with its unit, for people (sizes to ``digits`` decimals, a modulus as given)."""
    return f"{value:g} MPa" if value_unit(name) == "MPa" else f"{value:.{digits}f} mm"


def values_text(values: dict[str, float], digits: int = 1) -> str:
    """The values of a reinforcement, named, each with its unit: "height 12.0 mm, thickness 1.6 mm"."""
    return ", ".join(f"{k.replace('_', ' ')} {value_text(k, v, digits)}" for k, v in values.items())


@dataclass(frozen=True)
class Reinforcement:
    """Base of the reinforcement kinds. ``thickness`` (mm; None: the web's where the kind allows it) and
    ``youngs_modulus`` (MPa; None: the web's) are common; each kind adds its own size. Every size field is a
    study-file key of ``[reinforcement]``."""

    kind: ClassVar[str] = ""
    required: ClassVar[tuple[str, ...]] = ()  # sizes that must be given
    description: ClassVar[str] = ""  # one line for the text summary
    idealisation: ClassVar[str] = ""  # the paragraph of the report
    edge_note: ClassVar[str] = "free"  # how the cutout edge is modelled out of plane
    drawing_layer: ClassVar[str | None] = None  # DXF layer of the interior outline, if the kind has one
    thickness: float | None = None
    youngs_modulus: float | None = None

    @classmethod
    def keys(cls) -> tuple[str, ...]:
        """The study-file keys of the kind: its own sizes first, then thickness and Young's modulus."""
        own = [f.name for f in fields(cls) if f.name not in ("thickness", "youngs_modulus")]
        return (*own, "thickness", "youngs_modulus")

    def check(self) -> None:
        for name in self.required:
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

    @property
    def size(self) -> float:
        """The kind's own size (flange height, ring width), mm."""
        raise NotImplementedError

    def cross_section_mm2(self, web_thickness: float) -> float:
        """Area of the reinforcement's cross-section normal to the outline, mm^2."""
        return float(self.size) * self.member_thickness(web_thickness)

    def parameters(self) -> dict[str, Any]:
        out: dict[str, Any] = {"kind": self.kind}
        for name in self.keys():
            v = getattr(self, name)
            if v is not None:
                out[name] = float(v)
        return out

    def scaled(self, factor: float, names: tuple[str, ...]) -> Reinforcement:
        """The same kind with the sizes ``names`` multiplied by ``factor`` (a stronger reinforcement for > 1)."""
        return replace(self, **{n: float(getattr(self, n)) * factor for n in names if getattr(self, n) is not None})

    # ----- what the lower layers ask (defaults: a kind that adds nothing of that sort) -----------------------------
    def interior_outline(self, cutout: Cutout) -> Cutout | None:
        """The placed outline the mesh must follow inside the web (the edge of the reinforced region), or None."""
        return None

    def region_stiffness_ratio(self, web_modulus: float, web_thickness: float) -> float:
        """Membrane stiffness of the reinforced region (inside :meth:`interior_outline`) over the web's alone."""
        return 1.0

    def region_bending_ratio(self, web_modulus: float, web_thickness: float) -> float:
        """Bending stiffness of the reinforced region over the web's alone."""
        return 1.0

    def edge_axial_stiffness(self, web_modulus: float, web_thickness: float) -> float:
        """E A of a member along the cutout edge over the web thickness, N/mm (0: none)."""
        return 0.0

    def edge_beam(self, web_modulus: float, web_thickness: float) -> tuple[float, float] | None:
        """(E I in N mm^2 bending out of the web's plane, E A in N) of a beam along the cutout edge, or None."""
        return None

    def stress_locations(self, web_modulus: float) -> tuple[StressLocation, ...]:
        """Where the reinforcement's own stress, or the web's beside it, is read (besides the cutout edge)."""
        return ()

    def check_on(self, cutout: Cutout) -> None:
        """Raise :class:`GeometryError` when the kind cannot be made on this outline."""

    def sizes(self, cutout: Cutout, web_thickness: float) -> ReinforcedSizes:
        raise NotImplementedError

    def label(self) -> str:
        """A short name with its size for plot legends."""
        return f"{self.kind} {self.size:.1f} mm"

    def drawing_note(self, web_thickness: float | None) -> str:
        """One line for the DXF's header comment and properties."""
        return self.label()


@dataclass(frozen=True)
class Flange(Reinforcement):
    """A formed flange of ``height`` (mm) standing on the cutout edge; ``thickness`` None: the web's."""

    kind: ClassVar[str] = "flange"
    required: ClassVar[tuple[str, ...]] = ("height",)
    description: ClassVar[str] = ("formed flange standing on the cutout edge (an edge member in plane, a beam out"
                                  " of plane)")
    idealisation: ClassVar[str] = (
        "A formed flange standing on the whole cutout edge, fully effective, the bend radius not modelled: in plane an"
        " edge member carrying hoop force (axial stiffness E A along the outline); out of plane a beam along the edge"
        " with the flange's own bending stiffness E t h^3 / 12 (the web's share ignored, which errs low) and its axial"
        " force in the geometric stiffness. Its own axial stress is one of the places the peak is looked for.")
    edge_note: ClassVar[str] = "free with its flange (a beam: the flange's own bending stiffness and axial force)"
    height: float | None = None

    @property
    def size(self) -> float:
        return float(self.height or 0.0)

    def edge_axial_stiffness(self, web_modulus: float, web_thickness: float) -> float:
        return self.modulus(web_modulus) * self.cross_section_mm2(web_thickness) / web_thickness

    def edge_beam(self, web_modulus: float, web_thickness: float) -> tuple[float, float] | None:
        """E t_f h^3 / 12 about the flange's own centroid, bending in its own plane (normal to the web along the
        edge; the web's share is ignored, which errs low), and E A."""
        e, t_f = self.modulus(web_modulus), self.member_thickness(web_thickness)
        assert self.height is not None  # a required size: check() refuses None
        return e * t_f * float(self.height) ** 3 / 12.0, e * self.cross_section_mm2(web_thickness)

    def stress_locations(self, web_modulus: float) -> tuple[StressLocation, ...]:
        return (StressLocation(FLANGE, "edge_member", modulus=self.modulus(web_modulus)),)

    def check_on(self, cutout: Cutout) -> None:
        """A flange needs a convex outline whose radii are all at least FLANGE_RADIUS_PER_HEIGHT flange heights."""
        curv = cutout.sampling.curvature
        if np.any(curv < -1e-9):
            raise GeometryError(f"reinforcement.kind = \"flange\" needs a convex outline; this {cutout.family} is"
                                f" concave in places (radius {1.0 / float(-curv.min()):.3g} mm): use a ring instead")
        rmin = cutout.min_radius
        assert self.height is not None  # a required size: check() refuses None
        if rmin < FLANGE_RADIUS_PER_HEIGHT * float(self.height):
            raise GeometryError(
                f"reinforcement.height = {self.height:g} mm cannot be formed round a {rmin:.3g} mm radius of the"
                f" outline: every radius must be at least {FLANGE_RADIUS_PER_HEIGHT:g} x the flange height (a"
                f" free-edge stretch of at most 25 %), i.e. height <= {rmin / FLANGE_RADIUS_PER_HEIGHT:.3g} mm here")

    def sizes(self, cutout: Cutout, web_thickness: float) -> ReinforcedSizes:
        perimeter = cutout.sampling.perimeter
        a = self.cross_section_mm2(web_thickness)
        return ReinforcedSizes(a, a * perimeter, 0.0, perimeter)

    def label(self) -> str:
        return f"flange {self.size:.1f} mm"

    def drawing_note(self, web_thickness: float | None) -> str:
        t = self.thickness if self.thickness is not None else web_thickness
        t_text = "the web's thickness" if t is None else f"{t:g} mm thick"
        return (f"formed flange {self.height:g} mm high, {t_text}, standing on the whole cutout edge (not drawn in the"
                " flat profile; the flat blank must allow for it)")


@dataclass(frozen=True)
class Ring(Reinforcement):
    """A doubler ring of ``width`` (mm, normal to the outline) and ``thickness`` (mm) bonded over the web."""

    kind: ClassVar[str] = "ring"
    required: ClassVar[tuple[str, ...]] = ("width", "thickness")
    description: ClassVar[str] = "doubler ring bonded over the web round the cutout"
    idealisation: ClassVar[str] = (
        "A doubler ring bonded over the web between the outline and its offset, perfectly bonded and of the web's "
        "Poisson's ratio: in plane the region's membrane stiffness is the web's plus the doubler's; out of plane the "
        "stack bends about its own neutral plane (one-sided doubler; the membrane-bending coupling is neglected). The "
        "peak is looked for at the cutout edge, in the doubler there (when its modulus differs from the web's) and in "
        "the web at the ring's outer edge.")
    edge_note: ClassVar[str] = "free, the doubler ring a thicker plate"
    drawing_layer: ClassVar[str | None] = "DOUBLER_OUTER_EDGE"
    width: float | None = None

    @property
    def size(self) -> float:
        return float(self.width or 0.0)

    def interior_outline(self, cutout: Cutout) -> Cutout | None:
        assert self.width is not None  # a required size: check() refuses None
        return ring_outline(cutout, float(self.width))

    def region_stiffness_ratio(self, web_modulus: float, web_thickness: float) -> float:
        return 1.0 + self.modulus(web_modulus) * self.member_thickness(web_thickness) / (web_modulus * web_thickness)

    def region_bending_ratio(self, web_modulus: float, web_thickness: float) -> float:
        """Bending stiffness of web plus a doubler on one face over the web's alone, about the stack's own neutral
        plane (the membrane-bending coupling of the eccentric doubler is neglected)."""
        e_r, t_r = self.modulus(web_modulus), self.member_thickness(web_thickness)
        t = web_thickness
        layers = [(web_modulus, t, 0.5 * t), (e_r, t_r, t + 0.5 * t_r)]
        z0 = sum(e * h * z for e, h, z in layers) / sum(e * h for e, h, _ in layers)
        d = sum(e * (h ** 3 / 12.0 + h * (z - z0) ** 2) for e, h, z in layers)
        return d / (web_modulus * t ** 3 / 12.0)

    def stress_locations(self, web_modulus: float) -> tuple[StressLocation, ...]:
        out = [StressLocation(RING_EDGE, "interior_edge")]
        e_r = self.modulus(web_modulus)
        if e_r != web_modulus:
            out.append(StressLocation(DOUBLER, "cutout_scaled", factor=e_r / web_modulus))
        return tuple(out)

    def sizes(self, cutout: Cutout, web_thickness: float) -> ReinforcedSizes:
        perimeter = cutout.sampling.perimeter
        a = self.cross_section_mm2(web_thickness)
        assert self.width is not None  # a required size: check() refuses None
        outer = ring_outline(cutout, float(self.width))
        ring_area = outer.sampling.area - cutout.sampling.area
        return ReinforcedSizes(a, ring_area * self.member_thickness(web_thickness), ring_area, perimeter)

    def label(self) -> str:
        return f"doubler ring {self.size:.1f} mm wide"

    def drawing_note(self, web_thickness: float | None) -> str:
        t = self.thickness if self.thickness is not None else web_thickness
        t_text = "the web's thickness" if t is None else f"{t:g} mm thick"
        return f"doubler ring {self.width:g} mm wide, {t_text}: outer edge on layer {self.drawing_layer}"


REINFORCEMENTS: dict[str, type[Reinforcement]] = {cls.kind: cls for cls in (Flange, Ring)}
KINDS = tuple(REINFORCEMENTS)


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

    def parameters(self) -> dict[str, Any]:
        return {"distance": self.distance}


def ring_outline(cutout: Cutout, width: float) -> Cutout:
    """The placed outer edge of a ring of ``width`` round ``cutout`` (a ``Cutout`` of an :class:`OffsetShape`).

    Raises :class:`GeometryError` when the offset would fold over itself (a concave part of the outline with a
    radius of curvature no larger than the width)."""
    curv = cutout.sampling.curvature
    concave = curv[curv < 0]
    if concave.size and 1.0 / float(-concave.min()) <= width:
        raise GeometryError(
            f"reinforcement.width = {width:g} mm folds the ring over itself where the outline is concave (radius"
            f" {1.0 / float(-concave.min()):.3g} mm there); the width must be smaller than every concave radius")
    return replace(cutout, shape=OffsetShape(base=cutout.shape, distance=float(width)), reinforcement=None)


def reinforced_sizes(cutout: Cutout, web_thickness: float) -> ReinforcedSizes | None:
    r = cutout.reinforcement
    return None if r is None else r.sizes(cutout, web_thickness)


def check_formable(cutout: Cutout) -> None:
    """Raise :class:`GeometryError` when the cutout's reinforcement cannot be made on its outline."""
    if cutout.reinforcement is not None:
        cutout.reinforcement.check_on(cutout)


__all__ = ["CUTOUT_EDGE", "DOUBLER", "FLANGE", "FLANGE_RADIUS_PER_HEIGHT", "KINDS", "REINFORCEMENTS", "RING_EDGE",
           "Flange", "OffsetShape", "ReinforcedSizes", "Reinforcement", "Ring", "StressLocation", "check_formable",
           "reinforced_sizes", "ring_outline"]
