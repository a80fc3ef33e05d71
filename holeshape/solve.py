"""Solve layer: linear-elastic plane stress on a curved quadratic mesh, and stress recovery on a boundary.

Units: mm, N, MPa. Displacements in mm. Stress components are ordered (sxx, syy, sxy) everywhere in this module.
Array layouts follow scikit-fem: points (2, n); per-facet samples (..., n_facets, n_points_per_facet).
"""

from __future__ import annotations

import math
from collections.abc import Callable, Iterable, Iterator
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

import numpy as np

from holeshape.elastic import Elastic
from holeshape.errors import SolveError

if TYPE_CHECKING:
    from holeshape.geometry import Reinforcement
    from holeshape.mesh import PanelMesh
    from holeshape.study import LoadCase, Panel

# Sampling of each boundary facet for stress recovery, in the facet's reference coordinate [0, 1]. The ends are
# shared with the neighbouring facets and averaged there; the interior points catch a peak between nodes.
FACET_SAMPLES = np.linspace(0.0, 1.0, 5)
QUAD_ORDER = 4  # P2 stiffness on quadratic geometry: degree-2 integrand on straight cells; 4 covers the curved ones


def von_mises(sxx: Any, syy: Any, sxy: Any) -> Any:
    """Plane-stress von Mises stress of (sxx, syy, sxy), MPa (arrays or numbers; the one definition in holeshape)."""
    return np.sqrt(np.maximum(sxx * sxx - sxx * syy + syy * syy + 3 * sxy * sxy, 0.0))


def principal_stresses(sxx: Any, syy: Any, sxy: Any) -> tuple[Any, Any]:
    """(larger, smaller) in-plane principal stress, MPa."""
    c, r = 0.5 * (sxx + syy), np.hypot(0.5 * (sxx - syy), sxy)
    return c + r, c - r


def vector_basis(mesh: Any) -> Any:
    """P2 vector basis on a (curved) quadratic triangle mesh."""
    from skfem import Basis, ElementTriP2, ElementVector

    return Basis(mesh, ElementVector(ElementTriP2()), intorder=QUAD_ORDER)


def edge_points(mesh: Any, facets: np.ndarray, elements: np.ndarray | None = None
                ) -> Iterator[tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]]:
    """Where boundary (or interior) facets lie inside their elements, grouped by which two local vertices they join.

    Yields (selection, element indices, reference points of the facet's end-to-end direction as a function of a
    parameter, reference direction) for each local vertex pair; ``elements`` chooses the element on each facet
    (default: ``f2t[0]``, the only one on a boundary facet). Facets run from their first to their second vertex."""
    elem = mesh.f2t[0, facets] if elements is None else np.asarray(elements)
    fv = mesh.facets[:, facets]
    tri = mesh.t[:, elem]
    ia = np.argmax(tri == fv[0][None, :], axis=0)
    ib = np.argmax(tri == fv[1][None, :], axis=0)
    for a in range(3):
        for b in range(3):
            sel = np.flatnonzero((ia == a) & (ib == b))
            if a != b and sel.size:
                yield sel, elem[sel], _REF_VERTICES[a], _REF_VERTICES[b] - _REF_VERTICES[a]


