"""Fatigue of the opening's edge: the study's load cases combined into load states, cycles between them per unit
(flight, hour, voyage) as blocks or as a counted sequence, the local stress round every outline by superposition
of the solved cases (no new solve), the notch effect, the user's material curve, Palmgren-Miner damage, the life
and the fatigue reserve factor (the factor on every stress of the spectrum at which the life equals the required
life times the scatter factor). The arithmetic is holeshape.fatigue; this module reads the study's [fatigue] table
and the solved design.

Local stress: on a free edge (every opening's edge, a doubler of another modulus at it) the signed tangential
stress; where the stress that governs is not on a free edge (the web at a ring's outer edge) the signed principal
stress of largest magnitude, and for a flange the member's own axial stress. The hot spot is the point of largest
damage over every outline; it need not be the static peak.

How Kf is applied: for every load case j and every point p of a free edge, Kt_j(p) = |sigma_j(p)| / S_j (S_j the
case's Kt reference stress), Kf_j(p) = 1 + q(p) (Kt_j(p) - 1) with q from the outline's radius of curvature at p,
and the case's local stress is taken as sigma_j(p) Kf_j(p) / Kt_j(p); the states are then combined from these. For
one uniaxial case at the peak this is the textbook Kf x S; a combined cycle is the sum of each case's notch-
corrected stress. With ``notch = "none"`` (the default) Kf = Kt: the elastic stress itself, the conservative choice.
MPa, mm, cycles.
"""

from __future__ import annotations

import csv
import math
from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np

from holeshape.checks.base import (
    Chart,
    ChartAxes,
    Check,
    CheckResult,
    Design,
    Section,
    Series,
    Table,
    requirement,
    within_estimate,
)
from holeshape.errors import StudyError
from holeshape.fatigue import (
    BEYOND_LAST,
    CURVE_KINDS,
    MEAN_STRESS,
    METHODS,
    NOTCHES,
    STRAIN_MEAN,
    Curve,
    Cyclic,
    closed_loop,
    cycle_damage,
    fatigue_factor,
    masing_history,
    neuber_first,
    neuber_range,
    notch_sensitivity,
    rainflow_cycles,
    reserve_factor,
    strain_life_cycles,
    strain_life_damage,
)

if TYPE_CHECKING:
    from holeshape.study import Study

ADVICE = ("to raise the fatigue reserve: a larger radius at the hot spot, a lower-Kt shape, a thicker web, a"
          " reinforcement round the opening, or a better edge finish (a higher surface factor from approved data)")
ADVICE_ACCURACY = "to meet the accuracy target: use a finer accuracy level (--accuracy fine)"
CAUTION = ("Safe-life assessment only: no crack growth or damage tolerance; fastener holes, fretting, corrosion and"
           " environment are not assessed; the material curve, the scatter factor and every knock-down come from the"
           " applicable code and the user's approved data.")
CANDIDATES = 8  # points of an outline a counted sequence is rainflow-counted at (the screened hot-spot candidates)
COARSE_CANDIDATES = 4  # the same on the second mesh level, for the error estimate
KEYS = ("unit", "required_life", "scatter_factor", "method", "notch", "notch_constant", "cyclic_yield_strength",
        "curve", "cyclic", "block", "sequence")
CURVE_KEYS = ("kind", "strength_coefficient", "exponent", "points", "beyond_last", "reference_range",
              "reference_cycles", "slope", "slope_after_knee", "knee_cycles", "cutoff_cycles", "endurance_limit",
              "mean_stress", "ultimate_strength", "walker_exponent", "surface_factor", "ductility_coefficient",
              "ductility_exponent")


# ----- settings -----------------------------------------------------------------------------------------------------
@dataclass(frozen=True)
class State:
    """A load state: the study's load cases with factors (empty: zero load)."""

    factors: tuple[tuple[str, float], ...] = ()

    @property
    def text(self) -> str:
        if not self.factors:
            return "zero"
        out = ""
        for k, (n, f) in enumerate(self.factors):
            sign = ("-" if f < 0 else "") if k == 0 else (" - " if f < 0 else " + ")
            out += f"{sign}{abs(f):g} x {n}"
        return out

    def vector(self, names: list[str]) -> np.ndarray:
        d = dict(self.factors)
        return np.array([d.get(n, 0.0) for n in names])


@dataclass(frozen=True)
class Block:
    name: str
    start: State
    end: State
    cycles: float


@dataclass(frozen=True)
class FatigueSettings:
    """The [fatigue] table."""

    unit: str
    required_life: float
    scatter_factor: float
    method: str
    notch: str
    notch_constant: float | None
    curve: Curve
    cyclic: Cyclic | None = None
    cyclic_yield_strength: float | None = None
    blocks: tuple[Block, ...] = ()
    sequence: tuple[State, ...] = ()
    sequence_source: str = ""  # the CSV file the sequence was read from, if any
    min_reserve: float = 1.0
    min_life: float | None = None

    @property
    def target_damage(self) -> float:
        """The damage per unit at which the life equals the required life times the scatter factor."""
        return 1.0 / (self.required_life * self.scatter_factor)

    @property
    def yield_limit(self) -> float | None:
        if self.cyclic_yield_strength is not None:
            return self.cyclic_yield_strength
        return None if self.cyclic is None else self.cyclic.yield_strength


def _num(t: dict, key: str, where: str, *, default: Any = ..., positive: bool = False, negative: bool = False
         ) -> Any:
    if key not in t:
        if default is ...:
            raise StudyError(f"{where}{key} is missing")
        return default
    v = t[key]
    if isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(float(v)):
        raise StudyError(f"{where}{key} must be a finite number, got {v!r}")
    v = float(v)
    if positive and v <= 0:
        raise StudyError(f"{where}{key} must be > 0, got {v!r}")
    if negative and v >= 0:
        raise StudyError(f"{where}{key} must be < 0 (a fatigue curve falls as the life grows), got {v!r}")
    return v


