"""The study's inputs as frozen dataclasses (mm / N / MPa) and the names of its keys.

:mod:`holeshape.studyfile` reads a TOML study file into these, once, at the edge; everything past that edge takes
a :class:`Study` (or its parts), never a dictionary from the file.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

from holeshape.elastic import Elastic
from holeshape.parameters import (  # noqa: F401 - the study's parts, re-exported
    LENGTH_PARAMETERS,
    ROW_PARAMETERS,
    SHAPE_PARAMETERS,
    CutoutSpec,
    Param,
    Range,
)

if TYPE_CHECKING:
    from holeshape.geometry import Cutout

EDGES = ("traction", "displacement")
SHEAR_DISTRIBUTIONS = ("uniform", "parabolic")
MEASURES = ("von_mises", "max_principal", "hoop")
ACCURACIES = ("draft", "standard", "fine")
EDGE_SUPPORTS = ("simply_supported", "clamped")
GOALS = ("lowest_peak", "largest_opening", "lightest_reinforcement")  # holeshape.goals.GOALS, in this order
# "auto": the gradient refinement for a free-form outline of many radii searched for the lowest peak, else the
# sampler then simplex; "sampler_simplex": Optuna's TPE then Nelder-Mead; "gradient": standard shapes, then
# sequential linear programming on finite differences over a moved mesh (holeshape.search.gradient)
METHODS = ("auto", "sampler_simplex", "gradient")
COMMON_CUTOUT_KEYS = ("shape", "center", "rotation")


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
    """The web's material: its constitutive law (``elastic``, an :class:`~holeshape.elastic.Elastic` of a
    registered kind), the allowable stress and the net-section allowable (MPa, optional), density (kg/m^3,
    optional)."""

    name: str
    elastic: Elastic
    allowable_stress: float | None = None
    density: float | None = None
    net_section_allowable: float | None = None

    def to_dict(self) -> dict[str, Any]:
        """Flat, as the study file gives it (the elastic kind's own keys beside the name and allowables)."""
        return {"name": self.name, **self.elastic.to_dict(), "allowable_stress": self.allowable_stress,
                "density": self.density, "net_section_allowable": self.net_section_allowable}


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

    def polygon(self, default_center: tuple[float, float], clearance: float = 0.0) -> Any:
        """Shapely polygon of the envelope grown by ``clearance`` (mm)."""
        from shapely import affinity
        from shapely.geometry import Point, box

        cx, cy = self.center if self.center is not None else default_center
        if self.diameter is not None:
            return Point(cx, cy).buffer(self.diameter / 2 + clearance, quad_segs=64)
        assert self.width is not None and self.height is not None  # the parser gives a diameter or both sizes
        env = box(cx - self.width / 2, cy - self.height / 2, cx + self.width / 2, cy + self.height / 2)
        env = affinity.rotate(env, self.rotation, origin=(cx, cy))
        return env.buffer(clearance, quad_segs=16, join_style="round") if clearance > 0 else env

    @property
    def half_sizes(self) -> tuple[float, float]:
        if self.diameter is not None:
            return self.diameter / 2, self.diameter / 2
        assert self.width is not None and self.height is not None  # the parser gives a diameter or both sizes
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
    more: tuple[tuple[str, float], ...] = ()  # the keys registered checks read (Check.constraint_keys)

    def get(self, key: str) -> float | None:
        """A constraint a registered check reads (None when not given)."""
        return dict(self.more).get(key)


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
    warnings: tuple[str, ...] = ()  # values that are valid but look like a unit slip (one line each, every output)
    tables: tuple[tuple[str, Any], ...] = ()  # the parsed tables of registered checks that read one (by check name)

    @classmethod
    def of(cls, panel: Panel, material: Material, load_cases: tuple[LoadCase, ...], cutout: Cutout, *,
           title: str = "study", measure: Measure = Measure(), constraints: Constraints = Constraints(),
           stability: StabilitySettings | None = None, tables: dict[str, Any] | None = None) -> Study:
        """A study built in code around a placed :class:`~holeshape.geometry.Cutout` (the Python API); ``tables``
        the settings of registered checks that read a table of their own, by check name (``{"fatigue": ...}``)."""
        return cls(title=title, panel=panel, material=material, load_cases=tuple(load_cases),
                   cutout=CutoutSpec.from_cutout(cutout), measure=measure, constraints=constraints,
                   stability=stability, tables=tuple((tables or {}).items()))

    def table(self, name: str) -> Any:
        """The settings a check read from its own study-file table (None without the table)."""
        return dict(self.tables).get(name)

