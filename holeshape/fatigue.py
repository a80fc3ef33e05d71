"""Safe-life fatigue arithmetic: the material curve, mean-stress corrections, notch sensitivity, rainflow counting,
Neuber's rule on the cyclic curve with Masing hysteresis, Palmgren-Miner damage and the fatigue reserve factor.

Everything here is numbers in, numbers out (MPa, cycles, mm), vectorised over the points of an outline; which
stress a point carries is the fatigue check's business (holeshape.checks.fatigue). The material data are the
user's, from the user's approved source: nothing here holds a material value.

Formulas (their usual names; sources beside each):
- Basquin: stress amplitude S_a = sigma'_f (2 N)^b at zero mean (Dowling, Mechanical Behavior of Materials).
- Mean stress, the equivalent fully reversed amplitude S_ar of a cycle with amplitude S_a, mean S_m, maximum S_max:
  Goodman S_a / (1 - S_m / S_u), Gerber S_a / (1 - (S_m / S_u)^2), Morrow S_a / (1 - S_m / sigma'_f),
  Smith-Watson-Topper sqrt(S_max S_a), Walker S_max^(1 - gamma) S_a^gamma (Dowling). A compressive mean earns no
  credit with Goodman and Gerber (common practice, no source); Morrow is applied with its sign, as published.
- A cycle whose maximum is not tensile (S_max <= 0) does no damage on an amplitude curve (common practice, no
  source: fatigue cracks at a notch grow under tension); an output says so when no cycle of a spectrum is tensile.
- Detail category (the form steel codes use for welded and other details): ranges, N = N_C (dS_C / dS)^m1 down to
  the knee, slope m2 from the knee to the cut-off, no damage below the cut-off range. The whole range counts,
  compressive parts included, with no mean-stress correction, as those codes count a welded detail (a code's own
  reduction of compressive parts for a non-welded detail is not applied: conservative).
- Peterson q = 1 / (1 + a / r), Neuber q = 1 / (1 + sqrt(rho' / r)), Kf = 1 + q (Kt - 1) (Peterson, Stress
  Concentration Factors; Neuber, Theory of Notch Stresses).
- The support factor of the relative stress gradient chi* = -(1 / sigma) d sigma / dn at the notch root,
  n = 1 + sqrt(rho* chi*) and Kf = Kt / n (Siebel & Stieler 1955, from memory; the form behind the support factors
  of several later guidelines): the solve knows the gradient, a handbook user does not.
- Neuber's rule sigma epsilon = sigma_e^2 / E with the cyclic curve epsilon = sigma / E + (sigma / K')^(1 / n') and
  Masing's doubled curve for ranges; Coffin-Manson-Basquin epsilon_a = (sigma'_f / E)(2N)^b + epsilon'_f (2N)^c with
  Morrow's (sigma'_f - sigma_m) or Smith-Watson-Topper's sigma_max epsilon_a (Dowling).
- Rainflow counting: ASTM E1049-85 through the ``rainflow`` package.
- Palmgren-Miner: damage = sum n / N.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass

import numpy as np

CURVE_KINDS = ("basquin", "points", "detail_category")
MEAN_STRESS = ("none", "goodman", "gerber", "morrow", "smith_watson_topper", "walker")
NOTCHES = ("none", "peterson", "neuber", "stress_gradient")
METHODS = ("stress_life", "strain_life")
BEYOND_LAST = ("constant", "extrapolate")
STRAIN_MEAN = ("none", "morrow", "smith_watson_topper")
RESERVE_RANGE = (1e-3, 1e3)  # the factors on the spectrum the reserve is looked for between


@dataclass(frozen=True)
class Curve:
    """The user's material fatigue curve (MPa, cycles). ``kind`` one of :data:`CURVE_KINDS`; the fields a kind does
    not use stay None. Amplitudes are at zero mean; ``surface_factor`` (<= 1 for a rougher edge) multiplies the
    curve's strength; ``endurance_limit`` (amplitude) is the level below which a cycle does no damage."""

    kind: str
    strength_coefficient: float | None = None  # sigma'_f (basquin; strain-life; Morrow's mean correction)
    exponent: float | None = None  # b < 0
    points: tuple[tuple[float, float], ...] = ()  # (N, amplitude) in order of N
    beyond_last: str = "constant"
    reference_range: float | None = None  # detail category: the stress range at reference_cycles
    reference_cycles: float = 2e6
    slope: float | None = None  # m1
    slope_after_knee: float | None = None  # m2
    knee_cycles: float | None = None
    cutoff_cycles: float | None = None
    endurance_limit: float | None = None
    mean_stress: str = "none"
    ultimate_strength: float | None = None
    walker_exponent: float | None = None
    surface_factor: float = 1.0
    ductility_coefficient: float | None = None  # epsilon'_f (strain-life)
    ductility_exponent: float | None = None  # c < 0 (strain-life)

    @property
    def description(self) -> str:
        if self.kind == "basquin":
            text = f"Basquin: S_a = {self.strength_coefficient:g} (2N)^{self.exponent:g} MPa"
        elif self.kind == "points":
            text = (f"{len(self.points)} points (N, S_a) interpolated log-log; beyond the last point"
                    f" {'constant (no damage below it)' if self.beyond_last == 'constant' else 'extrapolated'}")
        else:
            text = (f"detail category {self.reference_range:g} MPa range at {self.reference_cycles:.3g} cycles,"
                    f" slopes m1 = {self.slope:g}, m2 = {self.slope_after_knee:g}, knee {self.knee_cycles:.3g},"
                    f" cut-off {self.cutoff_cycles:.3g} cycles")
        if self.ductility_coefficient is not None:
            text += (f" with Coffin-Manson epsilon'_f = {self.ductility_coefficient:g}, c ="
                     f" {self.ductility_exponent:g} (strain-life)")
        if self.endurance_limit is not None:
            text += f"; endurance limit {self.endurance_limit:g} MPa amplitude"
        if self.surface_factor != 1.0:
            text += f"; surface factor {self.surface_factor:g} (applied to the curve's strength)"
        if self.mean_stress in ("goodman", "gerber"):
            text += f"; mean stress by {self.mean_stress.capitalize()} with S_u = {self.ultimate_strength:g} MPa"
        elif self.mean_stress == "walker":
            text += f"; mean stress by Walker with gamma = {self.walker_exponent:g}"
        elif self.mean_stress != "none":
            text += f"; mean stress by {self.mean_stress.replace('_', '-').title().replace('-', ' ')}"
        else:
            text += "; no mean-stress correction"
        return text

    def amplitude_at(self, n: np.ndarray) -> np.ndarray:
        """The curve's zero-mean amplitude (MPa, after the surface factor) at ``n`` cycles (for the plot)."""
        n = np.asarray(n, dtype=float)
        if self.kind == "basquin":
            assert self.strength_coefficient is not None and self.exponent is not None
            a = self.strength_coefficient * (2 * n) ** self.exponent
        elif self.kind == "points":
            ln, ls = np.log10([p[0] for p in self.points]), np.log10([p[1] for p in self.points])
            x = np.log10(n)
            a = 10 ** np.interp(x, ln, ls)
            if len(ln) > 1:
                lo = (ls[1] - ls[0]) / (ln[1] - ln[0])
                a = np.where(x < ln[0], 10 ** (ls[0] + lo * (x - ln[0])), a)
                if self.beyond_last == "extrapolate":
                    hi = (ls[-1] - ls[-2]) / (ln[-1] - ln[-2])
                    a = np.where(x > ln[-1], 10 ** (ls[-1] + hi * (x - ln[-1])), a)
        else:
            a = 0.5 * self._range_at(n)
        if self.endurance_limit is not None:
            a = np.maximum(a, self.endurance_limit)
        return a * self.surface_factor

    def _range_at(self, n: np.ndarray) -> np.ndarray:
        assert self.reference_range is not None and self.slope and self.slope_after_knee
        assert self.knee_cycles is not None and self.cutoff_cycles is not None
        d_knee = self.reference_range * (self.reference_cycles / self.knee_cycles) ** (1 / self.slope)
        first = self.reference_range * (self.reference_cycles / n) ** (1 / self.slope)
        second = d_knee * (self.knee_cycles / np.minimum(n, self.cutoff_cycles)) ** (1 / self.slope_after_knee)
        return np.where(n <= self.knee_cycles, first, second)

    def cycles_to_failure(self, amplitude: np.ndarray) -> np.ndarray:
        """Cycles to failure at the equivalent fully reversed ``amplitude`` (MPa); inf where the curve gives no
        damage (below the endurance limit, the cut-off, the last point of a constant curve, or zero)."""
        s = np.asarray(amplitude, dtype=float) / self.surface_factor
        out = np.full(s.shape, np.inf)
        live = s > 0
        if self.endurance_limit is not None:
            live &= s > self.endurance_limit
        with np.errstate(divide="ignore", over="ignore", invalid="ignore"):
            if self.kind == "basquin":
                assert self.strength_coefficient is not None and self.exponent is not None
                n = 0.5 * (s / self.strength_coefficient) ** (1.0 / self.exponent)
            elif self.kind == "points":
                ln, ls = np.log10([p[0] for p in self.points]), np.log10([p[1] for p in self.points])
                # amplitudes fall as N grows: interpolate N against amplitude on the reversed arrays
                x = np.log10(np.where(live, s, 1.0))
                n = 10 ** np.interp(x, ls[::-1], ln[::-1])
                if len(ln) > 1:
                    lo = (ln[1] - ln[0]) / (ls[1] - ls[0])
                    n = np.where(x > ls[0], 10 ** (ln[0] + lo * (x - ls[0])), n)
                    below = x < ls[-1]
                    if self.beyond_last == "extrapolate":
                        hi = (ln[-1] - ln[-2]) / (ls[-1] - ls[-2])
                        n = np.where(below, 10 ** (ln[-1] + hi * (x - ls[-1])), n)
                    else:
                        live &= ~below
            else:
                assert self.reference_range is not None and self.slope and self.slope_after_knee
                assert self.knee_cycles is not None and self.cutoff_cycles is not None
                r = 2.0 * s
                d_knee = self.reference_range * (self.reference_cycles / self.knee_cycles) ** (1 / self.slope)
                d_cut = d_knee * (self.knee_cycles / self.cutoff_cycles) ** (1 / self.slope_after_knee)
                n = np.where(r >= d_knee, self.reference_cycles * (self.reference_range / r) ** self.slope,
                             self.knee_cycles * (d_knee / r) ** self.slope_after_knee)
                live &= r > d_cut
        out[live] = n[live]
        return out