def _choice(t: dict, key: str, where: str, choices: tuple[str, ...], default: str) -> str:
    v = t.get(key, default)
    if not isinstance(v, str) or v not in choices:
        raise StudyError(f"{where}{key} must be one of {', '.join(choices)}, got {v!r}")
    return v


def _unknown(t: dict, allowed: tuple[str, ...], where: str) -> None:
    import difflib

    for k in t:
        if k not in allowed:
            hint = difflib.get_close_matches(k, allowed, n=1)
            tip = f" (did you mean {hint[0]!r}?)" if hint else ""
            raise StudyError(f"unknown key {where}{k}{tip}; allowed: {', '.join(allowed)}")


def _state(v: Any, where: str, cases: list[str]) -> State:
    if v == "zero":
        return State()
    if not isinstance(v, dict) or not v:
        raise StudyError(f'{where} must be "zero" or a table of load-case factors such as {{ "{cases[0]}" = 1.0 }},'
                         f" got {v!r}")
    out = []
    for name, f in v.items():
        if name not in cases:
            raise StudyError(f"{where} names load case {name!r}, which the study does not have; its load cases are"
                             f" {', '.join(repr(c) for c in cases)}")
        out.append((name, _num({"f": f}, "f", f"{where}.{name} ")))
    return State(tuple(out))


def _curve(t: Any, method: str) -> Curve:
    w = "fatigue.curve."
    if not isinstance(t, dict):
        raise StudyError(f"fatigue.curve must be a table ([fatigue.curve]) with kind = one of {', '.join(CURVE_KINDS)},"
                         f" got {t!r}")
    _unknown(t, CURVE_KEYS, w)
    kind = _choice(t, "kind", w, CURVE_KINDS, "basquin")
    means = STRAIN_MEAN if method == "strain_life" else MEAN_STRESS
    mean = _choice(t, "mean_stress", w, means, "none")
    kw: dict[str, Any] = {"kind": kind, "mean_stress": mean}
    if kind == "basquin" or mean == "morrow" or method == "strain_life":
        kw["strength_coefficient"] = _num(t, "strength_coefficient", w, positive=True)
    if kind == "basquin" or method == "strain_life":
        kw["exponent"] = _num(t, "exponent", w, negative=True)
    if kind == "points":
        pts = t.get("points")
        if not isinstance(pts, list) or len(pts) < 2 or not all(isinstance(p, list) and len(p) == 2 for p in pts):
            raise StudyError(f"fatigue.curve.points must be at least two [cycles, amplitude] pairs, got {pts!r}")
        pp = [(_num({"v": p[0]}, "v", f"{w}points[{i}][0] ", positive=True),
               _num({"v": p[1]}, "v", f"{w}points[{i}][1] ", positive=True)) for i, p in enumerate(pts)]
        if any(b[0] <= a[0] or b[1] > a[1] for a, b in zip(pp, pp[1:])):
            raise StudyError("fatigue.curve.points must be in order of rising cycles with amplitudes that do not rise,"
                             f" got {pts!r}")
        kw["points"] = tuple(pp)
        kw["beyond_last"] = _choice(t, "beyond_last", w, BEYOND_LAST, "constant")
    if kind == "detail_category":
        kw["reference_range"] = _num(t, "reference_range", w, positive=True)
        kw["reference_cycles"] = _num(t, "reference_cycles", w, default=2e6, positive=True)
        for k in ("slope", "slope_after_knee", "knee_cycles", "cutoff_cycles"):
            if k not in t:
                raise StudyError(f"{w}{k} is missing: a detail category needs its slopes m1 (slope) and m2"
                                 " (slope_after_knee) and its knee and cut-off cycles (knee_cycles, cutoff_cycles)"
                                 " from the applicable code")
            kw[k] = _num(t, k, w, positive=True)
        if not kw["reference_cycles"] <= kw["knee_cycles"] < kw["cutoff_cycles"] and \
                not kw["knee_cycles"] < kw["cutoff_cycles"]:
            raise StudyError(f"{w}knee_cycles ({kw['knee_cycles']:g}) must be below cutoff_cycles"
                             f" ({kw['cutoff_cycles']:g})")
    kw["endurance_limit"] = _num(t, "endurance_limit", w, default=None, positive=True)
    if mean in ("goodman", "gerber"):
        if "ultimate_strength" not in t:
            raise StudyError(f'{w}mean_stress = "{mean}" needs {w}ultimate_strength (MPa, from approved data)')
        kw["ultimate_strength"] = _num(t, "ultimate_strength", w, positive=True)
    if mean == "walker":
        kw["walker_exponent"] = _num(t, "walker_exponent", w)
        if not 0.0 < kw["walker_exponent"] <= 1.0:
            raise StudyError(f"{w}walker_exponent must lie in (0, 1], got {kw['walker_exponent']!r}")
    kw["surface_factor"] = _num(t, "surface_factor", w, default=1.0, positive=True)
    if kw["surface_factor"] > 1.0:
        raise StudyError(f"{w}surface_factor must lie in (0, 1] (a finish factor lowers the curve), got"
                         f" {kw['surface_factor']!r}")
    if method == "strain_life":
        if kind != "basquin":
            raise StudyError(f'{w}kind = "{kind}" with fatigue.method = "strain_life": the strain-life curve is'
                             ' Coffin-Manson with Basquin: give kind = "basquin" with strength_coefficient, exponent,'
                             " ductility_coefficient and ductility_exponent")
        for k in ("ductility_coefficient", "ductility_exponent"):
            if k not in t:
                raise StudyError(f'{w}{k} is missing: fatigue.method = "strain_life" needs the Coffin-Manson constants'
                                 " ductility_coefficient (epsilon'_f) and ductility_exponent (c)")
        kw["ductility_coefficient"] = _num(t, "ductility_coefficient", w, positive=True)
        kw["ductility_exponent"] = _num(t, "ductility_exponent", w, negative=True)
        if kw["surface_factor"] != 1.0:
            raise StudyError(f"{w}surface_factor = {kw['surface_factor']!r} applies to the stress-life method; the"
                             " strain-life constants should already describe the edge as made")
    else:
        for k in ("ductility_coefficient", "ductility_exponent"):
            if k in t:
                raise StudyError(f'{w}{k} belongs to fatigue.method = "strain_life"; the stress-life method reads'
                                 " the amplitude curve only")
    return Curve(**kw)


