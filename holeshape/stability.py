"""Stability layer: linear (eigenvalue) buckling of the flat panel with its cutout, for every load case.

Model. A Kirchhoff plate of the panel's thickness, bending stiffness D = E t^3 / (12 (1 - nu^2)), prestressed by the
plane-stress solution of the load case (the same P2 solve, on a mesh of its own that covers the whole panel: buckling
modes need not share the cutout's mirror symmetry). The load factor lambda solves (K + lambda K_G) w = 0, with K the
bending stiffness and K_G = t * integral(grad(w) . S . grad(v)) for the prestress S; the applied load case times
lambda buckles the perfect plate. Panel edges are simply supported (w = 0) or clamped (w = 0 and dw/dn = 0); the
cutout edge is free.

Element. Morley's non-conforming quadratic plate triangle (scikit-fem ``ElementTriMorley``) on the straight-sided
twin of the panel mesh: it converges like h^2 (from below on the plain plate), costs a fraction of the C1 Argyris
element, and its two-level Richardson extrapolation was measured within 0.15 % of the converged factors
(DEVELOPERS.md, "Numerical choices"). Reported factors are the extrapolated values; the error estimate is the whole
Richardson correction plus a measured scatter floor (a convergence test checks that it bounds the true error).

Sign of the eigenproblem. K_G is indefinite (shear, mixed tension and compression), K is positive definite once the
supports are applied: we solve -K_G w = mu K w for the largest mu, so lambda = 1 / mu is the smallest positive load
factor. No mu above 1 / FACTOR_CEILING means the case does not buckle below FACTOR_CEILING times its load (pure
tension never does). Reversed shear is a separate load case.

Units: mm, N, MPa. Array layouts: scikit-fem points (2, n); prestress at quadrature points (3, n_elements, n_qp)
ordered (sxx, syy, sxy).
"""

from __future__ import annotations

import math
import time
from collections.abc import Callable, Sequence
from dataclasses import asdict, dataclass, field, replace
from typing import TYPE_CHECKING, Any, TypeVar

import numpy as np

from holeshape.errors import SolveError
from holeshape.mesh import MeshSpec, Region, mesh_panel
from holeshape.plate import (
    bending_stiffness,
    edge_beam_matrices,
    geometric_stiffness,
    has_compression,
    lowest_factors,
    plate_basis,
    supported_dofs,
)
from holeshape.study import ACCURACIES, StabilitySettings

if TYPE_CHECKING:
    from holeshape.geometry import Cutout, Reinforcement
    from holeshape.mesh import PanelMesh
    from holeshape.solve import BeamField
    from holeshape.study import LoadCase, Material, Panel

Modes = list[list[tuple[float, np.ndarray]]]  # per load case: [(factor, mode shape), ...]
Size = TypeVar("Size")  # what sets a level's mesh: a MeshSpec, or the cell count of a structured mesh

SUPPORT_NOTES = {"simply_supported": "simply supported (deflection held, free to rotate)",
                 "clamped": "clamped (deflection and slope held)"}
FACTOR_MEANING = {
    "traction": "the factor multiplies the applied edge stresses of the load case",
    "displacement": "the factor multiplies the imposed edge strain of the load case (the remote strain of an "
                    "uncut panel under the stated stresses)",
}
# the buckling keys a load case and a design carry in every JSON output (absent without [stability])
CASE_KEYS = ("buckling_load_factor", "buckling_error_estimate_pct", "buckling_reserve",
             "buckling_load_factor_unperforated")
DESIGN_KEYS = ("buckling_load_factor", "buckling_governing_load_case", "buckling_load_factor_unperforated",
               "buckling_error_estimate_pct", "buckling_reserve")


@dataclass(frozen=True)
class StabilityLevel:
    """Plate mesh family of an accuracy level: ``spec`` the finer mesh (its element size caps at ``spec.max_fraction``
    of the smaller panel side), compared with the same family at twice the size. ``target_pct`` bounds the estimate."""

    name: str
    spec: MeshSpec
    target_pct: float
    floor_pct: float


