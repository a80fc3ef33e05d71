"""Study files (TOML, mm / N / MPa): read and checked once, at the edge, into the frozen dataclasses of
:mod:`holeshape.study`.

Every rule broken gives a :class:`StudyError` whose one-line message names the field, echoes the value and says
what is allowed. Unknown keys are errors (with a "did you mean" hint), so a misspelt key never passes silently.
"""

from __future__ import annotations

import math
from pathlib import Path
from typing import TYPE_CHECKING, Any

import holeshape.checks as checks_registry
import holeshape.checks.outline as outline_rules
from holeshape.elastic import ELASTIC_KINDS
from holeshape.errors import GeometryError, StudyError
from holeshape.goals import GOALS
from holeshape.parameters import OpeningSpec, ReinforcementSpec, RowSpec
from holeshape.study import (
    ACCURACIES,
    COMMON_CUTOUT_KEYS,
    EDGE_SUPPORTS,
    EDGES,
    MEASURES,
    METHODS,
    ROW_PARAMETERS,
    SHAPE_PARAMETERS,
    SHEAR_DISTRIBUTIONS,
    Access,
    Constraints,
    CutoutSpec,
    LoadCase,
    Material,
    Measure,
    Panel,
    Range,
    SearchSettings,
    StabilitySettings,
    Study,
)
from holeshape.tablefields import string_value, table_list, unknown_keys

if TYPE_CHECKING:
    from holeshape.checks import Check
    from holeshape.geometry import Cutout


_unknown = unknown_keys  # the rules every table shares (holeshape.tablefields)
_string = string_value


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
    _unknown(v, ("min", "max", "log", "value"), f"{name}.")
    lo = _number(v, "min", f"{name}.", positive=positive)
    hi = _number(v, "max", f"{name}.", positive=positive)
    log = v.get("log", False)
    if not isinstance(log, bool):
        raise StudyError(f"{name}.log must be true or false, got {log!r}")
    if lo > hi:
        raise StudyError(f"{name} must have min <= max, got min = {lo!r}, max = {hi!r}")
    if log and lo <= 0:
        raise StudyError(f"{name} with log = true needs min > 0, got {lo!r}")
    value = _number(v, "value", f"{name}.", default=None)
    if value is not None and not lo <= value <= hi:
        raise StudyError(f"{name}.value must lie between min = {lo!r} and max = {hi!r}, got {value!r}")
    return Range(lo, hi, log, value)



def _table(doc: dict, key: str, required: bool = True) -> dict:
    if key not in doc:
        if required:
            raise StudyError(f"[{key}] table is missing")
        return {}
    v = doc[key]
    if isinstance(v, list) and v and all(isinstance(t, dict) for t in v):
        raise StudyError(f"{key} must be one table, written [{key}], got [[{key}]] ({len(v)} of them): a study has"
                         f" one {key} table")
    if not isinstance(v, dict):
        raise StudyError(f"{key} must be a table ([{key}]), got {_shown(v)}")
    return v


TOP_KEYS = ("title", "panel", "material", "load_case", "cutout", "measure", "constraints", "search", "stability",
            "reinforcement")


def check_tables() -> dict[str, type[Check]]:
    """The study-file tables the registered checks read, by table name (``Check.table``; each parsed by the
    check's ``parse_table`` into ``Study.tables``). Read from the registry at each parse, so a check registered
    after import (a test's, a plug-in's) is seen."""
    return {c.table: c for c in checks_registry.CHECKS if c.table is not None}


