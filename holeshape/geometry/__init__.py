"""Geometry layer (numpy only): cutout shape families, the placed cutout, and checks against the panel.

Adding a family: write a frozen dataclass subclass of :class:`Shape` and add one line to ``FAMILIES``.
"""

from __future__ import annotations

from holeshape.geometry.base import BoundarySampling, Cutout, Shape
from holeshape.geometry.families import Circle, Ellipse, RoundedRectangle, Slot, Superellipse
from holeshape.geometry.reinforcement import REINFORCEMENTS, Flange, Reinforcement, Ring
from holeshape.geometry.spline import Spline

FAMILIES: dict[str, type[Shape]] = {
    cls.family: cls for cls in (Circle, Ellipse, Superellipse, Slot, RoundedRectangle, Spline)
}

__all__ = [
    "FAMILIES", "REINFORCEMENTS", "BoundarySampling", "Circle", "Cutout", "Ellipse", "Flange", "Reinforcement", "Ring",
    "RoundedRectangle", "Shape", "Slot", "Spline", "Superellipse",
]
