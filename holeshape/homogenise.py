"""The effective membrane stiffness of the perforated panel, for the global model that sees the web as a plain
sheet: the panel's mean strain under unit mean stresses (traction edges) or its mean stress under unit mean
strains (displacement edges), from the factorised stiffness of a design's own finest mesh (back-substitutions;
a mirror model's shear state needs the antisymmetric mirror conditions, one more factorisation of the same matrix).

Means are the exact homogenisation integrals: the mean strain of the region is (1/A) times the boundary integral of
sym(u n) over its outer rectangle (panel edges and mirror lines; the openings' free edges included through the gross
area A), and its mean stress (1/A) times the sum of the edge reactions times their positions (the average-stress
theorem). Units: MPa, mm; engineering shear strain; per mm of thickness like the solve.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np

from holeshape.solve import FactorisedSystem, panel_edge_loads

if TYPE_CHECKING:
    from holeshape.mesh import PanelMesh
    from holeshape.solve import PanelSolution
    from holeshape.study import Panel

EDGE_NORMALS = {"left": (-1.0, 0.0), "right": (1.0, 0.0), "bottom": (0.0, -1.0), "top": (0.0, 1.0),
                "mirror_h": (0.0, -1.0), "mirror_v": (-1.0, 0.0)}


def _components(basis: Any) -> np.ndarray:
    """The displacement component (0: x, 1: y) of every DOF of the P2 vector basis."""
    comp = np.empty(basis.N, dtype=int)
    for c in (0, 1):
        comp[basis.nodal_dofs[c]] = c
        comp[basis.facet_dofs[c]] = c
    return comp


def mean_strain(pm: PanelMesh, basis: Any, u: np.ndarray) -> np.ndarray:
    """(3, m) mean strains (exx, eyy, gamma_xy) of the modelled region for displacements u (n_dofs, m)."""
    mesh, region = pm.mesh, pm.region
    area = (region.width - region.x0) * (region.height - region.y0)
    integral = np.zeros((2, 2, u.shape[1]))  # integral of u_i n_j
    for name, (nx, ny) in EDGE_NORMALS.items():
        f = pm.boundaries[name]
        if len(f) == 0:
            continue
        v = mesh.facets[:, f]
        length = np.linalg.norm(mesh.p[:, v[1]] - mesh.p[:, v[0]], axis=0)
        for i in (0, 1):  # exact for P2 on a straight facet: L (u_a / 6 + u_b / 6 + 2 u_mid / 3)
            ui = (u[basis.nodal_dofs[i, v[0]]] + u[basis.nodal_dofs[i, v[1]]]) / 6.0 \
                + 2.0 * u[basis.facet_dofs[i, f]] / 3.0
            s = length @ ui
            integral[i, 0] += nx * s
            integral[i, 1] += ny * s
    e = integral / area
    return np.array([e[0, 0], e[1, 1], e[0, 1] + e[1, 0]])


def _antisymmetric_fixed(basis: Any, pm: PanelMesh, displacement_edges: bool) -> np.ndarray:
    """The fixed DOFs of a mirror model under shear (antisymmetric about the mirror lines: u_x = 0 on y = cy,
    u_y = 0 on x = cx), with the panel edges held (displacement edges) or the rigid motions the mirror lines leave
    free removed (traction edges: a rotation, and a translation along a single mirror line)."""
    bnd, region = pm.boundaries, pm.region
    parts = []
    if len(bnd["mirror_h"]):
        parts.append(basis.get_dofs(bnd["mirror_h"]).all("u^1"))
    if len(bnd["mirror_v"]):
        parts.append(basis.get_dofs(bnd["mirror_v"]).all("u^2"))
    if displacement_edges:
        edges = np.concatenate([bnd[k] for k in ("left", "right", "bottom", "top")])
        parts.append(basis.get_dofs(edges).all())
    else:
        p = pm.mesh.p[:, :pm.mesh.nvertices]
        nd = basis.nodal_dofs

        def vertex(x: float, y: float) -> int:
            return int(np.argmin((p[0] - x) ** 2 + (p[1] - y) ** 2))

        if region.mirror_h and region.mirror_v:  # both mirror lines hold the translations: the rotation is left
            parts.append(np.array([nd[1, vertex(region.width, region.y0)]]))
        elif region.mirror_h:  # u_y at both ends of the horizontal mirror line: its translation and the rotation
            parts.append(np.array([nd[1, vertex(0.0, region.y0)], nd[1, vertex(region.width, region.y0)]]))
        else:  # a vertical mirror line only: u_x at both of its ends
            parts.append(np.array([nd[0, vertex(region.x0, 0.0)], nd[0, vertex(region.x0, region.height)]]))
    return np.unique(np.concatenate(parts))


def effective_compliance(pm: PanelMesh, sol: PanelSolution, panel: Panel) -> np.ndarray:
    """The 3 x 3 compliance (1/MPa; strains exx, eyy, gamma_xy against mean stresses sxx, syy, txy) of the
    perforated panel of ``pm`` with the stiffness factorised in ``sol`` (a :class:`~holeshape.solve.PanelSolution`
    of the same mesh, its edge condition ``panel.edges``)."""
    basis, system = sol.basis, sol.system
    assert system is not None  # solve_panel keeps its factorised stiffness
    region = pm.region
    mirrored = region.mirror_h or region.mirror_v
    cx, cy = panel.width / 2, panel.height / 2
    if panel.edges == "traction":
        loads = panel_edge_loads(basis, pm.mesh, pm.boundaries, np.eye(3))
        u = np.zeros((basis.N, 3))
        u[:, :2] = system.solve(loads[:, :2])
        if mirrored:
            u[:, 2:] = FactorisedSystem(system.K, _antisymmetric_fixed(basis, pm, False)).solve(loads[:, 2:])
        else:
            u[:, 2:] = system.solve(loads[:, 2:])
        return _unfolded(mean_strain(pm, basis, u), mirrored)
    # displacement edges: unit mean strains imposed, the mean stress from the reactions
    comp = _components(basis)
    X = basis.doflocs

    def field(fixed: np.ndarray, k: int) -> np.ndarray:
        """The homogeneous displacement of unit strain k at the DOFs ``fixed`` (exx, eyy, gamma_xy = 1)."""
        exx, eyy, gxy = np.eye(3)[k]
        dx, dy = X[0, fixed] - cx, X[1, fixed] - cy
        ux, uy = exx * dx + 0.5 * gxy * dy, 0.5 * gxy * dx + eyy * dy
        return np.where(comp[fixed] == 0, ux, uy)

    stress = np.zeros((3, 3))
    for k in range(3):
        sys_k = system
        if k == 2 and mirrored:
            sys_k = FactorisedSystem(system.K, _antisymmetric_fixed(basis, pm, True))
        fixed = sys_k.fixed
        u = sys_k.solve(np.zeros((basis.N, 1)), field(fixed, k)[:, None])[:, 0]
        r = (system.K @ u)[fixed]  # reactions at the held DOFs (force per mm of thickness)
        xf, yf = X[0, fixed] - cx, X[1, fixed] - cy
        rx, ry = np.where(comp[fixed] == 0, r, 0.0), np.where(comp[fixed] == 1, r, 0.0)
        area = (region.width - region.x0) * (region.height - region.y0)
        sxx, syy = rx @ xf / area, ry @ yf / area
        sxy = 0.5 * (rx @ yf + ry @ xf) / area
        stress[:, k] = (sxx, syy, sxy)
    return np.linalg.inv(_unfolded(stress, mirrored))


def _unfolded(m: np.ndarray, mirrored: bool) -> np.ndarray:
    """The whole panel's means from a mirror model's: over the whole panel the shear of a symmetric state and the
    normal components of the antisymmetric (shear) state are odd about the mirror lines and average to zero, which
    the modelled part alone does not show."""
    if not mirrored:
        return m
    out = m.copy()
    out[2, :2] = 0.0
    out[:2, 2] = 0.0
    return out