def edge_member_stiffness(basis: Any, facets: np.ndarray, axial_stiffness: float) -> Any:
    """Stiffness of a bar along boundary ``facets`` that carries force along the edge only (a formed flange or any
    edge member): energy 1/2 integral(EA eps_ss^2 ds) with the membrane strain of the edge eps_ss = t . grad(u) . t
    (which includes the u_n / R term of a curved edge). ``axial_stiffness`` EA per unit web thickness (N / mm, the
    web stiffness here is per mm of thickness). Integrated with 4 Gauss points on each curved edge."""
    from scipy.sparse import coo_matrix
    from skfem import Basis

    mesh = basis.mesh
    g, gw = np.polynomial.legendre.leggauss(4)
    lam, lw = 0.5 * (g + 1.0), 0.5 * gw
    rows, cols, vals = [], [], []
    for _, elem, start, d in edge_points(mesh, facets):
        ref = start[:, None] + lam[None, :] * d[:, None]
        cb = Basis(mesh, basis.elem, elements=elem, quadrature=(ref, lw))
        J = cb.mapping.DF(ref, tind=elem)  # (2, 2, k, q)
        tan = J[:, 0] * d[0] + J[:, 1] * d[1]  # dx/dlambda along the edge
        ds = np.linalg.norm(tan, axis=0)  # (k, q)
        tan = tan / ds
        eps = np.array([np.einsum("ikq,ijkq,jkq->kq", tan, np.asarray(cb.basis[i][0].grad), tan)
                        for i in range(cb.Nbfun)])  # (nbfun, k, q)
        ke = axial_stiffness * np.einsum("ikq,jkq,kq,q->ijk", eps, eps, ds, lw)
        dofs = cb.element_dofs  # (nbfun, k)
        rows.append(np.broadcast_to(dofs[:, None, :], ke.shape).ravel())
        cols.append(np.broadcast_to(dofs[None, :, :], ke.shape).ravel())
        vals.append(ke.ravel())
    n = basis.N
    return coo_matrix((np.concatenate(vals), (np.concatenate(rows), np.concatenate(cols))), shape=(n, n)).tocsr()


def stiffness(basis: Any, elastic: Elastic) -> Any:
    """Plane-stress membrane stiffness per mm of thickness (N/mm per mm of displacement)."""
    from skfem import BilinearForm
    from skfem.helpers import ddot, sym_grad

    @BilinearForm
    def form(u: Any, v: Any, w: Any) -> Any:
        return ddot(elastic.stress_tensor(sym_grad(u)), sym_grad(v))

    return form.assemble(basis)


def traction_load(mesh: Any, facets: np.ndarray, stress_field: Callable[[Any, Any], tuple[Any, Any, Any]]
                  ) -> np.ndarray:
    """Load vector of the traction sigma . n on ``facets`` for a stress field.

    ``stress_field(x, y)`` returns (sxx, syy, sxy), each broadcastable to x (MPa); n is the outward normal.
    """
    from skfem import ElementTriP2, ElementVector, FacetBasis, LinearForm

    fb = FacetBasis(mesh, ElementVector(ElementTriP2()), facets=facets, intorder=QUAD_ORDER)

    @LinearForm
    def form(v: Any, w: Any) -> Any:
        sxx, syy, sxy = (np.broadcast_to(c, w.x[0].shape) for c in stress_field(w.x[0], w.x[1]))
        n = w.n
        return (sxx * n[0] + sxy * n[1]) * v[0] + (sxy * n[0] + syy * n[1]) * v[1]

    return form.assemble(fb)


@dataclass
class FactorisedSystem:
    """K with Dirichlet DOFs removed, factorised once; solves any number of load cases.

    ``fixed`` (k,) DOF indices with prescribed values; ``free`` the rest.
    """

    K: Any = field(repr=False)
    fixed: np.ndarray
    free: np.ndarray = field(init=False)
    _lu: Any = field(init=False, repr=False)

    def __post_init__(self) -> None:
        from scipy.sparse.linalg import splu

        n = self.K.shape[0]
        mask = np.ones(n, dtype=bool)
        mask[self.fixed] = False
        self.free = np.flatnonzero(mask)
        K = self.K.tocsr()
        self._Kff = K[self.free][:, self.free].tocsc()
        self._Kfd = K[self.free][:, self.fixed]
        try:
            # K is symmetric positive definite: a symmetric ordering (minimum degree on A^T + A) with no pivoting
            # fills in least; partial pivoting was 10x slower on full-panel models (measured)
            self._lu = splu(self._Kff, permc_spec="MMD_AT_PLUS_A", diag_pivot_thresh=0.0,
                            options={"SymmetricMode": True})
        except RuntimeError as err:
            raise SolveError(f"the stiffness matrix is singular (a part of the panel is not held): {err}") from err
        diag = np.abs(self._lu.U.diagonal())
        if not np.all(np.isfinite(diag)) or diag.min() <= 1e-13 * diag.max():
            raise SolveError(
                f"the stiffness matrix is near-singular (pivot ratio {diag.min() / diag.max():.1e}); "
                "the result would not be trustworthy"
            )

    def solve(self, loads: np.ndarray, prescribed: np.ndarray | None = None) -> np.ndarray:
        """``loads`` (n, m) load vectors; ``prescribed`` (k, m) values at ``fixed``. Returns displacements (n, m)."""
        loads = np.atleast_2d(loads.T).T
        m = loads.shape[1]
        u = np.zeros((self.K.shape[0], m))
        rhs = loads[self.free]
        if prescribed is not None:
            u[self.fixed] = prescribed
            rhs = rhs - self._Kfd @ prescribed
        u[self.free] = self._lu.solve(np.ascontiguousarray(rhs))
        if not np.all(np.isfinite(u)):
            raise SolveError("the solve produced non-finite displacements")
        return u


