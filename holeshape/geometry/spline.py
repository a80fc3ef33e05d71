"""Free-form cutout: a closed periodic cubic spline r(theta) through radii at equally spaced angles (mm)."""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property
from typing import Any, ClassVar

import numpy as np

from holeshape.errors import GeometryError
from holeshape.geometry.base import Shape

SYMMETRIES = ("none", "x", "xy")


@dataclass(frozen=True)
class Spline(Shape):
    """Polar periodic spline through ``radii``.

    ``symmetry = "none"``: radii at theta = 360 k / N degrees, k = 0..N-1.
    ``"x"`` (mirror about the own x axis): radii from 0 to 180 degrees inclusive, N - 1 equal steps.
    ``"xy"`` (mirror about both axes): radii from 0 to 90 degrees inclusive, N - 1 equal steps.
    """

    family: ClassVar[str] = "spline"
    radii: tuple[float, ...] = (1.0, 1.0, 1.0, 1.0)
    symmetry: str = "none"

    @property
    def symmetric_about_x(self) -> bool:  # type: ignore[override]
        return self.symmetry in ("x", "xy")

    @property
    def symmetric_about_y(self) -> bool:  # type: ignore[override]
        return self.symmetry == "xy"

    def check(self) -> None:
        if self.symmetry not in SYMMETRIES:
            raise GeometryError(f"cutout.symmetry must be one of {', '.join(SYMMETRIES)}, got {self.symmetry!r}")
        least = {"none": 4, "x": 3, "xy": 2}[self.symmetry]
        if len(self.radii) < least:
            raise GeometryError(
                f"cutout.radii needs at least {least} values with symmetry = {self.symmetry!r}, got {len(self.radii)}"
            )
        for i, r in enumerate(self.radii):
            if not (isinstance(r, (int, float)) and math.isfinite(r) and r > 0):
                raise GeometryError(f"cutout.radii[{i}] must be a finite number > 0 mm, got {r!r}")
        radius = self.radius_at(np.linspace(0, 2 * math.pi, 4096, endpoint=False))
        if radius.min() <= 1e-3 * max(self.radii):
            raise GeometryError(
                f"cutout.radii {list(self.radii)} give a self-crossing spline (the curve passes through its centre);"
                " use radii that vary more gently"
            )

    @cached_property
    def _spline(self) -> Any:
        from scipy.interpolate import CubicSpline

        r = np.asarray(self.radii, dtype=float)
        if self.symmetry == "xy":
            r = np.concatenate([r, r[-2::-1]])  # 0..180 deg inclusive
        if self.symmetry in ("x", "xy"):
            r = np.concatenate([r, r[-2:0:-1]])  # 0..360 deg, 360 excluded
        theta = np.linspace(0.0, 2 * math.pi, len(r) + 1)
        return CubicSpline(theta, np.concatenate([r, r[:1]]), bc_type="periodic")

    def radius_at(self, t: np.ndarray) -> np.ndarray:
        """The polar radius (mm) at angle ``t`` (radians, the shape's own frame): the spline is star-shaped."""
        return self._spline(np.mod(t, 2 * math.pi))

    def local_xy(self, t: np.ndarray) -> np.ndarray:
        r = self.radius_at(t)
        return np.array([r * np.cos(t), r * np.sin(t)])

    def parameters(self) -> dict[str, Any]:
        return {"radii": list(self.radii), "symmetry": self.symmetry}
