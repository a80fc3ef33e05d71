"""Files a run leaves behind: written atomically (temporary file in the same folder, then rename), so a killed
run never leaves a half-written DXF, CSV or summary. Coordinates in mm, panel coordinates."""

from __future__ import annotations

import json
import math
import os
import re
import tempfile
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np

from holeshape.errors import HoleshapeError
from holeshape.geometry import Cutout

if TYPE_CHECKING:
    from holeshape.evaluate import EvaluationFields

CUTOUT_LAYER = "CUTOUT_PROFILE"
PANEL_LAYER = "PANEL_OUTLINE"
RING_LAYER = "DOUBLER_OUTER_EDGE"  # the ring's (Ring.drawing_layer), named here for readers of the files
CHORD_TOLERANCE_MM = 0.01


def safe_name(text: str, fallback: str = "design") -> str:
    """A title or name made safe as a file name: letters, digits, '-', '_' and '.' only, no leading dot."""
    s = re.sub(r"[^A-Za-z0-9._-]+", "-", text).strip("-.")[:80]
    return s or fallback


def user_file_mode() -> int:
    """The permissions a plain ``open()`` would give a new file: 0o666 less the process's umask (read without
    changing it: Linux reports it in /proc; elsewhere it is set and restored at once)."""
    try:
        with open("/proc/self/status") as fh:
            for line in fh:
                if line.startswith("Umask:"):
                    return 0o666 & ~int(line.split()[1], 8)
    except OSError:
        pass
    mask = os.umask(0o022)
    os.umask(mask)
    return 0o666 & ~mask


def atomic_write(path: Path, data: bytes | str) -> Path:
    """Write ``data`` to ``path`` through a temporary file in the same folder and a rename, so a killed run never
    leaves half a file; the file gets the user's normal permissions (the temporary file's 0600 is not kept)."""
    path = Path(path)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", dir=path.parent)
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data.encode() if isinstance(data, str) else data)
            fh.flush()
            os.fsync(fh.fileno())
        os.chmod(tmp, user_file_mode())
        os.replace(tmp, path)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise
    return path


def write_json(path: Path, obj: Any) -> Path:
    return atomic_write(path, json.dumps(obj, indent=2, allow_nan=False) + "\n")


def profile_points(cutout: Cutout, tol: float = CHORD_TOLERANCE_MM) -> np.ndarray:
    """Points (n, 2) on the exact outline, spaced so that no chord strays more than ``tol`` mm from the curve."""
    smp = cutout.sampling
    if not (np.all(np.isfinite(smp.points)) and np.isfinite(smp.perimeter)):
        raise HoleshapeError("the outline has non-finite coordinates; no profile is written")
    kappa = np.abs(smp.curvature)
    # sagitta of a chord h on radius rho is h^2 / (8 rho): h = sqrt(8 tol rho), with a safety factor of 0.7
    with np.errstate(divide="ignore"):
        h = 0.7 * np.sqrt(8 * tol / np.maximum(kappa, 1e-12))
    h = np.minimum(h, smp.perimeter / 16)
    # smallest spacing over a window, so a sharp corner is not stepped over
    h = np.minimum.reduce([np.roll(h, k) for k in range(-8, 9)])
    ds = np.diff(smp.s)
    dens = np.concatenate([[0.0], np.cumsum(ds / h)])
    n = max(16, int(math.ceil(dens[-1])))
    s_nodes = np.interp(np.linspace(0.0, dens[-1], n, endpoint=False), dens, smp.s)
    pts = cutout.xy(smp.t_at_arclength(s_nodes)).T
    if not np.all(np.isfinite(pts)):
        raise HoleshapeError("the outline has non-finite coordinates; no profile is written")
    return pts


def chord_error(cutout: Cutout, pts: np.ndarray) -> float:
    """Largest distance (mm) between the polyline's chords and the exact curve, checked at chord midpoints."""
    smp = cutout.sampling
    closed = np.vstack([pts, pts[:1]])
    # arc-length position of each vertex on the dense sampling, then the exact point half-way along each arc
    from scipy.spatial import cKDTree

    _, idx = cKDTree(smp.points.T).query(pts)
    s = smp.s[idx]
    s_next = np.roll(s, -1)
    s_next = np.where(s_next <= s, s_next + smp.perimeter, s_next)
    mid_exact = cutout.xy(smp.t_at_arclength(0.5 * (s + s_next))).T
    a, b = closed[:-1], closed[1:]
    ab = b - a
    t = np.clip(np.einsum("ij,ij->i", mid_exact - a, ab) / np.einsum("ij,ij->i", ab, ab), 0, 1)
    return float(np.max(np.linalg.norm(a + t[:, None] * ab - mid_exact, axis=1)))


def reinforcement_note(cutout: Cutout, web_thickness: float | None = None) -> str | None:
    """One line saying what reinforces the opening (for the DXF's header comment and properties)."""
    r = cutout.reinforcement
    return None if r is None else r.drawing_note(web_thickness)