# Measured on the plain plate (k = 4, 4.34, 9.32, 10.07, 14.6) and the holed square table (DEVELOPERS.md): the
# Richardson value of the standard pair is within 0.15 % of the converged one; the floor covers the scatter between
# two unstructured meshes of one family.
STABILITY_LEVELS = {
    "draft": StabilityLevel("draft", MeshSpec(boundary_ratio=3.0, growth=0.3, max_fraction=1 / 16, min_segments=24,
                                              ligament_elements=3.0), 3.0, 0.1),
    "standard": StabilityLevel("standard", MeshSpec(boundary_ratio=4.0, growth=0.3, max_fraction=1 / 28,
                                                    min_segments=32, ligament_elements=4.0), 1.0, 0.05),
    "fine": StabilityLevel("fine", MeshSpec(boundary_ratio=6.0, growth=0.2, max_fraction=1 / 44, min_segments=48,
                                            ligament_elements=6.0), 0.5, 0.05),
}
assert tuple(STABILITY_LEVELS) == ACCURACIES  # the same level names as the plane-stress evaluation
MAX_REFINEMENTS = 2  # further levels, each 1.5x finer, while the estimate exceeds the level's target
REFINE_RATIO = 1.5
CONVERGENCE_ORDER = 2.0  # Morley plate element, eigenvalues: O(h^2)


@dataclass(frozen=True)
class BucklingCase:
    """Buckling of one load case. ``load_factor`` None: no buckling below FACTOR_CEILING times the load."""

    name: str
    load_factor: float | None
    error_estimate_pct: float | None
    level_factors: tuple[float | None, ...]  # raw factor per plate mesh level, coarsest first
    unperforated_factor: float | None
    unperforated_error_estimate_pct: float | None
    reserve: float | None  # load_factor / required_factor

    @property
    def buckles(self) -> bool:
        return self.load_factor is not None


@dataclass(frozen=True)
class StabilityResult:
    """Everything the outputs say about stability (JSON-ready through ``to_dict``)."""

    cases: tuple[BucklingCase, ...]
    edge_support: str
    in_plane_edges: str
    required_factor: float
    accuracy: str
    accuracy_target_pct: float
    dofs: int  # plate DOFs of the finest level
    level_dofs: tuple[int, ...]
    refinements: int
    elapsed_s: float
    warnings: tuple[str, ...] = ()
    cutout_edge: str = "free"  # how the cutout edge is modelled out of plane (Reinforcement.edge_note)
    # the finest plate mesh and the mode shapes, for the plots (asked for with keep_fields; not part of the value)
    fields: StabilityFields | None = field(default=None, compare=False, repr=False)

    @property
    def governing(self) -> BucklingCase | None:
        buck = [c for c in self.cases if c.buckles]
        return min(buck, key=lambda c: math.inf if c.load_factor is None else c.load_factor) if buck else None

    @property
    def load_factor(self) -> float | None:
        g = self.governing
        return None if g is None else g.load_factor

    @property
    def unperforated_factor(self) -> float | None:
        vals = [c.unperforated_factor for c in self.cases if c.unperforated_factor is not None]
        return min(vals) if vals else None

    @property
    def error_estimate_pct(self) -> float:
        vals = [c.error_estimate_pct for c in self.cases if c.error_estimate_pct is not None]
        return max(vals) if vals else 0.0

    @property
    def reserve(self) -> float | None:
        f = self.load_factor
        return None if f is None else f / self.required_factor

    @property
    def meets_required(self) -> bool:
        """Every load case's factor at least the required one (a case that does not buckle meets it): the rule of
        the buckling requirement rows, compared in the same terms (factor against factor, not the rounded ratio)."""
        return all(c.load_factor is None or c.load_factor >= self.required_factor for c in self.cases)

    def to_dict(self) -> dict:
        d = asdict(replace(self, fields=None))
        d.pop("fields")
        d["cases"] = [asdict(c) | {"buckles": c.buckles} for c in self.cases]
        g = self.governing
        d.update(buckling_load_factor=self.load_factor, buckling_governing_load_case=None if g is None else g.name,
                 buckling_load_factor_unperforated=self.unperforated_factor,
                 buckling_error_estimate_pct=self.error_estimate_pct, buckling_reserve=self.reserve,
                 meets_required_factor=self.meets_required)
        return d


@dataclass
class StabilityFields:
    """Plate mesh of the finest level and the mode shapes (out-of-plane deflection at the vertices, largest
    magnitude 1), kept only for plots: ``modes[j]`` is a list of (factor, w) for load case j."""

    p: np.ndarray = field(repr=False)
    t: np.ndarray = field(repr=False)
    modes: Modes = field(repr=False)


