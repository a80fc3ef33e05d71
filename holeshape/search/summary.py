"""What a finished search's trials say, read from its storage: counts by outcome, the requirements that refused the
designs (by count, with the range of values against the limit), and the nearest misses (the designs closest to
meeting every requirement, each with its values against each limit). A run with no answer explains itself from
these, and a rerun reads them again without solving anything."""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from holeshape.search.runner import finished, is_feasible

if TYPE_CHECKING:
    from holeshape.search.space import DesignSpace

# ``study`` below is an optuna study and ``t`` an optuna trial: typed Any

NEAREST = 3  # nearest misses reported


def _searched(study: Any) -> list:
    """Finished trials that are designs of their own (not gradient probes)."""
    return [t for t in finished(study) if not t.user_attrs.get("probe")]


def violation(t: Any) -> float:
    """How far a trial misses: the sum of its positive scaled constraint values (0 for a feasible one)."""
    return float(sum(max(0.0, v) for v in (t.constraints or {}).values()))


def trial_reasons(study: Any) -> list[dict]:
    """Every requirement that refused designs: how many trials it refused, and the range of their values."""
    groups: dict[tuple, dict] = {}
    key: tuple[Any, ...]
    for t in _searched(study):
        if is_feasible(t) or t.state.name != "COMPLETE":
            continue
        rows = [r for r in t.user_attrs.get("requirements", []) if not r.get("met", True)]
        if not rows:  # refused before the requirement rows were stored (an outline that cannot be built)
            reason = str(t.user_attrs.get("reason", "refused"))
            key = ("reason", reason.split(" (")[0][:80])
            g = groups.setdefault(key, {"requirement": key[1], "trials": 0, "values": []})
            g["trials"] += 1
            continue
        for r in rows:
            key = (r["name"], r.get("load_case"), r["label"])
            g = groups.setdefault(key, {"requirement": r["label"], "name": r["name"], "load_case": r.get("load_case"),
                                        "limit": r["limit"], "relation": r["relation"], "unit": r.get("unit", ""),
                                        "kind": r.get("kind", ""), "trials": 0, "values": []}
                                   | ({"advice": r["advice"]} if r.get("advice") else {}))
            g["trials"] += 1
            if r.get("value") is not None:
                g["values"].append(float(r["value"]))
    out = []
    for g in groups.values():
        vals = g.pop("values")
        if vals:
            g["lowest"], g["highest"] = min(vals), max(vals)
        out.append(g)
    return sorted(out, key=lambda g: -g["trials"])


def failure_reasons(study: Any) -> list[dict]:
    """Trials the mesher or solver gave up on, by the kind of failure."""
    counts: dict[str, int] = {}
    for t in _searched(study):
        if t.state.name == "FAIL":
            kind = str(t.user_attrs.get("failure", "failed")).split(":")[0]
            counts[kind] = counts.get(kind, 0) + 1
    return [{"failure": k, "trials": n} for k, n in sorted(counts.items(), key=lambda kv: -kv[1])]


def bound_advice(misses: list[dict], space: DesignSpace) -> list[str]:
    """Where the nearest misses sit at the end of a searched range: the way to a design that passes may lie beyond
    it."""
    out = []
    dims = space.dimensions
    for m in misses[:NEAREST]:
        for k, v in m["params"].items():
            r = dims.get(k)
            if r is None or r.max <= r.min:
                continue
            end = "minimum" if v - r.min <= 1e-3 * (r.max - r.min) else \
                "maximum" if r.max - v <= 1e-3 * (r.max - r.min) else None
            text = f"the nearest misses sit at the {end} of {k}'s range ({r.min:g} to {r.max:g}): widen that range"
            if end is not None and text not in out:
                out.append(text)
    return out


def nearest_misses(study: Any, n: int = NEAREST) -> list[dict]:
    """The ``n`` designs nearest to meeting every requirement, each with its parameters and every requirement it
    misses, value against limit: the solved ones first (a design refused on its geometry before any mesh says
    nothing of its stress, so it cannot show which structural requirement stands in the way), each group by least
    summed scaled violation."""
    cands = [t for t in _searched(study) if t.state.name == "COMPLETE" and not is_feasible(t)]
    cands.sort(key=lambda t: (0 if t.user_attrs.get("peak_stress_mpa") is not None else 1, violation(t)))
    out = []
    for t in cands[:n]:
        missed = [r for r in t.user_attrs.get("requirements", []) if not r.get("met", True)]
        out.append({"trial": t.number, "params": dict(t.params), "violation": violation(t),
                    "area_mm2": t.user_attrs.get("area_mm2"), "peak_stress_mpa": t.user_attrs.get("peak_stress_mpa"),
                    "level": "draft",
                    "missed": missed or [{"label": str(t.user_attrs.get("reason", "refused")), "value": None,
                                          "limit": None, "relation": "", "unit": "", "kind": "geometry"}]})
    return out
