"""Design parameters: every value of the ``[cutout]`` tables, the row and the ``[reinforcement]`` by one typed key.

A :class:`CutoutSpec` holds what the study file says about the openings (numbers, lists, choices or
:class:`Range` s to search) in typed parts: one :class:`OpeningSpec` per ``[[cutout]]`` table, the optional
:class:`RowSpec` and :class:`ReinforcementSpec`. Every scalar value in it has a :class:`Param` key; a search point
or a sweep point is a ``{Param: float}`` map, and :meth:`CutoutSpec.build` turns one into the placed
:class:`~holeshape.geometry.Cutout`. Other modules never parse names: the flat spelling (``a``, ``radii[2]``,
``center[0]``, ``pitch``, ``reinforcement.height``, ``cutout[1].a``) exists for the study file's messages, the
storage's parameter names and the JSON, and is made and read here only. Lengths mm, angles degrees, moduli MPa.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from typing import TYPE_CHECKING, Any

from holeshape.errors import GeometryError, StudyError

if TYPE_CHECKING:
    from holeshape.geometry import Cutout, Reinforcement
    from holeshape.geometry.base import Row

SHAPE_PARAMETERS: dict[str, tuple[str, ...]] = {
    "circle": ("radius",),
    "ellipse": ("a", "b"),
    "superellipse": ("a", "b", "exponent"),
    "slot": ("length", "width"),
    "rounded_rectangle": ("a", "b", "corner_radius"),
    "spline": ("radii", "symmetry"),
}
# shape parameters that are lengths (scaled together when the study fixes the removed area)
LENGTH_PARAMETERS = ("radius", "a", "b", "length", "width", "corner_radius", "radii")
PLACE_PARAMETERS = ("center", "rotation")
ROW_PARAMETERS = ("count", "pitch", "direction")
PARTS = ("shape", "place", "row", "reinforcement")


@dataclass(frozen=True)
class Range:
    """A search range for a parameter. ``value`` (optional) is the current design: ``check`` evaluates it and the
    search tries it first."""

    min: float
    max: float
    log: bool = False
    value: float | None = None

    @property
    def nominal(self) -> float:
        """The current design's value, else the middle of the range."""
        return self.value if self.value is not None else 0.5 * (self.min + self.max)


Value = float | int | str | Range | tuple  # a number, a choice, a range, or a tuple of numbers and ranges


@dataclass(frozen=True, order=True)
class Param:
    """One scalar design parameter: the ``opening`` table it belongs to (0: the first ``[cutout]``), its ``part``
    (one of :data:`PARTS`), its ``name`` (the study-file key) and the ``index`` inside a list value (spline radii,
    centre coordinates)."""

    opening: int
    part: str
    name: str
    index: int | None = None

    @property
    def key(self) -> str:
        """The study-file key with its table: ``cutout.a``, ``cutout.pitch``, ``reinforcement.height``,
        ``cutout[1].a``."""
        flat = self.flat
        return flat if flat.startswith(("reinforcement.", "cutout[")) else f"cutout.{flat}"

    @property
    def flat(self) -> str:
        """The study file's spelling: ``a``, ``radii[2]``, ``center[0]``, ``pitch``, ``reinforcement.height``,
        ``cutout[1].a``."""
        base = self.name if self.index is None else f"{self.name}[{self.index}]"
        if self.part == "reinforcement":
            return f"reinforcement.{base}"
        return f"cutout[{self.opening}].{base}" if self.opening else base

    @property
    def unit(self) -> str:
        if self.name in ("rotation", "direction"):
            return "deg"
        if self.name in ("exponent", "count"):
            return ""
        if self.name == "youngs_modulus":
            return "MPa"
        return "mm"

    @property
    def is_length(self) -> bool:
        """A length of the outline itself (scaled with the others when the area is fixed)."""
        return self.part == "shape" and self.name in LENGTH_PARAMETERS

    def __str__(self) -> str:
        return self.flat


@dataclass(frozen=True)
class OpeningSpec:
    """One ``[cutout]`` table: its family, the family's values (in the family's order), centre and rotation."""

    shape: str
    values: tuple[tuple[str, Value], ...]
    center: tuple[float | Range, float | Range]
    rotation: float | Range = 0.0

    def value(self, name: str) -> Value:
        return dict(self.values)[name]


