"""Verified plane-stress evaluation of one cutout design: the peak boundary stress for every load case and at every
place a peak is looked for, with an error estimate.

The design is meshed and solved at two mesh levels of one family (the second with every element size doubled);
the change in peak between them is the error evidence reported with the peak. Half or quarter models are used
when the cutout, its position and every load case are mirror symmetric (exactly, not approximately).
Everything else said about a design (margins, net section, buckling, stiffness, geometry) is a check on the seam
of :mod:`holeshape.checks`, which reads this evaluation and its fields. Units: mm, N, MPa.
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass, field, replace
from typing import TYPE_CHECKING, Any

import numpy as np

from holeshape.errors import SolveError
from holeshape.geometry import Cutout
from holeshape.geometry.reinforcement import CUTOUT_EDGE, DOUBLER, FLANGE, RING_EDGE  # noqa: F401 - location names
from holeshape.mesh import MeshSpec, Region, mesh_panel
from holeshape.solve import (
    BoundaryStress,
    PanelSolution,
    load_fields,
    member_stress,
    peak_along,
    principal_stresses,
    solve_panel,
    von_mises,
)
from holeshape.study import ACCURACIES, LoadCase, Material, Measure, Panel

if TYPE_CHECKING:
    from holeshape.geometry import Reinforcement
    from holeshape.mesh import PanelMesh
    from holeshape.solve import BeamField


@dataclass(frozen=True)
class AccuracyLevel:
    """Mesh family and the error the level aims for (percent of the peak)."""

    name: str
    spec: MeshSpec
    target_pct: float
    floor_pct: float  # measured scatter of the peak between unstructured meshes of this density, percent


# Measured on Kirsch and Inglis cases (benchmarks/speed.py prints the table): the boundary ratio (local radius /
# element size) drives the peak error; far-field growth 0.3 per mm costs a few 0.01 % and saves most of the elements.
# ``target_pct`` bounds the *estimate*, which is conservative: the measured true error of "standard" is <= 0.07 %.
ACCURACY_LEVELS = {
    "draft": AccuracyLevel("draft", MeshSpec(boundary_ratio=12.0, growth=0.3, max_fraction=0.15, min_segments=40),
                           2.0, 0.1),
    "standard": AccuracyLevel("standard", MeshSpec(boundary_ratio=32.0, growth=0.3, max_fraction=0.1,
                                                   min_segments=96), 0.5, 0.03),
    "fine": AccuracyLevel("fine", MeshSpec(boundary_ratio=48.0, growth=0.2, max_fraction=0.08, min_segments=144),
                          0.2, 0.03),
}
# The floor is added to the level-to-level change so the estimate stays an upper bound where the change happens
# to be tiny (two unstructured meshes can agree by chance). Measured true errors (benchmarks/speed.py): draft up to
# 0.07 %, standard and fine up to 0.03 % on Kirsch and Inglis cases up to a/b = 8.
assert tuple(ACCURACY_LEVELS) == ACCURACIES  # one list of level names (study.ACCURACIES), in order
UNRESOLVED_FACTOR = 10.0  # an estimate this many times the level's target is an error, not a number
MAX_REFINEMENTS = 2  # extra levels (each 1.5x finer) tried when the estimate exceeds the level's target

KT_REFERENCES = {
    "von_mises": "von Mises stress of the remote stress state",
    "max_principal": "largest magnitude of the remote principal stresses",
    "hoop": "largest magnitude of the remote principal stresses",
}
STRESS_LABELS = {"von_mises": "von Mises stress", "max_principal": "max principal stress",
                 "hoop": "hoop stress magnitude"}


BEAM_KT_REFERENCE = ("the beam-theory stress at the opening's centre without the opening ({measure}; where that is"
                     " below 1 % of the largest beam-theory stress in the web, that largest one)")


def reference_stress(case: LoadCase, stress: str, field: BeamField | None = None,
                     center: tuple[float, float] | None = None, panel: Panel | None = None) -> float:
    """The stress Kt is measured against: the remote stress state, or for a beam case (``field``) the beam-theory
    stress at the opening's ``center`` (the largest in the web where that is below 1 % of it)."""
    def measure(sxx: Any, syy: Any, sxy: Any) -> np.ndarray:
        if stress == "von_mises":
            return np.asarray(von_mises(sxx, syy, sxy))
        s1, s2 = principal_stresses(sxx, syy, sxy)
        return np.maximum(np.abs(s1), np.abs(s2))

    if field is None:
        return float(measure(*case.components))
    assert center is not None and panel is not None  # a beam case is measured at the opening's centre in its panel
    at = float(measure(*field(center[0], center[1])))
    gx, gy = np.meshgrid(np.linspace(0.0, panel.width, 41), np.linspace(0.0, panel.height, 41))
    top = float(np.max(measure(*field(gx, gy))))
    return at if at >= 0.01 * top else top