@dataclass(frozen=True)
class BoundaryStress:
    """Stress sampled along a boundary arc, in order (a closed outline repeats its first sample at the end).

    ``s`` (n,) arc length, mm; ``xy`` (2, n) points, mm; ``tangent`` (2, n) unit tangents along the arc;
    ``sigma`` (3, n, m) stress components (sxx, syy, sxy) in MPa for m load cases.
    """

    s: np.ndarray
    xy: np.ndarray
    tangent: np.ndarray
    sigma: np.ndarray

    @property
    def hoop(self) -> np.ndarray:
        """Tangential (hoop) stress t . sigma . t, (n, m) MPa; independent of the tangent's sign."""
        tx, ty = self.tangent[0][:, None], self.tangent[1][:, None]
        sxx, syy, sxy = self.sigma
        return sxx * tx * tx + syy * ty * ty + 2 * sxy * tx * ty

    @property
    def normal(self) -> np.ndarray:
        """Stress normal to the boundary n . sigma . n, (n, m) MPa (the radial stress on a round edge)."""
        tx, ty = self.tangent[0][:, None], self.tangent[1][:, None]
        sxx, syy, sxy = self.sigma
        return sxx * ty * ty + syy * tx * tx - 2 * sxy * tx * ty

    @property
    def von_mises(self) -> np.ndarray:
        return von_mises(*self.sigma)

    @property
    def max_principal(self) -> np.ndarray:
        return principal_stresses(*self.sigma)[0]

    @property
    def min_principal(self) -> np.ndarray:
        return principal_stresses(*self.sigma)[1]


def stress_from_gradient(grad: np.ndarray, elastic: Elastic) -> np.ndarray:
    """(sxx, syy, sxy) from displacement gradients grad[i, j] = du_i/dx_j (any trailing shape)."""
    return np.array(elastic.stress(grad[0, 0], grad[1, 1], 0.5 * (grad[0, 1] + grad[1, 0])))


_REF_VERTICES = np.array([[0.0, 0.0], [1.0, 0.0], [0.0, 1.0]])  # scikit-fem's reference triangle


