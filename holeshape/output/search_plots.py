"""Plots of a search: history (best so far against trial), the best shape over the standard shapes and the access
envelope, and the trade-off front. mm and MPa on every axis."""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np

from holeshape.output.plots import pyplot, save
from holeshape.record import folder_name

if TYPE_CHECKING:
    from holeshape.geometry import Cutout
    from holeshape.study import Constraints, Panel, Study

# ``trials`` below are optuna trials, and matplotlib's figures and axes: typed Any


def plot_history(path: Path, trials: list[Any], title: str, goal: str = "lowest_peak") -> Path:
    """The goal's quantity for every feasible design against the trial number, with the best so far (the goal's
    own reading of its objective: the peak, the removed area (the best is the largest), the reinforcement's volume
    in cm^3)."""
    from optuna.trial import TrialState

    from holeshape.goals import GOALS
    from holeshape.search.runner import is_feasible

    g = GOALS.get(goal, GOALS["lowest_peak"])
    plt = pyplot()
    fig, ax = plt.subplots(figsize=(8, 4.6))
    probes = [(t.number, g.readable(t.values[0])) for t in trials if t.state == TrialState.COMPLETE
              and t.user_attrs.get("probe") and t.values[0] < 1e8]
    trials = [t for t in trials if not t.user_attrs.get("probe")]
    feas = [(t.number, g.readable(t.values[0])) for t in trials if is_feasible(t)]
    infeas = [t.number for t in trials if t.state == TrialState.COMPLETE and not t.user_attrs.get("feasible", True)]
    if probes:
        n, v = np.array(probes).T
        ax.plot(n, v, ".", ms=2, color="C0", alpha=0.5, label=f"gradient probes ({len(probes)}; moved mesh)")
    failed = [t.number for t in trials if t.state == TrialState.FAIL]
    if feas:
        n, v = np.array(feas).T
        ax.plot(n, v, "o", ms=3.5, color="0.55", label="feasible design (draft level)")
        order = np.argsort(n)
        best = np.maximum.accumulate(v[order]) if g.grows else np.minimum.accumulate(v[order])
        ax.step(n[order], best, where="post", color="black", lw=1.8, label="best so far")
        if not g.grows and v.min() > 0:
            ax.set_ylim(0.95 * v.min(), min(v.max(), 3 * v.min()) * 1.05)
        elif not g.grows:
            ax.set_ylim(0.0, max(v.max(), 1e-9) * 1.08)
        else:
            ax.set_ylim(max(0.0, v.min() * 0.9), v.max() * 1.08)
        ymark = ax.get_ylim()[1]
    else:
        ymark = 1.0
    if infeas:
        ax.plot(infeas, np.full(len(infeas), ymark), "x", ms=4, color="C3", clip_on=False,
                label=f"infeasible ({len(infeas)})")
    if failed:
        ax.plot(failed, np.full(len(failed), ymark), "s", ms=4, mfc="none", color="C1", clip_on=False,
                label=f"failed ({len(failed)})")
    ax.set_xlabel("trial")
    ax.set_ylabel(g.axis_label)
    ax.grid(True, alpha=0.3)
    ax.legend(fontsize=8, loc="upper right")
    ax.set_title(f"{title}: search history")
    fig.tight_layout(rect=(0, 0.02, 1, 1))
    return save(fig, path)