EDGE_GAUSS = 4  # Gauss points on each edge of a beam along the cutout


def richardson(coarse: float, fine: float, ratio: float, order: float = CONVERGENCE_ORDER) -> float:
    """Extrapolated value from two mesh levels whose sizes differ by ``ratio`` (> 1), for convergence ``order``."""
    return fine + (fine - coarse) / (ratio ** order - 1.0)


def estimate_pct(coarse: float, fine: float, ratio: float, floor_pct: float) -> tuple[float, float]:
    """(extrapolated value, error estimate in percent): the whole Richardson correction plus the floor."""
    ext = richardson(coarse, fine, ratio)
    return ext, 100.0 * abs(ext - fine) / abs(ext) + floor_pct


# ----- one mesh level -----------------------------------------------------------------------------------------------
@dataclass
class _LevelRun:
    factors: Modes  # per case: [(factor, mode)] (possibly empty)
    dofs: int
    p: np.ndarray
    t: np.ndarray


def _vertex_deflection(basis: Any, mode: np.ndarray) -> np.ndarray:
    w = mode[basis.nodal_dofs[0]]
    big = float(np.abs(w).max()) or 1.0
    return w / (big if abs(w.max()) >= abs(w.min()) else -big)


def plate_buckling(pm: PanelMesh, u: np.ndarray, material: Material, thickness: float, edge_support: str,
                   n_modes: int = 1, reinforcement: Reinforcement | None = None) -> tuple[Modes, Any]:
    """Buckling of a meshed panel (``holeshape.mesh.PanelMesh`` of the whole panel) under the in-plane
    displacements ``u`` (n_dofs, m) of its P2 solve (any in-plane boundary condition): per load case the
    ``n_modes`` lowest positive factors with their mode shapes (deflection at the mesh vertices, largest magnitude
    1), and the plate basis. Edges named left/right/bottom/top are supported; the cutout edge is free, or carries a
    flange (a beam with its bending stiffness and its axial force), or a doubler ring stiffens its elements."""
    from skfem import Basis, ElementTriP2, ElementVector

    from holeshape.solve import reinforcement_terms, stress_from_gradient

    mesh = pm.mesh
    pb = plate_basis(mesh.p[:, :mesh.nvertices], mesh.t)
    # the prestress at the plate's quadrature points: same reference points on the same elements of the curved mesh
    sb = Basis(mesh, ElementVector(ElementTriP2()), quadrature=pb.quadrature)
    prestresses = [stress_from_gradient(np.asarray(sb.interpolate(u[:, c]).grad), material.elastic)
                   for c in range(u.shape[1])]
    edges = np.concatenate([pm.boundaries[k] for k in ("left", "right", "bottom", "top")])
    scale: float | np.ndarray
    force: float | np.ndarray
    scale, force = 1.0, thickness
    extra = None
    e = material.elastic.reference_modulus
    if reinforcement is not None and pm.region_elements is not None:  # a reinforced region (a doubler ring)
        region_factor, _ = reinforcement_terms(reinforcement, material.elastic, thickness)
        scale = np.ones(mesh.t.shape[1])
        scale[pm.region_elements] = reinforcement.region_bending_ratio(e, thickness)
        force = np.full(mesh.t.shape[1], thickness)
        force[pm.region_elements] = thickness * region_factor  # membrane force = web stress x equivalent thickness
    beam = None if reinforcement is None else reinforcement.edge_beam(e, thickness)
    if beam is not None:  # a beam along the cutout edge (a flange)
        extra = _edge_beam_terms(pm, pb, u, *beam)
    return _plate_factors(pb, prestresses, material, thickness, edges, edge_support, n_modes, scale, force,
                          extra), pb


