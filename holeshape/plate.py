"""Plate forms for the stability layer: Kirchhoff bending and geometric (prestress) stiffness on Morley's plate
triangle, the flange's edge beam along the cutout, the panel-edge supports and the buckling eigenproblem.

Units: mm, N, MPa; w (deflection) in mm. Prestress at quadrature points (3, n_elements, n_qp) ordered
(sxx, syy, sxy). The model and the sign convention of the eigenproblem are described in :mod:`holeshape.stability`.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from holeshape.elastic import Elastic
from holeshape.errors import SolveError
from holeshape.study import EDGE_SUPPORTS

FACTOR_CEILING = 1000.0  # a case that needs more than this many times its load to buckle is reported as not buckling
QUICK_RESTARTS = 60  # Lanczos restarts before asking whether there is a factor below the ceiling at all
PLATE_QUAD_ORDER = 4  # Morley: second derivatives constant, gradients linear; prestress P1-P2 on a triangle


def _per_element(basis: Any, values: Any) -> np.ndarray:
    """A number or per-element values (n_elements,) spread over ``basis``'s quadrature points."""
    shape = np.asarray(basis.global_coordinates())[0].shape
    v = np.asarray(values, dtype=float)
    return np.ascontiguousarray(np.broadcast_to(v[:, None] if v.ndim == 1 else v, shape))


def bending_stiffness(basis: Any, elastic: Elastic, thickness: float, scale: float | np.ndarray = 1.0) -> Any:
    """Kirchhoff plate bending stiffness matrix, N mm (w in mm), of the material's bending law for a plate of
    ``thickness`` (D = E t^3 / (12 (1 - nu^2)) for an isotropic web); ``scale`` (a number or per element)
    multiplies it (a doubler ring's elements)."""
    from skfem import BilinearForm
    from skfem.helpers import dd

    @BilinearForm
    def form(u: Any, v: Any, w: Any) -> Any:
        return w["scale"] * elastic.bending_work(thickness, dd(u), dd(v))

    return form.assemble(basis, scale=_per_element(basis, scale if np.ndim(scale) else [scale] * basis.nelems))


def geometric_stiffness(basis: Any, prestress: np.ndarray, thickness: float | np.ndarray) -> Any:
    """t * integral(grad(u) . S . grad(v)) for the prestress ``prestress`` (3, n_elements, n_qp) MPa at ``basis``'s
    quadrature points (or (3,) for a uniform state); ``thickness`` a number or per element (mm): t S is the
    membrane force per unit length."""
    from skfem import BilinearForm
    from skfem.helpers import grad

    @BilinearForm
    def form(u: Any, v: Any, w: Any) -> Any:
        gu, gv = grad(u), grad(v)
        return w["t"] * (w["sxx"] * gu[0] * gv[0] + w["syy"] * gu[1] * gv[1]
                         + w["sxy"] * (gu[0] * gv[1] + gu[1] * gv[0]))

    shape = np.asarray(basis.global_coordinates())[0].shape
    s = [np.ascontiguousarray(np.broadcast_to(np.asarray(prestress[i], dtype=float), shape)) for i in range(3)]
    t = _per_element(basis, thickness if np.ndim(thickness) else [thickness] * basis.nelems)
    return form.assemble(basis, sxx=s[0], syy=s[1], sxy=s[2], t=t)


def edge_beam_matrices(pb: Any, chain: np.ndarray, closed: bool, bending: float,
                       axial_force: list[np.ndarray] | None = None) -> tuple[Any, list[Any]]:
    """A beam along a chain of plate vertices (a flange standing on the cutout edge): its bending stiffness
    integral(EI w_ss v_ss ds) and, per load case, its geometric stiffness integral(P w_s v_s ds) for the axial force
    P (N per segment of the chain, tension positive). ``bending`` EI in N mm^2; ``chain`` vertex indices in order
    along the edge (``closed``: the last joins the first).

    Discretised on the vertex deflections along the edge (central second differences on the uneven spacing,
    second order): Morley's own curvature is constant in an element and blind to the kinks between elements, so a
    beam on it would carry no bending (measured: an infinitely stiff edge beam left the free-edge plate at
    k = 1.46 instead of the simply supported 4). Returns (K_beam, [K_G beam per case])."""
    from scipy.sparse import coo_matrix, diags

    x = pb.mesh.p[:, chain]
    nxt = np.roll(np.arange(len(chain)), -1)
    h = np.linalg.norm(x[:, nxt] - x, axis=0)  # segment i joins chain[i] and chain[i + 1]
    if not closed:
        h = h[:-1]
    n_seg, n_v = len(h), len(chain)
    seg = np.arange(n_seg)
    dofs = pb.nodal_dofs[0, chain]
    # slope on each segment: (w[i + 1] - w[i]) / h[i]
    G = coo_matrix((np.concatenate([-1.0 / h, 1.0 / h]), (np.concatenate([seg, seg]),
                                                          np.concatenate([seg, (seg + 1) % n_v]))),
                   shape=(n_seg, n_v)).tocsr()
    # curvature at each vertex with a segment on both sides: (slope after - slope before) / mean spacing
    mids = np.arange(n_v) if closed else np.arange(1, n_v - 1)
    before, after = (mids - 1) % n_seg, mids % n_seg if closed else mids
    ell = 0.5 * (h[before] + h[after])
    C = coo_matrix((np.concatenate([np.full(len(mids), -1.0), np.ones(len(mids))]) / np.concatenate([ell, ell]),
                    (np.concatenate([np.arange(len(mids))] * 2), np.concatenate([before, after]))),
                   shape=(len(mids), n_seg)).tocsr() @ G
    P = coo_matrix((np.ones(n_v), (dofs, np.arange(n_v))), shape=(pb.N, n_v)).tocsr()  # vertex -> plate DOF
    K = P @ (C.T @ diags(bending * ell) @ C) @ P.T
    KG = [P @ (G.T @ diags(np.asarray(f, dtype=float) * h) @ G) @ P.T for f in (axial_force or [])]
    return K.tocsr(), [k.tocsr() for k in KG]


