"""Net section: the mean stresses across the web that is left beside the openings.

For every load case the sections are the straight cuts through each opening's centre normal to each principal
direction of the remote stress there (the beam-theory stress at the centre for a beam case) and normal to the
panel's x and y axes, across the whole panel; for a row also the web posts between neighbouring openings (the
segment of the row's axis between their edges). Along the web each cut leaves, the normal stress n . sigma . n and
the shear t . sigma . n are integrated with Gauss points on the solved field and divided by the net length: the
mean stresses a hand check of the net section would use (for a uniform remote stress S across a cut of gross length
L and net length L_net, equilibrium gives S L / L_net). The governing section of a case is the one with the largest
equivalent mean stress sqrt(s_n^2 + 3 t^2). With ``material.net_section_allowable`` the net-section margin of
safety (allowable / equivalent - 1) is a requirement, at least ``constraints.min_margin`` (default 0).

Why it matters: in a ductile metal web the static strength is governed by the net section, not the elastic peak at
the edge (which yields locally and redistributes); the peak governs fatigue. MPa, mm, degrees.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np

from holeshape.checks.base import Check, CheckResult, Design, Section, Table, requirement

if TYPE_CHECKING:
    from holeshape.geometry import Cutout
    from holeshape.solve import BeamField
    from holeshape.study import LoadCase, Panel, Study

GAUSS = 16  # points along each piece of web a cut leaves (the field is smooth there)
ADVICE = ("to raise the net-section margin: a smaller opening across the load, a thicker web, or a reinforcement that"
          " carries load past the opening")


@dataclass(frozen=True)
class NetSection:
    """One cut for one load case: what it is, its normal (degrees from x), gross and net length (mm) and the mean
    stresses across the net web (MPa)."""

    load_case: str
    kind: str  # "through opening k" or "web post k-k+1"
    normal_deg: float
    gross_length_mm: float
    net_length_mm: float
    mean_normal_mpa: float
    mean_shear_mpa: float

    @property
    def equivalent_mpa(self) -> float:
        return math.sqrt(self.mean_normal_mpa ** 2 + 3.0 * self.mean_shear_mpa ** 2)

    def to_dict(self) -> dict:
        return {"load_case": self.load_case, "section": self.kind, "normal_deg": self.normal_deg,
                "gross_length_mm": self.gross_length_mm, "net_length_mm": self.net_length_mm,
                "mean_normal_mpa": self.mean_normal_mpa, "mean_shear_mpa": self.mean_shear_mpa,
                "equivalent_mpa": self.equivalent_mpa}


@dataclass(frozen=True)
class Ligament:
    """The narrowest ligament: from the openings to panel edge ``edge``; mean stresses across it per load case
    (normal to the cut and shear), MPa."""

    edge: str
    width_mm: float
    start: tuple[float, float]
    end: tuple[float, float]
    mean_normal_mpa: tuple[float, ...]
    mean_shear_mpa: tuple[float, ...]


@dataclass(frozen=True, kw_only=True)
class NetSectionResult(CheckResult):
    check = "net_section"
    sections: tuple[NetSection, ...]
    governing: dict[str, int]  # load case -> index in sections
    allowable_mpa: float | None
    margins: dict[str, float | None]
    ligament: Ligament

    def to_dict(self) -> dict:
        return {"sections": [s.to_dict() for s in self.sections],
                "governing": {k: self.sections[i].to_dict() for k, i in self.governing.items()},
                "allowable_mpa": self.allowable_mpa, "margins": dict(self.margins),
                "equivalent": "sqrt(mean normal^2 + 3 mean shear^2) over the net web of the cut"}

    def top_fields(self) -> dict:
        from dataclasses import asdict

        return {"ligament": asdict(self.ligament)}

    def case_fields(self, load_case: str) -> dict:
        s = self.sections[self.governing[load_case]]
        out = {"net_section_stress_mpa": s.mean_normal_mpa, "net_section_shear_mpa": s.mean_shear_mpa,
               "net_section_equivalent_mpa": s.equivalent_mpa, "net_section": s.kind,
               "net_section_normal_deg": s.normal_deg}
        if self.allowable_mpa is not None:
            out["net_section_margin"] = self.margins[load_case]
        return out

    def section(self) -> Section:
        rows = []
        for name, i in self.governing.items():
            s = self.sections[i]
            rows.append({"name": name, "section": s.kind, "normal_deg": f"{s.normal_deg:.1f}",
                         "net_length_mm": s.net_length_mm, "gross_length_mm": s.gross_length_mm,
                         "mean_normal_mpa": s.mean_normal_mpa, "mean_shear_mpa": s.mean_shear_mpa,
                         "equivalent_mpa": s.equivalent_mpa, "margin_of_safety": self.margins.get(name)})
        cols = [("name", "load case"), ("section", "governing cut"), ("normal_deg", "normal (deg from x)"),
                ("net_length_mm", "net web (mm)"), ("gross_length_mm", "gross (mm)"),
                ("mean_normal_mpa", "mean normal (MPa)"), ("mean_shear_mpa", "mean shear (MPa)"),
                ("equivalent_mpa", "equivalent (MPa)")]
        allow = ("no material.net_section_allowable given: the net section is reported, not checked"
                 if self.allowable_mpa is None else
                 f"net-section allowable {self.allowable_mpa:g} MPa; margin = allowable / equivalent - 1")
        if self.allowable_mpa is not None:
            cols.append(("margin_of_safety", "net-section margin"))
        return Section("Net section", (
            "Mean stresses across the web each cut leaves (cuts through every opening's centre normal to the principal"
            " directions of the remote stress and to the panel axes, and the web posts between neighbouring openings"
            " of a row); the governing cut of each load case has the largest equivalent mean stress"
            " sqrt(s_n^2 + 3 t^2). The static strength of a ductile web is governed by its net section, the elastic"
            f" peak by fatigue. {allow[0].upper() + allow[1:]}.",), (Table(tuple(cols), tuple(rows)),))


def _directions(case: LoadCase, field: BeamField | None, center: tuple[float, float]) -> list[float]:
    """Section normals (radians) for one load case: the principal directions of the remote stress (at the centre
    for a beam case), then the panel axes; duplicates within 0.01 degree dropped."""
    if field is None:
        sx, sy, txy = case.components
    else:
        sx, sy, txy = (float(np.asarray(v)) for v in field(center[0], center[1]))
    out: list[float] = []
    p = 0.5 * math.atan2(2.0 * txy, sx - sy) if (sx, sy, txy) != (0.0, 0.0, 0.0) else 0.0
    for a in (p, p + 0.5 * math.pi, 0.0, 0.5 * math.pi):
        a = a % math.pi
        if all(min(abs(a - b), math.pi - abs(a - b)) > math.radians(0.01) for b in out):
            out.append(a)
    return out


def _cut(center: tuple[float, float], normal: float, panel: Panel, holes: Any) -> tuple[list[Any], float]:
    """The pieces of web (a list of ((x0, y0), (x1, y1))) a straight cut through ``center`` normal to ``normal``
    leaves across the panel, and its gross length (mm)."""
    from shapely.geometry import LineString, box

    tx, ty = -math.sin(normal), math.cos(normal)  # along the cut
    big = 4.0 * (panel.width + panel.height)
    line = LineString([(center[0] - big * tx, center[1] - big * ty), (center[0] + big * tx, center[1] + big * ty)])
    gross = line.intersection(box(0.0, 0.0, panel.width, panel.height))
    net = gross.difference(holes)
    parts = [net] if net.geom_type == "LineString" else list(getattr(net, "geoms", []))
    return [tuple(p.coords)[::len(p.coords) - 1] for p in parts if p.length > 0], gross.length


class NetSectionCheck(Check):
    name = "net_section"
    title = "Net section"

    @classmethod
    def in_search(cls, study: Study) -> bool:
        return study.material.net_section_allowable is not None

    @classmethod
    def bounds(cls, study: Study) -> bool:
        return study.material.net_section_allowable is not None

    def run(self, design: Design) -> NetSectionResult:
        from shapely.geometry import Polygon
        from shapely.ops import unary_union

        from holeshape.evaluate import stress_at_points
        from holeshape.solve import load_fields

        study, cutout, f = design.study, design.cutout, design.evaluation.fields
        panel = study.panel
        members = cutout.members
        holes = unary_union([Polygon(p) for p in cutout.outlines(720)])
        fields = load_fields(panel, study.load_cases)
        # every cut: (kind, normal, pieces, gross), shared by the load cases whose directions ask for it
        cuts: dict[tuple, tuple] = {}
        wanted: list[list[tuple]] = []
        for j, lc in enumerate(study.load_cases):
            mine = []
            for k, m in enumerate(members):
                for a in _directions(lc, fields[j], m.center):
                    key = ("through", k, round(math.degrees(a), 6))
                    if key not in cuts:
                        pieces, gross = _cut(m.center, a, panel, holes)
                        label = f"through opening {k + 1}" if len(members) > 1 else "through the opening"
                        cuts[key] = (label, a, pieces, gross)
                    mine.append(key)
            if cutout.row is not None:
                for k, (m0, m1) in enumerate(zip(members, members[1:])):
                    key = ("post", k, 0.0)
                    if key not in cuts:
                        seg = _post(m0, m1, holes)
                        d = math.atan2(m1.center[1] - m0.center[1], m1.center[0] - m0.center[0])
                        cuts[key] = (f"web post {k + 1}-{k + 2}", d + 0.5 * math.pi, [seg] if seg else [],
                                     math.hypot(m1.center[0] - m0.center[0], m1.center[1] - m0.center[1]))
                    mine.append(key)
            wanted.append(mine)
        g, w = np.polynomial.legendre.leggauss(GAUSS)
        t = 0.5 * (g + 1.0)
        pts: list[np.ndarray] = []
        index: dict[tuple, int] = {}
        for key, (_, _, pieces, _) in cuts.items():
            for p, (a, b) in enumerate(pieces):
                index[(key, p)] = len(pts)
                pts.append(np.array([a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1])]))
        sig = stress_at_points(f.panel_mesh, f.solution, np.concatenate(pts, axis=1)) if pts else None
        sections: list[NetSection] = []
        governing: dict[str, int] = {}
        margins: dict[str, float | None] = {}
        allow = study.material.net_section_allowable
        limit = study.constraints.min_margin if study.constraints.min_margin is not None else 0.0
        reqs = []
        for j, lc in enumerate(study.load_cases):
            best = None
            for key in wanted[j]:
                label, a, pieces, gross = cuts[key]
                n = np.array([math.cos(a), math.sin(a)])
                tt = np.array([-n[1], n[0]])
                force_n = force_t = length = 0.0
                for p, (x0, x1) in enumerate(pieces):
                    assert sig is not None  # a piece of web has its points
                    i0 = index[(key, p)] * GAUSS
                    s = sig[:, i0:i0 + GAUSS, j]  # (3, GAUSS)
                    sn = s[0] * n[0] ** 2 + s[1] * n[1] ** 2 + 2 * s[2] * n[0] * n[1]
                    st = s[0] * n[0] * tt[0] + s[1] * n[1] * tt[1] + s[2] * (n[0] * tt[1] + n[1] * tt[0])
                    ell = math.hypot(x1[0] - x0[0], x1[1] - x0[1])
                    force_n += 0.5 * ell * float(w @ sn)
                    force_t += 0.5 * ell * float(w @ st)
                    length += ell
                if length <= 0:
                    continue
                sec = NetSection(lc.name, label, math.degrees(a) % 180.0, float(gross), length, force_n / length,
                                 force_t / length)
                sections.append(sec)
                if best is None or sec.equivalent_mpa > sections[best].equivalent_mpa:
                    best = len(sections) - 1
            assert best is not None  # a cut through an opening inside the panel leaves web beside it
            governing[lc.name] = best
            eq = sections[best].equivalent_mpa
            margins[lc.name] = None if allow is None else (allow / eq - 1.0 if eq > 0 else math.inf)
            if allow is not None:
                m = margins[lc.name]
                reqs.append(requirement("net_section", f"net-section margin, {lc.name}", m, limit, ">=", scale=1.0,
                                        kind="margin", load_case=lc.name, advice=ADVICE, check=self.name,
                                        reason=f"net-section margin {m:+.3f} < {limit:+g} ({lc.name},"
                                               f" {sections[best].kind})"))
        return NetSectionResult(requirements=tuple(reqs), sections=tuple(sections), governing=governing,
                                allowable_mpa=allow, margins=margins, ligament=narrowest_ligament(design))


def _post(m0: Cutout, m1: Cutout, holes: Any) -> tuple[Any, Any] | None:
    """The web post between two neighbouring openings: the segment of the line joining their centres outside
    both, as ((x0, y0), (x1, y1)), or None when they touch."""
    from shapely.geometry import LineString

    seg = LineString([m0.center, m1.center]).difference(holes)
    if seg.is_empty or seg.length <= 0:
        return None
    parts = [seg] if seg.geom_type == "LineString" else list(seg.geoms)
    longest = max(parts, key=lambda p: p.length)
    c = tuple(longest.coords)
    return c[0], c[-1]


def narrowest_ligament(design: Design, n_points: int = 24) -> Ligament:
    """The ligament from the openings to the nearest panel edge, with the mean stresses across it (normal to the
    cut and shear), per load case."""
    from holeshape.evaluate import stress_at_points

    cutout, panel, f = design.cutout, design.study.panel, design.evaluation.fields
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
    t = 0.5 * (g + 1.0)
    xy = np.array([px + t * (end[0] - px), py + t * (end[1] - py)])
    sig = stress_at_points(f.panel_mesh, f.solution, xy)  # (3, n, m)
    normal_comp, shear_comp = (1, 2) if edge in ("left", "right") else (0, 2)
    mean_n = 0.5 * np.einsum("i,ij->j", w, sig[normal_comp])
    mean_t = 0.5 * np.einsum("i,ij->j", w, sig[shear_comp])
    return Ligament(edge=edge, width_mm=width, start=(px, py), end=end,
                    mean_normal_mpa=tuple(float(v) for v in mean_n), mean_shear_mpa=tuple(float(v) for v in mean_t))