def measure_values(bs: BoundaryStress, stress: str) -> np.ndarray:
    """The chosen measure along the boundary, (n, m) MPa; its maximum is the peak."""
    if stress == "von_mises":
        return bs.von_mises
    if stress == "max_principal":
        return bs.max_principal
    if stress == "hoop":
        return np.abs(bs.hoop)
    raise ValueError(f"unknown stress measure {stress!r}")


def choose_region(panel: Panel, cutout: Cutout, load_cases: tuple[LoadCase, ...]) -> Region:
    """The smallest exact model: mirror lines only where geometry, position and every load case are symmetric."""
    if any(lc.is_beam for lc in load_cases):  # a beam's moment varies along x and its stress across y: full model
        return Region(panel.width, panel.height)
    sym_h, sym_v = cutout.panel_symmetry()
    no_shear = all(lc.tau_xy == 0.0 for lc in load_cases)
    tol = 1e-9 * max(panel.width, panel.height)
    on_h = abs(cutout.center[1] - panel.height / 2) <= tol
    on_v = abs(cutout.center[0] - panel.width / 2) <= tol
    return Region(panel.width, panel.height, mirror_h=bool(sym_h and on_h and no_shear),
                  mirror_v=bool(sym_v and on_v and no_shear))




def opening_name(k: int) -> str:
    """The location name of the k-th opening (from 0) of a row, in order along it."""
    return f"opening {k + 1}"


def location_values(sol: PanelSolution, stress: str, reinforcement: Reinforcement | None, material: Material
                    ) -> dict[str, tuple[BoundaryStress, np.ndarray]]:
    """The chosen measure (n, m) along every place a peak is looked for, by location name: the cutout edge (every
    opening's edge for several), and the places the reinforcement names (``Reinforcement.stress_locations``: the
    web at a ring's outer edge, a flange's own axial stress, a doubler of another modulus at the cutout edge)."""
    if len(sol.members) > 1:  # a row: every opening's edge
        return {opening_name(k): (bs, measure_values(bs, stress)) for k, bs in enumerate(sol.members)}
    assert sol.cutout is not None  # solved with the cutout stress recovered
    out = {CUTOUT_EDGE: (sol.cutout, measure_values(sol.cutout, stress))}
    if reinforcement is None:
        return out
    for loc in reinforcement.stress_locations(material.elastic.reference_modulus):
        if loc.source == "interior_edge":
            assert sol.interior_edge is not None  # a kind with this location has an interior outline
            out[loc.name] = (sol.interior_edge, measure_values(sol.interior_edge, stress))
        elif loc.source == "cutout_scaled":
            out[loc.name] = (sol.cutout, out[CUTOUT_EDGE][1] * loc.factor)
        elif loc.source == "edge_member":
            axial = member_stress(sol.cutout, material.elastic, loc.modulus)
            out[loc.name] = (sol.cutout, np.maximum(axial, 0.0) if stress == "max_principal" else np.abs(axial))
        else:
            raise ValueError(f"unknown stress location source {loc.source!r}")
    return out


@dataclass(frozen=True)
class LocationPeak:
    """The peak at one location of a reinforced opening for one load case (MPa, mm, percent)."""

    location: str
    peak_stress_mpa: float
    x_mm: float
    y_mm: float
    error_estimate_pct: float