@dataclass(frozen=True)
class RowSpec:
    """``count`` copies of the opening at ``pitch`` (mm) along ``direction`` (degrees)."""

    count: int
    pitch: float | Range
    direction: float | Range = 0.0


@dataclass(frozen=True)
class ReinforcementSpec:
    """The ``[reinforcement]`` table: the kind (a key of ``geometry.REINFORCEMENTS``) and its sizes."""

    kind: str
    sizes: tuple[tuple[str, Value], ...]


def _scalars(value: Value) -> list[tuple[int | None, Any]]:
    """(index, item) of a value: one item with index None, or every element of a tuple."""
    if isinstance(value, tuple):
        return list(enumerate(value))
    return [(None, value)]


@dataclass(frozen=True)
class CutoutSpec:
    """Everything the study says about its openings, typed. ``openings[0]`` is the first (or only) table."""

    openings: tuple[OpeningSpec, ...]
    row: RowSpec | None = None
    reinforcement: ReinforcementSpec | None = None

    @classmethod
    def from_cutout(cls, cutout: Cutout) -> CutoutSpec:
        """The spec of a placed :class:`~holeshape.geometry.Cutout` with every value fixed (for the Python API: a
        design built in code, checked like one read from a study file)."""

        def opening(c: Cutout) -> OpeningSpec:
            vals = tuple((k, tuple(float(x) for x in v) if isinstance(v, (list, tuple)) else v)
                         for k, v in c.shape.parameters().items())
            return OpeningSpec(c.family, vals, (float(c.center[0]), float(c.center[1])), float(c.rotation))

        row = None if cutout.row is None else RowSpec(cutout.row.count, cutout.row.pitch, cutout.row.direction)
        r = cutout.reinforcement
        rs = None if r is None else ReinforcementSpec(r.kind, tuple((k, v) for k, v in r.parameters().items()
                                                                    if k != "kind"))
        return cls(openings=(opening(replace(cutout, others=())),) + tuple(opening(o) for o in cutout.others),
                   row=row, reinforcement=rs)

    @property
    def shape(self) -> str:
        return self.openings[0].shape

    @property
    def reinforced(self) -> bool:
        return self.reinforcement is not None

    @property
    def several(self) -> bool:
        """More than one opening (separate tables or a row)."""
        return len(self.openings) > 1 or (self.row is not None and self.row.count > 1)

    def entries(self) -> dict[Param, Any]:
        """Every scalar value by its key, in the study file's order (numbers, choices and ranges)."""
        out: dict[Param, Any] = {}
        for k, op in enumerate(self.openings):
            for name, v in op.values:
                for i, x in _scalars(v):
                    out[Param(k, "shape", name, i)] = x
            for i, x in _scalars(op.center):
                out[Param(k, "place", "center", i)] = x
            out[Param(k, "place", "rotation")] = op.rotation
        if self.row is not None:
            out[Param(0, "row", "count")] = self.row.count
            out[Param(0, "row", "pitch")] = self.row.pitch
            out[Param(0, "row", "direction")] = self.row.direction
        if self.reinforcement is not None:
            for name, v in self.reinforcement.sizes:
                out[Param(0, "reinforcement", name)] = v
        return out

    @property
    def ranges(self) -> dict[Param, Range]:
        """The searched parameters and their ranges."""
        return {p: v for p, v in self.entries().items() if isinstance(v, Range)}

    def numeric(self) -> dict[Param, float]:
        """Every parameter that is a number or a range (the ones a sweep may vary)."""
        return {p: (v.nominal if isinstance(v, Range) else float(v)) for p, v in self.entries().items()
                if isinstance(v, Range) or (isinstance(v, (int, float)) and not isinstance(v, bool)
                                            and p.name != "count")}

    def by_flat(self) -> dict[str, Param]:
        return {p.flat: p for p in self.entries()}

    def nominal(self) -> dict[Param, float]:
        """Every searched parameter at its ``value`` (else the middle of its range)."""
        return {p: r.nominal for p, r in self.ranges.items()}

    def without_reinforcement(self) -> CutoutSpec:
        return replace(self, reinforcement=None)

    # ----- building a placed cutout ---------------------------------------------------------------------------------
    def resolved(self, point: dict[Param, float] | None = None, scale: float = 1.0,
                 strict: bool = True) -> dict[Param, Any]:
        """The values of every parameter with ``point`` applied (any parameter may be set, searched or not), the
        outline's lengths times ``scale``, and each range that ``point`` leaves at its ``value`` (a range without
        a value is an error with ``strict``, else its middle)."""
        vals = self.entries()
        for p, v in (point or {}).items():
            if p not in vals:
                raise StudyError(f"{p.flat} is not a parameter of this study's [cutout]")
            vals[p] = float(v)
        for p, v in vals.items():
            if isinstance(v, Range):
                if v.value is None and strict:
                    raise StudyError(f"{p.key} is a range (min = {v.min:g}, max = {v.max:g}) without a value;"
                                     " give value = ... for the design to check, or run holeshape optimise")
                vals[p] = v.nominal
            if scale != 1.0 and p.is_length:
                vals[p] = vals[p] * scale
        return vals

    def build(self, point: dict[Param, float] | None = None, scale: float = 1.0, strict: bool = True) -> Cutout:
        """The placed :class:`~holeshape.geometry.Cutout` at ``point`` (see :meth:`resolved`); raises
        :class:`~holeshape.errors.GeometryError` naming the parameter when the values make no valid outline."""
        from holeshape.geometry import FAMILIES, Cutout

        vals = self.resolved(point, scale, strict)
        cutouts = []
        for k, op in enumerate(self.openings):
            own = {}
            for name, v in op.values:
                if isinstance(v, tuple):
                    own[name] = tuple(float(vals[Param(k, "shape", name, i)]) for i in range(len(v)))
                else:
                    own[name] = vals[Param(k, "shape", name)]
            shape = FAMILIES[op.shape](**own)
            shape.check()
            center = (float(vals[Param(k, "place", "center", 0)]), float(vals[Param(k, "place", "center", 1)]))
            cutouts.append(Cutout(shape=shape, center=center, rotation=float(vals[Param(k, "place", "rotation")])))
        first = replace(cutouts[0], reinforcement=self._reinforcement(vals), row=self._row(vals),
                        others=tuple(cutouts[1:]))
        if first.reinforcement is not None:
            first.reinforcement.check_on(first)
        return first

    def _row(self, vals: dict[Param, Any]) -> Row | None:
        from holeshape.geometry.base import Row

        if self.row is None or self.row.count == 1:
            return None
        pitch = float(vals[Param(0, "row", "pitch")])
        if not (math.isfinite(pitch) and pitch > 0):
            raise GeometryError(f"cutout.pitch must be a finite number > 0 mm, got {pitch!r}")
        return Row(count=self.row.count, pitch=pitch, direction=float(vals[Param(0, "row", "direction")]))

    def _reinforcement(self, vals: dict[Param, Any]) -> Reinforcement | None:
        from holeshape.geometry.reinforcement import REINFORCEMENTS

        if self.reinforcement is None:
            return None
        sizes = {name: float(vals[Param(0, "reinforcement", name)]) for name, _ in self.reinforcement.sizes}
        r = REINFORCEMENTS[self.reinforcement.kind](**sizes)
        r.check()
        return r

    def nominal_reinforcement(self) -> Reinforcement | None:
        """The reinforcement with each searched size at its ``value`` (else mid-range): the one the standard
        shapes are checked with. None without a [reinforcement] table."""
        return self._reinforcement(self.resolved(strict=False))

    def nominal_row(self) -> Row | None:
        """The row with a searched pitch at its ``value`` (else mid-range), None for one opening."""
        return self._row(self.resolved(strict=False))

    def fixed_center(self) -> tuple[float, float] | None:
        """The first opening's centre when neither coordinate is searched."""
        cx, cy = self.openings[0].center
        return None if isinstance(cx, Range) or isinstance(cy, Range) else (float(cx), float(cy))

    def describe(self) -> list[dict[str, Any]]:
        """Rows for the reports: every parameter with its unit, fixed value or range (current design)."""
        rows = []
        for p, v in self.entries().items():
            row: dict[str, Any] = {"parameter": p.flat, "unit": p.unit}
            if isinstance(v, Range):
                row.update(min=v.min, max=v.max, value=v.value, searched=True)
            else:
                row.update(value=v, searched=False)
            rows.append(row)
        return rows
