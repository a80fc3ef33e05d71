"""Mesh layer: a panel with one cutout -> curved quadratic triangle mesh (scikit-fem ``MeshTri2``).

How the mesh is made (all lengths mm):

1. Nodes are placed on the cutout at arc-length spacing ``h(s) = radius_of_curvature(s) / boundary_ratio``,
   capped, and graded along the curve so neighbouring spacings grow by at most ``growth`` per mm.
2. gmsh (built-in kernel) meshes the panel minus the polygon through those nodes; every cutout segment is one
   element edge, and the size inside grows linearly with distance from the cutout (``h_node + growth * d``).
3. The linear mesh becomes a ``MeshTri2`` whose cutout mid-side nodes are moved onto the exact analytic curve at
   the arc-length midpoint of their segment (centred, as quadratic elements need), so the boundary the solver
   sees is the true curve to O(h^3), not a polygon with re-entrant kinks.

A reduced model (half or quarter panel) uses the exact arc of the cutout between its symmetry points.
gmsh is one global instance per process and is not thread-safe: call from one thread; use processes to parallelise.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from holeshape.errors import MeshError
from holeshape.geometry import Cutout


@dataclass(frozen=True)
class MeshSpec:
    """Mesh density. ``boundary_ratio``: local radius of curvature / element size on the cutout; ``growth``:
    size increase per unit distance from the cutout; ``max_fraction``: largest element / smaller panel side."""

    boundary_ratio: float = 16.0
    growth: float = 0.1
    max_fraction: float = 0.1
    min_segments: int = 48  # on a full cutout outline (fewer on a reduced arc, in proportion)
    curved: bool = True  # False leaves straight-sided elements on the cutout (only for comparisons in benchmarks/)
    # cutout spacing held to (distance to the nearest panel edge) / ligament_elements; None keeps the plane-stress
    # levels' rule (LIGAMENT_ELEMENTS scaled by boundary_ratio / 16), which their measured accuracy rests on
    ligament_elements: float | None = None

    def coarsened(self, factor: float = 2.0) -> MeshSpec:
        """The same mesh family with every size multiplied by ``factor`` (the second level of a check)."""
        lig = None if self.ligament_elements is None else self.ligament_elements / factor
        return MeshSpec(self.boundary_ratio / factor, self.growth * factor, self.max_fraction * factor,
                        max(8, int(round(self.min_segments / factor))), self.curved, lig)


@dataclass(frozen=True)
class Region:
    """The part of the panel that is modelled. ``mirror_h``: symmetric about the horizontal line y = cy (model
    y >= cy); ``mirror_v``: symmetric about the vertical line x = cx (model x >= cx)."""

    width: float
    height: float
    mirror_h: bool = False
    mirror_v: bool = False

    @property
    def x0(self) -> float:
        return self.width / 2 if self.mirror_v else 0.0

    @property
    def y0(self) -> float:
        return self.height / 2 if self.mirror_h else 0.0

    @property
    def fraction(self) -> float:
        return (0.5 if self.mirror_h else 1.0) * (0.5 if self.mirror_v else 1.0)

    @property
    def name(self) -> str:
        return {(False, False): "full", (True, True): "quarter"}.get((self.mirror_h, self.mirror_v), "half")


@dataclass(frozen=True)
class PanelMesh:
    """The mesh and where its boundaries are.

    ``mesh``: MeshTri2 (points (2, n), quadratic mapping). ``boundaries``: facet indices per name: "left", "right",
    "bottom", "top" (panel edges), "mirror_h" (on y = cy, uy = 0), "mirror_v" (on x = cx, ux = 0), "cutout".
    ``cutout_facets`` (m,) in order along the modelled cutout arc (counter-clockwise around the cutout);
    ``cutout_flip`` (m,) True where the facet's vertex order runs against that direction;
    ``cutout_s`` (m + 1,) arc length of the segment ends, mm, measured from the start of the arc, and
    ``cutout_t`` the matching curve parameters.
    """

    mesh: Any = field(repr=False)
    boundaries: dict[str, np.ndarray] = field(repr=False)
    cutout_facets: np.ndarray = field(repr=False)
    cutout_flip: np.ndarray = field(repr=False)
    cutout_s: np.ndarray = field(repr=False)
    cutout_t: np.ndarray = field(repr=False)
    region: Region
    closed: bool
    # with a reinforcement that has an interior outline (a ring's outer edge): the reinforced region's elements,
    # the facets of that outline in order along the arc, the web element outside each of those facets, and the arc
    # length of their ends (mm)
    region_elements: np.ndarray | None = field(default=None, repr=False)
    interior_facets: np.ndarray | None = field(default=None, repr=False)
    interior_outside: np.ndarray | None = field(default=None, repr=False)
    interior_s: np.ndarray | None = field(default=None, repr=False)
    # every opening of a row as (facets, flip, s, t) like cutout_* above (the first is cutout_*); one for one opening
    members: tuple[tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray], ...] = field(default=(), repr=False)

    @property
    def n_elements(self) -> int:
        return int(self.mesh.t.shape[1])


def _graded_spacing(s: np.ndarray, h: np.ndarray, growth: float, periodic: bool) -> np.ndarray:
    """Smallest spacing field h'(s) <= h(s) with |dh'/ds| <= growth (a 1-D distance transform, O(n))."""
    if periodic:  # unroll three turns so the wrap-around grading is seen from both sides
        period = s[-1] + (s[1] - s[0])
        s3 = np.concatenate([s - period, s, s + period])
        return _graded_spacing(s3, np.tile(h, 3), growth, False)[len(s):2 * len(s)]
    fwd = growth * s + np.minimum.accumulate(h - growth * s)
    bwd = -growth * s + np.minimum.accumulate((h + growth * s)[::-1])[::-1]
    return np.minimum(fwd, bwd)


LIGAMENT_ELEMENTS = 4  # elements across a narrow ligament at the reference boundary ratio below
# the boundary ratio at which LIGAMENT_ELEMENTS holds: MeshSpec's default (the plane-stress levels' rule scales the
# count by LIGAMENT_REFERENCE_RATIO / boundary_ratio; plate meshes give MeshSpec.ligament_elements instead)
LIGAMENT_REFERENCE_RATIO = MeshSpec.boundary_ratio


def cutout_nodes(cutout: Cutout, spec: MeshSpec, t_start: float, t_span: float, h_cap: float,
                 panel_size: tuple[float, float] | None = None) -> np.ndarray:
    """Curve parameters of the cutout nodes from ``t_start`` over ``t_span`` (2 pi for the full outline).

    With ``panel_size`` the spacing is also held to (distance to the nearest panel edge) / LIGAMENT_ELEMENTS, so a
    narrow ligament gets several elements across it."""
    smp = cutout.sampling
    full = math.isclose(t_span, 2 * math.pi)
    n_dense = 4096
    t = t_start + np.linspace(0.0, t_span, n_dense, endpoint=not full)
    s0 = smp.arclength_at_t(np.array([t_start]))[0]
    s = smp.arclength_at_t(t) - s0
    tt = np.concatenate([smp.t, [2 * math.pi]])
    kappa = np.abs(np.interp(np.mod(t, 2 * math.pi), tt, np.concatenate([smp.curvature, smp.curvature[:1]])))
    perimeter = smp.perimeter
    h_floor = 1e-5 * perimeter  # only for curvature singularities; MAX_CUTOUT_SEGMENTS bounds the total
    h_cap = min(h_cap, perimeter / spec.min_segments)
    with np.errstate(divide="ignore"):
        h = np.clip(1.0 / (kappa * spec.boundary_ratio), h_floor, h_cap)
    if panel_size is not None:
        xy = cutout.xy(t)
        gap = np.min([xy[0], xy[1], panel_size[0] - xy[0], panel_size[1] - xy[1]], axis=0)
        per = LIGAMENT_ELEMENTS * LIGAMENT_REFERENCE_RATIO / spec.boundary_ratio if spec.ligament_elements is None \
            else spec.ligament_elements
        h = np.minimum(h, np.maximum(gap, h_floor) / per)
    h = _graded_spacing(s, h, spec.growth, periodic=full)
    # node count from the integral of ds / h, then equal steps in that integral
    length = s[-1] + (s[1] - s[0] if full else 0.0)
    s_ext = np.concatenate([s, [length]]) if full else s
    h_ext = np.concatenate([h, h[:1]]) if full else h
    dens = np.concatenate([[0.0], np.cumsum(np.diff(s_ext) * 0.5 * (1 / h_ext[1:] + 1 / h_ext[:-1]))])
    least = max(4, int(math.ceil(spec.min_segments * t_span / (2 * math.pi))))
    n_seg = max(least, int(math.ceil(dens[-1])))
    if n_seg > MAX_CUTOUT_SEGMENTS:
        raise MeshError(f"the outline would need {n_seg} boundary elements (its smallest radius "
                        f"{1 / max(kappa.max(), 1e-300):.3g} mm against a perimeter of {perimeter:.4g} mm);"
                        f" more than {MAX_CUTOUT_SEGMENTS} is refused: use a coarser accuracy or a larger radius")
    targets = np.linspace(0.0, dens[-1], n_seg + 1)
    s_nodes = np.interp(targets, dens, s_ext)
    return smp.t_at_arclength(s_nodes + s0)


_GMSH_READY = False
MAX_CUTOUT_SEGMENTS = 20000  # beyond this a single evaluation would take minutes: refuse rather than hang


def from_gmsh(err: BaseException) -> bool:
    """Whether an error came from the mesher itself: gmsh's Python API raises a plain ``Exception`` with its last
    error message (a geometry it cannot mesh belongs to the design). Anything else raised in the meshing code, a
    subclass (TypeError, IndexError, ...), is a bug of ours and must not pass for a failed design."""
    return type(err) is Exception


def gmsh_session() -> Any:
    """The process's gmsh instance with every option at its default (options outlive ``gmsh.clear()``, so a size
    limit set by one caller would silently coarsen the next caller's mesh)."""
    global _GMSH_READY
    import gmsh

    if not _GMSH_READY:
        gmsh.initialize(interruptible=False)  # no signal handler: Ctrl-C and SIGTERM stay ours
        _GMSH_READY = True
    gmsh.option.restoreDefaults()
    gmsh.option.setNumber("General.Terminal", 0)
    gmsh.option.setNumber("General.NumThreads", 1)
    return gmsh


