"""Shared helpers for the numerical tests (all lengths mm, stresses MPa)."""

from __future__ import annotations

import pytest

from holeshape.elastic import Isotropic
from holeshape.evaluate import evaluate
from holeshape.geometry import FAMILIES, Cutout
from holeshape.study import LoadCase, Material, Measure, Panel

ALUMINIUM = Material(name="test aluminium", elastic=Isotropic(71000.0, 0.33))
# A panel 400 hole sizes across: the finite-panel effect on the peak is ~0.13 % x (40 / 200)^2 = 0.005 %
# (measured in this project's prototype; benchmarks/speed.py repeats the Kirsch and Inglis cases), far below the
# test tolerances.
BIG = 4000.0


def big_panel(edges: str = "traction") -> Panel:
    return Panel(width=BIG, height=BIG, thickness=1.0, edges=edges)


def centred(family: str, **params) -> Cutout:
    shape = FAMILIES[family](**params)
    shape.check()
    return Cutout(shape, (BIG / 2, BIG / 2), params.pop("rotation", 0.0) if "rotation" in params else 0.0)


def run(cutout: Cutout, *cases: tuple[float, float, float], panel: Panel | None = None, accuracy: str = "standard",
        stress: str = "von_mises", **kw):
    """The plane-stress evaluation of ``cutout`` under remote stress states (its fields in ``.fields``)."""
    lcs = tuple(LoadCase(f"case {i}", *c) for i, c in enumerate(cases))
    return evaluate(panel or big_panel(), ALUMINIUM, lcs, cutout, Measure(stress, accuracy), **kw)


def checked(cutout: Cutout, cases, panel: Panel | None = None, material: Material = ALUMINIUM,
            accuracy: str = "standard", stress: str = "von_mises", **study_kw):
    """The evaluation and every check of the seam on one design (``holeshape.checkrun.DesignResult``); ``cases``
    are LoadCases or remote stress triples; ``study_kw`` go to ``Study.of`` (stability, constraints)."""
    from holeshape.checkrun import check_design
    from holeshape.study import Study

    lcs = tuple(c if isinstance(c, LoadCase) else LoadCase(f"case {i}", *c) for i, c in enumerate(cases))
    study = Study.of(panel or big_panel(), material, lcs, cutout, measure=Measure(stress, accuracy), **study_kw)
    return check_design(study, cutout, keep_fields=True)


@pytest.fixture(scope="session")
def big():
    return big_panel()