def _sequence(v: Any, cases: list[str], base: Path | None) -> tuple[tuple[State, ...], str]:
    w = "fatigue.sequence"
    if isinstance(v, str) and v != "zero":
        path = Path(v) if base is None or Path(v).is_absolute() else base / v
        try:
            with open(path, newline="") as fh:
                rows = list(csv.reader(fh))
        except OSError as err:
            raise StudyError(f"{w} = {v!r}: the file cannot be read ({err.strerror or err})") from err
        rows = [r for r in rows if r and not r[0].lstrip().startswith("#")]
        if len(rows) < 2:
            raise StudyError(f"{w} = {v!r}: the file needs a header of load-case names and at least one row")
        head = [h.strip() for h in rows[0]]
        for h in head:
            if h not in cases:
                raise StudyError(f"{w} = {v!r}: column {h!r} is not a load case of the study"
                                 f" ({', '.join(repr(c) for c in cases)})")
        states = []
        for i, r in enumerate(rows[1:], start=2):
            try:
                vals = [float(x) for x in r]
            except ValueError as err:
                raise StudyError(f"{w} = {v!r}: line {i} is not numbers: {','.join(r)!r}") from err
            if len(vals) != len(head) or not all(math.isfinite(x) for x in vals):
                raise StudyError(f"{w} = {v!r}: line {i} must have {len(head)} finite numbers, got {','.join(r)!r}")
            states.append(State(tuple(zip(head, vals))))
        return tuple(states), str(v)
    if not isinstance(v, list) or not v:
        raise StudyError(f"{w} must be a list of load states (\"zero\" or tables of load-case factors) or a CSV file"
                         f" of load-case factors, got {v!r}")
    return tuple(_state(s, f"{w}[{i}]", cases) for i, s in enumerate(v)), ""


def parse_fatigue(t: dict, parts: dict) -> FatigueSettings:
    """The [fatigue] table (``parts``: the parsed load cases, the study file's folder, the constraints' values)."""
    w = "fatigue."
    _unknown(t, KEYS, w)
    cases = [c.name for c in parts["load_cases"]]
    unit = t.get("unit", "cycle")
    if not isinstance(unit, str) or not unit.strip():
        raise StudyError(f'{w}unit must name the unit the spectrum repeats in ("flight", "hour", "voyage"), got'
                         f" {unit!r}")
    method = _choice(t, "method", w, METHODS, "stress_life")
    notch = _choice(t, "notch", w, NOTCHES, "none")
    const = None
    if notch != "none":
        if "notch_constant" not in t:
            raise StudyError(f'{w}notch = "{notch}" needs {w}notch_constant (mm: Peterson\'s a or Neuber\'s rho\','
                             " for the material, from its source)")
        const = _num(t, "notch_constant", w, positive=True)
    elif "notch_constant" in t:
        raise StudyError(f'{w}notch_constant is given but notch = "none" (Kf = Kt): give notch = "peterson" or'
                         ' "neuber" to use it')
    curve = _curve(t.get("curve"), method)
    cyclic = None
    if "cyclic" in t:
        c = t["cyclic"]
        if not isinstance(c, dict):
            raise StudyError(f"{w}cyclic must be a table with strength_coefficient (K', MPa) and hardening_exponent"
                             f" (n'), got {c!r}")
        _unknown(c, ("strength_coefficient", "hardening_exponent"), w + "cyclic.")
        cyclic = Cyclic(_num(c, "strength_coefficient", w + "cyclic.", positive=True),
                        _num(c, "hardening_exponent", w + "cyclic.", positive=True))
    if method == "strain_life" and cyclic is None:
        raise StudyError(f'{w}method = "strain_life" needs [fatigue.cyclic] with strength_coefficient (K\', MPa) and'
                         " hardening_exponent (n') of the cyclic stress-strain curve")
    blocks: tuple[Block, ...] = ()
    if "block" in t:
        bl = t["block"]
        if isinstance(bl, dict):
            bl = [bl]
        if not isinstance(bl, list) or not bl or not all(isinstance(b, dict) for b in bl):
            raise StudyError(f"{w}block must be [[fatigue.block]] tables, got {bl!r}")
        out = []
        for i, b in enumerate(bl):
            wb = f"{w}block[{i}]."
            _unknown(b, ("name", "from", "to", "cycles"), wb)
            for k in ("from", "to", "cycles"):
                if k not in b:
                    raise StudyError(f"{wb}{k} is missing")
            cyc = _num(b, "cycles", wb)
            if cyc <= 0:
                raise StudyError(f"{wb}cycles must be > 0 (cycles per {unit}), got {cyc!r}")
            name = b.get("name", f"block {i + 1}")
            if not isinstance(name, str):
                raise StudyError(f"{wb}name must be a string, got {name!r}")
            out.append(Block(name, _state(b["from"], wb + "from", cases), _state(b["to"], wb + "to", cases), cyc))
        blocks = tuple(out)
    sequence: tuple[State, ...] = ()
    source = ""
    if "sequence" in t:
        sequence, source = _sequence(t["sequence"], cases, parts.get("folder"))
        if len(sequence) < 2:
            raise StudyError(f"{w}sequence has {len(sequence)} state; a sequence needs at least two to make a cycle")
    if not blocks and not sequence:
        raise StudyError(f"[fatigue] needs the loading: [[fatigue.block]] tables (from, to, cycles per {unit}) or"
                         f" {w}sequence (load states per {unit}, or a CSV file of load-case factors)")
    if blocks and sequence:
        raise StudyError(f"[fatigue] has both [[fatigue.block]] and {w}sequence: give one (blocks of constant-"
                         "amplitude cycles, or a sequence counted by rainflow)")
    cons = parts.get("constraints", {})
    return FatigueSettings(
        unit=unit.strip(), required_life=_num(t, "required_life", w, positive=True),
        scatter_factor=_num(t, "scatter_factor", w, default=1.0, positive=True), method=method, notch=notch,
        notch_constant=const, curve=curve, cyclic=cyclic,
        cyclic_yield_strength=_num(t, "cyclic_yield_strength", w, default=None, positive=True), blocks=blocks,
        sequence=sequence, sequence_source=source, min_reserve=max(1.0, cons.get("min_fatigue_reserve", 1.0)),
        min_life=cons.get("min_fatigue_life"))