@dataclass(frozen=True)
class LoadCaseResult:
    """One load case: the governing peak (MPa) and where (mm), Kt on the reference stress, the error estimate
    (percent) and the peak on the second level, the hoop stress range round the edge, and with a reinforcement or
    several openings the peak at every location."""

    name: str
    peak_stress_mpa: float
    kt: float
    x_mm: float
    y_mm: float
    reference_stress_mpa: float
    error_estimate_pct: float
    peak_second_level_mpa: float
    hoop_max_mpa: float
    hoop_min_mpa: float
    peak_location: str = CUTOUT_EDGE
    locations: tuple[LocationPeak, ...] = ()


@dataclass(frozen=True)
class Evaluation:
    """The plane-stress evaluation of one design (JSON-ready through ``to_dict``). ``fields`` holds the finest
    level's mesh, solution and boundary stresses for the checks and the plots; it is not part of the value (compare,
    repr, JSON) and :meth:`without_fields` drops it before a result is cached or sent to another process."""

    peak_stress_mpa: float
    kt: float
    kt_reference: str
    error_estimate_pct: float
    area_mm2: float
    load_cases: tuple[LoadCaseResult, ...]
    dofs: int
    elapsed_s: float
    governing_load_case: str
    stress_measure: str
    accuracy: str
    accuracy_target_pct: float
    model: str
    levels: tuple[tuple[int, float], ...]  # (dofs, governing peak MPa) per mesh level, finest first
    refinements: int  # automatic extra levels beyond the accuracy level's own
    min_radius_mm: float
    edges: str
    warnings: tuple[str, ...] = ()
    fields: EvaluationFields | None = field(default=None, compare=False, repr=False)

    @property
    def within_target(self) -> bool:
        return self.error_estimate_pct <= self.accuracy_target_pct

    def case(self, name: str) -> LoadCaseResult:
        return next(c for c in self.load_cases if c.name == name)

    def without_fields(self) -> Evaluation:
        return replace(self, fields=None)

    def to_dict(self) -> dict:
        from dataclasses import asdict

        d = asdict(self.without_fields())
        d.pop("fields")
        d["load_cases"] = [asdict(c) for c in self.load_cases]
        d["levels"] = [{"dofs": n, "peak_stress_mpa": p} for n, p in self.levels]
        d["within_accuracy_target"] = self.within_target
        if not any(c["locations"] for c in d["load_cases"]):  # one bare opening keeps its JSON as it was
            for c in d["load_cases"]:
                c.pop("peak_location")
                c.pop("locations")
        return d


@dataclass
class EvaluationFields:
    """Meshes and solutions behind an :class:`Evaluation`, kept only for plots and field output."""

    panel_mesh: PanelMesh = field(repr=False)
    solution: PanelSolution = field(repr=False)
    boundary: BoundaryStress = field(repr=False)  # mirrored to the whole outline, in order
    coarse_boundary: BoundaryStress = field(repr=False)
    # the web along the reinforced region's interior outline (a ring's outer edge)
    interior_boundary: BoundaryStress | None = field(default=None, repr=False)
    member_stress: np.ndarray | None = field(default=None, repr=False)  # (n, m) of an edge member, MPa, signed
    interior_name: str = ""  # the location names of those two
    member_name: str = ""
    coarse_solution: PanelSolution | None = field(default=None, repr=False)  # the second level (error estimates)


