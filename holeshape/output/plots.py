"""Plots for engineers: stress field with the cutout outline, boundary stress against arc length, mesh close-up.

All axes in mm or MPa. Written as PNG. matplotlib is imported here only.
"""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np

from holeshape.evaluate import STRESS_LABELS, Evaluation, EvaluationFields, measure_values
from holeshape.solve import principal_stresses, von_mises

if TYPE_CHECKING:
    from holeshape.stability import StabilityFields, StabilityResult
    from holeshape.study import Panel

# matplotlib's figures and axes are typed Any; an outline to draw is one (2, n) array or a list of them
Outlines = np.ndarray | Sequence[np.ndarray]

PLOT_CAUTION = ("holeshape: linear-elastic plane stress, linear buckling and safe-life fatigue only where stated;"
                " no fracture assessment; review by a qualified engineer; applicable codes govern")


def pyplot() -> Any:
    """matplotlib's pyplot, imported on first use. The backend is the caller's choice (the command line sets the
    non-interactive one); figures are always closed after saving, so nothing is shown."""
    import matplotlib.pyplot as plt

    return plt


def save(fig: Any, path: Path) -> Path:
    """Save with the caution at the foot (wrapped to the figure's width, the plot lifted clear of it), atomically
    (temporary file, then rename). Every plot function lays itself out first; this only makes room at the foot."""
    import os
    import textwrap

    width_in, height_in = fig.get_size_inches()
    per_line = max(40, int(width_in * 72 / (6.5 * 0.52)))  # characters of 6.5 pt text across the figure
    lines = textwrap.wrap(PLOT_CAUTION, per_line)
    foot = (len(lines) * 8.5 + 6) / (height_in * 72)  # figure fraction the caution takes
    if fig.subplotpars.bottom < foot + 0.04:
        shift = foot + 0.04 - fig.subplotpars.bottom
        for ax in fig.axes:
            box = ax.get_position()
            ax.set_position([box.x0, box.y0 + shift * (1 - box.y0), box.width, box.height * (1 - shift)])
    fig.text(0.01, 0.005, "\n".join(lines), fontsize=6.5, color="0.35", ha="left", va="bottom")
    tmp = path.with_name(f".{path.name}.tmp")
    fig.savefig(tmp, dpi=130, format="png")
    os.replace(tmp, path)
    import matplotlib.pyplot as plt

    plt.close(fig)
    return path


def vertex_stress(fields: EvaluationFields) -> np.ndarray:
    """Stress (3, n_vertices, m) at the mesh vertices for display: each element's own value at its corners,
    averaged over the elements sharing a vertex (a picture, not the peak read-out)."""
    from skfem import Basis

    from holeshape.solve import stress_from_gradient

    sol, mesh = fields.solution, fields.panel_mesh.mesh
    ref = np.array([[0.0, 1.0, 0.0], [0.0, 0.0, 1.0]])
    cb = Basis(mesh, sol.basis.elem, quadrature=(ref, np.full(3, 1 / 3)))
    nv = mesh.nvertices  # MeshTri2.p holds the mid-side nodes too, after the vertices
    out = np.zeros((3, nv, sol.u.shape[1]))
    count = np.bincount(mesh.t.ravel(), minlength=nv).astype(float)
    for c in range(sol.u.shape[1]):
        s = stress_from_gradient(np.asarray(cb.interpolate(sol.u[:, c]).grad), sol.elastic)  # (3, nt, 3)
        for k in range(3):
            np.add.at(out[k, :, c], mesh.t.T.ravel(), s[k].ravel())
    return out / count[None, :, None]