def _edge_beam_terms(pm: PanelMesh, pb: Any, u: np.ndarray, bending: float, axial: float) -> tuple[Any, list[Any]]:
    """The bending stiffness and the geometric stiffness per load case (plate matrices) of a beam along the cutout
    edge of bending stiffness ``bending`` (E I, N mm^2) and axial stiffness ``axial`` (E A, N), strained with the
    web's edge."""
    from skfem import Basis, ElementTriP2, ElementVector

    from holeshape.solve import edge_points

    mesh = pm.mesh
    if not np.array_equal(pb.mesh.facets[:, pm.cutout_facets], mesh.facets[:, pm.cutout_facets]):
        raise SolveError("the plate mesh numbers its facets differently from the panel mesh")
    g, _ = np.polynomial.legendre.leggauss(EDGE_GAUSS)
    lam = 0.5 * (g + 1.0)
    force = np.empty((u.shape[1], len(pm.cutout_facets), EDGE_GAUSS))
    velem = ElementVector(ElementTriP2())
    for sel, elem, start, d in edge_points(mesh, pm.cutout_facets):
        ref = start[:, None] + lam[None, :] * d[:, None]
        cb = Basis(mesh, velem, elements=elem, quadrature=(ref, np.full(EDGE_GAUSS, 1.0 / EDGE_GAUSS)))
        J = cb.mapping.DF(ref, tind=elem)
        tan = J[:, 0] * d[0] + J[:, 1] * d[1]
        tan = tan / np.linalg.norm(tan, axis=0)
        for c in range(u.shape[1]):
            grad = np.asarray(cb.interpolate(u[:, c]).grad)  # (2, 2, k, q)
            force[c][sel] = axial * np.einsum("ikq,ijkq,jkq->kq", tan, grad, tan)
    fv = mesh.facets[:, pm.cutout_facets]
    chain = np.where(pm.cutout_flip, fv[1], fv[0])  # the start vertex of each facet along the arc
    return edge_beam_matrices(pb, chain, pm.closed, bending, [f.mean(axis=1) for f in force])


def _plate_factors(pb: Any, prestresses: list[np.ndarray], material: Material, thickness: float,
                   edge_facets: np.ndarray, edge_support: str, n_modes: int, scale: float | np.ndarray = 1.0,
                   force: float | np.ndarray | None = None, extra: tuple[Any, list[Any]] | None = None) -> Modes:
    """Per prestress (3, ...) MPa: the lowest positive factors and their vertex mode shapes on plate basis ``pb``
    with ``edge_facets`` supported. ``scale``/``force``: per-element bending stiffness ratio and membrane thickness
    (a ring); ``extra``: (K, [K_G per case]) of an edge beam (a flange)."""
    force = thickness if force is None else force
    K = bending_stiffness(pb, material.elastic, thickness, scale)
    KGs = [geometric_stiffness(pb, S, force) for S in prestresses]
    compression = [has_compression(S) for S in prestresses]
    if extra is not None:
        K = K + extra[0]
        KGs = [kg + kb for kg, kb in zip(KGs, extra[1])]
        compression = [True] * len(KGs)  # the flange may be compressed where the web is not
    fixed = supported_dofs(pb, edge_facets, edge_support)
    facs = lowest_factors(K, KGs, fixed, n_modes, compression)
    return [[(f, _vertex_deflection(pb, m)) for f, m in rows] for rows in facs]


def _holed_level(panel: Panel, material: Material, remote: np.ndarray, cutout: Cutout, spec: MeshSpec, support: str,
                 n_modes: int, fields: list[BeamField | None] | None = None) -> _LevelRun:
    from holeshape.solve import solve_panel

    region = Region(panel.width, panel.height)  # the whole panel: modes need not be symmetric
    pm = mesh_panel(panel.width, panel.height, cutout, region, spec)
    sol = solve_panel(pm, material.elastic, remote, panel.edges, panel.width,
                      panel.height, recover=False, reinforcement=cutout.reinforcement, thickness=panel.thickness,
                      fields=fields)
    facs, pb = plate_buckling(pm, sol.u, material, panel.thickness, support, n_modes, cutout.reinforcement)
    mesh = pm.mesh
    return _LevelRun(facs, int(pb.N), mesh.p[:, :mesh.nvertices].copy(), mesh.t.copy())


def crossed_grid(width: float, height: float, nx: int, ny: int) -> tuple[np.ndarray, np.ndarray]:
    """Structured triangles of a rectangle: every cell split into four by its centre (no preferred diagonal, so
    positive and negative shear see the same mesh). Returns p (2, n), t (3, m)."""
    xs, ys = np.linspace(0.0, width, nx + 1), np.linspace(0.0, height, ny + 1)
    X, Y = np.meshgrid(xs, ys, indexing="ij")
    corners = np.vstack([X.ravel(), Y.ravel()])
    cx, cy = np.meshgrid(0.5 * (xs[1:] + xs[:-1]), 0.5 * (ys[1:] + ys[:-1]), indexing="ij")
    centres = np.vstack([cx.ravel(), cy.ravel()])
    p = np.hstack([corners, centres])
    gi, gj = np.meshgrid(np.arange(nx), np.arange(ny), indexing="ij")
    i, j = gi.ravel(), gj.ravel()
    a, b = i * (ny + 1) + j, (i + 1) * (ny + 1) + j  # lower-left, lower-right
    c, d = b + 1, a + 1  # upper-right, upper-left
    m = corners.shape[1] + i * ny + j
    t = np.hstack([np.vstack([a, b, m]), np.vstack([b, c, m]), np.vstack([c, d, m]), np.vstack([d, a, m])])
    return p, t


