"""The contract every cutout shape family meets, and the placed cutout (shape + centre + rotation).

All lengths in mm, angles in the public API in degrees. A family describes its boundary in its own frame as a closed
counter-clockwise curve ``local_xy(t)`` for ``t`` in [0, 2 pi). Families symmetric about their own axes put
``t = 0, pi/2, pi, 3 pi/2`` on the +x, +y, -x and -y axes, which lets the mesh layer cut out exact quarter or
half boundaries for reduced models.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass, field
from functools import cached_property
from typing import TYPE_CHECKING, Any, ClassVar

import numpy as np

from holeshape.errors import GeometryError

if TYPE_CHECKING:
    from holeshape.geometry.reinforcement import Reinforcement

TWO_PI = 2.0 * math.pi


@dataclass(frozen=True)
class Shape:
    """Base class of the shape families. Subclasses are frozen dataclasses whose fields are the shape parameters."""

    family: ClassVar[str] = ""
    #: mirror symmetry of the family about its own x axis (y -> -y) and y axis (x -> -x)
    symmetric_about_x: ClassVar[bool] = True
    symmetric_about_y: ClassVar[bool] = True

    def local_xy(self, t: np.ndarray) -> np.ndarray:
        """Boundary points in the shape's own frame, array (2, len(t)), counter-clockwise in t."""
        raise NotImplementedError

    def check(self) -> None:
        """Raise :class:`GeometryError` naming ``cutout.<param>`` when a parameter breaks the family's rules."""

    def exact_area(self) -> float | None:
        """Closed-form area in mm^2 where one exists (the contract tests compare it with the sampled area)."""
        return None

    def parameters(self) -> dict[str, Any]:
        """The family's parameters by their study-file names."""
        from dataclasses import fields

        return {f.name: getattr(self, f.name) for f in fields(self)}

    # ----- derived quantities, computed from a dense sampling of the boundary -------------------------------
    @cached_property
    def sampling(self) -> BoundarySampling:
        return BoundarySampling.of(self.local_xy)

    @property
    def area(self) -> float:
        exact = self.exact_area()
        return float(exact) if exact is not None else self.sampling.area

    @property
    def min_radius(self) -> float:
        """Smallest radius of curvature on the boundary, mm (0 for a curvature singularity)."""
        return self.sampling.min_radius

    def boundary(self, n: int = 256) -> np.ndarray:
        """``n`` points spaced evenly in arc length, array (n, 2), counter-clockwise, not repeating the first."""
        return self.sampling.even_points(n).T

    @property
    def bounds(self) -> tuple[float, float, float, float]:
        p = self.sampling.points
        return float(p[0].min()), float(p[1].min()), float(p[0].max()), float(p[1].max())