# ----- the stress round every outline ------------------------------------------------------------------------------
@dataclass
class Place:
    """One outline the fatigue stress is read along: its points, the per-case values (``scalar`` (n, m) or a
    tensor (3, n, m) for the signed principal), the radius of curvature at each point (inf where no notch)."""

    name: str
    xy: np.ndarray
    s: np.ndarray
    values: np.ndarray
    tensor: bool
    radius: np.ndarray
    free_edge: bool

    def states(self, f: np.ndarray) -> np.ndarray:
        """The fatigue stress (n, k) of k states given as factors ``f`` (m, k)."""
        if not self.tensor:
            return self.values @ f
        sx, sy, txy = (self.values[i] @ f for i in range(3))
        c, r = 0.5 * (sx + sy), np.sqrt((0.5 * (sx - sy)) ** 2 + txy ** 2)
        return np.where(np.abs(c + r) >= np.abs(c - r), c + r, c - r)


def _radius(cut: Any, xy: np.ndarray) -> np.ndarray:
    from scipy.spatial import cKDTree

    best = np.full(xy.shape[1], np.inf)
    dist = np.full(xy.shape[1], np.inf)
    for m in cut.members:
        smp = m.sampling
        d, k = cKDTree(smp.points.T).query(xy.T)
        curv = np.abs(smp.curvature[k])
        with np.errstate(divide="ignore"):
            r = np.where(curv > 0, 1.0 / curv, np.inf)
        closer = d < dist
        best, dist = np.where(closer, r, best), np.where(closer, d, dist)
    return best


def places(design: Design, solution: Any, region: Any) -> list[Place]:
    """Every outline of the solved design with its fatigue stress per load case."""
    from holeshape.evaluate import mirror_to_full, opening_name
    from holeshape.solve import member_stress

    cut, el = design.cutout, design.study.material.elastic
    out = []
    if len(solution.members) > 1:
        edges = [(opening_name(k), mirror_to_full(bs, region)) for k, bs in enumerate(solution.members)]
    else:
        edges = [("cutout edge", mirror_to_full(solution.cutout, region))]
    for name, bs in edges:
        out.append(Place(name, bs.xy, bs.s, bs.hoop, False, _radius(cut, bs.xy), True))
    r = cut.reinforcement
    if r is not None:
        full = edges[0][1]
        for loc in r.stress_locations(el.reference_modulus):
            if loc.source == "interior_edge" and solution.interior_edge is not None:
                bs = mirror_to_full(solution.interior_edge, region)
                out.append(Place(loc.name, bs.xy, bs.s, bs.sigma, True, np.full(bs.s.size, np.inf), False))
            elif loc.source == "cutout_scaled":
                out.append(Place(loc.name, full.xy, full.s, full.hoop * loc.factor, False, out[0].radius, True))
            elif loc.source == "edge_member":
                out.append(Place(loc.name, full.xy, full.s, member_stress(full, el, loc.modulus), False,
                                 np.full(full.s.size, np.inf), False))
    return out


