"""The standard cutout families: circle, ellipse, superellipse, slot and rounded rectangle (all lengths mm)."""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import ClassVar

import numpy as np

from holeshape.errors import GeometryError
from holeshape.geometry.base import Shape, quadrant_mirror, require_positive


@dataclass(frozen=True)
class Circle(Shape):
    """Circle of the given radius."""

    family: ClassVar[str] = "circle"
    radius: float = 1.0

    def check(self) -> None:
        require_positive("radius", self.radius)

    def local_xy(self, t: np.ndarray) -> np.ndarray:
        return np.array([self.radius * np.cos(t), self.radius * np.sin(t)])

    def exact_area(self) -> float:
        return math.pi * self.radius**2

    @property
    def min_radius(self) -> float:
        return self.radius


@dataclass(frozen=True)
class Ellipse(Shape):
    """Ellipse with half-axes ``a`` (own x) and ``b`` (own y); t is the eccentric angle of Inglis' solution."""

    family: ClassVar[str] = "ellipse"
    a: float = 1.0
    b: float = 1.0

    def check(self) -> None:
        require_positive("a", self.a)
        require_positive("b", self.b)

    def local_xy(self, t: np.ndarray) -> np.ndarray:
        return np.array([self.a * np.cos(t), self.b * np.sin(t)])

    def exact_area(self) -> float:
        return math.pi * self.a * self.b

    @property
    def min_radius(self) -> float:
        return min(self.a, self.b) ** 2 / max(self.a, self.b)


@dataclass(frozen=True)
class Superellipse(Shape):
    """|x/a|^n + |y/b|^n = 1, written in polar form r(theta) so the curve is smooth for n >= 2.

    n = 2 is the ellipse; larger n squares the outline. Exponents from 1.5 to 2 are allowed: the curve stays
    tangent-continuous but its curvature grows without bound at the four axis points (min radius 0).
    """

    family: ClassVar[str] = "superellipse"
    MIN_EXPONENT: ClassVar[float] = 1.5
    MAX_EXPONENT: ClassVar[float] = 20.0
    a: float = 1.0
    b: float = 1.0
    exponent: float = 2.0

    def check(self) -> None:
        require_positive("a", self.a)
        require_positive("b", self.b)
        n = self.exponent
        if not (isinstance(n, (int, float)) and math.isfinite(n) and self.MIN_EXPONENT <= n <= self.MAX_EXPONENT):
            raise GeometryError(
                f"cutout.exponent must be between {self.MIN_EXPONENT} and {self.MAX_EXPONENT}"
                f" (2 = ellipse, larger = squarer), got {n!r}"
            )

    def local_xy(self, t: np.ndarray) -> np.ndarray:
        n = self.exponent
        c, s = np.cos(t), np.sin(t)
        r = (np.abs(c / self.a) ** n + np.abs(s / self.b) ** n) ** (-1.0 / n)
        return np.array([r * c, r * s])

    def exact_area(self) -> float:
        n = self.exponent
        return 4.0 * self.a * self.b * math.gamma(1 + 1 / n) ** 2 / math.gamma(1 + 2 / n)

    @property
    def min_radius(self) -> float:
        if self.exponent < 2.0:
            return 0.0
        return self.sampling.min_radius


@dataclass(frozen=True)
class Slot(Shape):
    """Two semicircular ends joined by straight sides: overall ``length`` along its own x axis, ``width`` across."""

    family: ClassVar[str] = "slot"
    length: float = 2.0
    width: float = 1.0

    def check(self) -> None:
        require_positive("length", self.length)
        require_positive("width", self.width)
        if self.length <= self.width:
            raise GeometryError(
                f"cutout.length must be greater than cutout.width ({self.width!r} mm) for a slot"
                f" (use a circle for equal sizes), got {self.length!r}"
            )

    def _quarter(self, u: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        r = self.width / 2
        c = (self.length - self.width) / 2
        arc = math.pi * r / 2
        s = u * (arc + c)
        phi = np.minimum(s, arc) / r
        on_arc = s <= arc
        x = np.where(on_arc, c + r * np.cos(phi), c - (s - arc))
        y = np.where(on_arc, r * np.sin(phi), r)
        return x, y

    def local_xy(self, t: np.ndarray) -> np.ndarray:
        return quadrant_mirror(self._quarter, t)

    def exact_area(self) -> float:
        r = self.width / 2
        return math.pi * r**2 + (self.length - self.width) * self.width

    @property
    def min_radius(self) -> float:
        return self.width / 2


@dataclass(frozen=True)
class RoundedRectangle(Shape):
    """Rectangle of half-sizes ``a`` x ``b`` with corners rounded to ``corner_radius``."""

    family: ClassVar[str] = "rounded_rectangle"
    a: float = 1.0
    b: float = 1.0
    corner_radius: float = 0.25

    def check(self) -> None:
        require_positive("a", self.a)
        require_positive("b", self.b)
        require_positive("corner_radius", self.corner_radius)
        if self.corner_radius > min(self.a, self.b):
            raise GeometryError(
                f"cutout.corner_radius must be <= min(a, b) = {min(self.a, self.b)!r} mm, got {self.corner_radius!r}"
            )

    def _quarter(self, u: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        a, b, rc = self.a, self.b, self.corner_radius
        l1, arc, l2 = b - rc, math.pi * rc / 2, a - rc
        s = u * (l1 + arc + l2)
        phi = np.clip(s - l1, 0.0, arc) / rc
        x = np.where(s <= l1, a, np.where(s <= l1 + arc, a - rc + rc * np.cos(phi), a - rc - (s - l1 - arc)))
        y = np.where(s <= l1, s, np.where(s <= l1 + arc, b - rc + rc * np.sin(phi), b))
        return x, y

    def local_xy(self, t: np.ndarray) -> np.ndarray:
        return quadrant_mirror(self._quarter, t)

    def exact_area(self) -> float:
        return 4 * self.a * self.b - (4 - math.pi) * self.corner_radius**2

    @property
    def min_radius(self) -> float:
        return self.corner_radius
