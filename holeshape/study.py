"""Study files (TOML, mm / N / MPa) parsed once, at the edge, into frozen dataclasses.

Every rule broken gives a :class:`StudyError` whose one-line message names the field, echoes the value and says
what is allowed. Unknown keys are errors (with a "did you mean" hint), so a misspelt key never passes silently.
"""

from __future__ import annotations

import difflib
import math
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from holeshape.errors import GeometryError, StudyError

EDGES = ("traction", "displacement")
MEASURES = ("von_mises", "max_principal", "hoop")
ACCURACIES = ("draft", "standard", "fine")
SHAPE_PARAMETERS: dict[str, tuple[str, ...]] = {
    "circle": ("radius",),
    "ellipse": ("a", "b"),
    "superellipse": ("a", "b", "exponent"),
    "slot": ("length", "width"),
    "rounded_rectangle": ("a", "b", "corner_radius"),
    "spline": ("radii", "symmetry"),
}
COMMON_CUTOUT_KEYS = ("shape", "center", "rotation")


@dataclass(frozen=True)
class Panel:
    """Rectangular panel, origin at its lower-left corner. Lengths mm."""

    width: float
    height: float
    thickness: float
    edges: str = "traction"


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
    """Uniform remote in-plane stress state, MPa."""

    name: str
    sigma_x: float = 0.0
    sigma_y: float = 0.0
    tau_xy: float = 0.0

    @property
    def components(self) -> tuple[float, float, float]:
        return (self.sigma_x, self.sigma_y, self.tau_xy)


@dataclass(frozen=True)
class Range:
    """A search range for a cutout parameter (used by the search; ``check`` needs numbers)."""

    min: float
    max: float
    log: bool = False


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
                out.update({f"{k}[{i}]": r for i, r in enumerate(v) if isinstance(r, Range)})
        return out

    def build(self, overrides: dict[str, Any] | None = None):
        """The placed :class:`~holeshape.geometry.Cutout` (all values must be numbers)."""
        from holeshape.geometry import FAMILIES, Cutout

        vals = dict(self.values)
        vals.update(overrides or {})
        for k, v in vals.items():
            if isinstance(v, Range) or (isinstance(v, (list, tuple)) and any(isinstance(i, Range) for i in v)):
                raise StudyError(f"cutout.{k} is a range {v!r}; this command needs a number")
        cls = FAMILIES[self.shape]
        kwargs = {k: vals[k] for k in SHAPE_PARAMETERS[self.shape] if k in vals}
        if "radii" in kwargs:
            kwargs["radii"] = tuple(float(r) for r in kwargs["radii"])
        shape = cls(**kwargs)
        shape.check()
        center = vals["center"]
        return Cutout(shape=shape, center=(float(center[0]), float(center[1])), rotation=float(vals["rotation"]))


@dataclass(frozen=True)
class Measure:
    stress: str = "von_mises"
    accuracy: str = "standard"


@dataclass(frozen=True)
class Study:
    title: str
    panel: Panel
    material: Material
    load_cases: tuple[LoadCase, ...]
    cutout: CutoutSpec
    measure: Measure = Measure()
    extra: dict[str, Any] = field(default_factory=dict)  # tables the later layers parse ([constraints], [search])
    source: str = ""


# ---------------------------------------------------------------------------------------------------------------
def _unknown(table: dict, allowed: tuple[str, ...], where: str) -> None:
    for key in table:
        if key not in allowed:
            hint = difflib.get_close_matches(key, allowed, n=1)
            tip = f" (did you mean {hint[0]!r}?)" if hint else ""
            raise StudyError(f"{where}{key} is not a known key{tip}; allowed: {', '.join(allowed)}")


def _number(table: dict, key: str, where: str, *, default: Any = ..., positive: bool = False,
            allow_range: bool = False) -> Any:
    if key not in table:
        if default is ...:
            raise StudyError(f"{where}{key} is missing (a number{' > 0' if positive else ''} is required)")
        return default
    v = table[key]
    if allow_range and isinstance(v, dict):
        return _range(v, f"{where}{key}", positive)
    if isinstance(v, bool) or not isinstance(v, (int, float)):
        raise StudyError(f"{where}{key} must be a number, got {v!r}")
    v = float(v)
    if not math.isfinite(v):
        raise StudyError(f"{where}{key} must be finite, got {v!r}")
    if positive and v <= 0:
        raise StudyError(f"{where}{key} must be > 0, got {v!r}")
    return v