def equivalent_amplitude(curve: Curve, s_max: np.ndarray, s_min: np.ndarray) -> np.ndarray:
    """The equivalent fully reversed amplitude (MPa) of cycles between ``s_min`` and ``s_max`` by the curve's
    mean-stress correction; 0 for a cycle that is not tensile at its maximum, inf for one whose mean reaches the
    strength the correction divides by."""
    s_max, s_min = np.asarray(s_max, float), np.asarray(s_min, float)
    amp = 0.5 * (s_max - s_min)
    mean = 0.5 * (s_max + s_min)
    if curve.kind == "detail_category":  # a range curve: the whole range counts, compressive parts included
        return np.where(amp > 0, amp, 0.0)
    kind = curve.mean_stress
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        if kind == "none":
            out = amp
        elif kind in ("goodman", "gerber"):
            assert curve.ultimate_strength is not None
            m = np.maximum(mean, 0.0) / curve.ultimate_strength
            den = 1.0 - (m if kind == "goodman" else m * m)
            out = np.where(den > 0, amp / den, np.inf)
        elif kind == "morrow":
            assert curve.strength_coefficient is not None
            den = 1.0 - mean / curve.strength_coefficient
            out = np.where(den > 0, amp / den, np.inf)
        elif kind == "smith_watson_topper":
            out = np.sqrt(np.maximum(s_max, 0.0) * amp)
        elif kind == "walker":
            assert curve.walker_exponent is not None
            g = curve.walker_exponent
            out = np.maximum(s_max, 0.0) ** (1.0 - g) * amp ** g
        else:
            raise ValueError(f"unknown mean-stress correction {kind!r}")
    return np.where((s_max > 0) & (amp > 0), out, 0.0)


