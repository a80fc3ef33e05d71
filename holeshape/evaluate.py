"""Verified evaluation of one cutout design: peak boundary stress for every load case, with an error estimate.

The design is meshed and solved at two mesh levels of one family (the second with every element size doubled);
the change in peak between them is the error evidence reported with the peak. Half or quarter models are used
when the cutout, its position and every load case are mirror symmetric (exactly, not approximately).
Units: mm, N, MPa.
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass, field, replace

import numpy as np

from holeshape.errors import SolveError
from holeshape.geometry import Cutout
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
from holeshape.stability import CASE_KEYS, DESIGN_KEYS, StabilityFields, StabilityResult, buckling
from holeshape.study import ACCURACIES, LoadCase, Material, Measure, Panel, StabilitySettings


@dataclass(frozen=True)
class AccuracyLevel:
    """Mesh family and the error the level aims for (percent of the peak)."""

    name: str
    spec: MeshSpec
    target_pct: float
    floor_pct: float  # measured scatter of the peak between unstructured meshes of this density, percent


# Measured on Kirsch and Inglis cases (benchmarks/accuracy.py): the boundary ratio (local radius / element size)
# drives the peak error; far-field growth 0.3 per mm costs a few 0.01 % and saves most of the elements.
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


def reference_stress(case: LoadCase, stress: str, field=None, center=None, panel: Panel | None = None) -> float:
    """The stress Kt is measured against: the remote stress state, or for a beam case (``field``) the beam-theory
    stress at the opening's ``center`` (the largest in the web where that is below 1 % of it)."""
    def measure(sxx, syy, sxy):
        if stress == "von_mises":
            return np.asarray(von_mises(sxx, syy, sxy))
        s1, s2 = principal_stresses(sxx, syy, sxy)
        return np.maximum(np.abs(s1), np.abs(s2))

    if field is None:
        return float(measure(*case.components))
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


TEE_KEYS = ("tee_above_mpa", "tee_below_mpa", "tee_above_shear_mpa", "tee_below_shear_mpa")
CUTOUT_EDGE = "cutout edge"
RING_EDGE = "web at the ring's outer edge"
FLANGE = "flange"
DOUBLER = "doubler at the cutout edge"


def opening_name(k: int) -> str:
    """The location name of the k-th opening (from 0) of a row, in order along it."""
    return f"opening {k + 1}"


def location_values(sol: PanelSolution, stress: str, reinforcement, material: Material
                    ) -> dict[str, tuple[BoundaryStress, np.ndarray]]:
    """The chosen measure (n, m) along every place a peak is looked for, by location name: the cutout edge, and
    with a reinforcement the web at a ring's outer edge, the flange's own axial stress, or a doubler of another
    modulus at the cutout edge."""
    if len(sol.members) > 1:  # a row: every opening's edge
        return {opening_name(k): (bs, measure_values(bs, stress)) for k, bs in enumerate(sol.members)}
    out = {CUTOUT_EDGE: (sol.cutout, measure_values(sol.cutout, stress))}
    if reinforcement is None:
        return out
    e, e_r = material.youngs_modulus, reinforcement.modulus(material.youngs_modulus)
    if reinforcement.kind == "ring":
        out[RING_EDGE] = (sol.ring_edge, measure_values(sol.ring_edge, stress))
        if e_r != e:
            out[DOUBLER] = (sol.cutout, out[CUTOUT_EDGE][1] * (e_r / e))
    else:
        axial = member_stress(sol.cutout, e, material.poisson_ratio, e_r)
        out[FLANGE] = (sol.cutout, np.maximum(axial, 0.0) if stress == "max_principal" else np.abs(axial))
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
class ReinforcementResult:
    """What the reinforcement is and what it does: sizes (mm, MPa), cross-section (mm^2), ring area (mm^2), added
    mass (kg, None without a density), and the peak at each location over the load cases (MPa)."""

    kind: str
    sizes: dict
    cross_section_mm2: float
    ring_area_mm2: float
    added_volume_mm3: float
    added_mass_kg: float | None
    peak_stress_mpa: dict  # location -> largest peak over the load cases

    def to_dict(self) -> dict:
        from dataclasses import asdict

        return asdict(self)