def _range(v: dict, name: str, positive: bool) -> Range:
    _unknown(v, ("min", "max", "log"), f"{name}.")
    lo = _number(v, "min", f"{name}.", positive=positive)
    hi = _number(v, "max", f"{name}.", positive=positive)
    log = v.get("log", False)
    if not isinstance(log, bool):
        raise StudyError(f"{name}.log must be true or false, got {log!r}")
    if lo > hi:
        raise StudyError(f"{name} must have min <= max, got min = {lo!r}, max = {hi!r}")
    if log and lo <= 0:
        raise StudyError(f"{name} with log = true needs min > 0, got {lo!r}")
    return Range(lo, hi, log)


def _string(table: dict, key: str, where: str, choices: tuple[str, ...] | None = None, default: Any = ...) -> Any:
    if key not in table:
        if default is ...:
            raise StudyError(f"{where}{key} is missing")
        return default
    v = table[key]
    if not isinstance(v, str):
        raise StudyError(f"{where}{key} must be a string, got {v!r}")
    if choices is not None and v not in choices:
        hint = difflib.get_close_matches(v, choices, n=1)
        tip = f" (did you mean {hint[0]!r}?)" if hint else ""
        raise StudyError(f"{where}{key} must be one of {', '.join(choices)}, got {v!r}{tip}")
    return v


def _table(doc: dict, key: str, required: bool = True) -> dict:
    if key not in doc:
        if required:
            raise StudyError(f"[{key}] table is missing")
        return {}
    v = doc[key]
    if not isinstance(v, dict):
        raise StudyError(f"{key} must be a table ([{key}]), got {v!r}")
    return v


TOP_KEYS = ("title", "panel", "material", "load_case", "cutout", "measure", "constraints", "search")


def parse_study(doc: dict, source: str = "") -> Study:
    """Validate a decoded TOML document and build the :class:`Study`."""
    _unknown(doc, TOP_KEYS, "")
    title = doc.get("title", Path(source).stem if source else "untitled study")
    if not isinstance(title, str):
        raise StudyError(f"title must be a string, got {title!r}")

    p = _table(doc, "panel")
    _unknown(p, ("width", "height", "thickness", "edges"), "panel.")
    panel = Panel(
        width=_number(p, "width", "panel.", positive=True),
        height=_number(p, "height", "panel.", positive=True),
        thickness=_number(p, "thickness", "panel.", positive=True),
        edges=_string(p, "edges", "panel.", EDGES, default="traction"),
    )

    m = _table(doc, "material")
    _unknown(m, ("name", "youngs_modulus", "poisson_ratio", "allowable_stress", "density"), "material.")
    nu = _number(m, "poisson_ratio", "material.")
    if not -1.0 < nu < 0.5:
        raise StudyError(f"material.poisson_ratio must lie strictly between -1 and 0.5, got {nu!r}")
    material = Material(
        name=_string(m, "name", "material.", default="unnamed material"),
        youngs_modulus=_number(m, "youngs_modulus", "material.", positive=True),
        poisson_ratio=nu,
        allowable_stress=_number(m, "allowable_stress", "material.", default=None, positive=True),
        density=_number(m, "density", "material.", default=None, positive=True),
    )

    cases = doc.get("load_case")
    if cases is None:
        raise StudyError("[[load_case]] is missing: give at least one load case (sigma_x, sigma_y, tau_xy in MPa)")
    if isinstance(cases, dict):
        cases = [cases]
    if not isinstance(cases, list) or not cases or not all(isinstance(c, dict) for c in cases):
        raise StudyError(f"load_case must be one or more [[load_case]] tables, got {cases!r}")
    load_cases = []
    for i, c in enumerate(cases):
        where = f"load_case[{i}]."
        _unknown(c, ("name", "sigma_x", "sigma_y", "tau_xy"), where)
        lc = LoadCase(
            name=_string(c, "name", where, default=f"load case {i + 1}"),
            sigma_x=_number(c, "sigma_x", where, default=0.0),
            sigma_y=_number(c, "sigma_y", where, default=0.0),
            tau_xy=_number(c, "tau_xy", where, default=0.0),
        )
        if lc.components == (0.0, 0.0, 0.0):
            raise StudyError(f"load_case[{i}] ({lc.name!r}) has no stress: give at least one of sigma_x, sigma_y,"
                             " tau_xy (MPa, non-zero)")
        load_cases.append(lc)
    names = [lc.name for lc in load_cases]
    dup = sorted({n for n in names if names.count(n) > 1})
    if dup:
        raise StudyError(f"load_case names must be unique, got {dup[0]!r} more than once")

    cutout = _parse_cutout(_table(doc, "cutout"), panel)

    ms = _table(doc, "measure", required=False)
    _unknown(ms, ("stress", "accuracy"), "measure.")
    measure = Measure(
        stress=_string(ms, "stress", "measure.", MEASURES, default="von_mises"),
        accuracy=_string(ms, "accuracy", "measure.", ACCURACIES, default="standard"),
    )
    extra = {k: doc[k] for k in ("constraints", "search") if k in doc}
    for k, v in extra.items():
        if not isinstance(v, dict):
            raise StudyError(f"{k} must be a table ([{k}]), got {v!r}")
    return Study(title=title, panel=panel, material=material, load_cases=tuple(load_cases), cutout=cutout,
                 measure=measure, extra=extra, source=source)