def mirrored_triangulation(fields: EvaluationFields, values: np.ndarray, odd: bool = False
                           ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Triangles and values of the whole panel from a reduced model (for display). ``odd``: the value changes sign
    in a mirror image (the shear stress sxy)."""
    mesh, region = fields.panel_mesh.mesh, fields.panel_mesh.region
    p, t, v = mesh.p[:, :mesh.nvertices].copy(), mesh.t.copy(), values.copy()
    cx, cy = region.width / 2, region.height / 2
    for flag, axis, c in ((region.mirror_v, 0, cx), (region.mirror_h, 1, cy)):
        if flag:
            q = p.copy()
            q[axis] = 2 * c - q[axis]
            t = np.concatenate([t, t + p.shape[1]], axis=1)
            p = np.concatenate([p, q], axis=1)
            v = np.concatenate([v, -v if odd else v])
    return p, t, v


def field_values(stress: np.ndarray, measure: str, tangent_free: bool = False) -> np.ndarray:
    if measure == "von_mises":
        return von_mises(*stress)
    return principal_stresses(*stress)[0]


def _warn(fig: Any, ev: Evaluation) -> None:
    """Numerical warnings go on the picture too, not only in the text."""
    if ev.warnings:
        fig.text(0.01, 0.985, "WARNING: " + ev.warnings[0], fontsize=7.5, color="red", ha="left", va="top",
                 wrap=True)


def outline_list(cutout_xy: Outlines) -> list[np.ndarray]:
    """Outlines (2, n) to draw: one array, or a list of them (a row of openings)."""
    return [cutout_xy] if isinstance(cutout_xy, np.ndarray) and cutout_xy.ndim == 2 else list(cutout_xy)


def plot_stress_field(path: Path, ev: Evaluation, fields: EvaluationFields, cutout_xy: Outlines,
                      case_index: int, panel_size: tuple[float, float], title: str) -> Path:
    plt = pyplot()
    measure = ev.stress_measure if ev.stress_measure != "hoop" else "von_mises"
    vs = vertex_stress(fields)[:, :, case_index]
    vals = field_values(vs, measure)
    p, t, v = mirrored_triangulation(fields, vals)
    fig, ax = plt.subplots(figsize=(8, 8 * panel_size[1] / panel_size[0] + 0.8))
    top = max(float(np.percentile(v, 99.9)), ev.load_cases[case_index].peak_stress_mpa)
    tpc = ax.tripcolor(p[0], p[1], t.T, v, shading="gouraud", cmap="viridis", vmin=0, vmax=top)
    for xy in outline_list(cutout_xy):
        ax.plot(*np.concatenate([xy, xy[:, :1]], axis=1), color="white", lw=1.2)
    if fields.interior_boundary is not None:
        ax.plot(*fields.interior_boundary.xy, color="white", lw=1.0, ls="--", label="reinforcement's outer edge")
        ax.legend(loc="upper right", fontsize=8)
    r = ev.load_cases[case_index]
    ax.plot([r.x_mm], [r.y_mm], marker="x", color="red", ms=10, mew=2)
    ax.annotate(f"peak {r.peak_stress_mpa:.1f} MPa", (r.x_mm, r.y_mm), xytext=(8, 8), textcoords="offset points",
                color="red", fontsize=9, weight="bold")
    ax.set_aspect("equal")
    ax.set_xlim(0, panel_size[0])
    ax.set_ylim(0, panel_size[1])
    ax.set_xlabel("x (mm)")
    ax.set_ylabel("y (mm)")
    label = "von Mises stress" if measure == "von_mises" else "max principal stress"
    fig.colorbar(tpc, ax=ax, shrink=0.8, label=f"{label} (MPa)")
    ax.set_title(f"{title}\n{r.name}: {label}")
    _warn(fig, ev)
    fig.tight_layout(rect=(0, 0.02, 1, 0.97))
    return save(fig, path)


def plot_boundary_stress(path: Path, ev: Evaluation, fields: EvaluationFields, allowable: float | None,
                         title: str) -> Path:
    """The measure along the cutout edge per load case; with a reinforcement a second panel: the web along the
    ring's outer edge, or the flange's own axial stress (signed: compression below zero)."""
    plt = pyplot()
    bs = fields.boundary
    vals = measure_values(bs, ev.stress_measure)
    second = None
    if fields.interior_boundary is not None:
        rb = fields.interior_boundary
        second = (rb.s, measure_values(rb, ev.stress_measure), fields.interior_name,
                  f"arc length round the reinforcement's outer edge, counter-clockwise from ({rb.xy[0, 0]:.1f},"
                  f" {rb.xy[1, 0]:.1f}) (mm)",
                  f"{STRESS_LABELS[ev.stress_measure]} (MPa)")
    elif fields.member_stress is not None:
        second = (bs.s, fields.member_stress, fields.member_name,
                  f"arc length round the cutout, counter-clockwise from ({bs.xy[0, 0]:.1f}, {bs.xy[1, 0]:.1f}) (mm)",
                  f"axial stress in the {fields.member_name} (MPa)")
    fig, axes = plt.subplots(2 if second else 1, 1, figsize=(9, 8.4 if second else 4.8), squeeze=False)
    styles = ["-", "--", "-.", ":"]
    ax = axes[0, 0]
    gov = next(r for r in ev.load_cases if r.name == ev.governing_load_case)
    for j, r in enumerate(ev.load_cases):
        here = gov.peak_location if gov.peak_location.startswith("opening") else "cutout edge"
        at = next((loc.peak_stress_mpa for loc in r.locations if loc.location == here), r.peak_stress_mpa)
        ax.plot(bs.s, vals[:, j], styles[j % 4], lw=1.6, label=f"{r.name} (peak here {at:.1f} MPa)")
    which = f" of {gov.peak_location} (governing)" if gov.peak_location.startswith("opening") else ""
    origin = f"from ({bs.xy[0, 0]:.1f}, {bs.xy[1, 0]:.1f})"
    panels = [(ax, f"arc length round the cutout, counter-clockwise {origin} (mm)",
               f"{STRESS_LABELS[ev.stress_measure]} (MPa)",
               f"{title}: stress along the cutout edge{which}" + (" (in the web)" if second else ""), bs.s)]
    if second:
        s2, v2, where, xlabel, ylabel = second
        ax2 = axes[1, 0]
        for j, r in enumerate(ev.load_cases):
            at = next(loc.peak_stress_mpa for loc in r.locations if loc.location == where)
            ax2.plot(s2, v2[:, j], styles[j % 4], lw=1.6, label=f"{r.name} (peak {at:.1f} MPa)")
        if fields.member_stress is not None:  # signed: compression below the line
            ax2.axhline(0.0, color="0.5", lw=0.8)
        panels.append((ax2, xlabel, ylabel, f"{where}", s2))
    for a, xlabel, ylabel, head, s in panels:
        if allowable:
            a.axhline(allowable, color="black", lw=1.0, ls=(0, (6, 3)), label=f"allowable {allowable:g} MPa")
        a.set_xlabel(xlabel)
        a.set_ylabel(ylabel)
        a.set_xlim(s[0], s[-1])
        a.grid(True, alpha=0.3)
        a.margins(y=0.25)  # head room above the curves, where the legend goes
        a.legend(fontsize=8, loc="lower center", bbox_to_anchor=(0.5, 1.0 - 0.01), ncol=2, frameon=False)
        a.set_title(head, pad=10 + 12 * ((len(ev.load_cases) + (1 if allowable else 0) + 1) // 2))
    _warn(fig, ev)
    fig.tight_layout(rect=(0, 0.02, 1, 0.97))
    return save(fig, path)


def plot_mesh(path: Path, fields: EvaluationFields, cutout_bounds: tuple[float, float, float, float],
              title: str) -> Path:
    plt = pyplot()
    mesh = fields.panel_mesh.mesh
    x0, y0, x1, y1 = cutout_bounds
    pad = 0.35 * max(x1 - x0, y1 - y0)
    fig, ax = plt.subplots(figsize=(7, 7))
    ax.triplot(mesh.p[0, :mesh.nvertices], mesh.p[1, :mesh.nvertices], mesh.t.T, color="0.3", lw=0.35)
    cut = fields.panel_mesh.cutout_facets
    dofs = mesh.doflocs
    mids = dofs[:, mesh.nvertices + cut]
    ax.plot(mids[0], mids[1], ".", color="C3", ms=2, label="curved mid-side nodes on the exact outline")
    ax.set_xlim(x0 - pad, x1 + pad)
    ax.set_ylim(y0 - pad, y1 + pad)
    ax.set_aspect("equal")
    ax.set_xlabel("x (mm)")
    ax.set_ylabel("y (mm)")
    ax.legend(fontsize=8, loc="upper right")
    ax.set_title(f"{title}\nmesh near the cutout ({fields.panel_mesh.region.name} model, "
                 f"{fields.panel_mesh.n_elements} elements)")
    fig.tight_layout(rect=(0, 0.02, 1, 1))
    return save(fig, path)


def plot_buckling_mode(path: Path, stability: StabilityResult, fields: StabilityFields | None, cutout_xy: Outlines,
                       panel: Panel, title: str) -> Path:
    """Out-of-plane deflection contours of the lowest buckling mode(s) of the governing load case (largest
    deflection scaled to 1), cutout drawn, panel edges labelled with their support."""
    plt = pyplot()
    gov = stability.governing
    names = [c.name for c in stability.cases]
    j = names.index(gov.name) if gov is not None else 0
    modes = fields.modes[j] if fields is not None else []
    n = max(1, len(modes))
    aspect = panel.height / panel.width
    import textwrap

    support = stability.edge_support.replace("_", " ")
    case = gov.name if gov is not None else names[0]
    head = (f"buckling mode, {case} ({support} edges, in-plane '{stability.in_plane_edges}' edges, cutout edge"
            f" {stability.cutout_edge.split(' (')[0]})")
    fig_w = min(16.0, 6.5 * n)
    lines = [title, *textwrap.wrap(head, max(40, int(11 * fig_w)))]  # ~11 characters of 10-point text per inch
    fig_h = 5.0 * aspect * min(1.0, fig_w / (6.5 * n)) + 1.4 + 0.18 * len(lines)
    fig, axes = plt.subplots(1, n, figsize=(fig_w, fig_h), squeeze=False)
    for k, ax in enumerate(axes[0]):
        ax.plot([0, panel.width, panel.width, 0, 0], [0, 0, panel.height, panel.height, 0], color="black", lw=1.2)
        for xy in outline_list(cutout_xy):
            ax.fill(*xy, color="white", zorder=3)
            ax.plot(*np.concatenate([xy, xy[:, :1]], axis=1), color="black", lw=1.2, zorder=4)
        if fields is not None and modes:  # modes come with their plate mesh
            factor, w = modes[k]
            levels = np.linspace(-1.0, 1.0, 21)
            cs = ax.tricontourf(fields.p[0], fields.p[1], fields.t.T, w, levels=levels, cmap="RdBu_r")
            ax.tricontour(fields.p[0], fields.p[1], fields.t.T, w, levels=levels[::2], colors="k", linewidths=0.3)
            reported = "" if k or gov is None else \
                f"\n(the reported factor, extrapolated from two meshes: {gov.load_factor:.3f})"
            ax.set_title(f"mode {k + 1}: factor {factor:.3f} on the finest plate mesh{reported}", fontsize=10)
            if k == n - 1:
                fig.colorbar(cs, ax=ax, shrink=0.8, label="out-of-plane deflection (largest = 1)")
        else:
            ax.text(0.5 * panel.width, 0.5 * panel.height, "no buckling below the factor ceiling",
                    ha="center", va="center")
        ax.set_aspect("equal")
        ax.set_xlim(-0.02 * panel.width, 1.02 * panel.width)
        ax.set_ylim(-0.02 * panel.height, 1.02 * panel.height)
        ax.set_xlabel("x (mm)")
        ax.set_ylabel("y (mm)")
    fig.suptitle("\n".join(lines), fontsize=10)
    if stability.warnings:
        fig.text(0.01, 0.985, "WARNING: " + stability.warnings[0], fontsize=7.5, color="red", ha="left", va="top")
    top = 1.0 - (0.18 * len(lines) + 0.1) / fig_h  # room for the title's lines (inches)
    fig.tight_layout(rect=(0, 0.03, 1, top))
    return save(fig, path)


def plot_chart(path: Path, chart: Any, title: str) -> Path:
    """A figure a check described (``holeshape.checks.Chart``: axes side by side, each with its series)."""
    plt = pyplot()
    n = len(chart.axes)
    fig, axs = plt.subplots(1, n, figsize=(6.0 * n, 4.6), squeeze=False)
    for ax, spec in zip(axs[0], chart.axes):
        for s in spec.series:
            x, y = np.asarray(s.x, float), np.asarray(s.y, float)
            if s.style == "points":
                ax.plot(x, y, "o", ms=6, mfc="none", mew=1.5, label=s.label)
            else:
                ax.plot(x, y, "-", lw=1.6, label=s.label)
        if spec.log_x:
            ax.set_xscale("log")
        if spec.log_y:
            ax.set_yscale("log")
        ax.set_xlabel(spec.x_label)
        ax.set_ylabel(spec.y_label)
        ax.set_title(spec.title, fontsize=10)
        ax.grid(True, which="both", alpha=0.3)
        if len(spec.series) > 1:
            ax.legend(fontsize=8, loc="best")
    import textwrap

    fig.suptitle("\n".join(textwrap.wrap(f"{title}: {chart.title}", 60 * n)), fontsize=11)
    fig.tight_layout(rect=(0, 0, 1, 0.92))
    return save(fig, path)