def notch_scaled(p: Place, settings: FatigueSettings, refs: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(per-case values with the notch effect, per-case local Kt (n, m), q (n,)) of a place (module docstring)."""
    n = p.values.shape[-2]
    if p.tensor or not p.free_edge:
        return p.values, np.ones((n, len(refs))), np.ones(n)
    q = notch_sensitivity(settings.notch, settings.notch_constant, p.radius)
    kt = np.abs(p.values) / np.where(refs > 0, refs, np.inf)[None, :]
    if settings.notch == "none":
        return p.values, kt, q
    kf = fatigue_factor(kt, q[:, None])
    ratio = np.where(kt > 1.0, kf / np.where(kt > 1.0, kt, 1.0), 1.0)
    return p.values * ratio, kt, q


# ----- the assessment -----------------------------------------------------------------------------------------------
@dataclass(frozen=True)
class BlockResult:
    """One block (or, for a sequence, one counted cycle of the hot spot) at the hot spot (MPa, cycles)."""

    name: str
    cycles_per_unit: float
    local_max_mpa: float
    local_min_mpa: float
    range_mpa: float
    mean_mpa: float
    equivalent_amplitude_mpa: float | None
    cycles_to_failure: float | None
    damage_per_unit: float

    def to_dict(self) -> dict:
        return dict(self.__dict__)


@dataclass(frozen=True)
class HotSpot:
    x_mm: float
    y_mm: float
    opening: str
    radius_mm: float | None
    kt: float
    q: float
    kf: float
    load_case: str


@dataclass(frozen=True)
class Spectrum:
    """What one solution level gives: damage per unit at the hot spot, the reserve, the hot spot and its blocks."""

    damage: float
    reserve: float | None
    hot: HotSpot
    blocks: tuple[BlockResult, ...]
    elastic_range_mpa: float
    tensile: bool
    outline: tuple[str, np.ndarray, np.ndarray] | None = None  # (place, arc length, damage per unit) of the hot one


def _assess(design: Design, settings: FatigueSettings, solution: Any, region: Any,
            candidates: int = CANDIDATES) -> Spectrum:
    ev = design.evaluation
    names = [c.name for c in design.study.load_cases]
    refs = np.array([ev.case(n).reference_stress_mpa for n in names])
    modulus = design.study.material.elastic.reference_modulus
    ps = places(design, solution, region)
    scaled = [notch_scaled(p, settings, refs) for p in ps]
    sl = settings.method == "strain_life"
    work = [Place(p.name, p.xy, p.s, v, p.tensor, p.radius, p.free_edge) for p, (v, _, _) in zip(ps, scaled)]

    if settings.blocks:
        fa = np.stack([b.start.vector(names) for b in settings.blocks], axis=1)  # (m, nb)
        fb = np.stack([b.end.vector(names) for b in settings.blocks], axis=1)
        cyc = np.array([b.cycles for b in settings.blocks])
        stress = [(p.states(fa), p.states(fb)) for p in work]  # each (n, nb)

        def per_point(f: float) -> list[np.ndarray]:
            out = []
            for a, b in stress:
                hi, lo = np.maximum(a, b) * f, np.minimum(a, b) * f
                if sl:
                    out.append(_strain_blocks(settings, modulus, a * f, b * f, cyc))
                else:
                    out.append(cycle_damage(settings.curve, hi, lo, cyc[None, :])[2])
            return out  # each (n, nb)

        def damage_at(f: float) -> float:
            return max(float(np.max(d.sum(axis=1))) for d in per_point(f))

        dmg = per_point(1.0)
        totals = [d.sum(axis=1) for d in dmg]
        k, i = _hot(totals, [np.max(np.abs(a - b), axis=1) for a, b in stress])
        a, b = stress[k][0][i], stress[k][1][i]
        hi, lo = np.maximum(a, b), np.minimum(a, b)
        if sl:
            d = dmg[k][i]
            nf = np.where(d > 0, cyc / np.where(d > 0, d, 1.0), np.inf)
            amp = np.full(len(cyc), np.nan)
        else:
            amp, nf, d = cycle_damage(settings.curve, hi, lo, cyc)
        blocks = tuple(BlockResult(bk.name, bk.cycles, float(hi[j]), float(lo[j]), float(hi[j] - lo[j]),
                                   float(0.5 * (hi[j] + lo[j])), None if sl else float(amp[j]),
                                   None if not np.isfinite(nf[j]) else float(nf[j]), float(d[j]))
                       for j, bk in enumerate(settings.blocks))
        dom = int(np.argmax(d)) if np.any(d > 0) else int(np.argmax(hi - lo))
        delta = fb[:, dom] - fa[:, dom]
        erange = float(np.max(hi - lo))
        tensile = any(float(np.max(np.maximum(x, y))) > 0 for x, y in stress)
        outline = (ps[k].name, ps[k].s, totals[k])
    else:
        f = np.stack([s.vector(names) for s in settings.sequence], axis=1)  # (m, K)
        cand: list[tuple[int, int]] = []
        proxies = []
        for kk, p in enumerate(work):
            hi, lo = _extremes(p, f)
            proxy = cycle_damage(settings.curve, hi, lo, 1.0)[2] if not sl else hi - lo
            proxy = np.where(np.isfinite(proxy), proxy, 1e300)
            proxies.append((proxy, hi - lo))
            top = np.argsort(-(proxy if np.any(proxy > 0) else hi - lo))[:candidates]
            cand += [(kk, int(i)) for i in top]
        hist = {c: _history(work[c[0]], c[1], f) for c in dict.fromkeys(cand)}
        counted = {c: rainflow_cycles(closed_loop(h).tolist()) for c, h in hist.items()} if not sl else {}

        def dmg_of(c: tuple[int, int], fac: float) -> float:
            if sl:
                assert settings.cyclic is not None
                return strain_life_damage(settings.curve, modulus, masing_history(hist[c] * fac, modulus,
                                                                                  settings.cyclic))
            cy = counted[c]
            if not cy:
                return 0.0
            r = np.array([x[0] for x in cy]) * fac
            m = np.array([x[1] for x in cy]) * fac
            return float(np.sum(cycle_damage(settings.curve, m + r / 2, m - r / 2, np.array([x[2] for x in cy]))[2]))

        scores = {c: dmg_of(c, 1.0) for c in hist}
        top_score = max(scores.values())
        # the reserve is the largest damage's: the candidates within three decades of it at the spectrum's level
        near = [c for c in hist if scores[c] >= 1e-3 * top_score] if top_score > 0 else list(hist)

        def damage_at(f: float) -> float:
            return max(dmg_of(c, f) for c in near)

        best = max(scores, key=lambda c: (scores[c], float(np.ptp(hist[c]))))
        k, i = best
        blocks = _sequence_blocks(settings, modulus, hist[best], counted.get(best))
        h = hist[best]
        erange = float(np.ptp(h))
        tensile = any(float(np.max(_extremes(p, f)[0])) > 0 for p in work)
        j0, j1 = int(np.argmax(h)), int(np.argmin(h))
        delta = f[:, j0] - f[:, j1]
        outline = None
    p = ps[k]
    # the load case that contributes most to the hot spot's governing range: its Kt, q and Kf are the hot spot's
    at = np.abs(p.values[:, i, :]).max(axis=0) if p.tensor else np.abs(p.values[i])
    contrib = np.abs(delta) * at
    jc = int(np.argmax(contrib))
    _, kts, qs = scaled[k]
    kt, q = float(kts[i, jc]), float(qs[i])
    kf = float(fatigue_factor(np.array(kt), np.array(q))) if p.free_edge and not p.tensor else kt
    r = float(p.radius[i]) if np.isfinite(p.radius[i]) else None
    hot = HotSpot(float(p.xy[0, i]), float(p.xy[1, i]), p.name, r, kt, q, kf, names[jc])
    total = float(sum(b.damage_per_unit for b in blocks)) if settings.blocks else float(scores[best])
    reserve = reserve_factor(damage_at, settings.target_damage)
    return Spectrum(total, reserve, hot, blocks, erange, tensile, outline if design.keep_fields else None)


def _hot(totals: list[np.ndarray], ranges: list[np.ndarray]) -> tuple[int, int]:
    """The (place, point) of largest damage; where nothing is damaged, of largest range."""
    pick = totals if any(float(t.max()) > 0 for t in totals) else ranges
    k = max(range(len(pick)), key=lambda j: float(np.max(pick[j])))
    return k, int(np.argmax(pick[k]))


def _extremes(p: Place, f: np.ndarray, chunk: int = 4096) -> tuple[np.ndarray, np.ndarray]:
    hi = np.full(p.values.shape[-2], -np.inf)
    lo = np.full(p.values.shape[-2], np.inf)
    for s in range(0, f.shape[1], chunk):
        v = p.states(f[:, s:s + chunk])
        hi, lo = np.maximum(hi, v.max(axis=1)), np.minimum(lo, v.min(axis=1))
    return hi, lo


def _history(p: Place, i: int, f: np.ndarray) -> np.ndarray:
    one = Place(p.name, p.xy[:, i:i + 1], p.s[i:i + 1], p.values[..., i:i + 1, :], p.tensor, p.radius[i:i + 1],
                p.free_edge)
    return one.states(f)[0]


def _strain_blocks(settings: FatigueSettings, modulus: float, a: np.ndarray, b: np.ndarray, cyc: np.ndarray
                   ) -> np.ndarray:
    """Damage (n, nb) of each block as its own constant-amplitude history: first loading along the cyclic curve
    to the extreme of larger magnitude, then the stabilised loop on the doubled curve (Neuber's rule both)."""
    assert settings.cyclic is not None
    big = np.where(np.abs(a) >= np.abs(b), a, b)
    other = np.where(np.abs(a) >= np.abs(b), b, a)
    s1, _ = neuber_first(big, modulus, settings.cyclic)
    ds, de = neuber_range(np.abs(big - other), modulus, settings.cyclic)
    smax = np.where(big >= other, s1, s1 + ds)
    smin = smax - ds
    n = strain_life_cycles(settings.curve, modulus, 0.5 * de, smax, 0.5 * (smax + smin))
    return np.where(np.isfinite(n), cyc / np.where(np.isfinite(n), n, 1.0), 0.0)


def _sequence_blocks(settings: FatigueSettings, modulus: float, h: np.ndarray,
                     counted: list[tuple[float, float, float]] | None) -> tuple[BlockResult, ...]:
    """The hot spot's counted cycles as blocks (alike cycles merged), largest damage first (at most 20 listed;
    the rest summed in one line)."""
    rows: dict[tuple[float, float], list[float]] = {}
    if settings.method == "strain_life":
        assert settings.cyclic is not None
        for lc in masing_history(h, modulus, settings.cyclic):
            key = (round(lc.stress_max, 6), round(lc.stress_min, 6))
            n = strain_life_cycles(settings.curve, modulus, np.array([0.5 * lc.strain_range]),
                                   np.array([lc.stress_max]), np.array([0.5 * (lc.stress_max + lc.stress_min)]))[0]
            rows.setdefault(key, [0.0, float(n)])[0] += lc.count
    else:
        for r, m, c in counted or []:
            key = (round(m + r / 2, 6), round(m - r / 2, 6))
            rows.setdefault(key, [0.0, math.nan])[0] += c
    keys = list(rows)
    his, los = np.array([k[0] for k in keys]), np.array([k[1] for k in keys])
    counts = np.array([rows[k][0] for k in keys])
    if settings.method == "strain_life":
        nfs = np.array([rows[k][1] for k in keys])
        amps: list[float | None] = [None] * len(keys)
        ds = np.where(np.isfinite(nfs), counts / np.where(np.isfinite(nfs), nfs, 1.0), 0.0)
    else:
        a, nfs, ds = cycle_damage(settings.curve, his, los, counts)
        amps = [float(x) for x in a]
    out = [BlockResult("", float(c), float(hi), float(lo), float(hi - lo), float(0.5 * (hi + lo)), amp,
                       float(nf) if math.isfinite(nf) else None, float(d))
           for c, hi, lo, amp, nf, d in zip(counts, his, los, amps, nfs, ds)]
    out.sort(key=lambda b: (-b.damage_per_unit, -b.range_mpa))
    named = [BlockResult(f"counted cycle {k + 1}", *list(b.to_dict().values())[1:]) for k, b in enumerate(out[:20])]
    if len(out) > 20:
        rest = out[20:]
        named.append(BlockResult(f"{len(rest)} smaller counted cycles", sum(b.cycles_per_unit for b in rest),
                                 max(b.local_max_mpa for b in rest), min(b.local_min_mpa for b in rest),
                                 max(b.range_mpa for b in rest), math.nan, None, None,
                                 sum(b.damage_per_unit for b in rest)))
    return tuple(named)


@dataclass(frozen=True, kw_only=True)
class FatigueResult(CheckResult):
    """The fatigue assessment of a design (the JSON keys of its block and the top level are a contract)."""

    check = "fatigue"
    settings: FatigueSettings = field(repr=False)
    damage_per_unit: float
    life: float | None  # units; None: no damage
    reserve_factor: float | None  # None: no damage at any factor up to the search's ceiling
    reserve_error_estimate_pct: float | None
    life_error_estimate_pct: float | None
    hot_spot: HotSpot
    blocks: tuple[BlockResult, ...]
    elastic_range_mpa: float
    tensile: bool
    outline: tuple[str, np.ndarray, np.ndarray] | None = field(default=None, compare=False, repr=False)

    def top_fields(self) -> dict:
        return {"fatigue_life": self.life, "fatigue_reserve_factor": self.reserve_factor,
                "fatigue_damage_per_unit": self.damage_per_unit}

    def row_fields(self) -> dict:
        return {"fatigue_reserve_factor": self.reserve_factor, "fatigue_life": self.life}

    def to_dict(self) -> dict:
        s = self.settings
        h = self.hot_spot
        return {"method": s.method, "notch": s.notch, "notch_constant_mm": s.notch_constant, "unit": s.unit,
                "required_life": s.required_life, "scatter_factor": s.scatter_factor,
                "curve": s.curve.description, "mean_stress": s.curve.mean_stress,
                "hot_spot": {"x_mm": h.x_mm, "y_mm": h.y_mm, "opening": h.opening, "radius_mm": h.radius_mm,
                             "kt": h.kt, "q": h.q, "kf": h.kf, "load_case": h.load_case},
                "blocks": [b.to_dict() for b in self.blocks],
                "reserve_error_estimate_pct": self.reserve_error_estimate_pct,
                "life_error_estimate_pct": self.life_error_estimate_pct,
                "local_elastic_range_mpa": self.elastic_range_mpa}

    def section(self) -> Section:
        s, h = self.settings, self.hot_spot
        need = s.required_life * s.scatter_factor
        life = "infinite (no damage)" if self.life is None else f"{self.life:.4g} {s.unit}s"
        res = "no damage at any factor up to 1000" if self.reserve_factor is None else f"{self.reserve_factor:.3f}"
        loading = ("blocks of constant-amplitude cycles per " + s.unit if s.blocks else
                   f"load states per {s.unit}, rainflow counted (ASTM E1049-85) as a closed loop from the highest"
                   " peak")
        paras = [
            f"Safe-life fatigue by the {s.method.replace('_', '-')} method: {len(s.blocks) or len(s.sequence)}"
            f" {loading}; Palmgren-Miner damage. Material curve: {s.curve.description}; mean-stress correction"
            f" {s.curve.mean_stress}.",
            f"Hot spot: {h.opening} at ({h.x_mm:.1f}, {h.y_mm:.1f}) mm, radius"
            f" {'straight or no notch' if h.radius_mm is None else f'{h.radius_mm:.2f} mm'}; Kt {h.kt:.3f}"
            f" ({h.load_case}), q {h.q:.3f}, Kf {h.kf:.3f}. Damage {self.damage_per_unit:.4g} per {s.unit}: life"
            f" {life} against the required {s.required_life:g} x scatter {s.scatter_factor:g} = {need:g}; fatigue"
            f" reserve factor {res} (the factor on every stress of the spectrum at which the life equals"
            f" {need:g} {s.unit}s; at least {s.min_reserve:g} required).",
            "Notch rule: " + ("none, Kf = Kt (the elastic stress itself, the conservative choice)" if s.notch == "none"
                              else f"{s.notch} (constant {s.notch_constant:g} mm), Kf = 1 + q (Kt - 1); each load"
                              " case's stress at a point of a free edge is scaled by Kf / Kt of that case at that"
                              " point, then the states are combined") + ". On a free edge the fatigue stress is the"
            " signed tangential stress; at a ring's outer edge (the web, not a free edge) the signed principal stress"
            " of largest magnitude; in a flange its axial stress.",
        ]
        if self.reserve_error_estimate_pct is not None:
            paras.append(f"Mesh error estimate of the reserve {self.reserve_error_estimate_pct:.2g} % and of the life"
                         f" {self.life_error_estimate_pct or 0:.2g} % (the same assessment on the second mesh level;"
                         " a life moves several times faster than the stress).")
        if not self.tensile:
            paras.append("No cycle of the spectrum is tensile anywhere on the outlines: no fatigue damage (a cycle"
                         " entirely in compression does none here).")
        paras.append(CAUTION)
        spec = Table((("name", "block"), ("from", "from"), ("to", "to"), ("cycles", f"cycles per {s.unit}")),
                     tuple({"name": b.name, "from": b.start.text, "to": b.end.text, "cycles": b.cycles}
                           for b in s.blocks)) if s.blocks else None
        blk = Table((("name", "cycle"), ("cycles_per_unit", f"cycles per {s.unit}"), ("local_max_mpa", "max (MPa)"),
                     ("local_min_mpa", "min (MPa)"), ("range_mpa", "range (MPa)"),
                     ("equivalent_amplitude_mpa", "equivalent amplitude (MPa)"),
                     ("cycles_to_failure", "cycles to failure"), ("damage_per_unit", f"damage per {s.unit}")),
                    tuple({**b.to_dict(), "cycles_to_failure": "no damage" if b.cycles_to_failure is None else
                           b.cycles_to_failure} for b in self.blocks))
        tables = tuple(t for t in (spec, blk) if t is not None)
        warn = self.reserve_factor is not None and self.reserve_factor < s.min_reserve
        return Section("Fatigue", tuple(paras), tables, warn=warn,
                       images=(("best_fatigue.png", "the material curve with the hot spot's cycles, and the damage"
                                                    " round the outline"),))

    def charts(self) -> tuple[Chart, ...]:
        s = self.settings
        pts = [b for b in self.blocks if b.cycles_to_failure is not None]
        top = max([1e9] + [3.0 * b.cycles_to_failure for b in pts])  # type: ignore[operator]
        n = np.logspace(2, math.log10(top), 120)
        curve = Series("material curve", tuple(n.tolist()), tuple(s.curve.amplitude_at(n).tolist()))
        if s.method == "stress_life":
            marks = Series("hot spot cycles (equivalent amplitude at their life)",
                           tuple(b.cycles_to_failure for b in pts),  # type: ignore[misc]
                           tuple(b.equivalent_amplitude_mpa for b in pts), "points")  # type: ignore[misc]
            left = ChartAxes("cycles to failure", "stress amplitude at zero mean (MPa)", (curve, marks), True, True,
                             "material curve and the hot spot's cycles")
        else:
            left = ChartAxes("cycles to failure", "stress amplitude at zero mean (MPa)", (curve,), True, True,
                             "Basquin part of the strain-life curve")
        axes = [left]
        if self.outline is not None:
            name, arc, dmg = self.outline
            if np.any(dmg > 0):  # a log axis over eight decades below the hot spot
                dmg = np.maximum(dmg, 1e-8 * float(dmg.max()))
            axes.append(ChartAxes(f"arc length along the {name} (mm, from its first point)",
                                  f"damage per {s.unit}", (Series("damage", tuple(arc.tolist()),
                                                                  tuple(dmg.tolist())),), False,
                                  bool(np.any(dmg > 0)), "damage round the outline"))
        return (Chart("best_fatigue.png", "Fatigue at the hot spot", tuple(axes)),)


class FatigueCheck(Check):
    name = "fatigue"
    title = "Fatigue"
    table = "fatigue"
    constraint_keys = ("min_fatigue_reserve", "min_fatigue_life")
    columns = (("fatigue_reserve_factor", "fatigue reserve"), ("fatigue_life", "fatigue life"))

    @classmethod
    def applies(cls, study: Study) -> bool:
        return study.table("fatigue") is not None

    @classmethod
    def bounds(cls, study: Study) -> bool:
        return cls.applies(study)

    @classmethod
    def parse_table(cls, table: dict, study_parts: dict) -> FatigueSettings:
        return parse_fatigue(table, study_parts)

    def run(self, design: Design) -> FatigueResult:
        from holeshape.evaluate import ACCURACY_LEVELS

        settings: FatigueSettings = design.study.table("fatigue")
        f = design.evaluation.fields
        region = f.panel_mesh.region
        fine = _assess(design, settings, f.solution, region)
        est_r = est_l = None
        if f.coarse_solution is not None and design.purpose != "search":
            coarse = _assess(design, settings, f.coarse_solution, region, COARSE_CANDIDATES)
            floor = ACCURACY_LEVELS[design.evaluation.accuracy].floor_pct
            if fine.reserve is not None and coarse.reserve is not None:
                est_r = 100.0 * abs(fine.reserve - coarse.reserve) / fine.reserve + floor
            if fine.damage > 0 and coarse.damage > 0:
                est_l = 100.0 * abs(fine.damage / coarse.damage - 1.0) + floor
        life = 1.0 / fine.damage if fine.damage > 0 else None
        reqs = [requirement("fatigue_reserve", "fatigue reserve factor", fine.reserve, settings.min_reserve, ">=",
                            scale=settings.min_reserve, kind="fatigue", advice=ADVICE, check=self.name,
                            reason=None if fine.reserve is None else
                            f"fatigue reserve factor {fine.reserve:.3f} < {settings.min_reserve:g}")]
        if settings.min_life is not None:
            safe = None if life is None else life / settings.scatter_factor
            reqs.append(requirement("fatigue_life", f"fatigue life / scatter ({settings.unit}s)", safe,
                                    settings.min_life, ">=", scale=settings.min_life, kind="fatigue", advice=ADVICE,
                                    check=self.name))
        if design.purpose != "search":
            reqs.append(requirement("fatigue_accuracy", "mesh error estimate of the fatigue reserve", est_r,
                                    design.evaluation.accuracy_target_pct, "<=", scale=None, unit="%",
                                    kind="accuracy", advice=ADVICE_ACCURACY, check=self.name))
        warns = []
        close = within_estimate("the fatigue reserve factor", fine.reserve, settings.min_reserve, est_r)
        if close:
            warns.append(close)
        lim = settings.yield_limit
        if settings.method == "stress_life" and lim is not None and fine.elastic_range_mpa > 2.0 * lim:
            warns.append(f"fatigue: the local elastic stress range at the hot spot ({fine.elastic_range_mpa:.0f} MPa)"
                         f" exceeds twice the cyclic yield stress ({2 * lim:.0f} MPa): the notch root yields and the"
                         ' stress-life answer is in doubt; use fatigue.method = "strain_life"')
        if not fine.tensile:
            warns.append("fatigue: no cycle of the spectrum is tensile on any outline, so no fatigue damage is"
                         " computed (a cycle entirely in compression does none here)")
        return FatigueResult(requirements=tuple(reqs), warnings=tuple(warns), settings=settings,
                             damage_per_unit=fine.damage, life=life, reserve_factor=fine.reserve,
                             reserve_error_estimate_pct=est_r, life_error_estimate_pct=est_l, hot_spot=fine.hot,
                             blocks=fine.blocks, elastic_range_mpa=fine.elastic_range_mpa, tensile=fine.tensile,
                             outline=fine.outline)

    @classmethod
    def absent(cls, study: Study) -> Section:
        return Section("Fatigue", ("Not assessed: the study has no [fatigue] table, so no fatigue life is computed. The"
                                   " edge of an opening in a tension- or shear-loaded web is where fatigue cracks"
                                   " start: add [fatigue] (load states, cycles per unit, the material curve) to"
                                   " check it.",), warn=True)