def parse_study(doc: dict, source: str = "") -> Study:
    """Validate a decoded TOML document and build the :class:`Study`."""
    own_tables = check_tables()
    _unknown(doc, TOP_KEYS + tuple(own_tables), "")
    title = doc.get("title", Path(source).stem if source else "untitled study")
    if not isinstance(title, str):
        raise StudyError(f"title must be a string, got {title!r}")

    p = _table(doc, "panel")
    _unknown(p, ("width", "height", "thickness", "edges", "section_inertia", "neutral_axis_y", "shear_distribution"),
             "panel.")
    panel = Panel(
        width=_number(p, "width", "panel.", positive=True),
        height=_number(p, "height", "panel.", positive=True),
        thickness=_number(p, "thickness", "panel.", positive=True),
        edges=_string(p, "edges", "panel.", EDGES, default="traction"),
        section_inertia=_number(p, "section_inertia", "panel.", default=None, positive=True),
        neutral_axis_y=_number(p, "neutral_axis_y", "panel.", default=None),
        shear_distribution=_string(p, "shear_distribution", "panel.", SHEAR_DISTRIBUTIONS, default="uniform"),
    )

    m = _table(doc, "material")
    material = _parse_material(m)

    cases = doc.get("load_case")
    if cases is None:
        raise StudyError("[[load_case]] is missing: give at least one load case (sigma_x, sigma_y, tau_xy in MPa)")
    cases = table_list(cases, "load_case")
    load_cases = []
    for i, c in enumerate(cases):
        where = f"load_case[{i}]."
        _unknown(c, ("name", "sigma_x", "sigma_y", "tau_xy", "shear_force", "bending_moment"), where)
        if any(k in c for k in ("shear_force", "bending_moment")):
            lc = _beam_case(c, i, where, panel)
            load_cases.append(lc)
            continue
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

    cutout = _parse_cutouts(doc, panel)

    ms = _table(doc, "measure", required=False)
    _unknown(ms, ("stress", "accuracy"), "measure.")
    measure = Measure(
        stress=_string(ms, "stress", "measure.", MEASURES, default="von_mises"),
        accuracy=_string(ms, "accuracy", "measure.", ACCURACIES, default="standard"),
    )
    constraints = _parse_constraints(_table(doc, "constraints", required=False), panel)
    search = _parse_search(_table(doc, "search", required=False))
    stability = _parse_stability(_table(doc, "stability", required=False)) if "stability" in doc else None
    if constraints.min_buckling_factor is not None and stability is None:
        raise StudyError(f"constraints.min_buckling_factor = {constraints.min_buckling_factor!r} needs a [stability]"
                         ' table (at least edge_support = "simply_supported" or "clamped") to say how the panel'
                         " edges are supported out of plane")
    if constraints.min_margin is not None and material.allowable_stress is None:
        raise StudyError(f"constraints.min_margin = {constraints.min_margin!r} needs material.allowable_stress (MPa)"
                         " to measure the margin of safety against")
    if constraints.area is not None and len(cutout.openings) > 1:
        raise StudyError(f"constraints.area = {constraints.area!r} mm^2 fixes the area of one design scaled to it;"
                         " with several [[cutout]] tables use min_area / max_area (the total)")
    if constraints.access is not None and len(cutout.openings) > 1:
        raise StudyError("constraints.access with several [[cutout]] tables: an access envelope belongs to one"
                         " opening; give it with a single [cutout]")
    if constraints.access is not None and cutout.row is not None:
        raise StudyError(f"constraints.access with a row of {cutout.row.count} openings (cutout.count): an access"
                         " envelope belongs to one opening; give the row without it, or a single opening")
    for name in ("max_added_mass", "max_reinforcement_area"):
        if getattr(constraints, name) is not None and cutout.reinforcement is None:
            raise StudyError(f"constraints.{name} = {getattr(constraints, name)!r} needs a [reinforcement] table"
                             ' (kind = "flange" or "ring") to limit')
    if constraints.max_added_mass is not None and material.density is None:
        raise StudyError(f"constraints.max_added_mass = {constraints.max_added_mass!r} kg needs material.density"
                         " (kg/m^3) to weigh the reinforcement")
    for key, cls in check_constraint_keys().items():
        if constraints.get(key) is not None and (cls.table is None or cls.table not in doc):
            raise StudyError(f"constraints.{key} = {constraints.get(key)!r} needs a [{cls.table}] table to check it"
                             " against")
    parts = {"panel": panel, "material": material, "load_cases": tuple(load_cases), "cutout": cutout,
             "constraints": dict(constraints.more), "folder": Path(source).parent if source else None}
    tables = tuple((cls.name, cls.parse_table(_table(doc, name), parts)) for name, cls in own_tables.items()
                   if name in doc)
    study = Study(title=title, panel=panel, material=material, load_cases=tuple(load_cases), cutout=cutout,
                  measure=measure, constraints=constraints, search=search, source=source, stability=stability,
                  warnings=tuple(plausibility(panel, material, tuple(load_cases))), tables=tables)
    why = GOALS[search.goal].requires(study, [c.name for c in checks_registry.CHECKS if c.bounds(study)])
    if why is not None:
        raise StudyError(why)
    return study