def boundary_stress(mesh: Any, u: np.ndarray, facets: np.ndarray, elastic: Elastic, closed: bool,
                    s_nodes: np.ndarray | None = None, elements: np.ndarray | None = None) -> BoundaryStress:
    """Recover the stress along a chain of boundary facets without smoothing the peak.

    The displacement gradient is evaluated inside each boundary element, at points of its boundary edge given
    directly in the element's reference coordinates (the element's own polynomial: no projection to nodes, no
    inverse mapping); at a node shared by two facets the two one-sided values are averaged. ``facets`` (k,) must be
    in chain order; ``u`` (n_dofs, m). ``s_nodes`` (k + 1,) arc length of the chain's nodes (else chord lengths).
    ``elements`` (k,): the element on each facet to recover from (an interior line such as a ring's outer edge has
    two; default ``f2t[0]``, the only one on a boundary facet).
    """
    from skfem import Basis, ElementTriP2, ElementVector

    k, q, m = len(facets), len(FACET_SAMPLES), u.shape[1]
    fv = mesh.facets[:, facets]  # (2, k) vertex indices
    nxt = np.roll(np.arange(k), -1)
    to_next = np.where((fv[0] == fv[0, nxt]) | (fv[0] == fv[1, nxt]), fv[0], fv[1])
    start = fv[0] + fv[1] - to_next
    if not closed and k > 1:
        start[k - 1] = to_next[k - 2]
        to_next[k - 1] = fv[0, k - 1] + fv[1, k - 1] - start[k - 1]
    elem = mesh.f2t[0, facets] if elements is None else np.asarray(elements)
    tri = mesh.t[:, elem]  # (3, k)
    ia = np.argmax(tri == start[None, :], axis=0)
    ib = np.argmax(tri == to_next[None, :], axis=0)
    x = np.empty((2, k, q))
    tangent = np.empty((2, k, q))
    sig = np.empty((3, k, q, m))
    velem = ElementVector(ElementTriP2())
    for a in range(3):
        for b in range(3):
            sel = np.flatnonzero((ia == a) & (ib == b))
            if a == b or sel.size == 0:
                continue
            ref = _REF_VERTICES[a][:, None] + FACET_SAMPLES[None, :] * (_REF_VERTICES[b] - _REF_VERTICES[a])[:, None]
            cb = Basis(mesh, velem, elements=elem[sel], quadrature=(ref, np.full(q, 1.0 / q)))
            x[:, sel] = np.asarray(cb.global_coordinates())
            J = cb.mapping.DF(ref, tind=elem[sel])  # (2, 2, len(sel), q)
            d = _REF_VERTICES[b] - _REF_VERTICES[a]
            tangent[:, sel] = J[:, 0] * d[0] + J[:, 1] * d[1]
            for c in range(m):
                grad = np.asarray(cb.interpolate(u[:, c]).grad)  # (2, 2, len(sel), q)
                sig[..., c][:, sel] = stress_from_gradient(grad, elastic)
    tangent /= np.linalg.norm(tangent, axis=0)
    # chain: node i is the start of facet i; average the one-sided values at shared nodes
    n_nodes = k if closed else k + 1
    starts = np.arange(k)
    ends = (starts + 1) % n_nodes
    node_sig = 0.5 * (sig[:, starts, 0] + sig[:, np.roll(starts, 1), -1])
    node_t = tangent[:, starts, 0] + tangent[:, np.roll(starts, 1), -1]
    if not closed:
        node_sig[:, 0] = sig[:, 0, 0]
        node_t[:, 0] = tangent[:, 0, 0]
        node_sig = np.concatenate([node_sig, sig[:, -1:, -1]], axis=1)
        node_t = np.concatenate([node_t, tangent[:, -1:, -1]], axis=1)
    del ends
    node_x = np.concatenate([x[:, :, 0], x[:, -1:, -1]], axis=1)[:, :n_nodes]
    # the ordered sequence: node, interior samples of its facet, next node, ...
    sig_all = np.concatenate([node_sig[:, :k, None], sig[:, :, 1:-1]], axis=2).reshape(3, k * (q - 1), m)
    x_all = np.concatenate([node_x[:, :k, None], x[:, :, 1:-1]], axis=2).reshape(2, k * (q - 1))
    t_all = np.concatenate([node_t[:, :k, None], tangent[:, :, 1:-1]], axis=2).reshape(2, k * (q - 1))
    if s_nodes is None:
        s_nodes = np.concatenate([[0.0], np.cumsum(np.linalg.norm(x[:, :, -1] - x[:, :, 0], axis=0))])
    s_all = (s_nodes[:-1, None] + FACET_SAMPLES[None, :-1] * np.diff(s_nodes)[:, None]).reshape(-1)
    # the last node (for a closed chain: the first node again, so the curve closes at s = perimeter)
    last = 0 if closed else -1
    sig_all = np.concatenate([sig_all, node_sig[:, last:][:, :1]], axis=1)
    x_all = np.concatenate([x_all, node_x[:, last:][:, :1]], axis=1)
    t_all = np.concatenate([t_all, node_t[:, last:][:, :1]], axis=1)
    s_all = np.concatenate([s_all, s_nodes[-1:]])
    t_all = t_all / np.linalg.norm(t_all, axis=0)
    return BoundaryStress(s=s_all, xy=x_all, tangent=t_all, sigma=sig_all)