def write_dxf(path: Path, cutout: Cutout, panel_size: tuple[float, float] | None = None,
              title: str = "", web_thickness: float | None = None) -> dict:
    """Closed LWPOLYLINE of the outline on its own layer, millimetre units, panel coordinates; audited. A ring
    reinforcement's outer edge goes on its own layer; any reinforcement is described in a comment at the head of the
    file and in the drawing's custom properties."""
    import ezdxf
    from ezdxf import units

    profiles = [profile_points(m) for m in cutout.members]  # one closed outline per opening of a row
    err = max(chord_error(m, p) for m, p in zip(cutout.members, profiles))
    if err > CHORD_TOLERANCE_MM:
        raise HoleshapeError(f"profile chord error {err:.4f} mm exceeds {CHORD_TOLERANCE_MM} mm; not written")
    ring_pts = None
    r = cutout.reinforcement
    outer = None if r is None else r.interior_outline(cutout)
    if r is not None and outer is not None:
        ring_pts = profile_points(outer)
        if chord_error(outer, ring_pts) > CHORD_TOLERANCE_MM:
            raise HoleshapeError(f"the {r.kind}'s outer edge cannot be written within the chord tolerance; not"
                                 " written")
    doc = ezdxf.new("R2010", setup=False, units=units.MM)
    doc.header["$MEASUREMENT"] = 1  # metric
    doc.layers.add(CUTOUT_LAYER, color=1)
    msp = doc.modelspace()
    for prof in profiles:
        msp.add_lwpolyline([tuple(map(float, p)) for p in prof], format="xy", close=True,
                           dxfattribs={"layer": CUTOUT_LAYER})
    if panel_size is not None:
        doc.layers.add(PANEL_LAYER, color=8)
        w, h = panel_size
        msp.add_lwpolyline([(0.0, 0.0), (w, 0.0), (w, h), (0.0, h)], close=True, dxfattribs={"layer": PANEL_LAYER})
    if ring_pts is not None:
        assert r is not None and r.drawing_layer is not None  # a kind with an outer edge names its layer
        doc.layers.add(r.drawing_layer, color=5)
        msp.add_lwpolyline([tuple(map(float, p)) for p in ring_pts], format="xy", close=True,
                           dxfattribs={"layer": r.drawing_layer})
    note = reinforcement_note(cutout, web_thickness)
    if r is not None and note is not None:
        doc.header.custom_vars.append("HOLESHAPE_REINFORCEMENT", note)
        for k, v in r.parameters().items():
            doc.header.custom_vars.append(f"HOLESHAPE_REINFORCEMENT_{k.upper()}", str(v))
    if title:
        doc.header["$PROJECTNAME"] = safe_name(title)
    auditor = doc.audit()
    if auditor.has_errors:
        raise HoleshapeError(f"the DXF audit found {len(auditor.errors)} errors; not written")
    import io

    buf = io.StringIO()
    doc.write(buf)
    text = buf.getvalue()
    if note is not None:  # DXF comment lines (group 999) ahead of the first section
        text = f"999\nholeshape: {note}\n" + text
    atomic_write(path, text)
    out = {"vertices": int(sum(len(p) for p in profiles)), "chord_error_mm": err}
    if len(profiles) > 1:
        out["outlines"] = len(profiles)
    if ring_pts is not None:
        out["ring_vertices"] = int(len(ring_pts))
    return out


def write_csv(path: Path, cutout: Cutout) -> Path:
    """The profile's points (closed); a row of openings adds an ``opening`` column (1, 2, ...)."""
    if cutout.count == 1:
        pts = profile_points(cutout)
        rows = ["x_mm,y_mm"] + [f"{x:.6f},{y:.6f}" for x, y in np.vstack([pts, pts[:1]])]
        return atomic_write(path, "\n".join(rows) + "\n")
    rows = ["x_mm,y_mm,opening"]
    for k, m in enumerate(cutout.members, 1):
        pts = profile_points(m)
        rows += [f"{x:.6f},{y:.6f},{k}" for x, y in np.vstack([pts, pts[:1]])]
    return atomic_write(path, "\n".join(rows) + "\n")


def write_vtk(path: Path, fields: EvaluationFields, load_case_names: list[str]) -> Path:
    """The stress field of a design as VTK XML (.vtu) for any open-source field viewer: vertex values of
    sxx, syy, sxy and von Mises per load case (MPa); a reduced model is mirrored to the whole panel. Written
    atomically."""
    import meshio

    from holeshape.output.plots import mirrored_triangulation, vertex_stress
    from holeshape.solve import von_mises

    vs = vertex_stress(fields)  # (3, nv, m)
    nv = fields.panel_mesh.mesh.nvertices
    data = {}
    p = t = None
    for j, name in enumerate(load_case_names):
        key = safe_name(name, f"case{j}")
        sxx, syy, sxy = vs[:, :, j]
        vm = von_mises(sxx, syy, sxy)
        for label, v in (("sxx", sxx), ("syy", syy), ("sxy", sxy), ("von_mises", vm)):
            p, t, vals = mirrored_triangulation(fields, v[:nv], odd=label == "sxy")
            data[f"{key}_{label}_MPa"] = vals
    assert p is not None and t is not None  # a design has at least one load case
    pts = np.column_stack([p.T, np.zeros(p.shape[1])])
    tmp = path.with_name(f".{path.stem}.tmp{path.suffix}")
    meshio.write_points_cells(str(tmp), pts, [("triangle", t.T.astype(np.int64))], point_data=data)
    os.replace(tmp, path)
    return path