@dataclass(frozen=True)
class BoundarySampling:
    """A dense sampling of a closed parametric curve: points, arc length and curvature.

    ``t`` (n,) parameter values in [0, 2 pi); ``points`` (2, n); ``s`` (n + 1,) cumulative arc length with the
    closing segment, ``curvature`` (n,) signed (positive where a counter-clockwise boundary is convex).
    Curvature comes from central differences of the exact parameterisation (step 1e-5 in t, relative error ~1e-7),
    which is ample for mesh sizing and the min-radius figure.
    """

    t: np.ndarray
    points: np.ndarray
    s: np.ndarray
    curvature: np.ndarray
    xy: Callable[[np.ndarray], np.ndarray] = field(repr=False, compare=False)

    @classmethod
    def of(cls, xy: Callable[[np.ndarray], np.ndarray], n: int = 8192) -> BoundarySampling:
        t = np.linspace(0.0, TWO_PI, n, endpoint=False)
        p = np.asarray(xy(t), dtype=float)
        d = 1e-5
        pp, pm = np.asarray(xy(t + d)), np.asarray(xy(t - d))
        d1 = (pp - pm) / (2 * d)
        d2 = (pp - 2 * p + pm) / (d * d)
        speed = np.hypot(d1[0], d1[1])
        with np.errstate(divide="ignore", invalid="ignore"):
            kappa = (d1[0] * d2[1] - d1[1] * d2[0]) / speed**3
        closed = np.concatenate([p, p[:, :1]], axis=1)
        seg = np.hypot(*np.diff(closed, axis=1))
        s = np.concatenate([[0.0], np.cumsum(seg)])
        return cls(t=t, points=p, s=s, curvature=np.nan_to_num(kappa, nan=0.0, posinf=1e12, neginf=-1e12), xy=xy)

    @property
    def perimeter(self) -> float:
        return float(self.s[-1])

    @property
    def area(self) -> float:
        # trapezoidal shoelace on a dense periodic sampling: spectrally accurate for smooth curves
        x, y = self.points
        return float(0.5 * np.sum(x * np.roll(y, -1) - np.roll(x, -1) * y))

    @property
    def min_radius(self) -> float:
        k = np.abs(self.curvature).max()
        return float(1.0 / k) if k > 0 else math.inf

    def t_at_arclength(self, s: np.ndarray) -> np.ndarray:
        """Parameter values at arc-length positions ``s`` (mm, may exceed one perimeter)."""
        s = np.asarray(s, dtype=float)
        turns = np.floor(s / self.perimeter)
        tt = np.concatenate([self.t, [TWO_PI]])
        return np.interp(s - turns * self.perimeter, self.s, tt) + turns * TWO_PI

    def arclength_at_t(self, t: np.ndarray) -> np.ndarray:
        t = np.asarray(t, dtype=float)
        turns = np.floor(t / TWO_PI)
        tt = np.concatenate([self.t, [TWO_PI]])
        return np.interp(t - turns * TWO_PI, tt, self.s) + turns * self.perimeter

    def even_points(self, n: int) -> np.ndarray:
        s = np.linspace(0.0, self.perimeter, n, endpoint=False)
        return np.asarray(self.xy(self.t_at_arclength(s)))