def notch_sensitivity(notch: str, constant: float | None, radius: np.ndarray) -> np.ndarray:
    """q at the notch radii ``radius`` (mm; inf on a straight edge): 1 for ``"none"`` (Kf = Kt)."""
    r = np.asarray(radius, dtype=float)
    if notch == "none":
        return np.ones_like(r)
    assert constant is not None
    with np.errstate(divide="ignore"):
        if notch == "peterson":
            return 1.0 / (1.0 + constant / r)
        if notch == "neuber":
            return 1.0 / (1.0 + np.sqrt(constant / r))
    raise ValueError(f"unknown notch rule {notch!r}")


def support_factor(constant: float, chi: np.ndarray) -> np.ndarray:
    """n = 1 + sqrt(rho* chi*) for the relative stress gradient ``chi`` (1/mm; no support where it is not positive)
    and the material constant ``constant`` = rho* (mm)."""
    return 1.0 + np.sqrt(constant * np.maximum(np.asarray(chi, dtype=float), 0.0))


def fatigue_factor(kt: np.ndarray, q: np.ndarray) -> np.ndarray:
    """Kf = 1 + q (Kt - 1), with Kt below 1 left as it is (no notch)."""
    kt = np.asarray(kt, dtype=float)
    return np.where(kt > 1.0, 1.0 + q * (kt - 1.0), kt)


