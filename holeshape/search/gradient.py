"""Gradient refinement of a free-form (spline) outline: sequential linear programming on the peak stress.

The peak is the largest of the stresses at the boundary's sample points, each a smooth function of the radii, so
the search is a minimax: minimise t subject to sigma_i(x) <= t at every sample point, with the geometric rows
(ligaments, access envelope, smallest radius, area limits) kept <= 0. Each iteration

1. evaluates the current design in full (a trial like any other: two mesh levels and an error estimate);
2. probes every searched parameter by a forward finite difference on that design's own mesh moved with the
   boundary (same elements and node numbering, so the difference carries no remeshing noise; each probe is a
   recorded trial that counts towards the budget);
3. solves the linear programme of the linearised sample stresses and geometric rows within a trust region (box
   in the unit cube of the design space; an elastic slack keeps it solvable), and
4. evaluates the step in full: kept when the peak falls (and every constraint holds), with the trust region grown
   or shrunk by the ratio of the actual to the predicted fall.

Measured against the sampler and simplex on the 12- and 24-radius harmonic-hole studies in benchmarks/search.py.
Applies to one spline opening without reinforcement searched for the lowest peak; a constraint known only after
the solve (the buckling factor, the margin) is not linearised: a step that breaks it is refused like any other.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass, replace
from typing import TYPE_CHECKING

import numpy as np

from holeshape.errors import HoleshapeError
from holeshape.geometry import Cutout, Spline
from holeshape.search.trial import TrialRecord
from holeshape.study import Panel, Study

if TYPE_CHECKING:
    from holeshape.mesh import PanelMesh
    from holeshape.search.runner import Objective
    from holeshape.search.space import DesignSpace

FD_STEP = 2.0e-3  # forward-difference step in the unit cube (0.05 mm on a 24 mm radius range)
TRUST_START = 0.08  # first trust-region half-width in the unit cube
TRUST_MIN = 2.0e-3  # a chain whose trust region falls below this has converged
TRUST_MAX = 0.25
CONVERGED_GAIN = 1.0e-4  # a predicted fall below this share of the peak is under the mesh's noise: converged
RESTART_SPREAD = 0.01  # a converged chain restarts from the best design moved this much (unit cube, per axis)
STRESS_ROWS_FROM = 0.6  # sample points above this share of the peak enter the linear programme
GEOMETRY_ROWS_FROM = -0.5  # geometric rows closer than this to their limit (in outline sizes) enter it
PENALTY = 50.0  # weight of the elastic slack on the geometric rows against the peak (scaled to 1)
PROBE_NOTE = "gradient probe: the last design's mesh moved with the boundary, one mesh level, not a candidate"
PROBE_REASON = "a gradient probe, not a candidate (one mesh level, no error estimate, solved requirements not checked)"


def not_applicable(study: Study) -> str | None:
    """Why the gradient refinement cannot run on ``study`` (None when it can)."""
    spec = study.cutout
    if spec.shape != "spline":
        return f"it refines free-form outlines (shape = \"spline\"), not shape = {spec.shape!r}"
    if spec.reinforced:
        return "a reinforced opening is searched by the sampler"
    if spec.several:
        return "several openings are searched by the sampler"
    from holeshape.goals import GOALS

    if not GOALS[study.search.goal].smooth:
        return f"it lowers the peak stress; search.goal = {study.search.goal!r} is searched by the sampler"
    if not _searched_radii(study):
        return "no radius of the spline is searched"
    return None


def _searched_radii(study: Study) -> int:
    return sum(1 for p in study.cutout.ranges if p.part == "shape" and p.name == "radii")


def chosen_method(study: Study) -> str:
    """The method a study's search uses: ``auto`` picks the gradient refinement for a spline of six or more
    searched radii when it applies (measured: the sampler stalls there), else the sampler and simplex."""
    m = study.search.method
    if m != "auto":
        return m
    return "gradient" if _searched_radii(study) >= 6 and not_applicable(study) is None else "sampler_simplex"


# --- the moved mesh -------------------------------------------------------------------------------------------
def blend_length(cutout: Cutout, panel: Panel) -> float:
    """How far (mm) from the outline the moved mesh follows the boundary: two outline sizes, but never past
    0.9 of the smallest distance to a panel edge (the edges do not move)."""
    gap = min(cutout.edge_gaps(panel.width, panel.height).values())
    return max(1e-6, min(2.0 * math.sqrt(cutout.area), 0.9 * gap))


def moved_mesh(pm: PanelMesh, base: Cutout, new: Cutout, panel: Panel) -> PanelMesh:
    """The panel mesh of ``base`` with its nodes moved so the cutout edge lies on ``new`` (both splines): the
    node at local polar angle phi on the edge goes to ``new``'s point of the same parameter, and a node off the
    edge by the same displacement times a smooth weight falling from 1 on the edge to 0 at
    :func:`blend_length`. Same elements and numbering."""
    mesh = pm.mesh
    X = mesh.doflocs
    c, s = math.cos(math.radians(base.rotation)), math.sin(math.radians(base.rotation))
    dx, dy = X[0] - base.center[0], X[1] - base.center[1]
    lx, ly = c * dx + s * dy, -s * dx + c * dy
    phi = np.mod(np.arctan2(ly, lx), 2 * math.pi)
    rho = np.hypot(lx, ly)
    assert isinstance(base.shape, Spline)  # the refinement moves free-form outlines only
    r_old = base.shape.radius_at(phi)
    u = np.clip((rho - r_old) / blend_length(base, panel), 0.0, 1.0)
    w = (1.0 - u) ** 2 * (1.0 + 2.0 * u)
    moved = X + w * (new.xy(phi) - base.xy(phi))
    s_nodes = new.sampling.arclength_at_t(pm.cutout_t)
    return replace(pm, mesh=replace(mesh, doflocs=moved), cutout_s=s_nodes - s_nodes[0])


def sample_stress(pm: PanelMesh, study: Study, cutout: Cutout) -> tuple[np.ndarray, float]:
    """(stress of the study's measure at the cutout's sample points, (n, m) MPa over the load cases; the peak
    refined between them) on the panel mesh ``pm``."""
    from holeshape.evaluate import measure_values
    from holeshape.solve import load_fields, peak_along, solve_panel

    panel = study.panel
    remote = np.array([lc.components for lc in study.load_cases])
    sol = solve_panel(pm, study.material.elastic, remote, panel.edges,
                      panel.width, panel.height, thickness=panel.thickness,
                      fields=load_fields(panel, study.load_cases))
    assert sol.cutout is not None  # solved with the cutout stress recovered
    vals = measure_values(sol.cutout, study.measure.stress)
    peak = max(peak_along(sol.cutout.s, v, pm.closed)[0] for v in vals.T)
    return vals, float(peak)


# --- the geometric rows ---------------------------------------------------------------------------------------
def geometry_rows(cutout: Cutout, study: Study) -> np.ndarray:
    """The geometric requirements as smooth rows (<= 0 met) for the linearisation: every geometric check's
    ``linear_rows`` (the ligament of every outline point to every panel edge, the curvature against the smallest
    radius, the access envelope's points inside the outline, the area limits). Smooth in the radii, unlike the single
    worst value of each requirement."""
    from holeshape.checks import registered

    rows = [cls.linear_rows(study, cutout) for cls in registered("geometry") if cls.applies(study)]
    return np.concatenate([np.atleast_1d(r) for r in rows if r is not None] or [np.zeros(0)])


# --- the linear programme -------------------------------------------------------------------------------------
def lp_step(stress: np.ndarray, j_stress: np.ndarray, geo: np.ndarray, j_geo: np.ndarray, x: np.ndarray,
            delta: float) -> tuple[np.ndarray, float]:
    """The step d (|d_i| <= delta, x + d in the unit cube) minimising max_i(stress_i + j_stress_i . d) +
    PENALTY * max(0, max_k(geo_k + j_geo_k . d)); returns (d, the predicted value of that merit)."""
    from scipy.optimize import linprog

    n = x.size
    c = np.zeros(n + 2)
    c[n], c[n + 1] = 1.0, PENALTY
    a_s = np.hstack([j_stress, -np.ones((len(stress), 1)), np.zeros((len(stress), 1))])
    a_g = np.hstack([j_geo, np.zeros((len(geo), 1)), -np.ones((len(geo), 1))])
    bounds = [(max(-delta, -xi), min(delta, 1.0 - xi)) for xi in x] + [(None, None), (0.0, None)]
    res = linprog(c, A_ub=np.vstack([a_s, a_g]), b_ub=-np.concatenate([stress, geo]), bounds=bounds,
                  method="highs")
    if res.status != 0:
        return np.zeros(n), merit(stress, geo)
    return res.x[:n], float(res.fun)


def merit(stress: np.ndarray, geo: np.ndarray) -> float:
    return float(np.max(stress)) + PENALTY * max(0.0, float(np.max(geo)) if len(geo) else 0.0)


# --- the refinement -------------------------------------------------------------------------------------------
@dataclass(frozen=True)
class Point:
    """A design fully evaluated: its unit coordinates, parameters, record, mesh and sample stresses."""

    x: np.ndarray
    params: dict[str, float]
    rec: TrialRecord
    cutout: Cutout | None  # None (and no mesh or stresses) for a design that was not solved
    pm: PanelMesh | None
    stress: np.ndarray | None  # (n, m) MPa
    peak: float  # the objective value (refined peak, MPa)

    @property
    def acceptable(self) -> bool:
        return self.rec.acceptable


class Refinement:
    """Sequential linear programming from a feasible design until ``record`` says the budget is spent.

    ``objective``: :class:`holeshape.search.runner.Objective`; ``record(rec) -> bool`` stores an evaluation as a
    finished trial and returns False once the study holds its budget (then the chain stops); ``names``: the
    searched dimensions, in order. Chains restart from the best design with a smaller trust region once they
    converge, so the whole budget is used."""

    def __init__(self, study: Study, space: DesignSpace, objective: Objective, record: Callable[[TrialRecord], bool],
                 names: list[str], seed: int = 0) -> None:
        self.study, self.space, self.objective, self.record = study, space, objective, record
        self.names = names
        self.rng = np.random.default_rng(seed)
        self.best: Point | None = None
        self.chains = 0

    # evaluations -------------------------------------------------------------------------------------------------
    def _params(self, x: np.ndarray, base: dict[str, float]) -> dict[str, float]:
        p = dict(base)
        p.update(self.space.from_unit(list(np.clip(x, 0.0, 1.0)), self.names))
        return p

    def full(self, x: np.ndarray, base_params: dict[str, float]) -> Point | None:
        """Evaluate a design in full and record it; None when the budget is spent."""
        params = self._params(x, base_params)
        rec, ev = self.objective.evaluate(params)
        if not self.record(rec):
            return None
        if ev is None:
            return Point(x, params, rec, None, None, None, math.inf)
        cutout = self.space.decode(params)
        from holeshape.evaluate import measure_values

        fields = ev.fields
        assert fields is not None and fields.solution.cutout is not None  # a fresh evaluation keeps its fields
        stress = measure_values(fields.solution.cutout, self.study.measure.stress)
        pt = Point(np.asarray(x, float), params, rec, cutout, fields.panel_mesh, stress, rec.sampler_value)
        if pt.acceptable and (self.best is None or pt.peak < self.best.peak):
            self.best = pt
        return pt

    def probe(self, base: Point, x: np.ndarray) -> tuple[TrialRecord, np.ndarray | None] | None:
        """One finite-difference probe on ``base``'s moved mesh, recorded; (record, sample stresses or None when
        the probe is infeasible or failed), or None when the budget is spent."""
        from holeshape.checks import assess

        assert base.pm is not None and base.cutout is not None  # probes are made round a solved design
        params = self._params(x, base.params)
        note = {"probe": True, "note": PROBE_NOTE}
        stress = None
        try:
            cutout = self.space.decode(params)
            geo = assess(self.study, cutout, accuracy="draft", purpose="search")
            attrs = {**note, "area_mm2": cutout.area, "min_radius_mm": cutout.min_radius}
            if not geo.meets_every_requirement:
                rec = TrialRecord.refused(params, geo.constraint_values(), "; ".join(geo.reasons()), **attrs)
            else:
                stress, peak = sample_stress(moved_mesh(base.pm, base.cutout, cutout, self.study.panel),
                                             self.study, cutout)
                rec = TrialRecord(params, "complete", value=peak, constraints=geo.constraint_values(),
                                  attrs={**attrs, "peak_stress_mpa": peak, "reason": PROBE_REASON})
        except HoleshapeError as err:  # geometry, mesh and solve errors belong to the design
            rec = replace(TrialRecord.failure(params, f"{type(err).__name__}: {' '.join(str(err).split())}", **note),
                          feasible=False)
        if not self.record(rec):
            return None
        return rec, stress

    # the chain ---------------------------------------------------------------------------------------------------
    def gradients(self, base: Point) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray] | None:
        """(stress rows, their Jacobian, geometric rows and their Jacobian) at ``base``, scaled by its peak."""
        assert base.stress is not None and base.cutout is not None  # a solved design
        n = len(self.names)
        ref = float(base.stress.max())
        s0 = base.stress.ravel() / ref
        g0 = geometry_rows(base.cutout, self.study)
        js = np.zeros((s0.size, n))
        jg = np.zeros((g0.size, n))
        for i in range(n):
            for sign in (1.0, -1.0) if base.x[i] + FD_STEP <= 1.0 else (-1.0, 1.0):
                x = base.x.copy()
                x[i] += sign * FD_STEP
                if not 0.0 <= x[i] <= 1.0:
                    continue
                out = self.probe(base, x)
                if out is None:
                    return None
                rec, stress = out
                if stress is None:
                    continue
                js[:, i] = (stress.ravel() / ref - s0) / (sign * FD_STEP)
                cut = self.space.decode(rec.params)
                jg[:, i] = (geometry_rows(cut, self.study) - g0) / (sign * FD_STEP)
                break
        keep_s = s0 >= STRESS_ROWS_FROM * s0.max()
        keep_g = g0 >= GEOMETRY_ROWS_FROM
        return s0[keep_s], js[keep_s], g0[keep_g], jg[keep_g]

    def run(self, start: dict[str, float]) -> None:
        """Refine from the parameters ``start`` (a feasible design) until the budget is spent."""
        x0 = np.array(self.space.to_unit(start, self.names))
        delta = TRUST_START
        base = self.full(x0, start)
        while base is not None:
            if not base.acceptable or base.stress is None:
                return
            lin = self.gradients(base)
            if lin is None:
                return
            s0, js, g0, jg = lin
            ref = float(base.stress.max())
            cur = merit(s0, g0)
            while True:
                d, predicted = lp_step(s0, js, g0, jg, base.x, delta)
                gain_pred = cur - predicted
                if gain_pred <= CONVERGED_GAIN or delta < TRUST_MIN:
                    base = self.restart()
                    delta = TRUST_START / 2 ** min(self.chains, 3)
                    break
                cand = self.full(base.x + d, base.params)
                if cand is None:
                    return
                gain = (base.peak - cand.peak) / ref
                step = float(np.max(np.abs(d)))
                if cand.acceptable and gain > 0.0:
                    ratio = gain / gain_pred
                    if ratio > 0.75 and step >= 0.9 * delta:
                        delta = min(TRUST_MAX, 2.0 * delta)
                    elif ratio < 0.25:
                        delta = 0.5 * step
                    base = cand
                    break
                delta = 0.5 * step

    def restart(self) -> Point | None:
        """A converged chain: start again from the best design moved a little at random (the same design again
        would end where it did), until a feasible start is found or the budget is spent."""
        self.chains += 1
        best = self.best
        while best is not None:
            x = np.clip(best.x + self.rng.normal(0.0, RESTART_SPREAD, best.x.size), 0.0, 1.0)
            pt = self.full(x, best.params)
            if pt is None or pt.acceptable:
                return pt
        return None