def peak_along(s: np.ndarray, values: np.ndarray, closed: bool) -> tuple[float, int]:
    """Largest value of a sampled curve, refined by a parabola through the best sample and its neighbours.

    ``closed``: the samples go once round a closed outline and the last repeats the first. Returns (peak, index of
    the best sample). The refinement never lowers the sampled maximum.
    """
    n = len(values) - 1 if closed else len(values)
    v, x = values[:n], s[:n]
    period = s[-1] - s[0]
    i = int(np.argmax(v))
    best = float(v[i])
    if closed or 0 < i < n - 1:
        j0, j2 = (i - 1) % n, (i + 1) % n
        h0 = (x[i] - x[j0]) % period if closed else x[i] - x[j0]
        h2 = (x[j2] - x[i]) % period if closed else x[j2] - x[i]
        y0, y1, y2 = v[j0], v[i], v[j2]
        if h0 > 0 and h2 > 0:
            # parabola through (-h0, y0), (0, y1), (h2, y2)
            a = ((y2 - y1) / h2 + (y0 - y1) / h0) / (h0 + h2)
            b = (y2 - y1) / h2 - a * h2
            if a < 0:
                xs = -b / (2 * a)
                if -h0 <= xs <= h2:
                    best = max(best, float(y1 + b * xs + a * xs * xs))
    if not math.isfinite(best):
        raise SolveError("the recovered boundary stress is not finite")
    return best, i


@dataclass(frozen=True)
class PanelSolution:
    """Displacements of every load case and the stress along the modelled cutout arc.

    ``u`` (n_dofs, m) mm; ``cutout`` the boundary stress; ``basis`` the P2 vector basis (for field plots).
    """

    basis: Any = field(repr=False)
    u: np.ndarray = field(repr=False)
    cutout: BoundaryStress | None = field(repr=False)  # None when solved with recover=False
    elastic: Elastic
    # the web just outside the reinforced region's interior outline (a ring's outer edge)
    interior_edge: BoundaryStress | None = field(default=None, repr=False)
    # BoundaryStress of every opening of a row (the first is cutout)
    members: tuple[BoundaryStress, ...] = field(default=(), repr=False)
    system: FactorisedSystem | None = field(default=None, repr=False)  # the factorised stiffness (more load cases)
    loads: np.ndarray | None = field(default=None, repr=False)  # the load vectors (n_dofs, m) that were solved

    @property
    def dofs(self) -> int:
        return int(self.u.shape[0])


EDGE_CONDITIONS = ("traction", "displacement")


def reinforcement_terms(reinforcement: Reinforcement | None, elastic: Elastic, thickness: float) -> tuple[float, float]:
    """(membrane stiffness of a ring's region over the web's, edge member EA over the web thickness in N/mm) for a
    reinforcement (None: (1, 0)). The web's own stiffness in this module is per mm of its thickness."""
    if reinforcement is None:
        return 1.0, 0.0
    e = elastic.reference_modulus
    return reinforcement.region_stiffness_ratio(e, thickness), reinforcement.edge_axial_stiffness(e, thickness)