def evaluate(panel: Panel, material: Material, load_cases: tuple[LoadCase, ...], cutout: Cutout,
             measure: Measure = Measure(), allow_reduction: bool = True, time_limit_s: float | None = None
             ) -> Evaluation:
    """Evaluate one design in plane stress. ``allow_reduction=False`` forces the full panel model (used to check
    the reduced ones). ``time_limit_s``: no further mesh level is started once this much time has gone; if the
    levels needed for an error estimate are not done by then, :class:`SolveError` says so. The result carries the
    finest level's fields (``Evaluation.fields``) for the checks and plots."""
    t0 = time.perf_counter()
    level = ACCURACY_LEVELS[measure.accuracy]
    region = choose_region(panel, cutout, load_cases) if allow_reduction else Region(panel.width, panel.height)
    remote = np.array([lc.components for lc in load_cases])
    fields = load_fields(panel, load_cases)

    def run(spec: MeshSpec) -> tuple[PanelMesh, PanelSolution, list[tuple[float, int, str]],
                                     dict[str, tuple[BoundaryStress, list[tuple[float, int]]]]]:
        if time_limit_s is not None and time.perf_counter() - t0 > time_limit_s:
            raise SolveError(f"the evaluation exceeded its time limit of {time_limit_s:g} s before its error "
                             "estimate was complete")
        pm = mesh_panel(panel.width, panel.height, cutout, region, spec)
        sol = solve_panel(pm, material.elastic, remote, panel.edges,
                          panel.width, panel.height, reinforcement=cutout.reinforcement, thickness=panel.thickness,
                          fields=fields)
        places = {name: (bs, [peak_along(bs.s, v, pm.closed) for v in vals.T])
                  for name, (bs, vals) in location_values(sol, measure.stress, cutout.reinforcement,
                                                          material).items()}
        # per load case: (governing peak, sample index, location) and every location's (peak, index)
        gov = [max(((pk[j][0], pk[j][1], name) for name, (_, pk) in places.items()), key=lambda x: x[0])
               for j in range(remote.shape[0])]
        return pm, sol, gov, places

    # levels coarsest first: the level's own mesh with every size doubled, the level, then finer ones if needed
    spec = level.spec
    runs = [run(spec.coarsened(2.0)), run(spec)]
    refinements = 0
    while True:
        # the estimate of each case at the location that governs it on the finer level
        ests = [error_estimate_pct(f[0], runs[-2][3][f[2]][1][j][0], level.floor_pct)
                for j, f in enumerate(runs[-1][2])]
        if max(ests) <= level.target_pct or refinements == MAX_REFINEMENTS:
            break
        if time_limit_s is not None and time.perf_counter() - t0 > 0.5 * time_limit_s:
            break  # no time for a finer level: report the estimate as it stands (with its warning)
        spec = spec.coarsened(1.0 / 1.5)
        runs.append(run(spec))
        refinements += 1
    pm, sol, peaks, places = runs[-1]
    pm_c, sol_c, peaks_c, places_c = runs[-2]
    assert sol.cutout is not None  # solved with the cutout stress recovered
    hoop = np.concatenate([bs.hoop for bs in (sol.members or (sol.cutout,))])
    several = cutout.reinforcement is not None or cutout.count > 1
    results = []
    for j, lc in enumerate(load_cases):
        peak, i, where = peaks[j]
        peak_c = places_c[where][1][j][0]
        if not (math.isfinite(peak) and peak > 0):
            raise SolveError(f"load case {lc.name!r}: the recovered peak stress is {peak!r}, not a positive number")
        ref = reference_stress(lc, measure.stress, fields[j], cutout.center, panel)
        locs = tuple(LocationPeak(name, pk[j][0], float(bs.xy[0, pk[j][1]]), float(bs.xy[1, pk[j][1]]),
                                  error_estimate_pct(pk[j][0], places_c[name][1][j][0], level.floor_pct))
                     for name, (bs, pk) in places.items()) if several else ()
        at = places[where][0]
        results.append(LoadCaseResult(
            name=lc.name, peak_stress_mpa=peak, kt=peak / ref if ref > 0 else math.inf,
            x_mm=float(at.xy[0, i]), y_mm=float(at.xy[1, i]), reference_stress_mpa=ref,
            error_estimate_pct=ests[j], peak_second_level_mpa=peak_c, hoop_max_mpa=float(hoop[:, j].max()),
            hoop_min_mpa=float(hoop[:, j].min()), peak_location=where, locations=locs))
    gov = max(range(len(results)), key=lambda k: results[k].peak_stress_mpa)
    g = results[gov]
    est = max(r.error_estimate_pct for r in results)
    warnings = []
    if est > UNRESOLVED_FACTOR * level.target_pct:
        raise SolveError(
            f"the mesh cannot resolve this outline: the peak changed by {est:.3g} % between the last two mesh levels"
            f" (target {level.target_pct:g} %; smallest radius {cutout.min_radius:.3g} mm); a number this uncertain"
            " is not reported")
    if est > level.target_pct:
        warnings.append(f"error estimate {est:.3g} % exceeds the {level.name} target of {level.target_pct:g} %:"
                        " treat the peak as approximate or use a finer accuracy level")
    if cutout.min_radius < 1e-6 * max(panel.width, panel.height):
        warnings.append("the outline has a point of unbounded curvature (radius -> 0): the peak is mesh-dependent")
    kt_reference = KT_REFERENCES[measure.stress]
    if fields[gov] is not None:
        kt_reference = BEAM_KT_REFERENCE.format(measure=STRESS_LABELS[measure.stress])
    return Evaluation(
        peak_stress_mpa=g.peak_stress_mpa, kt=g.kt, kt_reference=kt_reference,
        error_estimate_pct=est, area_mm2=cutout.area,
        load_cases=tuple(results), dofs=sol.dofs, elapsed_s=time.perf_counter() - t0,
        governing_load_case=g.name, stress_measure=measure.stress, accuracy=level.name,
        accuracy_target_pct=level.target_pct, model=region.name,
        levels=tuple((r[1].dofs, r[2][gov][0]) for r in reversed(runs)), refinements=refinements,
        min_radius_mm=cutout.min_radius, edges=panel.edges, warnings=tuple(warnings),
        fields=_fields(cutout, material, region, pm, sol, sol_c, g))