def _plain_level(panel: Panel, material: Material, remote: np.ndarray, n_short: int, support: str, n_modes: int,
                 fields: list[BeamField | None] | None = None) -> _LevelRun:
    """The unperforated panel: a crossed structured mesh and the uniform remote stress (exact for both in-plane
    edge conditions when there is no cutout), or a beam case's own field (exact for an unperforated web)."""
    from skfem import MeshTri1

    short = min(panel.width, panel.height)
    nx = max(2, int(round(n_short * panel.width / short)))
    ny = max(2, int(round(n_short * panel.height / short)))
    p, t = crossed_grid(panel.width, panel.height, nx, ny)
    pb = plate_basis(p, t)
    xq = np.asarray(pb.global_coordinates())
    pre = [np.asarray(r, dtype=float) if f is None else np.array(f(xq[0], xq[1]))
           for r, f in zip(remote, fields or [None] * len(remote))]
    facs = _plate_factors(pb, pre, material, panel.thickness,
                          MeshTri1(p, t).boundary_facets(), support, n_modes)
    return _LevelRun(facs, int(pb.N), p, t)


# the levels run, (factor, estimate) per load case, and the number of refinements
Converged = tuple[list[_LevelRun], list[tuple[float | None, float | None]], int]


def _converged(run_at: Callable[[Size], _LevelRun], coarse: Size, fine: Size,
               refine: Callable[[Size], tuple[Size, float]], level: StabilityLevel, n_cases: int,
               out_of_time: Callable[[], bool] = lambda: False) -> Converged:
    """Plate levels from ``coarse`` and ``fine`` (sizes 2:1), then ``refine(size) -> (finer size, ratio)`` while an
    estimate exceeds the level's target (at most MAX_REFINEMENTS, none once ``out_of_time()``). Returns the runs,
    (factor, estimate) per case from the last two, and the number of refinements."""
    runs, ratios, size = [run_at(coarse), run_at(fine)], [2.0], fine
    while True:
        ests = [_combine(runs, ratios, j, level.floor_pct)[1] for j in range(n_cases)]
        worst = max((e for e in ests if e is not None), default=0.0)
        if worst <= level.target_pct or len(runs) - 2 == MAX_REFINEMENTS or out_of_time():
            break
        size, ratio = refine(size)
        runs.append(run_at(size))
        ratios.append(ratio)
    return runs, [_combine(runs, ratios, j, level.floor_pct) for j in range(n_cases)], len(runs) - 2


def _plain_panel(panel: Panel, material: Material, remote: np.ndarray, level: StabilityLevel, support: str,
                 n_modes: int, fields: list[BeamField | None] | None = None) -> Converged:
    """The unperforated panel: nested structured meshes with an exact size ratio of 2 (then about 1.5 per
    refinement, the exact ratio of the cell counts)."""
    n = int(math.ceil(1.0 / level.spec.max_fraction / 2.0)) * 2

    def refine(k: int) -> tuple[int, float]:
        finer = int(round(k * REFINE_RATIO))
        return finer, finer / k

    return _converged(lambda k: _plain_level(panel, material, remote, k, support, n_modes, fields), n // 2, n, refine,
                      level, remote.shape[0])


def _first(run: _LevelRun, j: int) -> float | None:
    return run.factors[j][0][0] if run.factors[j] else None


def _combine(runs: list[_LevelRun], ratios: list[float], j: int, floor_pct: float
             ) -> tuple[float | None, float | None]:
    """Extrapolated factor and estimate of case j from the last two levels."""
    fc, ff = _first(runs[-2], j), _first(runs[-1], j)
    if ff is None and fc is None:
        return None, None
    if ff is None or fc is None:  # buckles on one level only: near the ceiling; take the finer level's word
        return (ff, 100.0) if ff is not None else (None, None)
    return estimate_pct(fc, ff, ratios[-1], floor_pct)


