"""The design space of a study's cutout: which parameters are searched, their ranges, and how a point of the
space becomes a placed cutout (scaled to a fixed area where the study fixes one). Lengths mm, angles degrees."""

from __future__ import annotations

import math
from dataclasses import dataclass

from holeshape.errors import StudyError
from holeshape.geometry import Cutout
from holeshape.study import Constraints, CutoutSpec, Range, set_flat

LENGTH_PARAMETERS = ("radius", "a", "b", "length", "width", "corner_radius", "radii")


@dataclass(frozen=True)
class DesignSpace:
    spec: CutoutSpec
    constraints: Constraints

    @property
    def dimensions(self) -> dict[str, Range]:
        """Searched parameters by flat name (``a``, ``radii[2]``, ``center[0]``) and their ranges."""
        return dict(self.spec.ranges)

    def check(self) -> None:
        if not self.dimensions:
            raise StudyError("the [cutout] table has no ranges to search: give at least one parameter as "
                             "{min = ..., max = ...}")

    def distributions(self):
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

    def values(self, params: dict[str, float]) -> dict:
        """The full parameter set: fixed values of the study plus the searched ones."""
        vals = {k: (list(v) if isinstance(v, (list, tuple)) else v) for k, v in self.spec.values.items()}
        for name, v in params.items():
            set_flat(vals, name, float(v))
        return vals

    def decode(self, params: dict[str, float]) -> tuple[Cutout, dict]:
        """Build the placed cutout for a point of the space; with a fixed area, scale every length to it.

        Raises :class:`~holeshape.errors.GeometryError` when the parameters make no valid outline of the family.
        """
        vals = self.values(params)
        cutout = self.spec.build(vals)
        if self.constraints.area is not None:
            vals.update(scaled_lengths(vals, math.sqrt(self.constraints.area / cutout.area)))
            cutout = self.spec.build(vals)
        return cutout, vals


def scaled_lengths(values: dict, k: float) -> dict:
    """The length parameters among ``values`` multiplied by ``k`` (lists and tuples element by element, keeping
    their type): the one rule for scaling a design to an area."""
    out = {}
    for key in LENGTH_PARAMETERS:
        if key in values:
            v = values[key]
            out[key] = type(v)(r * k for r in v) if isinstance(v, (list, tuple)) else v * k
    return out


def scaled_to_area(cutout: Cutout, area: float) -> Cutout:
    """The same outline scaled about its centre to ``area`` (mm^2)."""
    from dataclasses import fields, replace

    current = {f.name: getattr(cutout.shape, f.name) for f in fields(cutout.shape)}
    shape = replace(cutout.shape, **scaled_lengths(current, math.sqrt(area / cutout.area)))
    shape.check()
    return replace(cutout, shape=shape)