def _parse_cutout(c: dict, panel: Panel) -> CutoutSpec:
    shape = _string(c, "shape", "cutout.", tuple(SHAPE_PARAMETERS))
    params = SHAPE_PARAMETERS[shape]
    _unknown(c, COMMON_CUTOUT_KEYS + params, "cutout.")
    values: dict[str, Any] = {}
    for key in params:
        if key == "symmetry":
            values[key] = _string(c, key, "cutout.", ("none", "x", "xy"), default="none")
        elif key == "radii":
            radii = c.get("radii")
            if radii is None:
                raise StudyError("cutout.radii is missing (a list of radii in mm, equally spaced in angle)")
            if isinstance(radii, dict):  # one range for every radius
                count = radii.get("count")
                rest = {k: v for k, v in radii.items() if k != "count"}
                if not isinstance(count, int) or isinstance(count, bool) or count < 2:
                    raise StudyError(f"cutout.radii.count must be an integer >= 2 when radii is a range, got {count!r}")
                rng = _range(rest, "cutout.radii", True)
                values[key] = [rng] * count
            elif isinstance(radii, list):
                values[key] = [_number({"r": r}, "r", f"cutout.radii[{i}]", positive=True, allow_range=True)
                               if not isinstance(r, dict) else _range(r, f"cutout.radii[{i}]", True)
                               for i, r in enumerate(radii)]
            else:
                raise StudyError(f"cutout.radii must be a list of numbers (mm), got {radii!r}")
        else:
            values[key] = _number(c, key, "cutout.", positive=True, allow_range=True)
    center = c.get("center", [panel.width / 2, panel.height / 2])
    if isinstance(center, dict):
        raise StudyError("cutout.center ranges are given per coordinate: center = [{min=..., max=...}, 100.0]")
    if not isinstance(center, list) or len(center) != 2:
        raise StudyError(f"cutout.center must be [x, y] in mm, got {center!r}")
    values["center"] = [_number({"v": v}, "v", f"cutout.center[{i}]", allow_range=True) if not isinstance(v, dict)
                        else _range(v, f"cutout.center[{i}]", False) for i, v in enumerate(center)]
    values["rotation"] = _number(c, "rotation", "cutout.", default=0.0, allow_range=True)
    spec = CutoutSpec(shape=shape, values=values)
    if not spec.ranges:
        check_cutout_in_panel(spec.build(), panel)
    return spec


def check_cutout_in_panel(cutout, panel: Panel) -> None:
    """Raise :class:`GeometryError` unless the cutout is a simple closed curve strictly inside the panel."""
    from shapely.geometry import Polygon

    poly = Polygon(cutout.polygon(720))
    if not poly.is_valid:
        raise GeometryError(f"cutout ({cutout.family}, {cutout.parameters()}) crosses itself; "
                            "the outline must be a simple closed curve")
    x0, y0, x1, y1 = cutout.bounds
    gaps = {"left": x0, "bottom": y0, "right": panel.width - x1, "top": panel.height - y1}
    edge, gap = min(gaps.items(), key=lambda kv: kv[1])
    if gap <= 0:
        raise GeometryError(
            f"cutout.center {list(cutout.center)} puts the {cutout.family} outside or across the {edge} panel edge"
            f" (ligament {gap:.3g} mm); it must lie inside the {panel.width:g} x {panel.height:g} mm panel")
    if gap < 1e-3 * min(panel.width, panel.height):
        raise GeometryError(
            f"cutout.center {list(cutout.center)} leaves a ligament of only {gap:.3g} mm to the {edge} edge;"
            f" at least {1e-3 * min(panel.width, panel.height):.3g} mm (0.1 % of the panel) is needed to mesh it")


def load_study(path: str | Path) -> Study:
    """Read and validate a study file."""
    try:
        import tomllib
    except ModuleNotFoundError:  # Python 3.10
        import tomli as tomllib  # type: ignore[no-redef]

    path = Path(path)
    try:
        text = path.read_text(encoding="utf-8")
    except FileNotFoundError as err:
        raise StudyError(f"study file {str(path)!r} does not exist") from err
    except (OSError, UnicodeDecodeError) as err:
        raise StudyError(f"study file {str(path)!r} cannot be read: {err}") from err
    try:
        doc = tomllib.loads(text)
    except tomllib.TOMLDecodeError as err:
        raise StudyError(f"study file {str(path)!r} is not valid TOML: {err}") from err
    return parse_study(doc, source=str(path))