def plot_radii_history(path: Path, trials: list[Any], title: str) -> Path | None:
    """The outline of every new best design of a free-form (spline) search, overlaid about its centre and coloured
    by trial (late = dark), the final one in black: how the shape evolved, in one panel. None when the study has
    no spline designs."""

    from holeshape.geometry.spline import Spline
    from holeshape.search.runner import is_feasible

    best, steps = np.inf, []
    for t in sorted(trials, key=lambda t: t.number):
        d = t.user_attrs.get("dims") or {}
        if "radii" not in d or not is_feasible(t):
            continue
        if t.values[0] < best:
            best = t.values[0]
            steps.append((t.number, best, Spline(tuple(d["radii"]), d.get("symmetry", "none")),
                          float(d.get("rotation", 0.0))))
    if not steps:
        return None
    plt = pyplot()
    fig, ax = plt.subplots(figsize=(6.4, 6.8))
    th = np.linspace(0.0, 2 * np.pi, 721)
    cmap = plt.get_cmap("viridis_r")
    last = steps[-1][0] or 1
    for k, (num, val, shape, rot) in enumerate(steps):
        x, y = shape.local_xy(th)
        c, s = np.cos(np.radians(rot)), np.sin(np.radians(rot))
        final = k == len(steps) - 1
        ax.plot(c * x - s * y, s * x + c * y, color="black" if final else cmap(0.15 + 0.85 * num / last),
                lw=2.0 if final else 0.9, label=f"trial {num}: {val:.1f}" if final or k == 0 else None)
    ax.set_aspect("equal")
    ax.grid(True, alpha=0.3)
    ax.set_xlabel("x from the centre (mm)")
    ax.set_ylabel("y from the centre (mm)")
    ax.legend(fontsize=8, loc="upper center", bbox_to_anchor=(0.5, -0.12), ncol=2, frameon=False,
              title="first and last best (objective)")  # below the outlines, clear of them
    ax.set_title(f"{title}: outline of each new best design ({len(steps)})", fontsize=10)
    fig.tight_layout()
    return save(fig, path)


def plot_shapes(path: Path, best: Cutout, baselines: list[tuple[str, Cutout]], panel: Panel, constraints: Constraints,
                title: str, best_peak: float, base_peaks: dict,
                searched: tuple[str, Cutout, float] | None = None) -> Path:
    """The recommended outline over the standard shapes (and, when a standard shape is recommended, over the
    searched family's best: ``searched`` its family, outline and peak)."""
    plt = pyplot()
    fig, ax = plt.subplots(figsize=(8, 8 * panel.height / panel.width + 1.8))  # the legend below the panel
    ax.plot([0, panel.width, panel.width, 0, 0], [0, 0, panel.height, panel.height, 0], color="black", lw=1.2)
    styles = ["--", "-.", ":"]
    for i, (family, cut) in enumerate(baselines):
        for k, p in enumerate(cut.outlines(720)):
            ax.plot(*np.vstack([p, p[:1]]).T, styles[i % 3], color="0.45", lw=1.2,
                    label=f"{family.replace('_', ' ')}: {base_peaks[family]:.1f} MPa" if k == 0 else None)
    if searched is not None:
        family, cut, peak = searched
        for k, p in enumerate(cut.outlines(720)):
            ax.plot(*np.vstack([p, p[:1]]).T, "--", color="C3", lw=1.6,
                    label=f"searched {family.replace('_', ' ')}'s best: {peak:.1f} MPa" if k == 0 else None)
    for p in best.outlines(720)[1:]:  # the other openings of a row
        ax.fill(*p.T, color="C0", alpha=0.15)
        ax.plot(*np.vstack([p, p[:1]]).T, color="C0", lw=2.2)
    p = best.polygon(720) if best.count == 1 else best.outlines(720)[0]
    r = best.reinforcement
    region = None if r is None else r.interior_outline(best)
    if r is not None and region is not None:  # the reinforced region (a doubler ring) drawn round the opening
        q = region.polygon(720)
        ax.fill(*q.T, color="C1", alpha=0.25, label=r.label())
    ax.fill(*p.T, color="white" if region is not None else "C0", alpha=1.0 if region is not None else 0.15)
    extra = f", {r.label()}" if r is not None and region is None else ""
    ax.plot(*np.vstack([p, p[:1]]).T, color="C0", lw=2.2, label=f"recommended {best.family.replace('_', ' ')}{extra}: "
            f"{best_peak:.1f} MPa")
    if constraints.access is not None:
        env = constraints.access.polygon(best.center, 0.0)
        ax.fill(*env.exterior.xy, color="C2", alpha=0.25, label="access envelope")
        if constraints.clearance > 0:
            ax.plot(*constraints.access.polygon(best.center, constraints.clearance).exterior.xy, color="C2",
                    lw=0.8, label=f"with {constraints.clearance:g} mm clearance")
    what = "the searched best and standard shapes" if searched is not None else "the standard shapes"
    return _finish_plan(fig, ax, path, f"{title}\nrecommended shape, {what} (peak, fine level)")