def buckling(panel: Panel, material: Material, load_cases: Sequence[LoadCase], cutout: Cutout | None,
             settings: StabilitySettings, accuracy: str = "standard",
             time_limit_s: float | None = None, keep_fields: bool = False, cache: dict | None = None
             ) -> StabilityResult:
    """Buckling load factor of every load case for the panel with ``cutout`` (or without one: ``cutout=None``), and
    of the same panel without the cutout. With ``keep_fields`` the result carries the finest plate mesh and the
    mode shapes (``StabilityResult.fields``). ``cache``: a dict owned by the caller (a search run) in which the
    unperforated panel, the same for every design of a study, is kept between calls."""
    t0 = time.perf_counter()
    level = STABILITY_LEVELS[accuracy]
    from holeshape.solve import load_fields

    remote = np.array([lc.components for lc in load_cases], dtype=float)
    fields = load_fields(panel, load_cases)
    support, n_modes = settings.edge_support, max(1, settings.modes if keep_fields else 1)

    def check_time() -> None:
        if time_limit_s is not None and time.perf_counter() - t0 > time_limit_s:
            raise SolveError(f"the buckling check exceeded its time limit of {time_limit_s:g} s")

    def holed(spec: MeshSpec) -> _LevelRun:
        assert cutout is not None  # run only for a panel with its cutout
        check_time()
        return _holed_level(panel, material, remote, cutout, spec, support, n_modes, fields)

    key = ("unperforated panel", panel, material, tuple(load_cases), support, n_modes, level.name)
    plain = None if cache is None else cache.get(key)
    if plain is None:
        check_time()
        plain = _plain_panel(panel, material, remote, level, support, n_modes, fields)
        if cache is not None:
            cache[key] = plain
    plain_runs, plain_res, plain_refinements = plain

    if cutout is None:
        runs, res = plain_runs, plain_res
        refinements_holed = plain_refinements
    else:
        runs, res, refinements_holed = _converged(
            holed, level.spec.coarsened(2.0), level.spec, lambda s: (s.coarsened(1.0 / REFINE_RATIO), REFINE_RATIO),
            level, len(load_cases),
            out_of_time=lambda: time_limit_s is not None and time.perf_counter() - t0 > 0.5 * time_limit_s)

    cases = []
    for j, lc in enumerate(load_cases):
        f, est = res[j]
        fu, estu = plain_res[j]
        cases.append(BucklingCase(
            name=lc.name, load_factor=f, error_estimate_pct=est,
            level_factors=tuple(_first(r, j) for r in runs), unperforated_factor=fu,
            unperforated_error_estimate_pct=estu,
            reserve=None if f is None else f / settings.required_factor))
    warnings = []
    worst = max((c.error_estimate_pct for c in cases if c.error_estimate_pct is not None), default=0.0)
    if worst > level.target_pct:
        warnings.append(f"buckling error estimate {worst:.2g} % exceeds the {level.name} target of "
                        f"{level.target_pct:g} %: treat the load factor as approximate or use a finer accuracy")
    result = StabilityResult(
        cases=tuple(cases), edge_support=support, in_plane_edges=panel.edges,
        required_factor=settings.required_factor, accuracy=level.name, accuracy_target_pct=level.target_pct,
        dofs=runs[-1].dofs, level_dofs=tuple(r.dofs for r in runs), refinements=refinements_holed,
        elapsed_s=time.perf_counter() - t0, warnings=tuple(warnings),
        cutout_edge="free" if cutout is None or cutout.reinforcement is None else cutout.reinforcement.edge_note)
    if keep_fields:
        last = runs[-1]
        return replace(result, fields=StabilityFields(p=last.p, t=last.t, modes=last.factors))
    return result


def critical_stress_coefficient(stress: float, width_loaded: float, thickness: float, youngs_modulus: float,
                                poisson_ratio: float) -> float:
    """k in sigma_cr = k pi^2 E / (12 (1 - nu^2)) (t / b)^2 for a critical stress ``stress`` (MPa) on a plate of
    loaded width b (mm)."""
    return stress / (math.pi ** 2 * youngs_modulus / (12.0 * (1.0 - poisson_ratio ** 2))
                     * (thickness / width_loaded) ** 2)
