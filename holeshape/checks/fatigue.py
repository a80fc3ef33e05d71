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
    support_factor,
)
from holeshape.tablefields import string_value, table_list, unknown_keys

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


def _num(t: dict, key: str, where: str, *, default: Any = ..., positive: bool = False, negative: bool = False,
         low: float | None = None, high: float | None = None, what: str = "") -> Any:
    """A number of the table: ``where`` + ``key`` names it in every message; ``what`` says what it is when missing."""
    if key not in t:
        if default is ...:
            raise StudyError(f"{where}{key} is missing" + (f": give {what}" if what else ""))
        return default
    v = t[key]
    if isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(float(v)):
        raise StudyError(f"{where}{key} must be a finite number, got {v!r}")
    v = float(v)
    if positive and v <= 0:
        raise StudyError(f"{where}{key} must be > 0, got {v!r}")
    if negative and v >= 0:
        raise StudyError(f"{where}{key} must be < 0 (a fatigue curve falls as the life grows), got {v!r}")
    if low is not None and high is not None and not low < v < high:
        raise StudyError(f"{where}{key} must lie strictly between {low:g} and {high:g}, got {v!r}")
    return v


def _value(v: Any, path: str) -> float:
    """A number written inside an array or an inline table (``path`` its full name)."""
    if isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(float(v)):
        raise StudyError(f"{path} must be a finite number, got {v!r}")
    return float(v)


def _choice(t: dict, key: str, where: str, choices: tuple[str, ...], default: str) -> str:
    return str(string_value(t, key, where, choices, default))


_unknown = unknown_keys


def _unused(t: dict, keys: tuple[str, ...], where: str, why: str) -> None:
    """Refuse keys the chosen kind or correction does not read (a value the user thinks applies and does not)."""
    for k in keys:
        if k in t:
            raise StudyError(f"{where}{k} = {t[k]!r} is not used {why}: remove it, or choose what uses it")


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
        out.append((name, _value(f, f'{where}."{name}"')))
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
    if kind == "detail_category" and mean != "none":
        raise StudyError(f'{w}mean_stress = "{mean}" with kind = "detail_category": a detail category is a curve of'
                         ' stress ranges with no mean-stress correction; give mean_stress = "none"')
    kw: dict[str, Any] = {"kind": kind, "mean_stress": mean}
    if kind == "basquin" or mean == "morrow" or method == "strain_life":
        kw["strength_coefficient"] = _num(t, "strength_coefficient", w, positive=True,
                                          what="sigma'_f in MPa, from approved data")
    if kind == "basquin" or method == "strain_life":
        kw["exponent"] = _num(t, "exponent", w, low=-1.0, high=0.0, what="Basquin's b, between -1 and 0")
    if kind != "basquin":
        _unused(t, ("exponent",) if mean != "morrow" else (), w, f'by kind = "{kind}"')
    if kind == "points":
        pts = t.get("points")
        if not isinstance(pts, list) or len(pts) < 2 or not all(isinstance(p, list) and len(p) == 2 for p in pts):
            raise StudyError(f"fatigue.curve.points must be at least two [cycles, amplitude] pairs, got {pts!r}")
        pp = [(_value(p[0], f"{w}points[{i}][0]"), _value(p[1], f"{w}points[{i}][1]")) for i, p in enumerate(pts)]
        if any(a <= 0 or b <= 0 for a, b in pp):
            raise StudyError(f"fatigue.curve.points must hold positive cycles and amplitudes, got {pts!r}")
        if any(b[0] <= a[0] or b[1] >= a[1] for a, b in zip(pp, pp[1:])):
            raise StudyError("fatigue.curve.points must be in order of rising cycles with falling amplitudes (a flat"
                             " step would give an infinite or a zero life), got " + repr(pts))
        kw["points"] = tuple(pp)
        kw["beyond_last"] = _choice(t, "beyond_last", w, BEYOND_LAST, "constant")
    else:
        _unused(t, ("points", "beyond_last"), w, f'by kind = "{kind}"')
    detail = ("reference_range", "reference_cycles", "slope", "slope_after_knee", "knee_cycles", "cutoff_cycles")
    if kind == "detail_category":
        kw["reference_range"] = _num(t, "reference_range", w, positive=True,
                                     what="the detail's stress range in MPa at reference_cycles, from the code")
        kw["reference_cycles"] = _num(t, "reference_cycles", w, default=2e6, positive=True)
        for k in detail[2:]:
            if k not in t:
                raise StudyError(f"{w}{k} is missing: a detail category needs its slopes m1 (slope) and m2"
                                 " (slope_after_knee) and its knee and cut-off cycles (knee_cycles, cutoff_cycles)"
                                 " from the applicable code")
            kw[k] = _num(t, k, w, positive=True)
        if not kw["reference_cycles"] <= kw["knee_cycles"] < kw["cutoff_cycles"]:
            raise StudyError(f"{w}reference_cycles ({kw['reference_cycles']:g}), knee_cycles ({kw['knee_cycles']:g})"
                             f" and cutoff_cycles ({kw['cutoff_cycles']:g}) must rise in that order (the reference"
                             " point lies on the first slope)")
    else:
        _unused(t, detail, w, f'by kind = "{kind}"')
    kw["endurance_limit"] = _num(t, "endurance_limit", w, default=None, positive=True)
    if mean in ("goodman", "gerber"):
        kw["ultimate_strength"] = _num(t, "ultimate_strength", w, positive=True,
                                       what=f'the ultimate strength in MPa (mean_stress = "{mean}" divides by it)')
    else:
        _unused(t, ("ultimate_strength",), w, f'with mean_stress = "{mean}" (Goodman and Gerber read it)')
    if mean == "walker":
        kw["walker_exponent"] = _num(t, "walker_exponent", w, what="Walker's gamma in (0, 1]")
        if not 0.0 < kw["walker_exponent"] <= 1.0:
            raise StudyError(f"{w}walker_exponent must lie in (0, 1], got {kw['walker_exponent']!r}")
    else:
        _unused(t, ("walker_exponent",), w, f'with mean_stress = "{mean}"')
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
        kw["ductility_exponent"] = _num(t, "ductility_exponent", w, low=-1.0, high=0.0)
        if kw["surface_factor"] != 1.0:
            raise StudyError(f"{w}surface_factor = {kw['surface_factor']!r} applies to the stress-life method; the"
                             " strain-life constants should already describe the edge as made")
        if kw["endurance_limit"] is not None:
            raise StudyError(f"{w}endurance_limit applies to the stress-life method; the strain-life curve has none")
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
            with open(path, newline="", encoding="utf-8-sig") as fh:  # -sig: the byte-order mark of a CSV export
                rows = list(csv.reader(fh))
        except UnicodeDecodeError as err:
            raise StudyError(f"{w} = {v!r}: the file is not UTF-8 text (save it as CSV, UTF-8)") from err
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
        dup = sorted({h for h in head if head.count(h) > 1})
        if dup:
            raise StudyError(f"{w} = {v!r}: column {dup[0]!r} is given more than once; each load case once")
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
    if "unit" not in t:
        raise StudyError(f'{w}unit is missing: name the unit the spectrum repeats in ("flight", "hour", "voyage")')
    unit = t["unit"]
    if not isinstance(unit, str) or not unit.strip():
        raise StudyError(f'{w}unit must name the unit the spectrum repeats in ("flight", "hour", "voyage"), got'
                         f" {unit!r}")
    method = _choice(t, "method", w, METHODS, "stress_life")
    notch = _choice(t, "notch", w, NOTCHES, "none")
    const = None
    if notch != "none":
        if "notch_constant" not in t:
            raise StudyError(f'{w}notch = "{notch}" needs {w}notch_constant (mm: Peterson\'s a, Neuber\'s rho\' or'
                             " the support factor's rho*, for the material, from its source)")
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
        cyclic = Cyclic(_num(c, "strength_coefficient", w + "cyclic.", positive=True, what="K' in MPa"),
                        _num(c, "hardening_exponent", w + "cyclic.", low=0.0, high=1.0, what="n' in (0, 1)"))
    if method == "strain_life" and cyclic is None:
        raise StudyError(f'{w}method = "strain_life" needs [fatigue.cyclic] with strength_coefficient (K\', MPa) and'
                         " hardening_exponent (n') of the cyclic stress-strain curve")
    blocks: tuple[Block, ...] = ()
    if "block" in t:
        bl = table_list(t["block"], f"{w}block")
        out = []
        for i, b in enumerate(bl):
            wb = f"{w}block[{i}]."
            _unknown(b, ("name", "from", "to", "cycles"), wb)
            for k in ("from", "to", "cycles"):
                if k not in b:
                    raise StudyError(f"{wb}{k} is missing: a block is cycles per {unit} from one load state to"
                                     ' another ("zero" or a table of load-case factors)')
            cyc = _num(b, "cycles", wb)
            if cyc <= 0:
                raise StudyError(f"{wb}cycles must be > 0 (cycles per {unit}), got {cyc!r}")
            name = b.get("name", f"block {i + 1}")
            if not isinstance(name, str):
                raise StudyError(f"{wb}name must be a string, got {name!r}")
            blk = Block(name, _state(b["from"], wb + "from", cases), _state(b["to"], wb + "to", cases), cyc)
            if blk.start.vector(cases).tolist() == blk.end.vector(cases).tolist():
                raise StudyError(f"{w}block[{i}] runs from a state to the same state ({blk.start.text}): a block needs"
                                 " a range; give two different states")
            out.append(blk)
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
    scatter = _num(t, "scatter_factor", w, default=1.0, positive=True)
    if scatter < 1.0:
        raise StudyError(f"{w}scatter_factor must be >= 1 (the factor on the life the curve must give), got"
                         f" {scatter!r}")
    cons = parts.get("constraints", {})
    min_reserve = cons.get("min_fatigue_reserve", 1.0)
    if min_reserve < 1.0:
        raise StudyError(f"constraints.min_fatigue_reserve must be >= 1 (a reserve below 1 misses the required life),"
                         f" got {min_reserve!r}")
    return FatigueSettings(
        unit=unit.strip(), required_life=_num(t, "required_life", w, positive=True, what=f"the life in {unit}s"),
        scatter_factor=scatter, method=method, notch=notch,
        notch_constant=const, curve=curve, cyclic=cyclic,
        cyclic_yield_strength=_num(t, "cyclic_yield_strength", w, default=None, positive=True), blocks=blocks,
        sequence=sequence, sequence_source=source, min_reserve=min_reserve, min_life=cons.get("min_fatigue_life"))