def _finish_plan(fig: Any, ax: Any, path: Path, title: str) -> Path:
    """A drawing of the panel in plan: true scale, mm on both axes."""
    ax.set_aspect("equal")
    ax.set_xlabel("x (mm)")
    ax.set_ylabel("y (mm)")
    ax.legend(fontsize=8, loc="upper center", bbox_to_anchor=(0.5, -0.1), ncol=2, frameon=False)  # clear of the panel
    ax.set_title(title)
    fig.tight_layout(rect=(0, 0.02, 1, 1))
    return save(fig, path)


def plot_front(path: Path, trials: list[Any], front: list[dict], title: str) -> Path:

    from holeshape.search.runner import is_feasible

    plt = pyplot()
    fig, ax = plt.subplots(figsize=(8, 4.8))
    pts = [(t.values[1], t.values[0]) for t in trials if is_feasible(t)]
    if pts:
        a, s = np.array(pts).T
        ax.plot(a, s, "o", ms=3, color="0.6", label="feasible designs")
    if front:
        ax.plot([f["area_mm2"] for f in front], [f["peak_stress_mpa"] for f in front], "-o", color="C0", ms=5,
                lw=1.8, label="trade-off front (one DXF each)")
        for f in front:  # the buckling factor of each front member, where the search computed it
            if f.get("buckling_load_factor") is not None:
                ax.annotate(f"{f['buckling_load_factor']:.2f}", (f["area_mm2"], f["peak_stress_mpa"]),
                            xytext=(4, -10), textcoords="offset points", fontsize=7, color="C0")
        if any(f.get("buckling_load_factor") is not None for f in front):
            ax.plot([], [], " ", label="numbers: buckling load factor (draft)")
    ax.set_xlabel("removed area (mm^2)")
    ax.set_ylabel("peak stress over all load cases (MPa)")
    ax.grid(True, alpha=0.3)
    ax.legend(fontsize=8)
    ax.set_title(f"{title}: removed area against peak stress")
    fig.tight_layout(rect=(0, 0.02, 1, 1))
    return save(fig, path)


def plot_family_overlay(path: Path, study: Study, run_dir: Path, ranked: list[dict]) -> Path:
    """Every family's best outline in one figure, from their written profiles (mm)."""
    plt = pyplot()
    panel = study.panel
    fig, ax = plt.subplots(figsize=(8, 8 * panel.height / panel.width + 1.8))  # the legend below the panel
    ax.plot([0, panel.width, panel.width, 0, 0], [0, 0, panel.height, panel.height, 0], color="black", lw=1.2)
    styles = ["-", "--", "-.", ":", (0, (5, 1)), (0, (1, 1))]
    for i, r in enumerate(ranked):
        csv = run_dir / folder_name(r["shape"]) / "family_best.csv"
        pts = np.atleast_2d(np.loadtxt(csv, delimiter=",", skiprows=1))
        opening = pts[:, 2] if pts.shape[1] > 2 else np.ones(len(pts))
        for k in np.unique(opening):
            sel = pts[opening == k]
            ax.plot(sel[:, 0], sel[:, 1], linestyle=styles[i % len(styles)], lw=2.4 if i == 0 else 1.3,
                    color="C0" if i == 0 else f"{0.15 + 0.12 * i:.2f}",
                    label=f"{r['rank']}. {r['shape'].replace('_', ' ')}: {r['peak_stress_mpa']:.1f} MPa"
                    if k == opening[0] else None)
    if study.constraints.access is not None:
        from holeshape.search.baselines import baseline_center

        center = baseline_center(study.cutout, panel, study.constraints)
        env = study.constraints.access.polygon(center, 0.0)
        ax.fill(*env.exterior.xy, color="C2", alpha=0.25, label="access envelope")
    return _finish_plan(fig, ax, path, f"{study.title}\nbest of every family (peak, fine level)")