def plausibility(panel: Panel, material: Material, load_cases: tuple[LoadCase, ...] = ()) -> list[str]:
    """One-line warnings for values that are valid but look like a unit slip (the study's units are mm, N, MPa)."""
    out = material.elastic.plausibility()
    t = panel.thickness
    if not PLAUSIBLE_THICKNESS_MM[0] <= t <= PLAUSIBLE_THICKNESS_MM[1]:
        out.append(f"panel.thickness = {t:g} mm is outside {PLAUSIBLE_THICKNESS_MM[0]:g} to"
                   f" {PLAUSIBLE_THICKNESS_MM[1]:g} mm, where webs and plates lie: holeshape works in mm; check the"
                   " unit (a thickness in metres or micrometres?)")
    lo, hi = PLAUSIBLE_STRESS_MPA
    for key in ("allowable_stress", "net_section_allowable"):
        v = getattr(material, key)
        if v is not None and not lo <= v <= hi:
            out.append(f"material.{key} = {v:g} MPa is outside {lo:g} to {hi:g} MPa, where the strengths of"
                       " structural materials lie: holeshape works in MPa (N/mm^2); check the unit (a value in Pa"
                       " or kPa?)")
    for i, lc in enumerate(load_cases):
        for key in ("sigma_x", "sigma_y", "tau_xy"):
            v = getattr(lc, key)
            if abs(v) > hi:
                out.append(f"load_case[{i}].{key} = {v:g} MPa ({lc.name}) is beyond {hi:g} MPa, more than any"
                           " structural material carries: holeshape works in MPa (N/mm^2); check the unit")
    return out


PLAUSIBLE_THICKNESS_MM = (0.1, 100.0)  # foil to heavy plate (common practice, no source)
PLAUSIBLE_STRESS_MPA = (1.0, 5000.0)  # soft polymers to the strongest steel wire (common practice, no source)


def _parse_material(m: dict) -> Material:
    """[material]: the elastic kind's constants (``kind``, default "isotropic") and the allowables."""
    kind = _string(m, "kind", "material.", tuple(ELASTIC_KINDS), default="isotropic")
    common = ("name", "kind", "allowable_stress", "net_section_allowable", "density")
    cls = ELASTIC_KINDS[kind]
    _unknown(m, common + cls.keys(), "material.")
    try:
        elastic = cls.from_table(m, lambda key: _number(m, key, "material."))
    except StudyError:
        raise
    except ValueError as err:  # the kind's own check, which names the field
        raise StudyError(str(err)) from None
    return Material(
        name=_string(m, "name", "material.", default="unnamed material"),
        elastic=elastic,
        allowable_stress=_number(m, "allowable_stress", "material.", default=None, positive=True),
        density=_number(m, "density", "material.", default=None, positive=True),
        net_section_allowable=_number(m, "net_section_allowable", "material.", default=None, positive=True),
    )


def _beam_case(c: dict, i: int, where: str, panel: Panel) -> LoadCase:
    """A load case given by the beam's shear force and bending moment, checked against the panel's section."""
    mixed = [k for k in ("sigma_x", "sigma_y", "tau_xy") if k in c]
    if mixed:
        raise StudyError(f"load_case[{i}] mixes remote stresses ({', '.join(mixed)}) with beam forces (shear_force,"
                         " bending_moment); give one kind per load case (a study may mix both kinds of case)")
    lc = LoadCase(name=_string(c, "name", where, default=f"load case {i + 1}"),
                  shear_force=_number(c, "shear_force", where, default=0.0),
                  bending_moment=_number(c, "bending_moment", where, default=0.0))
    if lc.shear_force == 0.0 and lc.bending_moment == 0.0:
        raise StudyError(f"load_case[{i}] ({lc.name!r}) has no load: give shear_force (N) and/or bending_moment"
                         " (N mm), non-zero")
    if panel.section_inertia is None:
        raise StudyError(f"load_case[{i}] ({lc.name!r}) gives beam forces but panel.section_inertia is missing (mm^4,"
                         " the second moment of area of the whole beam section about its neutral axis)")
    if panel.edges != "traction":
        raise StudyError(f"load_case[{i}] ({lc.name!r}) gives beam forces, which load the panel edges as tractions:"
                         f' panel.edges must be "traction", got {panel.edges!r}')
    na = panel.neutral_axis
    if not 0.0 <= na <= panel.height:
        raise StudyError(f"panel.neutral_axis_y = {na!r} mm must lie within the panel height (0 to"
                         f" {panel.height:g} mm)")
    if panel.shear_distribution == "parabolic":
        solid = panel.thickness * panel.height ** 3 / 12.0
        if abs(na - panel.height / 2) > 1e-9 * panel.height or abs(panel.section_inertia / solid - 1) > 0.01:
            raise StudyError(
                f'panel.shear_distribution = "parabolic" is the solid rectangular section (the panel is the whole'
                f" section): it needs the neutral axis at mid-height and panel.section_inertia = t h^3 / 12 ="
                f" {solid:.6g} mm^4, got {panel.section_inertia!r} mm^4 with the neutral axis at {na:g} mm; use"
                ' "uniform" for a web between caps')
    return lc