def plate_basis(p: np.ndarray, t: np.ndarray) -> Any:
    """Morley basis on the straight-sided triangles (p (2, n) vertices, t (3, m)). A new element object per mesh:
    scikit-fem's global elements cache per-mesh data."""
    from skfem import Basis, ElementTriMorley, MeshTri1

    return Basis(MeshTri1(np.ascontiguousarray(p), np.ascontiguousarray(t)), ElementTriMorley(),
                 intorder=PLATE_QUAD_ORDER)


def supported_dofs(basis: Any, edge_facets: np.ndarray, edge_support: str) -> np.ndarray:
    """DOFs held on the panel edges: the deflection (simply supported), and the normal slope too (clamped)."""
    if edge_support == "simply_supported":
        return basis.get_dofs(edge_facets).all("u")
    if edge_support == "clamped":
        return basis.get_dofs(edge_facets).all()
    raise ValueError(f"edge_support must be one of {EDGE_SUPPORTS}, got {edge_support!r}")


def lowest_factors(K: Any, KG_cases: list[Any], fixed: np.ndarray, n_modes: int = 1,
                   compression: list[bool] | None = None) -> list[list[tuple[float, np.ndarray]]]:
    """For each geometric stiffness: the ``n_modes`` smallest positive load factors with their mode vectors (full
    DOF vectors), as [(factor, mode), ...]; an empty list where no factor lies below FACTOR_CEILING. K is factorised
    once for every case. ``compression[j]`` False says the prestress of case j has no compressive principal stress
    anywhere (then it cannot buckle and nothing is solved)."""
    compression = [True] * len(KG_cases) if compression is None else compression
    from scipy.sparse.linalg import ArpackNoConvergence, LinearOperator, eigsh, splu

    n = K.shape[0]
    mask = np.ones(n, dtype=bool)
    mask[fixed] = False
    free = np.flatnonzero(mask)
    Kf = K.tocsr()[free][:, free].tocsc()
    try:
        lu = splu(Kf, permc_spec="MMD_AT_PLUS_A", diag_pivot_thresh=0.0, options={"SymmetricMode": True})
    except RuntimeError as err:
        raise SolveError(f"the plate bending stiffness is singular (the panel is not supported): {err}") from err
    Minv = LinearOperator(Kf.shape, matvec=lu.solve, dtype=float)
    out: list[list[tuple[float, np.ndarray]]] = []
    k = min(max(1, n_modes), len(free) - 2)
    for KG, compressed in zip(KG_cases, compression):
        G = (-KG.tocsr())[free][:, free]
        if not compressed:
            out.append([])
            continue
        try:
            mu, vec = eigsh(G, k=k, M=Kf, Minv=Minv, which="LA", ncv=max(2 * k + 1, 20), maxiter=QUICK_RESTARTS)
        except ArpackNoConvergence:
            # Lanczos stalls when no eigenvalue stands clear of the cluster of mu near zero (mostly tension): ask
            # whether any factor lies below the ceiling at all before iterating longer
            if not _buckles_below(Kf, G, FACTOR_CEILING):
                out.append([])
                continue
            try:
                mu, vec = eigsh(G, k=k, M=Kf, Minv=Minv, which="LA", ncv=max(2 * k + 1, 40), maxiter=20000)
            except ArpackNoConvergence as err:
                raise SolveError("the buckling eigenvalue solver did not converge") from err
        order = np.argsort(-mu)
        rows = []
        for i in order:
            if mu[i] > 1.0 / FACTOR_CEILING:
                full = np.zeros(n)
                full[free] = vec[:, i]
                rows.append((float(1.0 / mu[i]), full))
        out.append(rows)
    return out


def has_compression(prestress: np.ndarray, relative: float = 1e-9) -> bool:
    """Whether the smaller principal stress of ``prestress`` (3, ...) is negative anywhere (beyond round-off)."""
    from holeshape.solve import principal_stresses

    smin = principal_stresses(prestress[0], prestress[1], prestress[2])[1]
    scale = float(np.max(np.abs(prestress))) or 1.0
    return bool(np.min(smin) < -relative * scale)


def _buckles_below(Kf: Any, G: Any, ceiling: float) -> bool:
    """Whether some load factor lies in (0, ceiling): then K - ceiling * G (with G = -K_G) is no longer positive
    definite. Counted by Sylvester's law of inertia from the pivots of a symmetric, diagonally pivoted
    factorisation (a Sturm-sequence check), so no eigenvalue iteration is spent on a case that cannot buckle."""
    from scipy.sparse.linalg import splu

    A = (Kf - ceiling * G).tocsc()
    try:
        lu = splu(A, permc_spec="MMD_AT_PLUS_A", diag_pivot_thresh=0.0, options={"SymmetricMode": True})
    except RuntimeError:  # an exactly singular shifted matrix: a factor at the ceiling itself
        return True
    return bool(np.any(lu.U.diagonal() <= 0.0))
