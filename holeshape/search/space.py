"""The design space of a study's cutout: which parameters are searched, their ranges, and how a point of the
space becomes a placed cutout (scaled to a fixed area where the study fixes one). Lengths mm, angles degrees.

The storage knows a parameter by its flat name (:attr:`holeshape.parameters.Param.flat`); everything else works on
the typed :class:`~holeshape.parameters.Param` keys, and the translation is made here, once.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from holeshape.errors import StudyError
from holeshape.geometry import Cutout
from holeshape.parameters import CutoutSpec, Param, Range
from holeshape.study import Constraints


@dataclass(frozen=True)
class DesignSpace:
    spec: CutoutSpec
    constraints: Constraints

    @property
    def params(self) -> dict[str, Param]:
        """The searched parameters by flat name (``a``, ``radii[2]``, ``center[0]``), in the study's order."""
        return {p.flat: p for p in self.spec.ranges}

    @property
    def dimensions(self) -> dict[str, Range]:
        """Searched parameters by flat name and their ranges."""
        return {p.flat: r for p, r in self.spec.ranges.items()}

    def check(self) -> None:
        if not self.dimensions:
            raise StudyError("the [cutout] table has no ranges to search: give at least one parameter as "
                             "{min = ..., max = ...}")

    def distributions(self) -> dict[str, Any]:
        from optuna.distributions import FloatDistribution

        return {k: FloatDistribution(r.min, r.max, log=r.log) for k, r in self.dimensions.items()}

    def to_unit(self, params: dict[str, float], names: list[str] | None = None) -> list[float]:
        """Coordinates in [0, 1] of ``params`` over the dimensions ``names`` (default: all, in order)."""
        dims = self.dimensions
        out = []
        for k in names or list(dims):
            r, v = dims[k], params[k]
            if r.max == r.min:
                out.append(0.5)
            elif r.log:
                out.append((math.log(v) - math.log(r.min)) / (math.log(r.max) - math.log(r.min)))
            else:
                out.append((v - r.min) / (r.max - r.min))
        return out

    def from_unit(self, u: list[float], names: list[str] | None = None) -> dict[str, float]:
        dims = self.dimensions
        out = {}
        for k, x in zip(names or list(dims), u):
            r = dims[k]
            x = min(1.0, max(0.0, x))
            out[k] = math.exp(math.log(r.min) + x * (math.log(r.max) - math.log(r.min))) if r.log \
                else r.min + x * (r.max - r.min)
        return out

    def point(self, params: dict[str, float]) -> dict[Param, float]:
        """The typed point of a storage's parameter set."""
        keys = self.params
        return {keys[k]: float(v) for k, v in params.items()}

    def decode(self, params: dict[str, float]) -> Cutout:
        """Build the placed cutout for a point of the space; with a fixed area, scale every length to it.

        Raises :class:`~holeshape.errors.GeometryError` when the parameters make no valid outline of the family.
        """
        point = self.point(params)
        cutout = self.spec.build(point)
        if self.constraints.area is not None:
            cutout = self.spec.build(point, scale=math.sqrt(self.constraints.area / cutout.area))
        return cutout

    def lengths(self) -> list[str]:
        """The searched lengths of the outline itself (flat names)."""
        return [k for k, p in self.params.items() if p.is_length]


def scaled_to_area(cutout: Cutout, area: float) -> Cutout:
    """The same outline scaled about its centre to ``area`` (mm^2)."""
    return scaled(cutout, math.sqrt(area / cutout.area))


def scaled(cutout: Cutout, k: float) -> Cutout:
    """The same outline with every length of its shape times ``k`` about its centre (a row keeps its pitch)."""
    from dataclasses import fields, replace

    from holeshape.parameters import LENGTH_PARAMETERS

    current = {f.name: getattr(cutout.shape, f.name) for f in fields(cutout.shape)}
    new = {name: (tuple(r * k for r in v) if isinstance(v, tuple) else v * k) for name, v in current.items()
           if name in LENGTH_PARAMETERS}
    shape = replace(cutout.shape, **new)
    shape.check()
    return replace(cutout, shape=shape)
