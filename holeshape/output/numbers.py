"""Numbers for people: one rule per kind of value (the unit suffix of its key), shared by the text summary and the
report, so a stress reads the same everywhere."""

from __future__ import annotations

import math
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from holeshape.checks import Requirement


def sig(v: float, figures: int = 2) -> str:
    """``v`` to ``figures`` significant figures, without exponent notation for the sizes a report shows; magnitudes
    below 0.001 (a percentage error that small is nil for a reader) as "< 0.001"."""
    if v == 0 or not math.isfinite(v):
        return f"{v:g}"
    if abs(v) < 1e-3:
        return "< 0.001"
    digits = max(0, figures - 1 - int(math.floor(math.log10(abs(v)))))
    return f"{v:.{digits}f}"


def fmt(key: str, v: Any) -> str:
    """One value for people (see :func:`_fmt`); a value that rounds to zero shows no sign."""
    out = _fmt(key, v)
    return out[1:] if out.startswith("-") and out.strip("-0.") == "" else out


def _fmt(key: str, v: Any) -> str:
    """One value for people, by what it is (its key): stresses to 0.1 MPa, percentages to 2 significant figures,
    lengths to 0.1 mm, areas to 1 mm^2, forces in N and moments in N mm to 4 figures, factors, ratios and Kt to 3
    decimals, margins signed to 3 decimals."""
    if v is None:
        return "-"
    if isinstance(v, bool):
        return "yes" if v else "NO"
    if isinstance(v, int):
        return str(v)
    if not isinstance(v, float):
        return str(v)
    if not math.isfinite(v):
        return "none" if math.isinf(v) else "-"
    if key.endswith("_pct") or key in ("error_pct", "tolerance_pct"):
        return sig(v, 2)
    if key in ("shear_force", "bending_moment") or key.endswith(("_n", "_nmm")):
        return f"{v:.4g}"
    if key in ("published", "holeshape"):  # a reference value: a stress (MPa) or a buckling load factor
        return f"{v:.2f}"
    if key.endswith("_mpa") or key in ("youngs_modulus", "allowable_stress", "sigma_x",
                                       "sigma_y", "tau_xy", "net_section_allowable", "value_mpa"):
        return f"{v:.1f}"
    if key.endswith("_mm2"):
        return f"{v:.0f}"
    if key.endswith("_mm3"):
        return f"{v:.0f}"
    if key.endswith("_kg"):
        return sig(v, 3)
    if key.endswith("_mm") or key in ("width", "height", "thickness"):
        return f"{v:.1f}"
    if "margin" in key:
        return f"{v:+.3f}"
    if key in ("kt",) or "factor" in key or "reserve" in key or "ratio" in key:
        return f"{v:.3f}"
    return f"{v:.4g}"


def requirement_value(r: Requirement) -> str:
    """A requirement row's value for people, by its kind: margins signed to 3 decimals, factors to 3 decimals,
    error estimates to 2 significant figures, lengths to 0.1 mm, areas to 1 mm^2, masses to 3 figures; with its
    unit. ``r``: a :class:`~holeshape.checks.Requirement`."""
    v, kind, unit = r.value, r.kind, r.unit
    if v is None:
        return "does not buckle" if kind == "buckling" else "-"
    if kind == "margin":
        return f"{v:+.3f}"
    if kind == "buckling" or kind == "fatigue" and not unit:
        return f"{v:.3f}"
    if kind == "accuracy":
        return f"{sig(v, 2)} %"
    if kind == "mass":
        return f"{sig(v, 3)} kg"
    if unit == "mm^2":
        return f"{v:.0f} mm^2"
    if unit == "mm":
        return f"{v:.1f} mm"
    if not unit and v in (0.0, 1.0):
        return "yes" if v == 1.0 else "no"
    return f"{v:.4g} {unit}".strip()


def limit_value(r: Requirement) -> str:
    """What a requirement asks for, with its unit."""
    unit = {"": "", "%": " %"}.get(r.unit, f" {r.unit}")
    if r.kind == "margin":
        return f"{r.relation} {r.limit:+g}"
    if not r.unit and r.limit == 1.0 and r.relation == ">=" and r.kind not in ("buckling", "fatigue"):
        return "yes"
    return f"{r.relation} {r.limit:g}{unit}"


def stored_value(row: dict, v: float | None, limit: bool = False) -> str:
    """A value of a stored requirement row (a dict with its ``kind`` and ``unit``), as :func:`requirement_value`
    reads a live one; ``limit`` for the required value (as the study gave it)."""
    if v is None:
        return "-"
    kind, unit = row.get("kind", ""), row.get("unit", "")
    if kind == "margin":
        return f"{v:+g}" if limit else f"{v:+.3f}"
    if limit:
        return f"{v:g}{(' ' + unit) if unit else ''}"
    if kind == "buckling" or kind == "fatigue" and not unit:
        return f"{v:.3f}"
    return f"{v:.4g}{(' ' + unit) if unit else ''}"