# ----- the stress round every outline ------------------------------------------------------------------------------
PLANES = 18  # critical planes every 10 degrees where the governing stress is not on a free edge


@dataclass
class Place:
    """One line the fatigue stress is read along: its points, the per-case stress (n, m) (linear in the load: a
    state is a factor-weighted sum), the radius of curvature at each point (inf where there is no notch), whether it
    is a free edge (the notch rule applies), and for a critical plane its normal's angle (degrees from x)."""

    name: str
    xy: np.ndarray
    s: np.ndarray
    values: np.ndarray
    radius: np.ndarray
    free_edge: bool
    plane_deg: float | None = None
    chi: np.ndarray | None = None  # relative stress gradient (n, m) into the material, 1/mm (stress_gradient rule)

    def states(self, f: np.ndarray) -> np.ndarray:
        """The fatigue stress (n, k) of k states given as factors ``f`` (m, k)."""
        return self.values @ f

    def at(self, i: int) -> Place:
        return Place(self.name, self.xy[:, i:i + 1], self.s[i:i + 1], self.values[i:i + 1], self.radius[i:i + 1],
                     self.free_edge, self.plane_deg)


def relative_gradient(solution: Any, region: Any, bs: Any) -> np.ndarray:
    """The relative gradient chi* = -(1 / sigma_t) d sigma_t / dn (1/mm) of each load case's tangential stress into
    the material at every point of a free edge (n, m): sigma_t at 13 points along the normal over two local element
    sizes, a cubic fitted to them by least squares, its slope at the edge over its value there, both averaged along
    the edge over two element sizes. The P2 stress is piecewise linear with pointwise errors of a few 0.1 %, which a
    difference of two values would amplify, and the slope depends on where the element kinks fall along each
    normal; the fit and the average smooth both (measured on Kirsch's circle, whose exact relative gradient at the
    peak is 7 / (3 a): within 0.6 % over the peak's neighbourhood at the standard level, against up to 4 % at single
    points). A point whose normal leaves the mesh
    within that span gets no support (chi* = 0: Kf = Kt, conservative)."""
    from holeshape.evaluate import stress_in

    xy = bs.xy
    closed = np.allclose(xy[:, 0], xy[:, -1])
    d = np.gradient(xy, axis=1)
    if closed:
        d[:, 0] = d[:, -1] = xy[:, 1] - xy[:, -2]
    t = d / np.maximum(np.hypot(d[0], d[1]), 1e-300)
    area = 0.5 * np.sum(xy[0, :-1] * xy[1, 1:] - xy[0, 1:] * xy[1, :-1])
    nrm = np.array([t[1], -t[0]]) * (1.0 if area > 0 else -1.0)  # the right of a counter-clockwise hole: the web
    spacing = np.hypot(*np.gradient(xy, axis=1))
    h = 4.0 * np.maximum(spacing, 1e-9)  # five samples per boundary facet: the element edge is four spacings
    u = np.linspace(0.0, 2.0, 13)  # distances in local element sizes
    tx, ty = t[0][:, None], t[1][:, None]
    try:
        f = []
        for uk in u:
            # a hair along the edge keeps a point off a reduced model's mirror line, where the point finder of the
            # straight-sided twin can pick the element across it (the field is smooth there: no effect on the value)
            sig = stress_in(region, solution, xy + nrm * (uk * h) + t * (1e-3 * h))  # (3, n, m)
            f.append(sig[0] * tx * tx + sig[1] * ty * ty + 2 * sig[2] * tx * ty)
    except (ValueError, IndexError):  # a normal that leaves the mesh (a ligament thinner than two elements)
        return np.zeros(bs.hoop.shape)
    fit = np.linalg.pinv(np.vander(u, 4, increasing=True))  # (4, 13): cubic in u by least squares
    coef = np.einsum("ck,knm->cnm", fit, np.array(f))
    f0, slope = coef[0], coef[1] / h[:, None]
    # the slope of a piecewise-linear stress depends on where the element kinks fall along each normal: averaged
    # along the edge over two elements (the samples' own span), where the true gradient changes by (h / r)^2
    k = 9
    w = np.ones(k) / k
    if closed:
        pad = np.concatenate([slope[-k:-1], slope, slope[1:k]], axis=0), np.concatenate([f0[-k:-1], f0, f0[1:k]])
    else:
        pad = np.pad(slope, ((k // 2, k // 2), (0, 0)), mode="edge"), np.pad(f0, ((k // 2, k // 2), (0, 0)),
                                                                              mode="edge")
    off = k - 1 if closed else k // 2
    sm = np.stack([np.convolve(pad[0][:, j], w, mode="same")[off:off + slope.shape[0]] for j in range(slope.shape[1])],
                  axis=1)
    f0s = np.stack([np.convolve(pad[1][:, j], w, mode="same")[off:off + f0.shape[0]] for j in range(f0.shape[1])],
                   axis=1)
    with np.errstate(divide="ignore", invalid="ignore"):
        chi = np.where(np.abs(f0s) > 0, -sm / f0s, 0.0)
    return np.nan_to_num(chi, nan=0.0, posinf=0.0, neginf=0.0)


def _radius(cut: Any, xy: np.ndarray, cache: dict) -> np.ndarray:
    """The outline's radius of curvature (mm, inf where straight) at each point, from the nearest sample of the
    exact outline's dense sampling (``cache``: the search trees of one design's assessment, both levels)."""
    from scipy.spatial import cKDTree

    best = np.full(xy.shape[1], np.inf)
    dist = np.full(xy.shape[1], np.inf)
    for m in cut.members:
        smp = m.sampling
        key = ("fatigue outline tree", m.shape, m.center, m.rotation)
        tree = cache.get(key)
        if tree is None:
            tree = cache[key] = cKDTree(smp.points.T)
        d, k = tree.query(xy.T)
        curv = np.abs(smp.curvature[k])
        with np.errstate(divide="ignore"):
            r = np.where(curv > 0, 1.0 / curv, np.inf)
        closer = d < dist
        best, dist = np.where(closer, r, best), np.where(closer, d, dist)
    return best


def places(design: Design, solution: Any, region: Any, trees: dict | None = None, gradient: bool = False
           ) -> list[Place]:
    """Every line of the web the solved design's fatigue is read along: each opening's edge (a free edge: the
    signed tangential stress) and, with a ring, the web at its outer edge (not a free edge: the normal stress on
    each of :data:`PLANES` critical planes, the worst plane taken). A flange's or a doubler's own stress is not
    assessed (their own fatigue is outside this check)."""
    from holeshape.evaluate import mirror_to_full, opening_name

    cut = design.cutout
    trees = {} if trees is None else trees
    out = []
    if len(solution.members) > 1:
        edges = [(opening_name(k), mirror_to_full(bs, region)) for k, bs in enumerate(solution.members)]
    else:
        edges = [("cutout edge", mirror_to_full(solution.cutout, region))]
    for name, bs in edges:
        out.append(Place(name, bs.xy, bs.s, bs.hoop, _radius(cut, bs.xy, trees), True,
                         chi=relative_gradient(solution, region, bs) if gradient else None))
    r = cut.reinforcement
    if r is not None and solution.interior_edge is not None:
        loc = next((x for x in r.stress_locations(design.study.material.elastic.reference_modulus)
                    if x.source == "interior_edge"), None)
        if loc is not None:
            bs = mirror_to_full(solution.interior_edge, region)
            sx, sy, txy = bs.sigma
            for k in range(PLANES):
                a = math.radians(180.0 * k / PLANES)
                c, sn = math.cos(a), math.sin(a)
                out.append(Place(loc.name, bs.xy, bs.s, sx * c * c + sy * sn * sn + 2 * txy * c * sn,
                                 np.full(bs.s.size, np.inf), False, 180.0 * k / PLANES))
    return out


def nominal_stress(design: Design) -> np.ndarray:
    """Each load case's nominal stress for the notch rule: the largest magnitude of the remote principal stresses
    (for a beam case, of the beam-theory stress at the opening's centre), whatever ``[measure] stress`` says."""
    from holeshape.evaluate import reference_stress
    from holeshape.solve import load_fields

    st = design.study
    fields = load_fields(st.panel, st.load_cases)
    return np.array([reference_stress(lc, "max_principal", fields[j], design.cutout.center, st.panel)
                     for j, lc in enumerate(st.load_cases)])


def notch_scaled(p: Place, settings: FatigueSettings, refs: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(per-case values with the notch effect, per-case local Kt (n, m), q (n,)) of a place (module docstring)."""
    n = p.values.shape[0]
    if not p.free_edge:
        return p.values, np.full((n, len(refs)), np.nan), np.ones(n)
    kt = np.abs(p.values) / np.where(refs > 0, refs, np.inf)[None, :]
    if settings.notch == "stress_gradient":
        assert p.chi is not None and settings.notch_constant is not None
        support = support_factor(settings.notch_constant, p.chi)  # (n, m): Kf = Kt / n
        ratio = np.where(kt > 1.0, 1.0 / support, 1.0)
        # the equivalent notch sensitivity of each point (of its most stressed case), for the hot spot's report
        kf = kt * ratio
        with np.errstate(divide="ignore", invalid="ignore"):
            qq = np.where(kt > 1.0, (kf - 1.0) / (kt - 1.0), 1.0)
        j = np.argmax(np.abs(p.values), axis=1)
        return p.values * ratio, kt, qq[np.arange(n), j]
    q = notch_sensitivity(settings.notch, settings.notch_constant, p.radius)
    if settings.notch == "none":
        return p.values, kt, q
    kf = fatigue_factor(kt, q[:, None])
    ratio = np.where(kt > 1.0, kf / np.where(kt > 1.0, kt, 1.0), 1.0)
    return p.values * ratio, kt, q


# ----- the assessment -----------------------------------------------------------------------------------------------
def _clean(v: float | None) -> float | None:
    """A number for the JSON: None for an undefined or infinite one (the text says why)."""
    return None if v is None or not math.isfinite(v) else float(v)


@dataclass(frozen=True)
class BlockResult:
    """One block (or, for a sequence, one counted cycle of the hot spot) at the hot spot (MPa, cycles): the local
    stresses the damage is computed from (for strain-life the notch root's stresses by Neuber's rule)."""

    name: str
    cycles_per_unit: float
    local_max_mpa: float | None
    local_min_mpa: float | None
    range_mpa: float | None
    mean_mpa: float | None
    equivalent_amplitude_mpa: float | None
    cycles_to_failure: float | None  # None: the cycle does no damage
    damage_per_unit: float | None  # None: the cycle fails at once (its mean reaches the strength)

    def to_dict(self) -> dict:
        return {k: (_clean(v) if isinstance(v, float) else v) for k, v in self.__dict__.items()}


@dataclass(frozen=True)
class HotSpot:
    x_mm: float
    y_mm: float
    opening: str
    radius_mm: float | None
    kt: float | None  # None where the point is not on a free edge (no notch)
    q: float | None
    kf: float | None
    load_case: str
    plane_deg: float | None = None  # the critical plane's normal, away from a free edge
    relative_gradient_per_mm: float | None = None  # chi* of the governing case (the stress_gradient rule)
    support_factor: float | None = None  # n = 1 + sqrt(rho* chi*) (the stress_gradient rule)


@dataclass(frozen=True)
class Spectrum:
    """What one solution level gives: damage per unit at the hot spot, the reserve and where it governs, the hot
    spot and its blocks."""

    damage: float
    reserve: float | None
    reserve_at: tuple[float, float, str] | None
    hot: HotSpot
    blocks: tuple[BlockResult, ...]
    elastic_range_mpa: float
    elastic_max_mpa: float
    tensile: bool
    # (place, arc length, damage per unit, 'line' or 'points', the hot spot's arc length) along the hot spot's line
    outline: tuple[str, np.ndarray, np.ndarray, str, float] | None = None


def _spread(score: np.ndarray, k: int, gap: int) -> list[int]:
    """The indices of the ``k`` largest scores at least ``gap`` samples apart (separate peaks along a line)."""
    out: list[int] = []
    for i in np.argsort(-score):
        if len(out) == k:
            break
        if all(abs(int(i) - j) >= gap for j in out):
            out.append(int(i))
    return out


def _assess(design: Design, settings: FatigueSettings, solution: Any, region: Any,
            candidates: int = CANDIDATES, trees: dict | None = None) -> Spectrum:
    names = [c.name for c in design.study.load_cases]
    refs = nominal_stress(design)
    modulus = design.study.material.elastic.reference_modulus
    ps = places(design, solution, region, trees, gradient=settings.notch == "stress_gradient")
    scaled = [notch_scaled(p, settings, refs) for p in ps]
    sl = settings.method == "strain_life"
    work = [Place(p.name, p.xy, p.s, v, p.radius, p.free_edge, p.plane_deg) for p, (v, _, _) in zip(ps, scaled)]
    tensile = True
    if settings.blocks:
        fa = np.stack([b.start.vector(names) for b in settings.blocks], axis=1)  # (m, nb)
        fb = np.stack([b.end.vector(names) for b in settings.blocks], axis=1)
        cyc = np.array([b.cycles for b in settings.blocks])
        stress = [(p.states(fa), p.states(fb)) for p in work]  # each (n, nb)

        def per_point(f: float) -> list[np.ndarray]:
            out = []
            for a, b in stress:
                if sl:
                    out.append(_strain_blocks(settings, modulus, a * f, b * f, cyc)[0])
                else:
                    out.append(cycle_damage(settings.curve, np.maximum(a, b) * f, np.minimum(a, b) * f,
                                            cyc[None, :])[2])
            return out  # each (n, nb)

        def totals_at(f: float) -> list[np.ndarray]:
            return [d.sum(axis=1) for d in per_point(f)]

        def damage_at(f: float) -> float:
            return max(float(np.max(t)) for t in totals_at(f))

        totals = totals_at(1.0)
        k, i = _hot(totals, [np.max(np.abs(a - b), axis=1) for a, b in stress])
        a, b = stress[k][0][i], stress[k][1][i]
        hi, lo = np.maximum(a, b), np.minimum(a, b)
        if sl:
            d, smax, smin = (x[0] for x in _strain_blocks(settings, modulus, a[None, :], b[None, :], cyc))
            nf = np.where(d > 0, cyc / np.where(d > 0, d, 1.0), np.inf)
            blocks = tuple(BlockResult(bk.name, bk.cycles, float(smax[j]), float(smin[j]), float(smax[j] - smin[j]),
                                       float(0.5 * (smax[j] + smin[j])), None,
                                       None if not np.isfinite(nf[j]) else float(nf[j]), float(d[j]))
                           for j, bk in enumerate(settings.blocks))
        else:
            amp, nf, d = cycle_damage(settings.curve, hi, lo, cyc)
            blocks = tuple(BlockResult(bk.name, bk.cycles, float(hi[j]), float(lo[j]), float(hi[j] - lo[j]),
                                       float(0.5 * (hi[j] + lo[j])), float(amp[j]),
                                       None if not np.isfinite(nf[j]) else float(nf[j]),
                                       float(d[j]) if np.isfinite(d[j]) else None)
                           for j, bk in enumerate(settings.blocks))
        dom = int(np.argmax(np.where(np.isfinite(d), d, 1e300))) if np.any(d > 0) else int(np.argmax(hi - lo))
        delta = fb[:, dom] - fa[:, dom]
        erange, emax = float(np.max(hi - lo)), float(np.max(hi))
        if not sl and settings.curve.kind != "detail_category":
            tensile = any(float(np.max(np.maximum(x, y))) > 0 for x, y in stress)
        total = float(totals[k][i])
        outline = (ps[k].name, ps[k].s, totals[k], "line", float(ps[k].s[i]))
    else:
        f = np.stack([st.vector(names) for st in settings.sequence], axis=1)  # (m, K)
        f = f[:, _turning(f)]  # a state where no factor turns is a turning point of no combination
        cand: list[tuple[int, int]] = []
        for kk, p in enumerate(work):
            hi_p, lo_p, pairs = _screen(settings, p, f, sl)
            big = cycle_damage(settings.curve, hi_p, lo_p, 1.0)[2] if not sl else hi_p - lo_p
            big = np.where(np.isfinite(big), big, 1e300)
            gap = max(1, p.values.shape[0] // 32)
            half = max(1, candidates // 2)
            cand += [(kk, i) for i in _spread(big if np.any(big > 0) else hi_p - lo_p, half, gap)]
            cand += [(kk, i) for i in _spread(pairs, candidates - half, gap)]
        hist = {c: work[c[0]].at(c[1]).states(f)[0] for c in dict.fromkeys(cand)}
        counted = {c: rainflow_cycles(closed_loop(h).tolist()) for c, h in hist.items()} if not sl else {}
        arrays = {c: (np.array([x[0] for x in cy]), np.array([x[1] for x in cy]), np.array([x[2] for x in cy]))
                  for c, cy in counted.items()}

        def dmg_of(c: tuple[int, int], fac: float) -> float:
            if sl:
                assert settings.cyclic is not None
                return strain_life_damage(settings.curve, modulus, masing_history(hist[c] * fac, modulus,
                                                                                  settings.cyclic))
            r, m, n = arrays[c]
            if r.size == 0:
                return 0.0
            return float(np.sum(cycle_damage(settings.curve, fac * (m + r / 2), fac * (m - r / 2), n)[2]))

        scores = {c: dmg_of(c, 1.0) for c in hist}
        finite = [v for v in scores.values() if math.isfinite(v)]
        top_score = max(scores.values())
        # the reserve is the largest damage's: the candidates within three decades of the worst at the spectrum
        near = [c for c in hist if scores[c] >= 1e-3 * top_score] if top_score > 0 and finite else list(hist)

        def damage_at(f: float) -> float:
            return max(dmg_of(c, f) for c in near)

        best = max(scores, key=lambda c: (scores[c], float(np.ptp(hist[c]))))
        k, i = best
        blocks = _sequence_blocks(settings, modulus, hist[best], counted.get(best))
        h = hist[best]
        erange, emax = float(np.ptp(h)), float(np.max(h))
        if not sl:
            tensile = any(float(np.max(_screen(settings, p, f, sl, pairs=False)[0])) > 0 for p in work) or \
                settings.curve.kind == "detail_category"
        j0, j1 = int(np.argmax(h)), int(np.argmin(h))
        delta = f[:, j0] - f[:, j1]
        total = float(scores[best])
        mine = [c for c in hist if c[0] == k]
        outline = (ps[k].name, np.array([ps[k].s[c[1]] for c in mine]), np.array([scores[c] for c in mine]), "points",
                   float(ps[k].s[i]))
    p = ps[k]
    at = np.abs(p.values[i])
    jc = int(np.argmax(np.abs(delta) * at))  # the load case that contributes most to the governing range
    _, kts, qs = scaled[k]
    chi_hot = support = None
    if p.free_edge and settings.notch == "stress_gradient":
        assert p.chi is not None and settings.notch_constant is not None
        kt = float(kts[i, jc])
        chi_hot = float(p.chi[i, jc])
        support = float(support_factor(settings.notch_constant, np.array(chi_hot)))
        kf: float | None = kt / support if kt > 1.0 else kt
        q = (kf - 1.0) / (kt - 1.0) if kt > 1.0 else 1.0  # type: ignore[operator]
    elif p.free_edge:
        kt, q = float(kts[i, jc]), float(qs[i])
        kf = float(fatigue_factor(np.array(kt), np.array(q)))
    else:
        kt = q = kf = None  # type: ignore[assignment]
    r = float(p.radius[i]) if np.isfinite(p.radius[i]) else None
    hot = HotSpot(float(p.xy[0, i]), float(p.xy[1, i]), p.name, r, kt, q, kf, names[jc], p.plane_deg, chi_hot,
                  support)
    reserve = reserve_factor(damage_at, settings.target_damage)
    where = None
    if reserve is not None and settings.blocks:
        tot = totals_at(reserve)
        kr = max(range(len(tot)), key=lambda j: float(np.max(tot[j])))
        ir = int(np.argmax(tot[kr]))
        where = (float(ps[kr].xy[0, ir]), float(ps[kr].xy[1, ir]), ps[kr].name)
    elif reserve is not None:
        cr = max(near, key=lambda c: dmg_of(c, reserve))
        where = (float(ps[cr[0]].xy[0, cr[1]]), float(ps[cr[0]].xy[1, cr[1]]), ps[cr[0]].name)
    return Spectrum(total, reserve, where, hot, blocks, erange, emax, tensile,
                    outline if design.keep_fields else None)


def _turning(f: np.ndarray) -> np.ndarray:
    """The states of a sequence (columns of ``f``) where at least one factor turns, and the first and last."""
    k = f.shape[1]
    if k < 3:
        return np.arange(k)
    d = np.diff(f, axis=1)
    turn = np.any(d[:, :-1] * d[:, 1:] < 0, axis=0) | np.any((d[:, :-1] == 0) != (d[:, 1:] == 0), axis=0)
    return np.flatnonzero(np.concatenate([[True], turn, [True]]))


def _screen(settings: FatigueSettings, p: Place, f: np.ndarray, strain: bool, pairs: bool = True,
            chunk: int = 2048) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Each point's extremes over the sequence, and the damage of its consecutive state pairs as half cycles (a
    proxy that sees every excursion, however small; the extremes see the largest cycle, which rainflow always
    counts). The two rank the points a sequence is counted at."""
    n = p.values.shape[0]
    hi, lo, dmg = np.full(n, -np.inf), np.full(n, np.inf), np.zeros(n)
    prev = None
    for s0 in range(0, f.shape[1], chunk):
        v = p.states(f[:, s0:s0 + chunk])
        hi, lo = np.maximum(hi, v.max(axis=1)), np.minimum(lo, v.min(axis=1))
        if pairs:
            w = v if prev is None else np.concatenate([prev, v], axis=1)
            a, b = w[:, :-1], w[:, 1:]
            if strain:
                dmg += np.abs(b - a).sum(axis=1)
            else:
                d = cycle_damage(settings.curve, np.maximum(a, b), np.minimum(a, b), 0.5)[2]
                dmg += np.where(np.isfinite(d), d, 1e300).sum(axis=1)
            prev = v[:, -1:]
    return hi, lo, dmg


def _hot(totals: list[np.ndarray], ranges: list[np.ndarray]) -> tuple[int, int]:
    """The (place, point) of largest damage; where nothing is damaged, of largest range."""
    pick = totals if any(float(t.max()) > 0 for t in totals) else ranges
    k = max(range(len(pick)), key=lambda j: float(np.max(pick[j])))
    return k, int(np.argmax(pick[k]))


def _strain_blocks(settings: FatigueSettings, modulus: float, a: np.ndarray, b: np.ndarray, cyc: np.ndarray
                   ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(damage, local max, local min), each (n, nb), of each block as its own constant-amplitude history: first
    loading along the cyclic curve to the extreme of larger magnitude, then the stabilised loop on the doubled curve
    (Neuber's rule both). Blocks do not interact: a residual stress left by another block's larger excursion is not
    carried (a sequence is followed with memory)."""
    assert settings.cyclic is not None
    big = np.where(np.abs(a) >= np.abs(b), a, b)
    other = np.where(np.abs(a) >= np.abs(b), b, a)
    s1, _ = neuber_first(big, modulus, settings.cyclic)
    ds, de = neuber_range(np.abs(big - other), modulus, settings.cyclic)
    smax = np.where(big >= other, s1, s1 + ds)
    smin = smax - ds
    n = strain_life_cycles(settings.curve, modulus, 0.5 * de, smax, 0.5 * (smax + smin))
    return np.where(np.isfinite(n), cyc / np.where(np.isfinite(n), n, 1.0), 0.0), smax, smin


def _sequence_blocks(settings: FatigueSettings, modulus: float, h: np.ndarray,
                     counted: list[tuple[float, float, float]] | None) -> tuple[BlockResult, ...]:
    """The hot spot's counted cycles as blocks (alike cycles merged), largest damage first (at most 20 listed;
    the rest summed in one line)."""
    from dataclasses import replace

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
                       float(nf) if math.isfinite(nf) else None, float(d) if math.isfinite(d) else None)
           for c, hi, lo, amp, nf, d in zip(counts, his, los, amps, nfs, ds)]
    out.sort(key=lambda b: (-(math.inf if b.damage_per_unit is None else b.damage_per_unit), -(b.range_mpa or 0.0)))
    named = [replace(b, name=f"counted cycle {k + 1}") for k, b in enumerate(out[:20])]
    if len(out) > 20:
        rest = out[20:]
        d = [b.damage_per_unit for b in rest]
        named.append(BlockResult(f"{len(rest)} smaller counted cycles (their largest max, smallest min, largest"
                                 " range)", sum(b.cycles_per_unit for b in rest),
                                 max(b.local_max_mpa or -math.inf for b in rest),
                                 min(b.local_min_mpa or math.inf for b in rest), max(b.range_mpa or 0.0 for b in rest),
                                 None, None, None, None if any(x is None for x in d) else float(sum(d))))  # type: ignore[arg-type]
    return tuple(named)


@dataclass(frozen=True, kw_only=True)
class FatigueResult(CheckResult):
    """The fatigue assessment of a design (the JSON keys of its block and the top level are a contract)."""

    check = "fatigue"
    settings: FatigueSettings = field(repr=False)
    damage_per_unit: float
    life: float | None  # units; None: no damage
    reserve_factor: float | None  # None: the spectrum does not reach the required damage at any factor up to 1000
    reserve_at: tuple[float, float, str] | None
    reserve_error_estimate_pct: float | None
    life_error_estimate_pct: float | None
    hot_spot: HotSpot
    blocks: tuple[BlockResult, ...]
    elastic_range_mpa: float
    tensile: bool
    outline: tuple[str, np.ndarray, np.ndarray, str, float] | None = field(default=None, compare=False, repr=False)

    def top_fields(self) -> dict:
        return {"fatigue_life": _clean(self.life), "fatigue_reserve_factor": _clean(self.reserve_factor),
                "fatigue_damage_per_unit": _clean(self.damage_per_unit)}

    def row_fields(self) -> dict:
        return {"fatigue_reserve_factor": _clean(self.reserve_factor), "fatigue_life": _clean(self.life)}

    def to_dict(self) -> dict:
        s = self.settings
        h = self.hot_spot
        return {"method": s.method, "notch": s.notch, "notch_constant_mm": s.notch_constant, "unit": s.unit,
                "required_life": s.required_life, "scatter_factor": s.scatter_factor,
                "curve": s.curve.description, "mean_stress": s.curve.mean_stress,
                "hot_spot": {"x_mm": h.x_mm, "y_mm": h.y_mm, "opening": h.opening, "radius_mm": _clean(h.radius_mm),
                             "kt": h.kt, "q": h.q, "kf": h.kf, "load_case": h.load_case,
                             "critical_plane_deg": h.plane_deg,
                             "relative_gradient_per_mm": h.relative_gradient_per_mm,
                             "support_factor": h.support_factor},
                "blocks": [b.to_dict() for b in self.blocks],
                "reserve_governed_at": None if self.reserve_at is None else
                {"x_mm": self.reserve_at[0], "y_mm": self.reserve_at[1], "opening": self.reserve_at[2]},
                "reserve_error_estimate_pct": _clean(self.reserve_error_estimate_pct),
                "life_error_estimate_pct": _clean(self.life_error_estimate_pct),
                "local_elastic_range_mpa": self.elastic_range_mpa,
                "sequence_file": s.sequence_source or None}

    def section(self) -> Section:
        s, h = self.settings, self.hot_spot
        need = s.required_life * s.scatter_factor
        if self.life is None:
            life = "infinite (no damage)"
        elif self.life == 0:
            life = "none: a cycle's mean stress reaches the strength its mean-stress correction divides by"
        else:
            life = f"{self.life:.4g} {s.unit}s"
        res = ("not reached: the spectrum does not do the required damage at any factor up to 1000"
               if self.reserve_factor is None else f"{self.reserve_factor:.3f}")
        loading = ("blocks of constant-amplitude cycles per " + s.unit + ", each counted on its own (a block"
                   " between two other blocks' extremes, such as ground to the peak gust, must be given as a block)"
                   if s.blocks else
                   f"load states per {s.unit}" + (f" from {s.sequence_source}" if s.sequence_source else "") +
                   ", rainflow counted (ASTM E1049-85) as a closed loop from the highest peak")
        where = "straight or no notch" if h.radius_mm is None else f"{h.radius_mm:.2f} mm"
        notch_words = ("not on a free edge: the normal stress on the worst critical plane"
                       f" ({h.plane_deg:g} deg from x), no notch factor" if h.kt is None else
                       f"Kt {h.kt:.3f} ({h.load_case}), q {h.q:.3f}, Kf {h.kf:.3f}")
        count = len(s.blocks) or len(s.sequence)
        if s.blocks and count == 1:
            loading = loading.replace("blocks of", "block of", 1)
        cyc = "" if s.cyclic is None else (f" Cyclic curve K' = {s.cyclic.strength_coefficient:g} MPa, n' ="
                                          f" {s.cyclic.hardening_exponent:g}.")
        paras = [
            f"Safe-life fatigue by the {s.method.replace('_', '-')} method: {count} {loading}; Palmgren-Miner"
            f" damage. Material curve (the user's): {s.curve.description}.{cyc}",
            f"Hot spot: {h.opening} at ({h.x_mm:.1f}, {h.y_mm:.1f}) mm, radius {where}; {notch_words}. Damage"
            f" {self.damage_per_unit:.4g} per {s.unit}: life {life} against the required {s.required_life:g} x"
            f" scatter {s.scatter_factor:g} = {need:g}; fatigue reserve factor {res} (the factor on every stress of"
            f" the spectrum at which the life equals {need:g} {s.unit}s; at least {s.min_reserve:g} required)"
            + ("" if self.reserve_at is None or (abs(self.reserve_at[0] - h.x_mm) < 0.5 and
                                                 abs(self.reserve_at[1] - h.y_mm) < 0.5) else
               f", governed at ({self.reserve_at[0]:.1f}, {self.reserve_at[1]:.1f}) mm on the {self.reserve_at[2]}")
            + ".",
            "Notch rule: " + ("none, Kf = Kt (the elastic stress itself, the conservative choice)" if s.notch == "none"
                              else f"stress gradient (rho* = {s.notch_constant:g} mm), Kf = Kt / n with the support"
                              " factor n = 1 + sqrt(rho* chi*) of the solved relative stress gradient chi* into the"
                              " web (Siebel & Stieler)" + ("" if h.relative_gradient_per_mm is None else
                                                            f"; at the hot spot chi* = {h.relative_gradient_per_mm:.4g}"
                                                            f" 1/mm, n = {h.support_factor:.4f}")
                              + "; each load case's stress at a point of a free edge is scaled by Kf / Kt of that"
                              " case at that point, then the states are combined" if s.notch == "stress_gradient"
                              else f"{s.notch} (constant {s.notch_constant:g} mm), Kf = 1 + q (Kt - 1); each load"
                              " case's stress at a point of a free edge is scaled by Kf / Kt of that case at that"
                              " point (Kt on the case's largest remote principal stress), then the states are"
                              " combined") + ". On a free edge the fatigue stress is the signed tangential stress;"
            " at a ring's outer edge (the web, not a free edge) the normal stress on the worst of 18 critical planes."
            " A flange's or a doubler's own fatigue is not assessed.",
        ]
        if self.reserve_error_estimate_pct is not None:
            paras.append(f"Mesh error estimate of the reserve {self.reserve_error_estimate_pct:.2g} %"
                         + ("" if self.life_error_estimate_pct is None else
                            f" and of the life {self.life_error_estimate_pct:.2g} %")
                         + " (the same assessment on the second mesh level; a life moves several times faster than"
                         " the stress).")
        if not self.tensile:
            paras.append("No cycle of the spectrum is tensile anywhere on the outlines: no fatigue damage (a cycle"
                         " entirely in compression does none on an amplitude curve).")
        if s.curve.kind == "detail_category":
            paras.append("The detail category is applied to the local stress at the edge (the notch stress, Kt"
                         " included). A code category that already includes the hole's effect is meant for the"
                         " nominal or net-section stress and must not be used with this local stress.")
        if s.method == "stress_life" and s.yield_limit is None:
            paras.append("Local yielding is not checked: give fatigue.cyclic_yield_strength (or [fatigue.cyclic]) to"
                         " be warned when the notch root yields.")
        paras.append(CAUTION)
        warn = self.reserve_factor is not None and self.reserve_factor < s.min_reserve
        if warn:
            paras.insert(0, f"The fatigue reserve factor {self.reserve_factor:.3f} is below the required"
                            f" {s.min_reserve:g}: the life the curve gives ({life}) is short of {need:g} {s.unit}s.")
        c = s.curve
        inputs = [("unit", s.unit), ("required life", f"{s.required_life:g} {s.unit}s"),
                  ("scatter factor on the life", f"{s.scatter_factor:g}"), ("method", s.method.replace("_", "-")),
                  ("notch rule", s.notch if s.notch_constant is None else f"{s.notch}, {s.notch_constant:g} mm"),
                  ("curve kind", c.kind.replace("_", " ")), ("mean-stress correction", c.mean_stress)]
        if c.points:
            inputs.append(("curve points (N, S_a MPa)", "; ".join(f"{n:g}, {a:g}" for n, a in c.points)))
        if s.cyclic_yield_strength is not None:
            inputs.append(("cyclic yield stress", f"{s.cyclic_yield_strength:g} MPa"))
        if s.min_life is not None:
            inputs.append(("least life / scatter", f"{s.min_life:g} {s.unit}s"))
        inputs_table = Table((("what", "fatigue input"), ("value", "value")),
                             tuple({"what": a, "value": b} for a, b in inputs))
        spec = Table((("name", "block"), ("from", "from"), ("to", "to"), ("cycles", f"cycles per {s.unit}")),
                     tuple({"name": b.name, "from": b.start.text, "to": b.end.text, "cycles": b.cycles}
                           for b in s.blocks)) if s.blocks else None
        local = "local (Neuber)" if s.method == "strain_life" else "local"
        blk = Table((("name", "cycle"), ("cycles_per_unit", f"cycles per {s.unit}"),
                     ("local_max_mpa", f"{local} max (MPa)"), ("local_min_mpa", f"{local} min (MPa)"),
                     ("range_mpa", "range (MPa)"), ("equivalent_amplitude_mpa", "equivalent amplitude (MPa)"),
                     ("cycles_to_failure", "cycles to failure"), ("damage_per_unit", f"damage per {s.unit}")),
                    tuple({**b.to_dict(), "cycles_to_failure": "no damage" if b.cycles_to_failure is None
                           and b.damage_per_unit is not None else b.cycles_to_failure,
                           "damage_per_unit": "fails at once" if b.damage_per_unit is None and b.name and
                           b.cycles_to_failure is None and b.mean_mpa is not None else b.damage_per_unit}
                          for b in self.blocks))
        hot_row = {"where": h.opening, "x": h.x_mm, "y": h.y_mm,
                   "r": "straight" if h.radius_mm is None else h.radius_mm, "kt": h.kt, "q": h.q, "kf": h.kf,
                   "case": h.load_case, "life": "infinite" if self.life is None else self.life,
                   "reserve": self.reserve_factor}
        hot_table = Table((("where", "hot spot"), ("x", "x (mm)"), ("y", "y (mm)"), ("r", "radius (mm)"),
                           ("kt", "Kt"), ("q", "q"), ("kf", "Kf"), ("case", "load case of Kt"),
                           ("life", f"life ({s.unit}s)"), ("reserve", "fatigue reserve factor")), (hot_row,))
        tables = tuple(t for t in (inputs_table, spec, hot_table, blk) if t is not None)
        return Section("Fatigue", tuple(paras), tables, warn=warn,
                       images=(("best_fatigue.png", "the material curve with the hot spot's cycles, and the damage"
                                                    " round the outline"),))

    def charts(self) -> tuple[Chart, ...]:
        s = self.settings
        pts = [b for b in self.blocks if b.cycles_to_failure is not None and b.equivalent_amplitude_mpa is not None]
        top = max([1e9] + [3.0 * b.cycles_to_failure for b in pts])  # type: ignore[operator]
        n = np.logspace(2, math.log10(top), 120)
        label = "material curve" + (" (surface factor applied)" if s.curve.surface_factor != 1.0 else "")
        curve = Series(label, tuple(n.tolist()), tuple(s.curve.amplitude_at(n).tolist()))
        marks = tuple(Series(f"{b.name} ({b.cycles_per_unit:g} per {s.unit})", (b.cycles_to_failure,),  # type: ignore[arg-type]
                             (b.equivalent_amplitude_mpa,), "points") for b in pts[:8])  # type: ignore[arg-type]
        if s.method == "stress_life" and s.curve.kind != "detail_category":
            left = ChartAxes("cycles to failure", "stress amplitude at zero mean (MPa)", (curve, *marks), True, True,
                             "the curve, and the hot spot's cycles at their equivalent amplitude")
        elif s.method == "stress_life":
            left = ChartAxes("cycles to failure", "half the stress range (MPa)", (curve, *marks), True, True,
                             "detail category and the hot spot's cycles")
        else:
            left = ChartAxes("cycles to failure", "stress amplitude at zero mean (MPa)", (curve,), True, True,
                             "Basquin part of the strain-life curve (the cycles are in the table)")
        axes = [left]
        if self.outline is not None and np.any(np.asarray(self.outline[2]) > 0):
            name, arc, dmg, style, hot = self.outline
            dmg = np.where(np.isfinite(dmg), dmg, np.nan)
            floor = 1e-8 * float(np.nanmax(dmg))  # a log axis over eight decades below the hot spot
            dmg = np.maximum(dmg, floor)
            need = s.target_damage
            what = ("damage" if style == "line" else "damage at the points the sequence was counted at")
            series = [Series(what, tuple(arc.tolist()), tuple(dmg.tolist()), style),
                      Series(f"required at most (1 / ({s.required_life:g} x {s.scatter_factor:g}))",
                             (float(np.min(arc)), float(np.max(arc))), (need, need)),
                      Series("hot spot", (hot,), (max(floor, self.damage_per_unit),), "points")]
            axes.append(ChartAxes(f"arc length along the {name} (mm, from its first sample)",
                                  f"damage per {s.unit}", tuple(series), False, True, "damage round the outline"))
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
        trees: dict = {}  # the outline's search trees, shared by both levels
        fine = _assess(design, settings, f.solution, region, trees=trees)
        est_r = est_l = None
        if f.coarse_solution is not None and design.purpose != "search":
            coarse = _assess(design, settings, f.coarse_solution, region, COARSE_CANDIDATES, trees)
            floor = ACCURACY_LEVELS[design.evaluation.accuracy].floor_pct
            if fine.reserve is not None and coarse.reserve is not None:
                est_r = 100.0 * abs(fine.reserve - coarse.reserve) / fine.reserve + floor
            elif (fine.reserve is None) != (coarse.reserve is None):
                est_r = 100.0  # one level reaches the required damage, the other does not: not resolved
            if fine.damage > 0 and coarse.damage > 0 and math.isfinite(fine.damage) and math.isfinite(coarse.damage):
                est_l = 100.0 * abs(fine.damage / coarse.damage - 1.0) + floor
        if fine.damage <= 0:
            life: float | None = None
        elif math.isinf(fine.damage):
            life = 0.0
        else:
            life = 1.0 / fine.damage
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
        if settings.method == "stress_life" and lim is not None:
            if fine.elastic_range_mpa > 2.0 * lim:
                warns.append(f"fatigue: the local elastic stress range at the hot spot ({fine.elastic_range_mpa:.0f}"
                             f" MPa) exceeds twice the cyclic yield stress ({2 * lim:.0f} MPa): the notch root yields"
                             ' in every cycle and the stress-life answer is in doubt; use fatigue.method ='
                             ' "strain_life"')
            elif fine.elastic_max_mpa > lim:
                warns.append(f"fatigue: the local elastic peak at the hot spot ({fine.elastic_max_mpa:.0f} MPa) exceeds"
                             f" the cyclic yield stress ({lim:.0f} MPa): the notch root yields and its mean stress"
                             " relaxes, so the mean-stress correction on the elastic mean is in doubt; use"
                             ' fatigue.method = "strain_life"')
        if life == 0.0:
            warns.append("fatigue: the mean stress of a cycle at the hot spot reaches the strength the mean-stress"
                         " correction divides by: no life; reduce the stress or check the correction")
        if not fine.tensile:
            warns.append("fatigue: no cycle of the spectrum is tensile on any outline, so no fatigue damage is"
                         " computed (a cycle entirely in compression does none on an amplitude curve)")
        return FatigueResult(requirements=tuple(reqs), warnings=tuple(warns), settings=settings,
                             damage_per_unit=fine.damage, life=life, reserve_factor=fine.reserve,
                             reserve_at=fine.reserve_at, reserve_error_estimate_pct=est_r,
                             life_error_estimate_pct=est_l, hot_spot=fine.hot, blocks=fine.blocks,
                             elastic_range_mpa=fine.elastic_range_mpa, tensile=fine.tensile, outline=fine.outline)

    @classmethod
    def absent(cls, study: Study) -> Section:
        return Section("Fatigue", ("Not assessed: the study has no [fatigue] table, so no fatigue life is computed. The"
                                   " edge of an opening in a tension- or shear-loaded web is where fatigue cracks"
                                   " start: add [fatigue] (load states, cycles per unit, the material curve) to"
                                   " check it.",), warn=True)