def _parse_stability(c: dict) -> StabilitySettings:
    w = "stability."
    _unknown(c, ("edge_support", "required_factor", "modes"), w)
    modes = c.get("modes", 1)
    if isinstance(modes, bool) or not isinstance(modes, int) or not 1 <= modes <= 6:
        raise StudyError(f"stability.modes must be an integer from 1 to 6 (mode shapes to plot), got {modes!r}")
    return StabilitySettings(
        edge_support=_string(c, "edge_support", w, EDGE_SUPPORTS, default="simply_supported"),
        required_factor=_number(c, "required_factor", w, default=1.0, positive=True),
        modes=modes)


def check_constraint_keys() -> dict[str, type[Check]]:
    """The [constraints] keys the registered checks read (``Check.constraint_keys``), by key."""
    return {k: c for c in checks_registry.CHECKS for k in c.constraint_keys}


def _parse_constraints(c: dict, panel: Panel) -> Constraints:
    w = "constraints."
    own = check_constraint_keys()
    _unknown(c, ("min_area", "max_area", "area", "access", "clearance", "min_ligament", "min_radius",
                 "min_buckling_factor", "min_margin", "max_added_mass", "max_reinforcement_area", *own), w)
    access = None
    if "access" in c:
        a = c["access"]
        if not isinstance(a, dict):
            raise StudyError(f"constraints.access must be a table such as {{width = 100.0, height = 60.0}} or "
                             f"{{diameter = 80.0}}, got {a!r}")
        _unknown(a, ("width", "height", "diameter", "center", "rotation"), "constraints.access.")
        aw = "constraints.access."
        if "diameter" in a:
            if "width" in a or "height" in a:
                raise StudyError("constraints.access takes either diameter or width and height, not both")
            dims = {"diameter": _number(a, "diameter", aw, positive=True)}
        elif "width" in a or "height" in a:
            dims = {"width": _number(a, "width", aw, positive=True), "height": _number(a, "height", aw, positive=True)}
        else:
            raise StudyError("constraints.access needs width and height (mm) or diameter (mm)")
        center = a.get("center")
        if center is not None:
            if not isinstance(center, list) or len(center) != 2:
                raise StudyError(f"constraints.access.center must be [x, y] in mm, got {center!r}")
            center = tuple(_number({"v": v}, "v", f"{aw}center[{i}]") for i, v in enumerate(center))
        access = Access(center=center, rotation=_number(a, "rotation", aw, default=0.0), **dims)
    cons = Constraints(
        min_area=_number(c, "min_area", w, default=None, positive=True),
        max_area=_number(c, "max_area", w, default=None, positive=True),
        area=_number(c, "area", w, default=None, positive=True),
        access=access,
        clearance=_number(c, "clearance", w, default=0.0),
        min_ligament=_number(c, "min_ligament", w, default=None, positive=True),
        min_radius=_number(c, "min_radius", w, default=None, positive=True),
        min_buckling_factor=_number(c, "min_buckling_factor", w, default=None, positive=True),
        min_margin=_number(c, "min_margin", w, default=None),
        max_added_mass=_number(c, "max_added_mass", w, default=None, positive=True),
        max_reinforcement_area=_number(c, "max_reinforcement_area", w, default=None, positive=True),
        more=tuple((k, _number(c, k, w, positive=True)) for k in own if k in c),
    )
    if cons.min_margin is not None and not -1.0 < cons.min_margin <= 10.0:
        raise StudyError(f"constraints.min_margin must lie in (-1, 10] (a margin of safety, e.g. 0.0 or 0.15), got"
                         f" {cons.min_margin!r}")
    if cons.clearance < 0:
        raise StudyError(f"constraints.clearance must be >= 0 mm, got {cons.clearance!r}")
    if cons.area is not None and (cons.min_area is not None or cons.max_area is not None):
        raise StudyError("constraints.area fixes the area: give either area or min_area / max_area, not both")
    if cons.min_area is not None and cons.max_area is not None and cons.min_area > cons.max_area:
        raise StudyError(f"constraints.min_area ({cons.min_area!r} mm^2) must not exceed constraints.max_area"
                         f" ({cons.max_area!r} mm^2)")
    limit = panel.width * panel.height
    for name in ("min_area", "area"):
        v = getattr(cons, name)
        if v is not None and v >= limit:
            raise StudyError(f"constraints.{name} = {v!r} mm^2 cannot be removed from a {limit:g} mm^2 panel")
    if cons.min_ligament is not None and 2 * cons.min_ligament >= min(panel.width, panel.height):
        raise StudyError(f"constraints.min_ligament = {cons.min_ligament!r} mm leaves no room for an opening in a "
                         f"{panel.width:g} x {panel.height:g} mm panel")
    if access is not None:
        x0, y0, x1, y1 = access.polygon((0.0, 0.0), cons.clearance).bounds
        lig = 2 * (cons.min_ligament or 0.0)
        if x1 - x0 + lig >= panel.width or y1 - y0 + lig >= panel.height:
            raise StudyError(
                f"constraints.access envelope ({x1 - x0:g} x {y1 - y0:g} mm with clearance {cons.clearance:g} mm) plus"
                f" the ligament of {cons.min_ligament or 0:g} mm each side cannot fit the {panel.width:g} x "
                f"{panel.height:g} mm panel")
        env_area = access.polygon((0.0, 0.0), cons.clearance).area
        for name in ("max_area", "area"):
            v = getattr(cons, name)
            if v is not None and v < env_area:
                raise StudyError(f"constraints.{name} = {v!r} mm^2 is smaller than the access envelope with its "
                                 f"clearance ({env_area:.0f} mm^2): no opening can meet both")
    return cons