def _fields(cutout: Cutout, material: Material, region: Region, pm: PanelMesh, sol: PanelSolution, sol_c: PanelSolution,
            governing: LoadCaseResult) -> EvaluationFields:
    """The finest level's mesh and solution, and the edge stresses the plots draw (whole outline, in order)."""
    assert sol.cutout is not None and sol_c.cutout is not None  # solved with the cutout stress recovered
    k = 0
    if sol.members:  # several openings: the edge of the one that governs
        k = int(governing.peak_location.split()[-1]) - 1
    full = mirror_to_full(sol.members[k] if sol.members else sol.cutout, region)
    full_c = mirror_to_full(sol_c.members[k] if sol_c.members else sol_c.cutout, region)
    r = cutout.reinforcement
    interior = mirror_to_full(sol.interior_edge, region) if sol.interior_edge is not None else None
    member, names = None, {}
    for loc in () if r is None else r.stress_locations(material.elastic.reference_modulus):
        names[loc.source] = loc.name
        if loc.source == "edge_member":
            member = member_stress(full, material.elastic, loc.modulus)
    return EvaluationFields(panel_mesh=pm, solution=sol, boundary=full, coarse_boundary=full_c,
                            interior_boundary=interior, member_stress=member,
                            interior_name=names.get("interior_edge", ""), member_name=names.get("edge_member", ""),
                            coarse_solution=sol_c)


def error_estimate_pct(peak: float, peak_second: float, floor_pct: float) -> float:
    """Discretisation error estimate of ``peak`` from the peak on the next coarser mesh level, percent.

    The whole change between the levels is reported (no division by an assumed rate) plus the measured scatter
    floor of the level: with the observed convergence this over-states the error of the finer level several times
    over and stays an upper bound when the rate is worse, which a convergence test checks against exact solutions.
    """
    return 100.0 * abs(peak - peak_second) / abs(peak) + floor_pct


# ----- mirroring a reduced model's boundary to the whole outline ----------------------------------------------
def _reflect(bs: BoundaryStress, horizontal: bool, cx: float, cy: float) -> BoundaryStress:
    """Mirror image about y = cy (``horizontal``) or x = cx, in reversed order so it continues the chain."""
    xy = bs.xy.copy()
    t = bs.tangent.copy()
    sig = bs.sigma.copy()
    if horizontal:
        xy[1] = 2 * cy - xy[1]
        t[1] = -t[1]
    else:
        xy[0] = 2 * cx - xy[0]
        t[0] = -t[0]
    sig[2] = -sig[2]
    return BoundaryStress(s=bs.s[-1] - bs.s[::-1], xy=xy[:, ::-1], tangent=-t[:, ::-1], sigma=sig[:, ::-1])


