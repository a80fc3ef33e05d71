"""A design's assessment as the outputs carry it: the checks' blocks, their additions to the top level and to each
load case, and the sections the text and the report print (those of checks that do not apply included where a
reader looks for them). No output format is made here; this is the plain data every writer reads."""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from holeshape.checks.base import Assessment, Section

if TYPE_CHECKING:
    from holeshape.evaluate import Evaluation
    from holeshape.study import Study


def blocks(assessment: Assessment) -> dict[str, Any]:
    """Each check's own block of the JSON, by its name (checks with nothing of their own left out)."""
    out = {}
    for res in assessment.results:
        d = res.to_dict()
        if d is not None:
            out[res.check] = d
    return out


def top_fields(assessment: Assessment) -> dict[str, Any]:
    out: dict[str, Any] = {}
    for res in assessment.results:
        out.update(res.top_fields())
    return out


def case_fields(assessment: Assessment, load_case: str) -> dict[str, Any]:
    out: dict[str, Any] = {}
    for res in assessment.results:
        out.update(res.case_fields(load_case))
    return out


def sections(assessment: Assessment, study: Study) -> list[Section]:
    """The sections of every result, then those of the checks a reader looks for that do not apply."""
    from holeshape.checks import absent_sections

    out = [s for s in (res.section() for res in assessment.results) if s is not None]
    return out + absent_sections(study)


def design_json(evaluation: Evaluation, assessment: Assessment, study: Study) -> dict[str, Any]:
    """The JSON of one checked design: the evaluation, every check's block and fields, the requirement rows, the
    verdict overall and per load case."""
    d = evaluation.to_dict()
    d.update(top_fields(assessment))
    d.update(blocks(assessment))
    reqs = assessment.requirements
    d["requirements"] = [r.to_dict() for r in reqs]
    d["meets_every_requirement"] = assessment.meets_every_requirement
    d.update(assessment.verdict().to_dict())
    for c in d["load_cases"]:
        c.update(case_fields(assessment, c["name"]))
        c.update(assessment.verdict(c["name"]).to_dict())
    d["sections"] = [s.to_dict() for s in sections(assessment, study)]
    d["warnings"] = list(dict.fromkeys(list(study.warnings) + list(evaluation.warnings) +
                                       list(assessment.warnings)))
    return d
