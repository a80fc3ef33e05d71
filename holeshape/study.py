"""The study's inputs as frozen dataclasses (mm / N / MPa) and the names of its keys.

:mod:`holeshape.studyfile` reads a TOML study file into these, once, at the edge; everything past that edge takes
a :class:`Study` (or its parts), never a dictionary from the file.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

from holeshape.errors import GeometryError, StudyError

EDGES = ("traction", "displacement")
SHEAR_DISTRIBUTIONS = ("uniform", "parabolic")
MEASURES = ("von_mises", "max_principal", "hoop")
ACCURACIES = ("draft", "standard", "fine")
EDGE_SUPPORTS = ("simply_supported", "clamped")
GOALS = ("lowest_peak", "largest_opening", "lightest_reinforcement")
# "auto": the gradient refinement for a free-form outline of many radii searched for the lowest peak, else the
# sampler then simplex; "sampler_simplex": Optuna's TPE then Nelder-Mead; "gradient": standard shapes, then
# sequential linear programming on finite differences over a moved mesh (holeshape.search.gradient)
METHODS = ("auto", "sampler_simplex", "gradient")
SHAPE_PARAMETERS: dict[str, tuple[str, ...]] = {
    "circle": ("radius",),
    "ellipse": ("a", "b"),
    "superellipse": ("a", "b", "exponent"),
    "slot": ("length", "width"),
    "rounded_rectangle": ("a", "b", "corner_radius"),
    "spline": ("radii", "symmetry"),
}
COMMON_CUTOUT_KEYS = ("shape", "center", "rotation")
ROW_KEYS = ("count", "pitch", "direction")  # a row of copies of one opening
REINFORCEMENT_KEYS = ("kind", "height", "width", "thickness", "youngs_modulus")
REINFORCEMENT_PREFIX = "reinforcement."  # cutout values of the [reinforcement] table: "reinforcement.height", ...


def flat_name(base: str, index: int | None = None) -> str:
    """The flat name of a cutout parameter: ``a``, or ``radii[2]`` for an entry of a list parameter."""
    return base if index is None else f"{base}[{index}]"


def split_flat_name(name: str) -> tuple[str, int | None]:
    """``"radii[2]"`` -> ``("radii", 2)``; ``"a"`` -> ``("a", None)``; ``"cutout[1].radii[2]"`` ->
    ``("cutout[1].radii", 2)`` (the inverse of :func:`flat_name`)."""
    if name.endswith("]") and "[" in name:
        base, idx = name[:-1].rsplit("[", 1)
        return base, int(idx)
    return name, None


OTHER_PREFIX = "cutout[{}]."  # values of the i-th further [[cutout]] table (i from 1): "cutout[1].a", ...


def set_flat(values: dict, name: str, value) -> None:
    """Set the parameter ``name`` (flat, as :func:`flat_name` gives it) in a dict of cutout values."""
    base, idx = split_flat_name(name)
    if idx is None:
        values[base] = value
    else:
        values[base][idx] = value


@dataclass(frozen=True)
class Panel:
    """Rectangular panel, origin at its lower-left corner. Lengths mm."""

    width: float
    height: float
    thickness: float
    edges: str = "traction"
    # the beam section a web panel belongs to (for load cases given as shear force and bending moment): second
    # moment of area of the whole section (mm^4), its neutral axis (mm, panel y; None: mid-height), and how the web
    # carries the shear ("uniform": built-up beam, caps take the bending; "parabolic": a solid rectangular section)
    section_inertia: float | None = None
    neutral_axis_y: float | None = None
    shear_distribution: str = "uniform"

    @property
    def neutral_axis(self) -> float:
        return self.height / 2 if self.neutral_axis_y is None else self.neutral_axis_y


@dataclass(frozen=True)
class Material:
    """Isotropic linear-elastic material. Moduli and stresses MPa; density (optional) kg/m^3."""

    name: str
    youngs_modulus: float
    poisson_ratio: float
    allowable_stress: float | None = None
    density: float | None = None


@dataclass(frozen=True)
class LoadCase:
    """Uniform remote in-plane stress state, MPa; or, for a beam web, the shear force (N) and the bending moment
    (N mm, at the panel's x-centre; it varies along x as dM/dx = V) of the beam the panel belongs to."""

    name: str
    sigma_x: float = 0.0
    sigma_y: float = 0.0
    tau_xy: float = 0.0
    shear_force: float | None = None
    bending_moment: float | None = None

    @property
    def is_beam(self) -> bool:
        return self.shear_force is not None or self.bending_moment is not None

    @property
    def components(self) -> tuple[float, float, float]:
        return (self.sigma_x, self.sigma_y, self.tau_xy)


@dataclass(frozen=True)
class Range:
    """A search range for a cutout parameter. ``value`` (optional) is the current design: ``check`` evaluates it
    and the search tries it first."""

    min: float
    max: float
    log: bool = False
    value: float | None = None


@dataclass(frozen=True)
class CutoutSpec:
    """The ``[cutout]`` table: a family name and its parameter values (numbers, lists, strings or Ranges)."""

    shape: str
    values: dict[str, Any] = field(default_factory=dict)

    @property
    def ranges(self) -> dict[str, Range]:
        out: dict[str, Range] = {}
        for k, v in self.values.items():
            if isinstance(v, Range):
                out[k] = v
            elif isinstance(v, (list, tuple)):
                out.update({flat_name(k, i): r for i, r in enumerate(v) if isinstance(r, Range)})
        return out

    def build(self, overrides: dict[str, Any] | None = None):
        """The placed :class:`~holeshape.geometry.Cutout` (all values must be numbers)."""
        from holeshape.geometry import FAMILIES, Cutout

        vals = {k: (list(v) if isinstance(v, (list, tuple)) else v) for k, v in self.values.items()}
        vals.update(overrides or {})

        def number(k, v):
            if isinstance(v, Range):
                if v.value is None:
                    raise StudyError(f"cutout.{k} is a range (min = {v.min:g}, max = {v.max:g}) without a value;"
                                     " give value = ... for the design to check, or run holeshape optimise")
                return v.value
            return v

        for k, v in vals.items():
            vals[k] = [number(f"{k}[{i}]", x) for i, x in enumerate(v)] if isinstance(v, list) else number(k, v)
        others = []
        i = 1
        while OTHER_PREFIX.format(i) + "shape" in vals:  # further [[cutout]] tables, each built on its own
            pre = OTHER_PREFIX.format(i)
            own = {k[len(pre):]: v for k, v in vals.items() if k.startswith(pre)}
            others.append(CutoutSpec(own.pop("shape"), own).build())
            i += 1
        vals = {k: v for k, v in vals.items() if not k.startswith("cutout[")}
        cls = FAMILIES[self.shape]
        kwargs = {k: vals[k] for k in SHAPE_PARAMETERS[self.shape] if k in vals}
        if "radii" in kwargs:
            kwargs["radii"] = tuple(float(r) for r in kwargs["radii"])
        shape = cls(**kwargs)
        shape.check()
        center = vals["center"]
        cutout = Cutout(shape=shape, center=(float(center[0]), float(center[1])), rotation=float(vals["rotation"]),
                        reinforcement=build_reinforcement(vals), row=build_row(vals), others=tuple(others))
        if cutout.reinforcement is not None:
            from holeshape.geometry.reinforcement import check_formable

            check_formable(cutout)
        return cutout

    @property
    def reinforced(self) -> bool:
        return REINFORCEMENT_PREFIX + "kind" in self.values

    def without_reinforcement(self) -> CutoutSpec:
        return CutoutSpec(self.shape, {k: v for k, v in self.values.items() if not k.startswith(REINFORCEMENT_PREFIX)})


def build_row(values: dict):
    """The :class:`~holeshape.geometry.base.Row` of a cutout's numeric values (None for one opening)."""
    from holeshape.geometry.base import Row

    count = int(values.get("count", 1))
    if count == 1:
        return None
    pitch = float(values["pitch"])
    if not (math.isfinite(pitch) and pitch > 0):
        raise GeometryError(f"cutout.pitch must be a finite number > 0 mm, got {pitch!r}")
    return Row(count=count, pitch=pitch, direction=float(values.get("direction", 0.0)))


def nominal_row(values: dict):
    """The row of a cutout's values with a searched pitch at its ``value`` (else mid-range): for the standard
    shapes. None for one opening."""
    vals = {k: (v.value if v.value is not None else 0.5 * (v.min + v.max)) if isinstance(v, Range) else v
            for k, v in values.items() if k in ROW_KEYS}
    return build_row(vals)


def nominal_reinforcement(values: dict):
    """The reinforcement of a cutout's values with each searched size at its ``value`` (else the middle of its
    range): the one the standard shapes are checked with. None without a [reinforcement] table."""
    vals = {k: (v if not isinstance(v, Range) else (v.value if v.value is not None else 0.5 * (v.min + v.max)))
            for k, v in values.items() if k.startswith(REINFORCEMENT_PREFIX)}
    return build_reinforcement(vals)


def build_reinforcement(values: dict):
    """The :class:`~holeshape.geometry.Reinforcement` of a cutout's numeric values (None without one)."""
    from holeshape.geometry import Reinforcement

    kind = values.get(REINFORCEMENT_PREFIX + "kind")
    if kind is None:
        return None
    sizes = {k: float(values[REINFORCEMENT_PREFIX + k]) for k in REINFORCEMENT_KEYS[1:]
             if REINFORCEMENT_PREFIX + k in values}
    r = Reinforcement(kind=kind, **sizes)
    r.check()
    return r


@dataclass(frozen=True)
class Measure:
    stress: str = "von_mises"
    accuracy: str = "standard"


@dataclass(frozen=True)
class Access:
    """The envelope the opening must clear: a rectangle ``width`` x ``height`` or a circle of ``diameter`` (mm),
    centred at ``center`` (default: the cutout's centre), rotated ``rotation`` degrees counter-clockwise."""

    width: float | None = None
    height: float | None = None
    diameter: float | None = None
    center: tuple[float, float] | None = None
    rotation: float = 0.0

    def polygon(self, default_center: tuple[float, float], clearance: float = 0.0):
        """Shapely polygon of the envelope grown by ``clearance`` (mm)."""
        from shapely import affinity
        from shapely.geometry import Point, box

        cx, cy = self.center if self.center is not None else default_center
        if self.diameter is not None:
            return Point(cx, cy).buffer(self.diameter / 2 + clearance, quad_segs=64)
        env = box(cx - self.width / 2, cy - self.height / 2, cx + self.width / 2, cy + self.height / 2)
        env = affinity.rotate(env, self.rotation, origin=(cx, cy))
        return env.buffer(clearance, quad_segs=16, join_style="round") if clearance > 0 else env

    @property
    def half_sizes(self) -> tuple[float, float]:
        if self.diameter is not None:
            return self.diameter / 2, self.diameter / 2
        return self.width / 2, self.height / 2


@dataclass(frozen=True)
class Constraints:
    """Requirements on the opening (mm, mm^2). ``area`` fixes the removed area (each design is scaled to it)."""

    min_area: float | None = None
    max_area: float | None = None
    area: float | None = None
    access: Access | None = None
    clearance: float = 0.0
    min_ligament: float | None = None
    min_radius: float | None = None
    min_buckling_factor: float | None = None  # checked after the solve (needs [stability])
    min_margin: float | None = None  # margin of safety against material.allowable_stress, checked after the solve
    max_added_mass: float | None = None  # kg of reinforcement (needs [reinforcement] and material.density)
    max_reinforcement_area: float | None = None  # mm^2 of the reinforcement's cross-section


@dataclass(frozen=True)
class SearchSettings:
    """``trials``: evaluations in all (the standard shapes first); ``seed``: sampler seed;
    ``global_fraction``: share of the trials for the global sampler before the local refinement;
    ``goal``: "lowest_peak" (lowest peak stress), "lightest_reinforcement" (the least reinforcement volume, hence
    mass, that meets every constraint: searched [reinforcement] sizes) or "largest_opening" (largest removed area
    within every
    constraint: the weight-reduction study); ``method``: one of :data:`METHODS`."""

    trials: int = 60
    seed: int = 0
    global_fraction: float = 0.25
    goal: str = "lowest_peak"
    method: str = "auto"


@dataclass(frozen=True)
class StabilitySettings:
    """The ``[stability]`` table: out-of-plane support of the panel edges (the cutout edge is free), the reserve
    demanded on the buckling load factor (shown on every output), and how many mode shapes to plot."""

    edge_support: str = "simply_supported"
    required_factor: float = 1.0
    modes: int = 1


@dataclass(frozen=True)
class Study:
    title: str
    panel: Panel
    material: Material
    load_cases: tuple[LoadCase, ...]
    cutout: CutoutSpec
    measure: Measure = Measure()
    constraints: Constraints = Constraints()
    search: SearchSettings = SearchSettings()
    source: str = ""
    stability: StabilitySettings | None = None