def _parse_search(c: dict) -> SearchSettings:
    _unknown(c, ("trials", "seed", "global_fraction", "goal", "method"), "search.")
    trials, seed = c.get("trials", 60), c.get("seed", 0)
    for name, v in (("trials", trials), ("seed", seed)):
        if isinstance(v, bool) or not isinstance(v, int):
            raise StudyError(f"search.{name} must be an integer, got {v!r}")
    if trials < 1 or trials > 100_000:
        raise StudyError(f"search.trials must be between 1 and 100000, got {trials!r}")
    if seed < 0:
        raise StudyError(f"search.seed must be >= 0, got {seed!r}")
    frac = _number(c, "global_fraction", "search.", default=0.25)
    if not 0.0 < frac <= 1.0:
        raise StudyError(f"search.global_fraction must be in (0, 1], got {frac!r}")
    goal = _string(c, "goal", "search.", tuple(GOALS), default="lowest_peak")
    method = _string(c, "method", "search.", METHODS, default="auto")
    return SearchSettings(trials=trials, seed=seed, global_fraction=frac, goal=goal, method=method)


def _parse_reinforcement(c: dict) -> ReinforcementSpec:
    """The [reinforcement] table: its kind and sizes (sizes may be ranges)."""
    w = "reinforcement."
    from holeshape.geometry.reinforcement import REINFORCEMENTS

    kind = _string(c, "kind", w, tuple(REINFORCEMENTS))
    cls = REINFORCEMENTS[kind]
    every = sorted({k for other in REINFORCEMENTS.values() for k in other.keys()})
    for key in c:
        if key != "kind" and key in every and key not in cls.keys():
            takes = " and ".join(cls.required) + ("" if "thickness" in cls.required else
                                                  " (and thickness, default the web's)")
            raise StudyError(f"reinforcement.{key} does not apply to kind = {kind!r}; a {kind} takes {takes}")
    _unknown(c, ("kind", *cls.keys()), w)
    sizes = tuple((key, _number(c, key, w, positive=True, allow_range=True)) for key in cls.keys()
                  if key in cls.required or key in c)
    return ReinforcementSpec(kind=kind, sizes=sizes)