def _label(name: str) -> str:
    unit = "degrees" if name == "rotation" else ("-" if name == "exponent" else "mm")
    return f"cutout {name} ({unit})"


def plot_sweep(path: Path, result: dict, allowable: float | None) -> Path:
    """1-D: peak stress, Kt and removed area against the varied parameter; 2-D: a map of the peak stress."""
    plt = pyplot()
    pts = result["points"]
    vary = result["vary"]
    solved = [p for p in pts if p.get("solved")]
    if len(vary) == 1:
        name = vary[0]["name"]
        keys = [("peak_stress_mpa", "peak stress (MPa)"), ("kt", "Kt"), ("area_mm2", "removed area (mm^2)")]
        if any("buckling_load_factor" in p for p in solved):
            keys.insert(1, ("buckling_load_factor", "buckling load factor"))
        fig, axes = plt.subplots(len(keys), 1, figsize=(8, 2.7 * len(keys)), sharex=True)
        x = np.array([p["coords"][name] for p in solved])
        ok = np.array([p["feasible"] for p in solved], dtype=bool)
        for ax, (key, label) in zip(axes, keys):
            y = np.array([np.nan if p.get(key) is None else p[key] for p in solved], dtype=float)
            ax.plot(x, y, "-", color="0.3", lw=1.2)
            ax.plot(x[ok], y[ok], "o", color="C0", ms=5, label="meets the constraints")
            ax.plot(x[~ok], y[~ok], "x", color="C3", ms=6, label="breaks a constraint")
            ax.set_ylabel(label)
            ax.grid(True, alpha=0.3)
        if allowable:
            axes[0].axhline(allowable, color="black", ls="--", lw=1, label=f"allowable {allowable:g} MPa")
        if result.get("required_buckling_factor") and keys[1][0] == "buckling_load_factor":
            axes[1].axhline(result["required_buckling_factor"], color="black", ls="--", lw=1,
                            label=f"required {result['required_buckling_factor']:g}")
            axes[1].legend(fontsize=8)
        axes[0].legend(fontsize=8)
        axes[-1].set_xlabel(_label(name))
        axes[0].set_title(f"{result['study']}: sweep of {name}")
    else:
        (na, nb) = vary[0]["name"], vary[1]["name"]
        A = np.linspace(vary[0]["lo"], vary[0]["hi"], vary[0]["n"])
        B = np.linspace(vary[1]["lo"], vary[1]["hi"], vary[1]["n"])
        Z = np.full((len(A), len(B)), np.nan)
        for k, p in enumerate(pts):
            if p.get("solved"):
                Z[k // len(B), k % len(B)] = p["peak_stress_mpa"]
        fig, ax = plt.subplots(figsize=(8, 6))
        m = ax.pcolormesh(B, A, np.ma.masked_invalid(Z), shading="nearest", cmap="viridis")
        fig.colorbar(m, ax=ax, label="peak stress (MPa)")
        bad = [(p["coords"][nb], p["coords"][na]) for p in pts if not p["feasible"]]
        if bad:
            ax.plot(*np.array(bad).T, "x", color="red", ms=6, label="breaks a constraint or not solvable")
            ax.legend(fontsize=8)
        ax.set_xlabel(_label(nb))
        ax.set_ylabel(_label(na))
        ax.set_title(f"{result['study']}: peak stress map")
    fig.tight_layout(rect=(0, 0.02, 1, 1))
    return save(fig, path)