# ----- counting -----------------------------------------------------------------------------------------------------
def rainflow_cycles(history: Sequence[float]) -> list[tuple[float, float, float]]:
    """(range, mean, count) of every cycle of ``history`` by ASTM E1049-85 (the ``rainflow`` package: half cycles
    of the residue count 0.5)."""
    import rainflow

    return [(float(r), float(m), float(c)) for r, m, c, _, _ in rainflow.extract_cycles(list(history))]


def closed_loop(history: np.ndarray) -> np.ndarray:
    """A history that repeats unit after unit, rearranged to start and end at its largest value: counted this way
    every cycle is whole (no residue), the rainflow count of the repeated history per unit."""
    h = np.asarray(history, dtype=float)
    k = int(np.argmax(h))
    return np.concatenate([h[k:], h[:k], h[k:k + 1]])


def reversals(history: np.ndarray) -> np.ndarray:
    """The turning points of a history (its first and last values kept)."""
    h = np.asarray(history, dtype=float)
    if h.size < 3:
        return h
    keep = np.ones(h.size, bool)
    d = np.diff(h)
    nz = d != 0
    h2 = h[np.concatenate([[True], nz])]
    if h2.size < 3:
        return h2
    d2 = np.diff(h2)
    keep = np.concatenate([[True], d2[:-1] * d2[1:] < 0, [True]])
    return h2[keep]