def _parse_cutouts(doc: dict, panel: Panel) -> CutoutSpec:
    """[cutout] (one table, perhaps a row) or [[cutout]] (several tables, each its own opening), with the
    [reinforcement]."""
    reinforcement = _parse_reinforcement(_table(doc, "reinforcement")) if "reinforcement" in doc else None
    tables = doc.get("cutout")
    if tables is None:
        raise StudyError("[cutout] table is missing")
    if isinstance(tables, dict):
        tables = [tables]
    if not isinstance(tables, list) or not tables or not all(isinstance(t, dict) for t in tables):
        raise StudyError(f"cutout must be a [cutout] table or [[cutout]] tables, got {_shown(tables)}")
    several = len(tables) > 1
    if several and reinforcement is not None:
        raise StudyError(f"[[cutout]] is given {len(tables)} times with a [reinforcement]: reinforcing several"
                         " openings is not supported yet; reinforce a single opening")
    openings, row = [], None
    for i, t in enumerate(tables):
        where = f"cutout[{i}]." if several else "cutout."
        if several and "count" in t:
            raise StudyError(f"cutout[{i}].count: a row inside one of several [[cutout]] tables is not supported;"
                             " give either one [cutout] with count and pitch or separate [[cutout]] tables")
        openings.append(_parse_opening(t, panel, where))
        if not several:
            row = _parse_row(t, reinforcement is not None)
    spec = CutoutSpec(openings=tuple(openings), row=row, reinforcement=reinforcement)
    if all(r.value is not None for r in spec.ranges.values()):
        check_cutout_in_panel(spec.build(), panel)
    return spec


def _parse_row(c: dict, reinforced: bool) -> RowSpec | None:
    """count / pitch / direction of a row of copies of the opening (None for one opening)."""
    given = [k for k in ROW_PARAMETERS if k in c]
    if not given:
        return None
    if "count" not in c:
        raise StudyError(f"cutout.{given[0]} is given without cutout.count: a row needs count (the number of"
                         " openings, an integer from 2 to 50), pitch (mm, centre to centre) and optionally direction"
                         " (degrees)")
    count = c.get("count")
    if isinstance(count, bool) or not isinstance(count, int) or not 1 <= count <= 50:
        raise StudyError(f"cutout.count must be an integer from 1 to 50 (openings in the row), got {_shown(count)}")
    if count == 1:
        return None
    if "pitch" not in c:
        raise StudyError(f"cutout.count = {count} needs cutout.pitch (mm, centre to centre along the row)")
    if reinforced:
        raise StudyError(f"cutout.count = {count} with a [reinforcement]: reinforced rows are not supported yet;"
                         " reinforce a single opening, or leave the row bare")
    return RowSpec(count=count, pitch=_number(c, "pitch", "cutout.", positive=True, allow_range=True),
                   direction=_number(c, "direction", "cutout.", default=0.0))