def _join(parts: list[BoundaryStress]) -> BoundaryStress:
    s, xy, t, sig = [parts[0].s], [parts[0].xy], [parts[0].tangent], [parts[0].sigma]
    offset = parts[0].s[-1]
    for p in parts[1:]:
        s.append(p.s[1:] + offset)
        xy.append(p.xy[:, 1:])
        t.append(p.tangent[:, 1:])
        sig.append(p.sigma[:, 1:])
        offset += p.s[-1]
    return BoundaryStress(s=np.concatenate(s), xy=np.concatenate(xy, axis=1), tangent=np.concatenate(t, axis=1),
                          sigma=np.concatenate(sig, axis=1))


def mirror_to_full(bs: BoundaryStress, region: Region) -> BoundaryStress:
    """The stress round the whole cutout outline from a reduced model's arc (counter-clockwise)."""
    cx, cy = region.width / 2, region.height / 2
    if region.mirror_h and region.mirror_v:
        b = _reflect(bs, False, cx, cy)
        c = _reflect(b, True, cx, cy)
        d = _reflect(c, False, cx, cy)
        return _join([bs, b, c, d])
    if region.mirror_h or region.mirror_v:
        return _join([bs, _reflect(bs, region.mirror_h, cx, cy)])
    return bs


def stress_at_points(pm: PanelMesh, sol: PanelSolution, xy: np.ndarray) -> np.ndarray:
    """Stress (3, n, m) MPa at panel points ``xy`` (2, n), mirrored into a reduced model where needed."""
    return stress_in(pm.region, sol, xy)


def stress_in(region: Region, sol: PanelSolution, xy: np.ndarray) -> np.ndarray:
    """:func:`stress_at_points` for any solution of the model ``region`` (its mesh is the solution's basis's: the
    second mesh level's solution as well as the finest)."""
    from skfem import MeshTri1

    from holeshape.solve import stress_from_gradient

    q = xy.copy()
    sign = np.ones(q.shape[1])
    if region.mirror_v:
        flip = q[0] < region.x0
        q[0] = np.where(flip, 2 * region.x0 - q[0], q[0])
        sign = np.where(flip, -sign, sign)
    if region.mirror_h:
        flip = q[1] < region.y0
        q[1] = np.where(flip, 2 * region.y0 - q[1], q[1])
        sign = np.where(flip, -sign, sign)
    basis = sol.basis
    mesh = basis.mesh
    # the quadratic mesh has no point finder: locate on its straight-sided twin, start from that element's affine
    # inverse and polish with Newton steps on the curved map (no clipping, so points on an edge stay exact)
    cells = MeshTri1(mesh.p, mesh.t).element_finder()(q[0], q[1])
    v = mesh.p[:, mesh.t[:, cells]]  # (2, 3, n)
    A = np.stack([v[:, 1] - v[:, 0], v[:, 2] - v[:, 0]], axis=1)  # (2, 2, n)
    X = np.linalg.solve(A.transpose(2, 0, 1), (q - v[:, 0]).T[:, :, None])[:, :, 0].T[:, :, None]  # (2, n, 1)
    for _ in range(6):
        F = basis.mapping.F(X, tind=cells)
        X = X + np.einsum("ijkl,jkl->ikl", basis.mapping.invDF(X, tind=cells), q[:, :, None] - F)
    m = sol.u.shape[1]
    out = np.empty((3, q.shape[1], m))
    grads = [basis.elem.gbasis(basis.mapping, X, j, tind=cells)[0].grad for j in range(basis.Nbfun)]
    dofs = basis.element_dofs[:, cells]  # (Nbfun, n)
    for c in range(m):
        grad = sum(sol.u[dofs[j], c][None, None, :, None] * np.asarray(grads[j]) for j in range(basis.Nbfun))
        out[:, :, c] = stress_from_gradient(grad, sol.elastic)[:, :, 0]
    out[2] *= sign[:, None]
    return out