def _arc_range(cutout: Cutout, region: Region) -> tuple[float, float]:
    """Curve parameter at the start of the modelled arc and the arc's span (radians)."""
    rot = math.radians(cutout.rotation)
    if region.mirror_h and region.mirror_v:
        return (0.0 - rot) % (2 * math.pi), math.pi / 2
    if region.mirror_h:
        return (0.0 - rot) % (2 * math.pi), math.pi
    if region.mirror_v:
        return (1.5 * math.pi - rot) % (2 * math.pi), math.pi
    return 0.0, 2 * math.pi


def _arc_points(cutout: Cutout, region: Region, spec: MeshSpec, h_max: float, width: float, height: float
                ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Nodes of the modelled arc of an outline: parameters, points (ends exactly on the mirror lines), and the
    spacing at each node (for the size field)."""
    t_start, t_span = _arc_range(cutout, region)
    closed = region.name == "full"
    t_nodes = cutout_nodes(cutout, spec, t_start, t_span, h_cap=h_max, panel_size=(width, height))
    xy = cutout.xy(t_nodes)  # (2, n)
    if closed:
        xy_ring, t_ring = xy[:, :-1], t_nodes[:-1]
    else:
        xy_ring, t_ring = xy, t_nodes
        # the arc ends sit exactly on the symmetry lines
        if region.mirror_h:
            if region.mirror_v:
                xy_ring[1, 0] = region.y0
                xy_ring[0, -1] = region.x0
            else:
                xy_ring[1, 0] = xy_ring[1, -1] = region.y0
        else:
            xy_ring[0, 0] = xy_ring[0, -1] = region.x0
    seg_len = np.hypot(*np.diff(np.concatenate([xy_ring, xy_ring[:, :1]], axis=1) if closed else xy_ring, axis=1))
    node_h = np.minimum(np.concatenate([seg_len, seg_len[-1:]])[: xy_ring.shape[1]],
                        np.concatenate([seg_len[:1], seg_len])[: xy_ring.shape[1]])
    return t_ring, xy_ring, node_h


def mesh_panel(width: float, height: float, cutout: Cutout, region: Region, spec: MeshSpec) -> PanelMesh:
    """Mesh the modelled region of a ``width`` x ``height`` panel (origin at its lower-left corner) minus ``cutout``.

    With a reinforcement that has an interior outline (``Reinforcement.interior_outline``: a ring's outer edge)
    that outline is an interior line of the mesh and the reinforced region's elements are listed
    (``PanelMesh.region_elements``). The caller has checked that the
    cutout lies inside the panel and that ``region`` matches its symmetry.
    """

    h_max = spec.max_fraction * min(width, height)
    closed = region.name == "full"
    if cutout.count > 1:
        return _mesh_row(width, height, cutout, region, spec, h_max)
    t_ring, xy_ring, node_h = _arc_points(cutout, region, spec, h_max, width, height)
    r = cutout.reinforcement
    outer = None if r is None else r.interior_outline(cutout)
    if outer is not None:
        t_off, xy_off, h_off = _arc_points(outer, region, spec, h_max, width, height)

    gmsh = gmsh_session()
    gmsh.clear()
    gmsh.model.add("panel")
    geo = gmsh.model.geo
    cut_pts = [geo.addPoint(float(x), float(y), 0.0) for x, y in xy_ring.T]
    off_pts = [geo.addPoint(float(x), float(y), 0.0) for x, y in xy_off.T] if outer is not None else []
    x0, y0, x1, y1 = region.x0, region.y0, width, height

    def chain(pts: list[int]) -> list[int]:
        n = len(pts)
        return [geo.addLine(pts[i], pts[(i + 1) % n]) for i in range(n if closed else n - 1)]

    try:
        ring = chain(cut_pts)
        off = chain(off_pts) if outer is not None else []
        inner_edge, inner_pts = (off, off_pts) if outer is not None else (ring, cut_pts)
        surfaces = []
        if closed:
            corners = [geo.addPoint(x0, y0, 0), geo.addPoint(x1, y0, 0), geo.addPoint(x1, y1, 0),
                       geo.addPoint(x0, y1, 0)]
            box = [geo.addLine(corners[i], corners[(i + 1) % 4]) for i in range(4)]
            surfaces.append(geo.addPlaneSurface([geo.addCurveLoop(box), geo.addCurveLoop(inner_edge)]))
            if outer is not None:
                surfaces.append(geo.addPlaneSurface([geo.addCurveLoop(off), geo.addCurveLoop(ring)]))
        else:
            first, last = inner_pts[0], inner_pts[-1]
            if region.mirror_h and region.mirror_v:
                # arc from its point on y = y0 to its point on x = x0
                corners = [(x1, y0), (x1, y1), (x0, y1)]
            elif region.mirror_h:
                # arc from its right point on y = y0 over the top to its left point on y = y0
                corners = [(x1, y0), (x1, y1), (x0, y1), (x0, y0)]
            else:
                # arc from its bottom point on x = x0 round the right side to its top point on x = x0
                corners = [(x0, y0), (x1, y0), (x1, y1), (x0, y1)]
            pts = [first] + [geo.addPoint(cx, cy, 0) for cx, cy in corners] + [last]
            # counter-clockwise round the domain: panel corners, then the arc back to where the loop began
            loop = [geo.addLine(pts[i], pts[i + 1]) for i in range(len(pts) - 1)] + [-c for c in reversed(inner_edge)]
            surfaces.append(geo.addPlaneSurface([geo.addCurveLoop(loop)]))
            if outer is not None:
                # the ring: out along the first mirror line, the ring's outer arc, back along the second, the cutout
                band = [geo.addLine(cut_pts[0], off_pts[0])] + off + [geo.addLine(off_pts[-1], cut_pts[-1])] \
                    + [-c for c in reversed(ring)]
                surfaces.append(geo.addPlaneSurface([geo.addCurveLoop(band)]))
        geo.synchronize()
        for line in ring + off:
            gmsh.model.mesh.setTransfiniteCurve(line, 2)
        if outer is not None:
            _size_field(gmsh, cut_pts + off_pts, np.concatenate([node_h, h_off]), spec.growth, h_max)
        else:
            _size_field(gmsh, cut_pts, node_h, spec.growth, h_max)
        _generate(gmsh, h_max)
        node_tags, coords, _ = gmsh.model.mesh.getNodes()
        tris, n_ring = [], 0
        for k, surface in enumerate(surfaces):
            etypes, _, enodes = gmsh.model.mesh.getElements(2, surface)
            if len(etypes) != 1 or etypes[0] != 2:
                raise MeshError(f"gmsh returned element types {list(etypes)}, expected 3-node triangles only")
            tris.append(enodes[0])
            if k == 1:
                n_ring = len(enodes[0]) // 3
    except Exception as err:
        if not from_gmsh(err):
            raise
        raise MeshError(f"gmsh could not mesh the panel around the {cutout.family} cutout: {err}") from err
    finally:
        gmsh.clear()
    linear = _linear_mesh(node_tags, coords, np.concatenate(tris))
    t = linear.t
    pm = _curve_cutout(linear, [cutout], [xy_ring], [t_ring], closed, region, width, height, spec.curved)
    if outer is None:
        return pm
    region_elements = np.arange(t.shape[1] - n_ring, t.shape[1])
    return _with_interior(pm, outer, xy_off, t_off, region_elements, spec.curved)


def _generate(gmsh: Any, h_max: float) -> None:
    """Mesh the model in 2-D with sizes from the background field only (capped at ``h_max``)."""
    gmsh.option.setNumber("Mesh.MeshSizeFromPoints", 0)
    gmsh.option.setNumber("Mesh.MeshSizeFromCurvature", 0)
    gmsh.option.setNumber("Mesh.MeshSizeExtendFromBoundary", 0)
    gmsh.option.setNumber("Mesh.MeshSizeMax", h_max)
    gmsh.option.setNumber("Mesh.Algorithm", 6)
    gmsh.model.mesh.generate(2)


def _linear_mesh(node_tags: np.ndarray, coords: np.ndarray, enodes: np.ndarray) -> Any:
    """``MeshTri1`` from gmsh's flat arrays: coords (3n,), triangle node tags (3m,) -> p (2, n), t (3, m), compact
    (no orphan nodes in the stiffness matrix), counter-clockwise."""
    from skfem import MeshTri1

    order = np.argsort(node_tags)
    tags_sorted = node_tags[order]
    tri = order[np.searchsorted(tags_sorted, enodes)].reshape(-1, 3).T
    used = np.unique(tri)
    remap = np.full(node_tags.size, -1, dtype=np.int64)
    remap[used] = np.arange(used.size)
    p = coords.reshape(-1, 3)[used, :2].T.copy()
    t = remap[tri]
    d = (p[0, t[1]] - p[0, t[0]]) * (p[1, t[2]] - p[1, t[0]]) - (p[1, t[1]] - p[1, t[0]]) * (p[0, t[2]] - p[0, t[0]])
    t[[1, 2]] = np.where(d < 0, t[[2, 1]], t[[1, 2]])
    return MeshTri1(p, np.ascontiguousarray(t))


def _mesh_row(width: float, height: float, cutout: Cutout, region: Region, spec: MeshSpec, h_max: float
              ) -> PanelMesh:
    """The whole panel minus every opening of a row (no mirror reduction, no ring: the study refuses those)."""
    if region.name != "full":
        raise MeshError("a row of openings is meshed as the whole panel")
    members = cutout.members
    arcs = [_arc_points(m, region, spec, h_max, width, height) for m in members]
    gmsh = gmsh_session()
    gmsh.clear()
    gmsh.model.add("panel")
    geo = gmsh.model.geo
    try:
        corners = [geo.addPoint(x, y, 0) for x, y in ((0, 0), (width, 0), (width, height), (0, height))]
        loops = [geo.addCurveLoop([geo.addLine(corners[i], corners[(i + 1) % 4]) for i in range(4)])]
        all_pts, all_h, holes = [], [], []
        for _, xy, node_h in arcs:
            pts = [geo.addPoint(float(x), float(y), 0.0) for x, y in xy.T]
            lines = [geo.addLine(pts[i], pts[(i + 1) % len(pts)]) for i in range(len(pts))]
            loops.append(geo.addCurveLoop(lines))
            holes += lines
            all_pts += pts
            all_h.append(node_h)
        surface = geo.addPlaneSurface(loops)
        geo.synchronize()
        for line in holes:
            gmsh.model.mesh.setTransfiniteCurve(line, 2)
        _size_field(gmsh, all_pts, np.concatenate(all_h), spec.growth, h_max)
        _generate(gmsh, h_max)
        node_tags, coords, _ = gmsh.model.mesh.getNodes()
        etypes, _, enodes = gmsh.model.mesh.getElements(2, surface)
    except Exception as err:
        if not from_gmsh(err):
            raise
        raise MeshError(f"gmsh could not mesh the panel around the row of {cutout.family} cutouts: {err}") from err
    finally:
        gmsh.clear()
    if len(etypes) != 1 or etypes[0] != 2:
        raise MeshError(f"gmsh returned element types {list(etypes)}, expected 3-node triangles only")
    linear = _linear_mesh(node_tags, coords, enodes[0])
    return _curve_cutout(linear, members, [a[1] for a in arcs], [a[0] for a in arcs], True, region, width, height,
                         spec.curved)


def _chain_facets(linear: Any, xy_ring: np.ndarray, closed: bool, scale: float) -> tuple[np.ndarray, np.ndarray]:
    """Facet indices of the segments joining consecutive points ``xy_ring`` (2, n), and whether each facet's
    vertex order runs against the chain."""
    from scipy.spatial import cKDTree

    p = linear.p
    dist, vid = cKDTree(p.T).query(xy_ring.T)
    if dist.max() > 1e-9 * scale:
        raise MeshError("gmsh moved a node of an outline; the mesh does not follow it")
    b = np.roll(vid, -1) if closed else vid[1:]
    a = vid if closed else vid[:-1]
    facets = linear.facets  # (2, nf), each column sorted
    key = facets[0].astype(np.int64) * p.shape[1] + facets[1]
    order = np.argsort(key)
    lo, hi = np.minimum(a, b), np.maximum(a, b)
    pos = np.minimum(np.searchsorted(key[order], lo.astype(np.int64) * p.shape[1] + hi), len(order) - 1)
    found = order[pos]
    if not np.array_equal(key[found], lo.astype(np.int64) * p.shape[1] + hi):
        raise MeshError("a segment of an outline is not an element edge of the mesh")
    return found, facets[0, found] != a


def _arc_s(cutout: Cutout, t_ring: np.ndarray, closed: bool) -> tuple[np.ndarray, np.ndarray]:
    """Unwrapped curve parameters and arc lengths of the arc nodes (closing node repeated for a closed outline)."""
    smp = cutout.sampling
    t_nodes = np.concatenate([t_ring, [t_ring[0] + 2 * math.pi]]) if closed else t_ring
    # unwrap so arc length increases along the arc
    t_nodes = t_nodes[0] + np.mod(t_nodes - t_nodes[0], 2 * math.pi)
    if closed:
        t_nodes[-1] = t_nodes[0] + 2 * math.pi
    return t_nodes, smp.arclength_at_t(t_nodes)


def _curved_midpoints(cutout: Cutout, s_nodes: np.ndarray) -> np.ndarray:
    smp = cutout.sampling
    return cutout.xy(smp.t_at_arclength(0.5 * (s_nodes[:-1] + s_nodes[1:])))


def _with_interior(pm: PanelMesh, outer: Cutout, xy_off: np.ndarray, t_off: np.ndarray, region_elements: np.ndarray,
                   curved: bool) -> PanelMesh:
    """Add the reinforced region's outer edge (an interior line: mid-side nodes moved onto its exact curve) to a
    panel mesh."""
    from dataclasses import replace

    mesh = pm.mesh
    closed = pm.closed
    facets, _ = _chain_facets(mesh, xy_off, closed, float(np.ptp(mesh.p, axis=1).max()))
    _, s_nodes = _arc_s(outer, t_off, closed)
    doflocs = mesh.doflocs.copy()
    if curved:
        doflocs[:, mesh.dofs.facet_dofs[0, facets]] = _curved_midpoints(outer, s_nodes)
    in_ring = np.zeros(mesh.t.shape[1], dtype=bool)
    in_ring[region_elements] = True
    both = mesh.f2t[:, facets]  # (2, k): the two elements of each interior facet
    outside = np.where(in_ring[both[0]], both[1], both[0])
    if np.any(in_ring[outside]) or np.any(outside < 0):
        raise MeshError("the ring's outer edge does not separate the ring from the web")
    return replace(pm, mesh=replace(mesh, doflocs=doflocs), region_elements=region_elements, interior_facets=facets,
                   interior_outside=outside, interior_s=s_nodes - s_nodes[0])


def _size_field(gmsh: Any, points: list[int], node_h: np.ndarray, growth: float, h_max: float) -> None:
    """Background size min_j(h_j + growth * distance to cutout node group j), groups of similar spacing."""
    fld = gmsh.model.mesh.field
    edges = np.exp(np.arange(np.log(node_h.min()), np.log(node_h.max()) + 0.4, 0.4))  # bins of ratio ~1.5
    groups = np.clip(np.searchsorted(edges, node_h, side="right") - 1, 0, len(edges) - 1)
    evals = []
    for g in np.unique(groups):
        members = [points[i] for i in np.flatnonzero(groups == g)]
        h_g = float(node_h[groups == g].min())
        dist = fld.add("Distance")
        fld.setNumbers(dist, "PointsList", members)
        ev = fld.add("MathEval")
        fld.setString(ev, "F", f"{h_g!r} + {growth!r} * F{dist}")
        evals.append(ev)
    cap = fld.add("MathEval")
    fld.setString(cap, "F", f"{h_max!r}")
    low = fld.add("Min")
    fld.setNumbers(low, "FieldsList", evals + [cap])
    fld.setAsBackgroundMesh(low)


def _curve_cutout(linear: Any, cutouts: list[Cutout], xy_rings: list[np.ndarray], t_rings: list[np.ndarray],
                  closed: bool, region: Region, width: float, height: float, curved: bool = True) -> PanelMesh:
    """The quadratic mesh with every opening's mid-side nodes on its exact curve, and its named boundaries."""
    from dataclasses import replace

    from skfem import MeshTri2

    p = linear.p
    scale = max(width, height)
    facets = linear.facets
    quad = MeshTri2.from_mesh(linear)
    doflocs = quad.doflocs.copy()
    members = []
    for cutout, xy_ring, t_ring in zip(cutouts, xy_rings, t_rings):
        cut_facets, flip = _chain_facets(linear, xy_ring, closed, scale)
        t_nodes, s_nodes = _arc_s(cutout, t_ring, closed)
        if curved:
            doflocs[:, quad.dofs.facet_dofs[0, cut_facets]] = _curved_midpoints(cutout, s_nodes)
        members.append((cut_facets, flip, s_nodes - s_nodes[0], t_nodes))
    quad = replace(quad, doflocs=doflocs)
    cut_facets, flip, s0, t0 = members[0]

    mid = p[:, facets].mean(axis=1)  # (2, nf) midpoints of straight facets
    bnd = quad.boundary_facets()
    tol = 1e-9 * scale
    names = {
        "left": bnd[np.abs(mid[0, bnd] - 0.0) < tol] if not region.mirror_v else np.array([], dtype=np.int64),
        "right": bnd[np.abs(mid[0, bnd] - width) < tol],
        "bottom": bnd[np.abs(mid[1, bnd] - 0.0) < tol] if not region.mirror_h else np.array([], dtype=np.int64),
        "top": bnd[np.abs(mid[1, bnd] - height) < tol],
        "mirror_h": bnd[np.abs(mid[1, bnd] - region.y0) < tol] if region.mirror_h else np.array([], dtype=np.int64),
        "mirror_v": bnd[np.abs(mid[0, bnd] - region.x0) < tol] if region.mirror_v else np.array([], dtype=np.int64),
        "cutout": np.sort(np.concatenate([m[0] for m in members])),
    }
    return PanelMesh(mesh=quad, boundaries=names, cutout_facets=cut_facets, cutout_flip=flip, cutout_s=s0,
                     cutout_t=t0, region=region, closed=closed, members=tuple(members))


def mesh_from_gmsh(gmsh: Any, surface: int) -> Any:
    """``MeshTri2`` from the current gmsh model after ``generate(2)`` and ``setOrder(2)`` (6-node triangles).

    For domains built directly with gmsh's own curved geometry (the panel meshes above use exact analytic
    outlines instead). Built straight from gmsh's flat arrays: reading through meshio drops the 3-node boundary
    lines. Only nodes of the surface's triangles are kept (no orphans).
    """
    from skfem import MeshTri2

    tags, coords, _ = gmsh.model.mesh.getNodes(2, surface, includeBoundary=True)
    etypes, _, enodes = gmsh.model.mesh.getElements(2, surface)
    if list(etypes) != [9]:
        raise MeshError(f"expected 6-node triangles (gmsh type 9), got types {list(etypes)}")
    order = np.argsort(tags)
    tri = order[np.searchsorted(tags[order], enodes[0])].reshape(-1, 6).T
    used = np.unique(tri)
    remap = np.full(tags.size, -1, dtype=np.int64)
    remap[used] = np.arange(used.size)
    p = coords.reshape(-1, 3)[used, :2].T.copy()
    return MeshTri2(p, np.ascontiguousarray(remap[tri]))