@dataclass(frozen=True)
class Ligament:
    """The narrowest ligament: from the cutout to panel edge ``edge``; mean stresses across it, MPa."""

    edge: str
    width_mm: float
    start: tuple[float, float]
    end: tuple[float, float]
    mean_normal_mpa: tuple[float, ...]  # per load case, stress normal to the section (carried past the cutout)
    mean_shear_mpa: tuple[float, ...]


@dataclass(frozen=True)
class LoadCaseResult:
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
    net_section_stress_mpa: float
    net_section_shear_mpa: float
    margin_of_safety: float | None
    # beam load cases: mean normal and shear stress across the web above and below the opening (the tee sections),
    # on the vertical section through its centre, MPa
    tee_above_mpa: float | None = None
    tee_below_mpa: float | None = None
    tee_above_shear_mpa: float | None = None
    tee_below_shear_mpa: float | None = None
    # with [stability]: the load factor that buckles the web (None: does not buckle below the ceiling), its error
    # estimate, factor / required factor, and the same panel without the cutout
    buckling_load_factor: float | None = None
    buckling_error_estimate_pct: float | None = None
    buckling_reserve: float | None = None
    buckling_load_factor_unperforated: float | None = None
    # with a reinforcement: where the peak is, and the peak at every location
    peak_location: str = CUTOUT_EDGE
    locations: tuple[LocationPeak, ...] = ()


@dataclass(frozen=True)
class Evaluation:
    """Everything ``holeshape check`` reports about one design (JSON-ready through ``to_dict``)."""

    peak_stress_mpa: float
    kt: float
    kt_reference: str
    error_estimate_pct: float
    area_mm2: float
    margin_of_safety: float | None
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
    ligament: Ligament
    edges: str
    warnings: tuple[str, ...] = ()
    stability: StabilityResult | None = None
    reinforcement: ReinforcementResult | None = None
    ligaments_between_mm: tuple[float, ...] = ()  # a row: the web between each pair of neighbouring openings

    @property
    def within_target(self) -> bool:
        return self.error_estimate_pct <= self.accuracy_target_pct

    @property
    def lowest_margin(self) -> float | None:
        """The smallest margin of safety over the load cases (None without an allowable)."""
        m = [r.margin_of_safety for r in self.load_cases if r.margin_of_safety is not None]
        return min(m) if m else None

    def to_dict(self) -> dict:
        from dataclasses import asdict

        d = asdict(self)
        d["load_cases"] = [asdict(c) for c in self.load_cases]
        d["levels"] = [{"dofs": n, "peak_stress_mpa": p} for n, p in self.levels]
        d["within_accuracy_target"] = self.within_target
        if not self.ligaments_between_mm:
            d.pop("ligaments_between_mm")
        if all(c["tee_above_mpa"] is None for c in d["load_cases"]):  # no beam case: the JSON as it was
            for c in d["load_cases"]:
                for k in TEE_KEYS:
                    c.pop(k)
        if self.reinforcement is None:  # a bare opening keeps its JSON as it was
            d.pop("reinforcement")
            if not any(c["locations"] for c in d["load_cases"]):
                for c in d["load_cases"]:
                    c.pop("peak_location")
                    c.pop("locations")
        if self.stability is None:  # a study without [stability] keeps its JSON as it was
            d.pop("stability")
            for c in d["load_cases"]:
                for k in CASE_KEYS:
                    c.pop(k)
        else:
            st = self.stability.to_dict()
            d["stability"] = st
            d.update({k: st[k] for k in DESIGN_KEYS})
        return d