def _parse_opening(c: dict, panel: Panel, where: str) -> OpeningSpec:
    shape = _string(c, "shape", where, tuple(SHAPE_PARAMETERS))
    params = SHAPE_PARAMETERS[shape]
    _unknown(c, COMMON_CUTOUT_KEYS + (ROW_PARAMETERS if where == "cutout." else ()) + params, where)
    values: list[tuple[str, Any]] = []
    for key in params:
        if key == "symmetry":
            values.append((key, _string(c, key, where, ("none", "x", "xy"), default="none")))
        elif key == "radii":
            radii = c.get("radii")
            if radii is None:
                raise StudyError(f"{where}radii is missing (a list of radii in mm, equally spaced in angle)")
            if isinstance(radii, dict):  # one range for every radius
                count = radii.get("count")
                rest = {k: v for k, v in radii.items() if k != "count"}
                if not isinstance(count, int) or isinstance(count, bool) or count < 2:
                    raise StudyError(f"{where}radii.count must be an integer >= 2 when radii is a range, got"
                                     f" {_shown(count)}")
                rng = _range(rest, f"{where}radii", True)
                values.append((key, (rng,) * count))
            elif isinstance(radii, list):
                values.append((key, tuple(
                    _number({"r": r}, "r", f"{where}radii[{i}]", positive=True, allow_range=True)
                    if not isinstance(r, dict) else _range(r, f"{where}radii[{i}]", True)
                    for i, r in enumerate(radii))))
            else:
                raise StudyError(f"{where}radii must be a list of numbers (mm), got {_shown(radii)}")
        else:
            values.append((key, _number(c, key, where, positive=True, allow_range=True)))
    center = c.get("center", [panel.width / 2, panel.height / 2])
    if isinstance(center, dict):
        raise StudyError(f"{where}center ranges are given per coordinate: center = [{{min=..., max=...}}, 100.0]")
    if not isinstance(center, list) or len(center) != 2:
        raise StudyError(f"{where}center must be [x, y] in mm, got {_shown(center)}")
    xy = tuple(_number({"v": v}, "v", f"{where}center[{i}]", allow_range=True) if not isinstance(v, dict)
               else _range(v, f"{where}center[{i}]", False) for i, v in enumerate(center))
    return OpeningSpec(shape=shape, values=tuple(values), center=(xy[0], xy[1]),
                       rotation=_number(c, "rotation", where, default=0.0, allow_range=True))


def _shown(v: Any) -> str:
    """A value from the file as a person wrote it: TOML tables and arrays, not Python's dicts and lists."""
    if isinstance(v, dict):
        return "{" + ", ".join(f"{k} = {_shown(x)}" for k, x in v.items()) + "}"
    if isinstance(v, list):
        if v and all(isinstance(x, dict) for x in v):
            return f"an array of {len(v)} tables"
        return "[" + ", ".join(_shown(x) for x in v) + "]"
    if isinstance(v, str):
        return f'"{v}"'
    if isinstance(v, bool):
        return "true" if v else "false"
    return repr(v)


def check_cutout_in_panel(cutout: Cutout, panel: Panel) -> None:
    """Raise :class:`GeometryError` unless every opening is a simple closed curve strictly inside the panel, with web
    between openings; the message names the table and the value that put it there."""
    from shapely.geometry import Polygon

    members = cutout.members
    separate = bool(cutout.others)

    def table(k: int) -> str:
        return f"cutout[{k}]" if separate else "cutout"

    outlines = cutout.outlines(720)
    polys = [Polygon(p) for p in outlines]
    for k, (m, a) in enumerate(zip(members, polys)):
        if not a.is_valid:
            raise GeometryError(f"{table(k)} ({m.family}, {m.shape.parameters()}) crosses itself; the outline must be"
                                " a simple closed curve")
    if separate:
        for i, a in enumerate(polys):
            for j in range(i):
                gap = a.distance(polys[j])
                if gap < outline_rules.least_web_between([outlines[i], outlines[j]]):
                    raise GeometryError(f"cutout[{i}] overlaps or touches cutout[{j}] (web between them {gap:.3g} mm);"
                                        " separate openings need web between them")
    elif cutout.count > 1:
        assert cutout.row is not None  # one table of several openings: a row
        gap = min(a.distance(b) for a, b in zip(polys, polys[1:]))
        if gap < outline_rules.least_web_between(outlines):
            raise GeometryError(
                f"cutout.pitch = {cutout.row.pitch:g} mm makes neighbouring openings of the row overlap or touch"
                f" (web between them {gap:.3g} mm); the pitch must exceed the opening's size along the row")
    least = outline_rules.INSIDE * min(panel.width, panel.height)
    for k, m in enumerate(members):
        edge, gap = min(m.edge_gaps(panel.width, panel.height).items(), key=lambda kv: kv[1])
        if gap >= least:
            continue
        if cutout.row is not None:
            row = cutout.row
            span = (row.count - 1) * row.pitch
            raise GeometryError(
                f"cutout.count = {row.count} at cutout.pitch = {row.pitch:g} mm (a row {span:g} mm long between its end"
                f" centres, direction {row.direction:g} deg) runs opening {k + 1} "
                + ("across" if gap <= 0 else f"to within {gap:.3g} mm of") + f" the {edge} panel edge (ligament"
                f" {gap:.3g} mm) of the {panel.width:g} x {panel.height:g} mm panel: fewer openings, a smaller pitch"
                " or a centre further from that edge")
        where = f"{table(k)}.center {[round(c, 6) for c in m.center]}"
        if gap <= 0:
            raise GeometryError(
                f"{where} puts the {m.family} outside or across the {edge} panel edge (ligament {gap:.3g} mm); it must"
                f" lie inside the {panel.width:g} x {panel.height:g} mm panel")
        raise GeometryError(
            f"{where} leaves a ligament of only {gap:.3g} mm to the {edge} edge; at least {least:.3g} mm (0.1 % of"
            " the panel) is needed to mesh it")
    r = cutout.reinforcement
    outer = None if r is None else r.interior_outline(cutout)
    if r is not None and outer is not None:
        size = f"reinforcement.{r.keys()[0]} = {r.size:g} mm"
        if not Polygon(outer.polygon(720)).is_valid:
            raise GeometryError(f"{size} makes the {r.kind}'s outer edge cross itself")
        ring_edge, ring_gap = min(outer.edge_gaps(panel.width, panel.height).items(), key=lambda kv: kv[1])
        if ring_gap < least:
            raise GeometryError(
                f"{size} runs the {r.kind} past the {ring_edge} panel edge (gap {ring_gap:.3g} mm); the {r.kind}"
                " must lie inside the panel with a ligament of web beyond it")