def solve_panel(pm: PanelMesh, elastic: Elastic, remote: np.ndarray, edges: str,
                width: float, height: float, recover: bool = True, reinforcement: Reinforcement | None = None,
                thickness: float = 1.0, fields: list[BeamField | None] | None = None) -> PanelSolution:
    """Solve a panel mesh (``holeshape.mesh.PanelMesh``) for m uniform remote stress states.

    ``remote`` (m, 3): (sigma_x, sigma_y, tau_xy) MPa per load case. ``edges``: "traction" applies sigma . n on
    the panel edges (rigid-body modes removed by three point constraints, which carry no load because the
    tractions are self-equilibrated); "displacement" imposes the remote strain field on the panel edges.
    Mirror lines get zero normal displacement. One factorisation serves every load case. ``recover=False`` skips
    the cutout stress recovery (``cutout`` is then None: a prestress for the buckling check needs the field only).
    ``reinforcement`` (with the web ``thickness``, mm): a ring stiffens its elements of the mesh (same Poisson's
    ratio assumed; the recovered stresses are the web's), a flange adds an edge member along the cutout.
    ``fields``: per load case a stress field whose tractions load the edges instead of ``remote`` (a beam web's
    :class:`BeamField`; None keeps the uniform remote stress); traction edges only.
    """
    remote = np.atleast_2d(np.asarray(remote, dtype=float))
    mesh = pm.mesh
    basis = vector_basis(mesh)
    K = stiffness(basis, elastic)
    region_factor, edge_axial = reinforcement_terms(reinforcement, elastic, thickness)
    if region_factor != 1.0:
        from skfem import Basis

        region_basis = Basis(mesh, basis.elem, elements=pm.region_elements, intorder=QUAD_ORDER)
        K = K + (region_factor - 1.0) * stiffness(region_basis, elastic)
    if edge_axial > 0.0:
        K = K + edge_member_stiffness(basis, pm.cutout_facets, edge_axial)
    bnd = pm.boundaries
    edge_facets = np.concatenate([bnd[k] for k in ("left", "right", "bottom", "top")])
    fixed_parts = []
    if len(bnd["mirror_h"]):
        fixed_parts.append(basis.get_dofs(bnd["mirror_h"]).all("u^2"))
    if len(bnd["mirror_v"]):
        fixed_parts.append(basis.get_dofs(bnd["mirror_v"]).all("u^1"))
    cx, cy = width / 2, height / 2
    m = remote.shape[0]
    if edges == "displacement" and fields is not None and any(f is not None for f in fields):
        raise ValueError("stress-field (beam) load cases need traction edges")
    if edges == "displacement":
        ux_dofs = basis.get_dofs(edge_facets).all("u^1")
        uy_dofs = basis.get_dofs(edge_facets).all("u^2")
        ex, ey, exy = elastic.strain(*remote.T)
        gxy = 2.0 * exy
        X = basis.doflocs
        vx = ex[None, :] * (X[0, ux_dofs] - cx)[:, None] + 0.5 * gxy[None, :] * (X[1, ux_dofs] - cy)[:, None]
        vy = 0.5 * gxy[None, :] * (X[0, uy_dofs] - cx)[:, None] + ey[None, :] * (X[1, uy_dofs] - cy)[:, None]
        fixed_parts = [ux_dofs, uy_dofs] + fixed_parts
        fixed = np.concatenate(fixed_parts)
        values = np.concatenate([vx, vy] + [np.zeros((len(f), m)) for f in fixed_parts[2:]], axis=0)
        fixed, first = np.unique(fixed, return_index=True)
        values = values[first]
        loads = np.zeros((K.shape[0], m))
    elif edges == "traction":
        loads = panel_edge_loads(basis, mesh, bnd, remote, fields)
        fixed_parts += rigid_body_constraints(basis, pm, width, height)
        fixed = np.unique(np.concatenate(fixed_parts)) if fixed_parts else np.array([], dtype=np.int64)
        values = None
    else:
        raise ValueError(f"edges must be one of {EDGE_CONDITIONS}, got {edges!r}")
    system = FactorisedSystem(K, fixed)
    u = system.solve(loads, values)
    cut = boundary_stress(mesh, u, pm.cutout_facets, elastic, closed=pm.closed,
                          s_nodes=pm.cutout_s) if recover else None
    interior = boundary_stress(mesh, u, pm.interior_facets, elastic, closed=pm.closed,
                               s_nodes=pm.interior_s, elements=pm.interior_outside) \
        if recover and pm.interior_facets is not None else None
    members: tuple[BoundaryStress, ...] = ()
    if cut is not None and len(pm.members) > 1:
        members = (cut,) + tuple(boundary_stress(mesh, u, f, elastic, closed=True, s_nodes=s_m)
                                 for f, _, s_m, _ in pm.members[1:])
    return PanelSolution(basis=basis, u=u, cutout=cut, elastic=elastic, interior_edge=interior, members=members,
                         system=system, loads=loads)


