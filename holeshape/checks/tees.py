"""The tee sections of a beam web: the mean normal (sigma_x) and shear stress across the web above and below the
opening on the vertical section through its centre (the middle opening of a row), MPa, for every beam load case.
Read from the solved field with Gauss points along each section."""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from holeshape.checks.base import Check, CheckResult, Design, Section, Table

if TYPE_CHECKING:
    from holeshape.study import Study

GAUSS = 24  # points along each section (exact for the field's polynomial degree many times over)


@dataclass(frozen=True, kw_only=True)
class TeeResult(CheckResult):
    """Per beam load case: mean sigma_x and shear above and below the opening (MPa), at x = ``x_mm``."""

    check = "tee_sections"
    x_mm: float
    cases: dict[str, dict[str, float]]

    def case_fields(self, load_case: str) -> dict:
        return dict(self.cases.get(load_case, {}))

    def section(self) -> Section:
        rows = tuple({"name": n, **v} for n, v in self.cases.items())
        return Section("Tee sections", (
            f"Mean stresses across the web above and below the opening on the vertical section x = {self.x_mm:.1f} mm"
            " (the tee sections of the beam web), beam load cases.",),
            (Table((("name", "load case"), ("tee_above_mpa", "above: sigma_x (MPa)"),
                    ("tee_above_shear_mpa", "above: shear (MPa)"), ("tee_below_mpa", "below: sigma_x (MPa)"),
                    ("tee_below_shear_mpa", "below: shear (MPa)")), rows),))


class TeeCheck(Check):
    name = "tee_sections"
    title = "Tee sections"

    @classmethod
    def applies(cls, study: Study) -> bool:
        return any(lc.is_beam for lc in study.load_cases)

    @classmethod
    def in_search(cls, study: Study) -> bool:
        return False  # reported, not a requirement

    def run(self, design: Design) -> TeeResult:
        from shapely.geometry import LineString, Polygon

        from holeshape.evaluate import stress_at_points

        panel, cutout, f = design.study.panel, design.cutout, design.evaluation.fields
        members = cutout.members
        middle = members[len(members) // 2]  # a row: the opening at (or just past) its middle
        xc = middle.center[0]
        cut = LineString([(xc, 0.0), (xc, panel.height)]).intersection(Polygon(middle.polygon(720)))
        ys = np.asarray(cut.bounds)[[1, 3]] if not cut.is_empty else np.array([middle.center[1]] * 2)
        g, w = np.polynomial.legendre.leggauss(GAUSS)
        t = 0.5 * (g + 1.0)
        parts = {}
        for name, (y0, y1) in (("above", (ys[1], panel.height)), ("below", (0.0, ys[0]))):
            xy = np.array([np.full(GAUSS, xc), y0 + t * (y1 - y0)])
            sig = stress_at_points(f.panel_mesh, f.solution, xy)  # (3, n, m)
            parts[name] = (0.5 * np.einsum("i,ij->j", w, sig[0]), 0.5 * np.einsum("i,ij->j", w, sig[2]))
        cases = {}
        for j, lc in enumerate(design.study.load_cases):
            if lc.is_beam:
                cases[lc.name] = {"tee_above_mpa": float(parts["above"][0][j]),
                                  "tee_below_mpa": float(parts["below"][0][j]),
                                  "tee_above_shear_mpa": float(parts["above"][1][j]),
                                  "tee_below_shear_mpa": float(parts["below"][1][j])}
        return TeeResult(x_mm=float(xc), cases=cases)