def dump_toml(doc: dict) -> str:
    """A small TOML writer for these documents (tables, arrays of tables, inline tables, floats incl. nan/inf)."""

    def val(v: Any) -> str:
        if isinstance(v, bool):
            return "true" if v else "false"
        if isinstance(v, float):
            if math.isnan(v):
                return "nan"
            if math.isinf(v):
                return "inf" if v > 0 else "-inf"
            return repr(v)
        if isinstance(v, int):
            return str(v)
        if isinstance(v, str):
            return '"' + v.replace("\\", "\\\\").replace('"', '\\"') + '"'
        if isinstance(v, list):
            return "[" + ", ".join(val(x) for x in v) + "]"
        if isinstance(v, dict):
            return "{" + ", ".join(f"{key(k)} = {val(x)}" for k, x in v.items()) + "}"
        raise TypeError(v)

    def key(k: str) -> str:
        return k if k.replace("_", "").isalnum() else val(k)

    lines = [f"{key(k)} = {val(v)}" for k, v in doc.items() if not isinstance(v, (dict, list)) or
             (isinstance(v, list) and not all(isinstance(x, dict) for x in v))]
    for k, v in doc.items():
        if isinstance(v, dict):
            lines.append(f"\n[{key(k)}]")
            lines += [f"{key(a)} = {val(b)}" for a, b in v.items()]
        elif isinstance(v, list) and v and all(isinstance(x, dict) for x in v):
            for item in v:
                lines.append(f"\n[[{key(k)}]]")
                lines += [f"{key(a)} = {val(b)}" for a, b in item.items()]
    return "\n".join(lines) + "\n"


def toml_words(message: str) -> str:
    """The TOML reader's message in the study file's terms: a table or a key written twice named as written."""
    import re

    m = re.match(r"Cannot declare \((.*)\) twice(.*)", message)
    if m:
        name = ".".join(part.strip().strip("'\"") for part in m.group(1).split(",") if part.strip())
        return f"[{name}] is written twice{m.group(2)}; each table once (a list of tables is [[{name}]])"
    m = re.match(r"Cannot overwrite a value(.*)", message)
    if m:
        return f"a key is given twice in its table{m.group(1)}; give each key once"
    return message


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
    except IsADirectoryError as err:
        raise StudyError(f"study file {str(path)!r} is a folder, not a study file (give the path of a .toml"
                         " file)") from err
    except (OSError, UnicodeDecodeError) as err:
        raise StudyError(f"study file {str(path)!r} cannot be read: {err}") from err
    try:
        doc = tomllib.loads(text)
    except tomllib.TOMLDecodeError as err:
        raise StudyError(f"study file {str(path)!r} is not valid TOML: {toml_words(str(err))}") from err
    return parse_study(doc, source=str(path))