@dataclass
class EvaluationFields:
    """Meshes and solutions behind an :class:`Evaluation`, kept only for plots and field output."""

    panel_mesh: object = field(repr=False)
    solution: PanelSolution = field(repr=False)
    boundary: BoundaryStress = field(repr=False)  # mirrored to the whole outline, in order
    coarse_boundary: BoundaryStress = field(repr=False)
    stability: StabilityFields | None = field(default=None, repr=False)
    ring_boundary: BoundaryStress | None = field(default=None, repr=False)  # the web at a ring's outer edge
    flange_stress: np.ndarray | None = field(default=None, repr=False)  # (n, m) along ``boundary``, MPa


def evaluate(panel: Panel, material: Material, load_cases: tuple[LoadCase, ...], cutout: Cutout,
             measure: Measure = Measure(), keep_fields: bool = False, allow_reduction: bool = True,
             time_limit_s: float | None = None, stability: StabilitySettings | None = None,
             cache: dict | None = None):
    """Evaluate one design. Returns an :class:`Evaluation`, or ``(Evaluation, EvaluationFields)`` when
    ``keep_fields``. ``allow_reduction=False`` forces the full panel model (used to check the reduced ones).
    ``time_limit_s``: no further mesh level is started once this much time has gone; if the levels needed for
    an error estimate are not done by then, :class:`SolveError` says so. ``stability``: also the buckling load
    factor of every load case (whole panel, its own two plate mesh levels at the same accuracy name). ``cache``: a
    dict owned by the caller's run for results shared between designs (the unperforated panel's buckling)."""
    t0 = time.perf_counter()
    level = ACCURACY_LEVELS[measure.accuracy]
    region = choose_region(panel, cutout, load_cases) if allow_reduction else Region(panel.width, panel.height)
    remote = np.array([lc.components for lc in load_cases])
    fields = load_fields(panel, load_cases)

    def run(spec):
        if time_limit_s is not None and time.perf_counter() - t0 > time_limit_s:
            raise SolveError(f"the evaluation exceeded its time limit of {time_limit_s:g} s before its error "
                             "estimate was complete")
        pm = mesh_panel(panel.width, panel.height, cutout, region, spec)
        sol = solve_panel(pm, material.youngs_modulus, material.poisson_ratio, remote, panel.edges,
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
    hoop = np.concatenate([bs.hoop for bs in (sol.members or (sol.cutout,))])
    lig = narrowest_ligament(panel, cutout, pm, sol)
    tees = tee_sections(panel, cutout, pm, sol) if any(f is not None for f in fields) else None
    results = []
    for j, lc in enumerate(load_cases):
        peak, i, where = peaks[j]
        peak_c = places_c[where][1][j][0]
        if not (math.isfinite(peak) and peak > 0):
            raise SolveError(f"load case {lc.name!r}: the recovered peak stress is {peak!r}, not a positive number")
        ref = reference_stress(lc, measure.stress, fields[j], cutout.center, panel)
        est = ests[j]
        mos = material.allowable_stress / peak - 1.0 if material.allowable_stress else None
        locs = tuple(LocationPeak(name, pk[j][0], float(bs.xy[0, pk[j][1]]), float(bs.xy[1, pk[j][1]]),
                                  error_estimate_pct(pk[j][0], places_c[name][1][j][0], level.floor_pct))
                     for name, (bs, pk) in places.items()) \
            if cutout.reinforcement is not None or cutout.count > 1 else ()
        at = places[where][0]
        results.append(LoadCaseResult(
            name=lc.name, peak_stress_mpa=peak, kt=peak / ref if ref > 0 else math.inf,
            x_mm=float(at.xy[0, i]), y_mm=float(at.xy[1, i]), reference_stress_mpa=ref,
            error_estimate_pct=est, peak_second_level_mpa=peak_c, hoop_max_mpa=float(hoop[:, j].max()),
            hoop_min_mpa=float(hoop[:, j].min()), net_section_stress_mpa=lig.mean_normal_mpa[j],
            net_section_shear_mpa=lig.mean_shear_mpa[j], margin_of_safety=mos, peak_location=where,
            locations=locs, **({} if tees is None or fields[j] is None else tees[j])))
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
    stab, stab_fields = None, None
    if stability is not None:
        left = None if time_limit_s is None else max(1.0, time_limit_s - (time.perf_counter() - t0))
        out = buckling(panel, material, load_cases, cutout, stability, measure.accuracy, time_limit_s=left,
                       keep_fields=keep_fields, cache=cache)
        stab, stab_fields = out if keep_fields else (out, None)
        results = [replace(r, buckling_load_factor=c.load_factor, buckling_error_estimate_pct=c.error_estimate_pct,
                           buckling_reserve=c.reserve, buckling_load_factor_unperforated=c.unperforated_factor)
                   for r, c in zip(results, stab.cases)]
        warnings += list(stab.warnings)
    kt_reference = KT_REFERENCES[measure.stress]
    if fields[gov] is not None:
        kt_reference = BEAM_KT_REFERENCE.format(measure=STRESS_LABELS[measure.stress])
    ev = Evaluation(
        peak_stress_mpa=g.peak_stress_mpa, kt=g.kt, kt_reference=kt_reference,
        error_estimate_pct=est, area_mm2=cutout.area, margin_of_safety=g.margin_of_safety,
        load_cases=tuple(results), dofs=sol.dofs, elapsed_s=time.perf_counter() - t0,
        governing_load_case=g.name, stress_measure=measure.stress, accuracy=level.name,
        accuracy_target_pct=level.target_pct, model=region.name,
        levels=tuple((r[1].dofs, r[2][gov][0]) for r in reversed(runs)), refinements=refinements,
        min_radius_mm=cutout.min_radius, ligament=lig, edges=panel.edges, warnings=tuple(warnings), stability=stab,
        reinforcement=reinforcement_result(cutout, panel, material, results),
        ligaments_between_mm=neighbour_ligaments(cutout))
    if keep_fields:
        k = 0
        if sol.members:  # a row: the edge of the opening that governs
            k = int(g.peak_location.split()[-1]) - 1
        full = mirror_to_full(sol.members[k] if sol.members else sol.cutout, region)
        full_c = mirror_to_full(sol_c.members[k] if sol_c.members else sol_c.cutout, region)
        r = cutout.reinforcement
        ring = mirror_to_full(sol.ring_edge, region) if sol.ring_edge is not None else None
        flange = member_stress(full, material.youngs_modulus, material.poisson_ratio,
                               r.modulus(material.youngs_modulus)) if r is not None and r.kind == "flange" else None
        return ev, EvaluationFields(panel_mesh=pm, solution=sol, boundary=full, coarse_boundary=full_c,
                                    stability=stab_fields, ring_boundary=ring, flange_stress=flange)
    return ev


def neighbour_ligaments(cutout: Cutout) -> tuple[float, ...]:
    """The width of web (mm) between each pair of neighbouring openings of a row, or from each of several separate
    openings to its nearest neighbour (empty for one opening)."""
    from shapely.geometry import Polygon

    polys = [Polygon(p) for p in cutout.outlines(720)]
    if cutout.others:  # separate openings: each one's nearest neighbour (every pair is a candidate)
        return tuple(float(min(a.distance(b) for j, b in enumerate(polys) if j != i)) for i, a in enumerate(polys))
    return tuple(float(a.distance(b)) for a, b in zip(polys, polys[1:]))


def reinforcement_result(cutout: Cutout, panel: Panel, material: Material, results) -> ReinforcementResult | None:
    from holeshape.geometry.reinforcement import reinforced_sizes

    r = cutout.reinforcement
    if r is None:
        return None
    sizes = reinforced_sizes(cutout, panel.thickness)
    peaks: dict[str, float] = {}
    for res in results:
        for loc in res.locations:
            peaks[loc.location] = max(peaks.get(loc.location, 0.0), loc.peak_stress_mpa)
    params = r.parameters()
    params.pop("kind")
    params.setdefault("thickness", r.member_thickness(panel.thickness))
    return ReinforcementResult(kind=r.kind, sizes=params, cross_section_mm2=sizes.cross_section_mm2,
                               ring_area_mm2=sizes.ring_area_mm2, added_volume_mm3=sizes.volume_mm3,
                               added_mass_kg=sizes.mass_kg(material.density), peak_stress_mpa=peaks)


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


# ----- net-section stress across the narrowest ligament ----------------------------------------------------------
def narrowest_ligament(panel: Panel, cutout: Cutout, pm, sol: PanelSolution, n_points: int = 24) -> Ligament:
    pts = np.concatenate([m.sampling.points for m in cutout.members], axis=1)
    W, H = panel.width, panel.height
    gaps = cutout.edge_gaps(W, H)
    nearest = {"left": np.argmin(pts[0]), "right": np.argmax(pts[0]), "bottom": np.argmin(pts[1]),
               "top": np.argmax(pts[1])}  # the outline point closest to each edge
    edge, width = min(gaps.items(), key=lambda kv: kv[1])
    idx = int(nearest[edge])
    px, py = float(pts[0, idx]), float(pts[1, idx])
    end = {"left": (0.0, py), "right": (W, py), "bottom": (px, 0.0), "top": (px, H)}[edge]
    g, w = np.polynomial.legendre.leggauss(n_points)
    f = 0.5 * (g + 1.0)
    xy = np.array([px + f * (end[0] - px), py + f * (end[1] - py)])
    sig = stress_at_points(pm, sol, xy)  # (3, n, m)
    normal_comp, shear_comp = (1, 2) if edge in ("left", "right") else (0, 2)
    mean_n = 0.5 * np.einsum("i,ij->j", w, sig[normal_comp])
    mean_t = 0.5 * np.einsum("i,ij->j", w, sig[shear_comp])
    return Ligament(edge=edge, width_mm=width, start=(px, py), end=end,
                    mean_normal_mpa=tuple(float(v) for v in mean_n), mean_shear_mpa=tuple(float(v) for v in mean_t))


def tee_sections(panel: Panel, cutout: Cutout, pm, sol: PanelSolution, n_points: int = 24) -> list[dict]:
    """Per load case: mean normal (sigma_x) and shear stress across the web above and below the opening on the
    vertical section through its centre (the tee sections of a beam web), MPa."""
    from shapely.geometry import LineString, Polygon

    members = cutout.members
    middle = members[len(members) // 2]  # a row: the opening at (or just past) its middle
    xc = middle.center[0]
    cut = LineString([(xc, 0.0), (xc, panel.height)]).intersection(Polygon(middle.polygon(720)))
    ys = np.asarray(cut.bounds)[[1, 3]] if not cut.is_empty else np.array([middle.center[1]] * 2)
    g, w = np.polynomial.legendre.leggauss(n_points)
    f = 0.5 * (g + 1.0)
    parts = {}
    for name, (y0, y1) in (("above", (ys[1], panel.height)), ("below", (0.0, ys[0]))):
        xy = np.array([np.full(n_points, xc), y0 + f * (y1 - y0)])
        sig = stress_at_points(pm, sol, xy)  # (3, n, m)
        parts[name] = (0.5 * np.einsum("i,ij->j", w, sig[0]), 0.5 * np.einsum("i,ij->j", w, sig[2]))
    return [{"tee_above_mpa": float(parts["above"][0][j]), "tee_below_mpa": float(parts["below"][0][j]),
             "tee_above_shear_mpa": float(parts["above"][1][j]), "tee_below_shear_mpa": float(parts["below"][1][j])}
            for j in range(sol.u.shape[1])]


def stress_at_points(pm, sol: PanelSolution, xy: np.ndarray) -> np.ndarray:
    """Stress (3, n, m) MPa at panel points ``xy`` (2, n), mirrored into a reduced model where needed."""
    from skfem import MeshTri1

    from holeshape.solve import stress_from_gradient

    region = pm.region
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
    mesh, basis = pm.mesh, sol.basis
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
        out[:, :, c] = stress_from_gradient(grad, sol.youngs_modulus, sol.poisson_ratio)[:, :, 0]
    out[2] *= sign[:, None]
    return out