# ----- stress-life damage -------------------------------------------------------------------------------------------
def cycle_damage(curve: Curve, s_max: np.ndarray, s_min: np.ndarray, count: np.ndarray | float
                 ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(equivalent amplitude MPa, cycles to failure, damage) of ``count`` cycles between the arrays' values."""
    amp = equivalent_amplitude(curve, s_max, s_min)
    n = curve.cycles_to_failure(amp)
    with np.errstate(divide="ignore"):
        d = np.where(np.isfinite(n), np.asarray(count, float) / np.where(np.isfinite(n), n, 1.0), 0.0)
    d = np.where(np.isinf(amp), np.inf, d)
    return amp, n, d


# ----- local yielding: Neuber's rule, Masing, strain-life --------------------------------------------------------
@dataclass(frozen=True)
class Cyclic:
    """The cyclic stress-strain curve epsilon = sigma / E + (sigma / K')^(1 / n') (MPa)."""

    strength_coefficient: float  # K'
    hardening_exponent: float  # n'

    @property
    def yield_strength(self) -> float:
        """The cyclic 0.2 % offset yield stress K' 0.002^n'."""
        return self.strength_coefficient * 0.002 ** self.hardening_exponent


def _neuber_solve(product: np.ndarray, modulus: float, k: float, n: float) -> np.ndarray:
    """sigma >= 0 with sigma (sigma / E + (sigma / k)^(1 / n)) = product (vectorised Newton from the elastic
    value, safeguarded by bisection)."""
    p = np.asarray(product, dtype=float)
    lo, hi = np.zeros_like(p), np.sqrt(p * modulus)  # the elastic answer bounds it from above
    s = hi.copy()
    for _ in range(80):
        f = s * (s / modulus + (s / k) ** (1.0 / n)) - p
        done = np.abs(f) <= 1e-12 * np.maximum(p, 1e-30)
        if np.all(done):
            break
        df = 2 * s / modulus + (s / k) ** (1.0 / n) * (1.0 + 1.0 / n)
        hi = np.where(f > 0, s, hi)
        lo = np.where(f <= 0, s, lo)
        with np.errstate(divide="ignore", invalid="ignore"):
            step = s - f / df
        nxt = np.where((step > lo) & (step < hi) & np.isfinite(step), step, 0.5 * (lo + hi))
        s = np.where(done, s, nxt)  # a converged point keeps its root
    return s


def _neuber_scalar(product: float, modulus: float, k: float, n: float) -> float:
    """The scalar twin of :func:`_neuber_solve` (plain floats: the Masing history calls it once per reversal)."""
    if product <= 0.0:
        return 0.0
    lo, hi = 0.0, math.sqrt(product * modulus)
    s = hi
    for _ in range(100):
        pl = (s / k) ** (1.0 / n)
        f = s * (s / modulus + pl) - product
        if abs(f) <= 1e-13 * product:
            break
        if f > 0:
            hi = s
        else:
            lo = s
        step = s - f / (2 * s / modulus + pl * (1.0 + 1.0 / n))
        s = step if lo < step < hi else 0.5 * (lo + hi)
    return s


def neuber_first(sigma_e: np.ndarray, modulus: float, cyclic: Cyclic) -> tuple[np.ndarray, np.ndarray]:
    """Local (stress, strain) at first loading to the elastic notch stress ``sigma_e`` (signed), on the cyclic
    curve by Neuber's rule sigma epsilon = sigma_e^2 / E."""
    se = np.asarray(sigma_e, dtype=float)
    s = _neuber_solve(se * se / modulus, modulus, cyclic.strength_coefficient, cyclic.hardening_exponent)
    e = s / modulus + (s / cyclic.strength_coefficient) ** (1.0 / cyclic.hardening_exponent)
    return np.sign(se) * s, np.sign(se) * e


def neuber_range(delta_e: np.ndarray, modulus: float, cyclic: Cyclic) -> tuple[np.ndarray, np.ndarray]:
    """Local (stress range, strain range) for the elastic notch range ``delta_e`` (>= 0) on Masing's doubled
    curve d_epsilon = d_sigma / E + 2 (d_sigma / 2K')^(1 / n') with d_sigma d_epsilon = delta_e^2 / E."""
    de = np.abs(np.asarray(delta_e, dtype=float))
    k2 = 2.0 * cyclic.strength_coefficient
    # d_sigma (d_sigma / E + 2 (d_sigma / 2K')^(1/n')) = de^2 / E: with x = d_sigma / 2, 4 x (x / E + (x / K')^(1/n'))
    x = _neuber_solve(de * de / modulus / 4.0, modulus, cyclic.strength_coefficient, cyclic.hardening_exponent)
    ds = 2.0 * x
    deps = ds / modulus + 2.0 * (ds / k2) ** (1.0 / cyclic.hardening_exponent)
    return ds, deps


def strain_life_cycles(curve: Curve, modulus: float, strain_amplitude: np.ndarray, stress_max: np.ndarray,
                       stress_mean: np.ndarray) -> np.ndarray:
    """Cycles to failure from the Coffin-Manson-Basquin curve with the curve's mean-stress correction (Morrow,
    Smith-Watson-Topper or none); inf where the cycle does no damage (not tensile at its maximum for SWT, zero
    amplitude)."""
    sf, b = curve.strength_coefficient, curve.exponent
    ef, c = curve.ductility_coefficient, curve.ductility_exponent
    assert sf is not None and b is not None and ef is not None and c is not None
    ea = np.asarray(strain_amplitude, float)
    smax, sm = np.asarray(stress_max, float), np.asarray(stress_mean, float)
    lo, hi = np.zeros_like(ea), np.full_like(ea, 30.0)  # log10(2N)

    def left(x: np.ndarray) -> np.ndarray:
        r = 10.0 ** x
        if curve.mean_stress == "smith_watson_topper":
            return sf * sf / modulus * r ** (2 * b) + sf * ef * r ** (b + c)
        m = sm if curve.mean_stress == "morrow" else 0.0
        return (sf - m) / modulus * r ** b + ef * r ** c

    target = smax * ea if curve.mean_stress == "smith_watson_topper" else ea
    for _ in range(100):  # both sides fall with N: bisection on log10(2N)
        mid = 0.5 * (lo + hi)
        big = left(mid) > target
        lo, hi = np.where(big, mid, lo), np.where(big, hi, mid)
    n = 0.5 * 10.0 ** (0.5 * (lo + hi))
    dead = (ea <= 0) | (target <= 0) | (hi >= 30.0 - 1e-9)
    return np.where(dead, np.inf, n)


@dataclass(frozen=True)
class LocalCycle:
    """One cycle of the local (notch-root) stress and strain: count, stress max and min (MPa), strain range."""

    count: float
    stress_max: float
    stress_min: float
    strain_range: float


def masing_history(elastic: np.ndarray, modulus: float, cyclic: Cyclic) -> list[LocalCycle]:
    """The local cycles of an elastic notch-stress history that repeats unit after unit, by Neuber's rule with
    Masing hysteresis and material memory. The history is rearranged to start and end at its largest absolute value
    (so every loop closes); first loading runs along the cyclic curve, every later branch along the doubled curve
    from its origin; when a branch passes the reversal it started from, the loop closes (one cycle) and the branch
    goes on from the origin of the branch it interrupted."""
    h = np.asarray(elastic, dtype=float)
    if h.size == 0:
        return []
    k0 = int(np.argmax(np.abs(h)))
    h = reversals(np.concatenate([h[k0:], h[:k0], h[k0:k0 + 1]]))
    kk, nn = cyclic.strength_coefficient, cyclic.hardening_exponent

    def strain(s: float) -> float:
        return s / modulus + math.copysign((abs(s) / kk) ** (1.0 / nn), s)

    first = math.copysign(_neuber_scalar(h[0] * h[0] / modulus, modulus, kk, nn), h[0])
    # the stack of branch origins (elastic, local stress, local strain); the first is the largest excursion, which
    # the repeated history never passes (it starts and ends there)
    stack: list[tuple[float, float, float]] = [(float(h[0]), first, strain(first))]
    cycles: list[LocalCycle] = []
    for x in h[1:]:
        x = float(x)
        while len(stack) >= 2 and abs(x - stack[-1][0]) >= abs(stack[-1][0] - stack[-2][0]):
            a, b = stack[-2], stack[-1]  # the loop a -> b -> a closes
            cycles.append(LocalCycle(1.0, max(a[1], b[1]), min(a[1], b[1]), abs(b[2] - a[2])))
            del stack[-1]
            if len(stack) >= 2:
                del stack[-1]
            else:  # back at the largest excursion, the branch's origin
                break
        o = stack[-1]
        d = x - o[0]
        x2 = _neuber_scalar(d * d / modulus / 4.0, modulus, kk, nn)  # half the local range (Masing)
        ds = 2.0 * x2
        de = ds / modulus + 2.0 * (ds / (2.0 * kk)) ** (1.0 / nn)
        sign = 1.0 if d >= 0 else -1.0
        stack.append((x, o[1] + sign * ds, o[2] + sign * de))
    return cycles


def strain_life_damage(curve: Curve, modulus: float, cycles: list[LocalCycle]) -> float:
    """Miner's sum of local cycles on the strain-life curve."""
    if not cycles:
        return 0.0
    smax = np.array([c.stress_max for c in cycles])
    smin = np.array([c.stress_min for c in cycles])
    ea = np.array([0.5 * c.strain_range for c in cycles])
    n = strain_life_cycles(curve, modulus, ea, smax, 0.5 * (smax + smin))
    counts = np.array([c.count for c in cycles])
    return float(np.sum(np.where(np.isfinite(n), counts / np.where(np.isfinite(n), n, 1.0), 0.0)))


# ----- reserve ------------------------------------------------------------------------------------------------------
def reserve_factor(damage_at: Callable[[float], float], target: float) -> float | None:
    """The factor F on every stress of the spectrum at which the damage per unit equals ``target`` (1 / (required
    life x scatter)): the fatigue reserve, >= 1 passes. ``damage_at(F)`` must grow with F. None when the spectrum
    does no damage even at the top of :data:`RESERVE_RANGE`."""
    from scipy.optimize import brentq

    lo, hi = RESERVE_RANGE
    if damage_at(hi) <= target:
        return None
    if damage_at(lo) >= target:
        return lo

    def g(f: float) -> float:
        d = damage_at(math.exp(f))
        if d <= 0:
            return -1e3  # no damage at all: far below
        return math.log(d / target) if math.isfinite(d) else 1e3

    return float(math.exp(brentq(g, math.log(lo), math.log(hi), xtol=1e-12, rtol=1e-12, maxiter=200)))