def member_stress(bs: BoundaryStress, elastic: Elastic, member_modulus: float) -> np.ndarray:
    """Axial stress (n, m) MPa of an edge member bonded along ``bs``: its strain is the web's strain along the edge,
    t . eps . t with eps the web's compliance times its stress ((sigma_tt - nu sigma_nn) / E for an isotropic web)."""
    exx, eyy, exy = elastic.strain(*bs.sigma)
    tx, ty = bs.tangent[0][:, None], bs.tangent[1][:, None]
    return member_modulus * (exx * tx * tx + eyy * ty * ty + 2.0 * exy * tx * ty)


@dataclass(frozen=True)
class BeamField:
    """The beam-theory stress of a web panel (MPa; x, y panel coordinates in mm):
    sigma_x = M(x) (y - y_na) / I with M(x) = M0 + V (x - x_c), sigma_y = 0, tau_xy = C - V (y - y_na)^2 / (2 I).

    It satisfies equilibrium (d sigma_x / dx = V (y - y_na) / I = -d tau / dy) and compatibility (its Airy function
    (M0 + V x)(y - y_na)^3 / (6 I) - C x y is biharmonic), so an unperforated panel loaded on its edges by these
    tractions carries exactly this field: the end-loaded cantilever of Timoshenko & Goodier when C = V c^2 / (2 I)
    for a solid rectangular section of half-depth c. ``shear_constant`` C sets how the web carries the shear."""

    shear_force: float  # V, N
    moment: float  # M0 at x_c, N mm
    x_center: float
    neutral_axis: float
    inertia: float  # I of the whole section, mm^4
    shear_constant: float  # C, MPa

    @classmethod
    def of(cls, case: LoadCase, panel: Panel) -> BeamField:
        """The field of a beam load case (``study.LoadCase`` with shear_force / bending_moment) in ``panel``."""
        assert panel.section_inertia is not None  # the study parser requires it for beam load cases
        v, m, i = float(case.shear_force or 0.0), float(case.bending_moment or 0.0), float(panel.section_inertia)
        h, na, t = panel.height, panel.neutral_axis, panel.thickness
        if panel.shear_distribution == "parabolic":  # zero at the free top and bottom edges (solid section)
            c = v * (h / 2) ** 2 / (2 * i)
        else:  # the web carries the whole shear force: mean tau over the depth is V / (h t)
            mean_eta2 = ((h - na) ** 3 + na ** 3) / (3 * h)
            c = v / (h * t) + v * mean_eta2 / (2 * i)
        return cls(v, m, panel.width / 2, na, i, c)

    def __call__(self, x: Any, y: Any) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        x, y = np.asarray(x, dtype=float), np.asarray(y, dtype=float)
        eta = y - self.neutral_axis
        sx = (self.moment + self.shear_force * (x - self.x_center)) * eta / self.inertia
        txy = self.shear_constant - self.shear_force * eta ** 2 / (2 * self.inertia)
        return sx, np.zeros_like(sx), np.broadcast_to(txy, sx.shape)


def load_fields(panel: Panel, load_cases: Iterable[LoadCase]) -> list[BeamField | None]:
    """Per load case: its :class:`BeamField`, or None for a uniform remote stress."""
    return [BeamField.of(lc, panel) if lc.is_beam else None for lc in load_cases]


EDGE_NORMALS = {"left": (-1.0, 0.0), "right": (1.0, 0.0), "bottom": (0.0, -1.0), "top": (0.0, 1.0)}