def quadrant_mirror(quarter: Callable[[np.ndarray], tuple[np.ndarray, np.ndarray]], t: np.ndarray) -> np.ndarray:
    """Build a doubly symmetric closed curve from its first-quadrant arc.

    ``quarter(u)`` maps u in [0, 1] from a point on the +x axis to a point on the +y axis. Returns (2, n).
    """
    t = np.mod(np.asarray(t, dtype=float), TWO_PI)
    k = np.minimum((t // (math.pi / 2)).astype(int), 3)
    u = t / (math.pi / 2) - k
    flip = (k % 2) == 1
    x, y = quarter(np.where(flip, 1.0 - u, u))
    sx = np.where((k == 1) | (k == 2), -1.0, 1.0)
    sy = np.where(k >= 2, -1.0, 1.0)
    return np.array([sx * x, sy * y])


def require_positive(name: str, value: float) -> None:
    if not (isinstance(value, (int, float)) and math.isfinite(value) and value > 0):
        raise GeometryError(f"cutout.{name} must be a finite number > 0 mm, got {value!r}")


@dataclass(frozen=True)
class Row:
    """``count`` copies of one opening at ``pitch`` (mm, centre to centre) along ``direction`` (degrees,
    counter-clockwise from x), centred on the cutout's centre."""

    count: int
    pitch: float
    direction: float = 0.0

    def offsets(self) -> np.ndarray:
        """(count, 2) offsets of the members' centres from the row's centre, mm, in order along the row."""
        k = np.arange(self.count) - 0.5 * (self.count - 1)
        d = math.radians(self.direction)
        return np.outer(k * self.pitch, [math.cos(d), math.sin(d)])


@dataclass(frozen=True)
class Cutout:
    """A shape placed in the panel: centre (mm, panel coordinates) and counter-clockwise rotation (degrees), with
    its reinforcement (``holeshape.geometry.reinforcement.Reinforcement``; None for a bare opening)."""

    shape: Shape
    center: tuple[float, float]
    rotation: float = 0.0
    reinforcement: Reinforcement | None = None
    row: Row | None = None  # several openings at a pitch (None: one opening)
    others: tuple[Cutout, ...] = ()  # further openings of their own shapes (separate [[cutout]] tables), each a Cutout

    @property
    def members(self) -> list[Cutout]:
        """The single openings: of a row, in order along it; with ``others``, this one then those (``[self]`` for
        one opening)."""
        if self.others:
            from dataclasses import replace

            return [replace(self, others=()), *self.others]
        if self.row is None or self.row.count == 1:
            return [self]
        from dataclasses import replace

        return [replace(self, center=(self.center[0] + float(dx), self.center[1] + float(dy)), row=None)
                for dx, dy in self.row.offsets()]

    @property
    def count(self) -> int:
        if self.others:
            return 1 + len(self.others)
        return 1 if self.row is None else self.row.count

    @property
    def family(self) -> str:
        return self.shape.family

    def xy(self, t: np.ndarray) -> np.ndarray:
        """Boundary points in panel coordinates, (2, len(t))."""
        p = self.shape.local_xy(t)
        c, s = math.cos(math.radians(self.rotation)), math.sin(math.radians(self.rotation))
        return np.array([self.center[0] + c * p[0] - s * p[1], self.center[1] + s * p[0] + c * p[1]])

    @cached_property
    def sampling(self) -> BoundarySampling:
        return BoundarySampling.of(self.xy)

    @property
    def area(self) -> float:
        """Removed area, mm^2 (the total of several openings)."""
        if self.others:
            return self.shape.area + sum(o.area for o in self.others)
        return self.shape.area * self.count

    @property
    def min_radius(self) -> float:
        return min([self.shape.min_radius] + [o.min_radius for o in self.others])

    @property
    def bounds(self) -> tuple[float, float, float, float]:
        """Bounding box of every opening (x0, y0, x1, y1), mm."""
        b = []
        for m in self.members:
            p = m.sampling.points
            b.append((float(p[0].min()), float(p[1].min()), float(p[0].max()), float(p[1].max())))
        return min(x[0] for x in b), min(x[1] for x in b), max(x[2] for x in b), max(x[3] for x in b)

    def outlines(self, n: int = 720) -> list[np.ndarray]:
        """(n, 2) outline of every opening (one for a single opening), as :meth:`polygon` gives each."""
        return [m.polygon(n) for m in self.members]

    def edge_gaps(self, width: float, height: float) -> dict[str, float]:
        """Distance (mm) from the outline to each edge of a ``width`` x ``height`` panel with its origin at the
        lower-left corner: left, bottom, right, top (negative where the outline crosses the edge)."""
        x0, y0, x1, y1 = self.bounds
        return {"left": x0, "bottom": y0, "right": width - x1, "top": height - y1}

    def polygon(self, n: int = 720) -> np.ndarray:
        """(n, 2) points evenly spaced in arc length, counter-clockwise, panel coordinates."""
        return self.sampling.even_points(n).T

    def parameters(self) -> dict[str, Any]:
        out = dict(self.shape.parameters())
        out["center"] = list(self.center)
        out["rotation"] = self.rotation
        if self.reinforcement is not None:
            out.update({f"reinforcement.{k}": v for k, v in self.reinforcement.parameters().items()})
        if self.row is not None:
            out.update(count=self.row.count, pitch=self.row.pitch, direction=self.row.direction)
        for i, o in enumerate(self.others, 1):
            out[f"cutout[{i}].shape"] = o.family
            out.update({f"cutout[{i}].{k}": v for k, v in o.parameters().items()})
        return out

    @property
    def bare(self) -> Cutout:
        """The same opening without its reinforcement."""
        from dataclasses import replace

        return replace(self, reinforcement=None)

    def panel_symmetry(self) -> tuple[bool, bool]:
        """Whether the placed outline is mirror symmetric about a horizontal and a vertical line through its centre
        (a row is modelled whole: neither)."""
        if self.count > 1:
            return False, False
        r = self.rotation % 180.0
        sx, sy = self.shape.symmetric_about_x, self.shape.symmetric_about_y
        if math.isclose(r, 0.0, abs_tol=1e-9) or math.isclose(r, 180.0, abs_tol=1e-9):
            return sx, sy
        if math.isclose(r, 90.0, abs_tol=1e-9):
            return sy, sx
        return False, False
