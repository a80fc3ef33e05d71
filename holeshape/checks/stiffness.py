"""The effective membrane stiffness of the perforated panel relative to the uncut one: what a global model that
meshes the web as a plain sheet should give it. E_x, E_y, nu_xy and G_xy of the panel with its openings (and any
reinforcement) from its homogenised compliance (holeshape.homogenise: the same mesh and factorised stiffness as
the peak stress, unit mean stresses on the study's own edge condition), and the equivalent thickness of the plain
sheet for each: t E_x / E, t E_y / E, t G_xy / G. Reported, not a requirement."""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from holeshape.checks.base import Check, CheckResult, Design, Section, Table

if TYPE_CHECKING:
    from holeshape.study import Study


@dataclass(frozen=True, kw_only=True)
class StiffnessResult(CheckResult):
    """Effective moduli (MPa), their ratios to the uncut panel's, and the equivalent thicknesses (mm)."""

    check = "stiffness"
    youngs_modulus_x_mpa: float
    youngs_modulus_y_mpa: float
    shear_modulus_mpa: float
    poisson_ratio_xy: float
    ratio_x: float
    ratio_y: float
    ratio_shear: float
    thickness_mm: float
    equivalent_thickness_x_mm: float
    equivalent_thickness_y_mm: float
    equivalent_thickness_shear_mm: float
    edges: str

    def section(self) -> Section:
        rows = (
            {"property": "E_x (along x)", "value_mpa": self.youngs_modulus_x_mpa, "ratio": self.ratio_x,
             "t_eq": self.equivalent_thickness_x_mm},
            {"property": "E_y (along y)", "value_mpa": self.youngs_modulus_y_mpa, "ratio": self.ratio_y,
             "t_eq": self.equivalent_thickness_y_mm},
            {"property": "G_xy (in-plane shear)", "value_mpa": self.shear_modulus_mpa, "ratio": self.ratio_shear,
             "t_eq": self.equivalent_thickness_shear_mm},
        )
        edges = "free-edge (uniform traction)" if self.edges == "traction" else "straight-edge (uniform strain)"
        return Section("Effective stiffness", (
            "Membrane stiffness of the panel with its openings, for a global model that meshes the web as a plain"
            f" sheet: homogenised over the whole {edges} panel from the same mesh as the peak stress;"
            f" nu_xy = {self.poisson_ratio_xy:.3f}. A plain sheet of the"
            " equivalent thickness carries the same load with the same mean strain; use the shear value for a shear"
            " web.",),
            (Table((("property", "property"), ("value_mpa", "effective (MPa)"), ("ratio", "over the uncut panel"),
                    ("t_eq", f"equivalent thickness of the {self.thickness_mm:g} mm web (mm)")), rows),))


class StiffnessCheck(Check):
    name = "stiffness"
    title = "Effective stiffness"

    @classmethod
    def in_search(cls, study: Study) -> bool:
        return False  # reported for the global model, not a requirement

    def run(self, design: Design) -> StiffnessResult:
        from holeshape.homogenise import effective_compliance

        study, f = design.study, design.evaluation.fields
        s = effective_compliance(f.panel_mesh, f.solution, study.panel)
        el = study.material.elastic
        c0 = np.array([el.stress(*e) for e in ((1.0, 0.0, 0.0), (0.0, 1.0, 0.0), (0.0, 0.0, 0.5))]).T
        s0 = np.linalg.inv(c0)
        t = study.panel.thickness
        rx, ry, rs = s0[0, 0] / s[0, 0], s0[1, 1] / s[1, 1], s0[2, 2] / s[2, 2]
        return StiffnessResult(youngs_modulus_x_mpa=1.0 / s[0, 0], youngs_modulus_y_mpa=1.0 / s[1, 1],
                               shear_modulus_mpa=1.0 / s[2, 2], poisson_ratio_xy=-s[1, 0] / s[0, 0], ratio_x=rx,
                               ratio_y=ry, ratio_shear=rs, thickness_mm=t, equivalent_thickness_x_mm=t * rx,
                               equivalent_thickness_y_mm=t * ry, equivalent_thickness_shear_mm=t * rs,
                               edges=study.panel.edges)