def panel_edge_loads(basis: Any, mesh: Any, boundaries: dict[str, np.ndarray], remote: np.ndarray,
                     fields: list[BeamField | None] | None = None) -> np.ndarray:
    """Consistent P2 load vectors (n_dofs, m) of the load cases' tractions on the straight panel edges.

    Uniform remote stresses: on a straight edge of length L with its mid-side node at the midpoint, a constant
    traction q gives q L / 6 at each end node and 2 q L / 3 at the mid node (exact integration of the quadratic
    shape functions). A case with a stress field (``fields[j]``, e.g. a :class:`BeamField`) is integrated with
    3 Gauss points per edge (exact for the field's quadratic tractions against the quadratic shape functions).
    Written out instead of a facet basis because an element with a curved cutout edge and a panel edge (a thin
    ligament) defeats scikit-fem's inverse mapping on facets.
    """
    m = remote.shape[0]
    fields = fields or [None] * m
    loads = np.zeros((basis.N, m))
    sx, sy, txy = remote.T
    g, gw = np.polynomial.legendre.leggauss(3)
    xi, wq = 0.5 * (g + 1.0), 0.5 * gw
    shape = np.array([(1 - xi) * (1 - 2 * xi), xi * (2 * xi - 1), 4 * xi * (1 - xi)])  # end, end, mid; (3, q)
    for name, (nx, ny) in EDGE_NORMALS.items():
        f = boundaries[name]
        if len(f) == 0:
            continue
        v = mesh.facets[:, f]  # (2, k) vertex indices
        p0, p1 = mesh.p[:, v[0]], mesh.p[:, v[1]]
        length = np.linalg.norm(p1 - p0, axis=0)  # (k,)
        qx = np.outer(length, sx * nx + txy * ny)  # (k, m): traction x L
        qy = np.outer(length, txy * nx + sy * ny)
        node_dofs = [(basis.nodal_dofs[c, v[0]], basis.nodal_dofs[c, v[1]], basis.facet_dofs[c, f]) for c in (0, 1)]
        for comp, q in ((0, qx), (1, qy)):
            for dofs, w in zip(node_dofs[comp], (1 / 6, 1 / 6, 2 / 3)):
                uniform = np.where([fld is None for fld in fields], 1.0, 0.0)[None, :]
                np.add.at(loads, dofs, w * q * uniform)
        pts = p0[:, :, None] + xi[None, None, :] * (p1 - p0)[:, :, None]  # (2, k, q)
        for j, fld in enumerate(fields):
            if fld is None:
                continue
            fxx, fyy, fxy = (np.broadcast_to(c, pts[0].shape) for c in fld(pts[0], pts[1]))
            tx, ty = fxx * nx + fxy * ny, fxy * nx + fyy * ny  # (k, q)
            for comp, tr in ((0, tx), (1, ty)):
                for a, dofs in enumerate(node_dofs[comp]):
                    np.add.at(loads[:, j], dofs, length * np.einsum("kq,q,q->k", tr, shape[a], wq))
    return loads


def rigid_body_constraints(basis: Any, pm: PanelMesh, width: float, height: float) -> list[np.ndarray]:
    """DOFs that remove exactly the rigid-body modes a traction-loaded (reduced) panel still has."""
    p = pm.mesh.p[:, :pm.mesh.nvertices]
    region = pm.region

    def vertex(x: float, y: float) -> int:
        return int(np.argmin((p[0] - x) ** 2 + (p[1] - y) ** 2))

    nd = basis.nodal_dofs  # (2, n_vertices): ux, uy
    if region.mirror_h and region.mirror_v:
        return []
    if region.mirror_h:  # uy and rotation held by the mirror line; x translation free
        return [np.array([nd[0, vertex(0.0, region.y0)]])]
    if region.mirror_v:  # ux and rotation held; y translation free
        return [np.array([nd[1, vertex(region.x0, 0.0)]])]
    a, b = vertex(0.0, 0.0), vertex(width, 0.0)
    return [np.array([nd[0, a], nd[1, a], nd[1, b]])]
