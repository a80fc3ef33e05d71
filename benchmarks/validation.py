"""Verification against published solutions, at one accuracy level (default "standard").

Run:  .venv/bin/python benchmarks/validation.py [draft|standard|fine]
          prints one Markdown table of every case (family, case, source, published, holeshape, error, tolerance,
          error estimate, model and DOFs, time)
      .venv/bin/python benchmarks/validation.py [draft|standard|fine] --write docs/verification.md
          prints the same table and writes the whole verification manual: an introduction, one section per family
          of checks (Kirsch, Inglis, Howland, NAFEMS LE1, reinforced holes, plate buckling) with the source beside
          every value, and the inventory of the published and derived checks held by the test suite (read from
          the tests' own comments, so it follows the suite).
Every table of the manual is produced here from the runs and the code; only the prose is written by hand.
The cases reuse holeshape.validation (reference_cases, lame_ring_hoop, le1_sigma_yy_at_d, buckling_cases: the
same functions behind the validation appendix of every report) and add the further load states and sizes this
table has always carried. Units: mm, MPa.
"""

from __future__ import annotations

import argparse
import ast
import datetime
import os
import platform
import re
import subprocess
import sys
import time
import tokenize
from dataclasses import dataclass
from pathlib import Path

from holeshape import __version__
from holeshape.evaluate import ACCURACY_LEVELS, evaluate
from holeshape.geometry import Circle, Cutout, Ellipse, Flange, Ring
from holeshape.stability import STABILITY_LEVELS
from holeshape.study import ACCURACIES, LoadCase, Measure, Panel
from holeshape.validation import (
    BIG,
    BUCKLING_CASES,
    REFERENCE_MATERIAL,
    buckling_cases,
    lame_ring_hoop,
    le1_sigma_yy_at_d,
    reference_cases,
)

ROOT = Path(__file__).resolve().parents[1]
FAMILIES = ("kirsch", "inglis", "howland", "nafems", "reinforced", "buckling")
E_REF, NU_REF = REFERENCE_MATERIAL.elastic.youngs_modulus, REFERENCE_MATERIAL.elastic.poisson_ratio
LE1_MESH_MM = 60.0  # element size of the LE1 benchmark mesh (the report appendix uses the same)


@dataclass(frozen=True)
class Case:
    """One plane-stress reference case: its family, name, source, the placed cutout in its panel, the remote stress
    (sx, sy, txy) MPa, the published peak (MPa), the tolerance (percent), and whether every report's validation
    appendix solves it too (holeshape.validation.reference_cases(full=False))."""

    family: str
    name: str
    source: str
    cutout: Cutout
    panel: Panel
    load: tuple[float, float, float]
    published: float
    tolerance_pct: float
    in_appendix: bool = False


def _family(source: str) -> str:
    for word, fam in (("Kirsch", "kirsch"), ("Inglis", "inglis"), ("Howland", "howland"),
                      ("Mansfield", "reinforced"), ("Lame", "reinforced")):
        if word in source:
            return fam
    raise ValueError(f"no family for the source {source!r}")


def cases() -> list[Case]:
    """The plane-stress cases: holeshape.validation.reference_cases(full=True) (the report appendix's set and its
    full extension), and the further load states and sizes of this table, in family order."""
    appendix = {row[0] for row in reference_cases(full=False)}
    out = [Case(_family(src), name, src, cut, panel, tuple(float(v) for v in load), float(pub), float(tol),
                name in appendix)
           for name, src, cut, panel, load, pub, tol in reference_cases(full=True)]
    big, mid = Panel(BIG, BIG, 1.0), (BIG / 2, BIG / 2)
    nu = REFERENCE_MATERIAL.elastic.poisson_ratio
    out.append(Case("kirsch", "circle, sx = s, sy = s/2", "Kirsch (1898): 3 sx - sy",
                    Cutout(Circle(10.0), mid), big, (100.0, 50.0, 0.0), 250.0, 0.1))
    for r in (2, 4, 8):
        out.append(Case("inglis", f"ellipse a/b = {r}, load along", "Inglis (1913): 1 + 2b/a",
                        Cutout(Ellipse(10.0, 10.0 / r), mid), big, (100.0, 0.0, 0.0), 100.0 * (1 + 2 / r), 0.1))
    for ratio in (1.5, 4.0):  # doubler thickness (ratio - 1) t over the web t, out to b = 2a
        out.append(Case("reinforced", f"doubler ring, t_ring = {ratio - 1:g} t, b = 2a, equibiaxial",
                        "Lame (closed form, derived)", Cutout(Circle(10.0), mid, 0.0,
                                                              Ring(width=10.0, thickness=ratio - 1.0)),
                        big, (100.0, 100.0, 0.0), 100.0 * lame_ring_hoop(ratio, 2.0, nu), 0.1))
    for share in (0.5, 2.0):  # edge member area over Mansfield's neutral a t / (1 - nu)
        area = share * 10.0 / (1 - nu)
        q = 2 * 100.0 / (1 + nu + 10.0 / area)  # radial stress the member takes (Lame with an edge member)
        out.append(Case("reinforced", f"flanged circle, member {share:g} x the neutral area, equibiaxial (sheet hoop)",
                        "Lame with an edge member (closed form, derived); neutral area Mansfield (1953)",
                        Cutout(Circle(10.0), mid, 0.0, Flange(height=area)), big, (100.0, 100.0, 0.0),
                        200.0 - q, 0.1))
    order = {f: i for i, f in enumerate(FAMILIES)}

    def key(c: Case) -> tuple:
        if c.family == "reinforced":  # rings then flanges, each from the least to the most reinforcement
            return (order[c.family], c.name.startswith("flange"), -c.published)
        return (order[c.family],)  # stable: the reference rows first within a family
    return sorted(out, key=key)


def howland_fit(d_over_w: float) -> float:
    """Gross-section Kt of a central hole in a strip from the curve fit of Pilkey & Pilkey, Peterson's Stress
    Concentration Factors, 3rd ed. (2008), Chart 4.1, as tests/test_finite_width.py uses it (net-section Kt
    2 + 0.284 (1 - d/W) - 0.600 (1 - d/W)^2 + 1.32 (1 - d/W)^3, divided by 1 - d/W)."""
    s = 1.0 - d_over_w
    return (2 + 0.284 * s - 0.600 * s ** 2 + 1.32 * s ** 3) / s


def solve(accuracy: str) -> dict:
    """Every case at ``accuracy``: the plane-stress rows, NAFEMS LE1, the plate-buckling rows, and the wall time."""
    t_start = time.perf_counter()
    measure = Measure("hoop", accuracy)
    rows = []
    for c in cases():
        t0 = time.perf_counter()
        ev = evaluate(c.panel, REFERENCE_MATERIAL, (LoadCase("c", *c.load),), c.cutout, measure)
        err = 100.0 * (ev.peak_stress_mpa / c.published - 1.0)
        rows.append({"family": c.family, "case": c.name, "source": c.source, "published": c.published,
                     "holeshape": ev.peak_stress_mpa, "error_pct": err, "tolerance_pct": c.tolerance_pct,
                     "error_estimate_pct": ev.error_estimate_pct, "within": abs(err) <= c.tolerance_pct,
                     "model": ev.model, "dofs": ev.dofs, "seconds": time.perf_counter() - t0,
                     "in_appendix": c.in_appendix, "location": ev.load_cases[0].peak_location,
                     "d_over_w": 2 * c.cutout.shape.radius / c.panel.height if c.family == "howland" else None})
    t0 = time.perf_counter()
    v = le1_sigma_yy_at_d(LE1_MESH_MM)
    err = 100.0 * (v / 92.7 - 1.0)
    rows.append({"family": "nafems", "case": "LE1 elliptic membrane, sigma_yy at D",
                 "source": "NAFEMS (1990): 92.7 MPa", "published": 92.7, "holeshape": v, "error_pct": err,
                 "tolerance_pct": 1.0, "error_estimate_pct": None,
                 "within": abs(err) <= 1.0, "model": "quarter (the benchmark's own)", "dofs": None,
                 "seconds": time.perf_counter() - t0, "in_appendix": True, "location": "D = (2000, 0) mm",
                 "d_over_w": None})
    ks = {name: k for name, _, _, k, _ in BUCKLING_CASES}
    for r in buckling_cases(accuracy):
        rows.append({**r, "family": "buckling", "model": "whole panel, unperforated meshes", "in_appendix": True,
                     "k_published": ks[r["case"]], "k_holeshape": ks[r["case"]] * r["holeshape"] / r["published"],
                     "location": None, "d_over_w": None})
    return {"accuracy": accuracy, "rows": rows, "seconds": time.perf_counter() - t_start}


# ----- Markdown ---------------------------------------------------------------------------------------------------
def _cell(v) -> str:
    return str(v).replace("|", "\\|")


def _table(header: list[str], body: list[list]) -> str:
    lines = ["| " + " | ".join(header) + " |", "|" + "---|" * len(header)]
    lines += ["| " + " | ".join(_cell(x) for x in row) + " |" for row in body]
    return "\n".join(lines)


def _pct(v, digits: int = 3, signed: bool = False) -> str:
    if v is None:
        return "-"
    return f"{v:+.{digits}f} %" if signed else f"{v:.{digits}f} %"


def _yes(v: bool) -> str:
    return "yes" if v else "NO"


def _bounded(r: dict) -> str:
    """Whether the error estimate is at least the error against the reference ("-" without an estimate)."""
    if r["error_estimate_pct"] is None:
        return "-"
    return _yes(r["error_estimate_pct"] >= abs(r["error_pct"]))


def _model(r: dict) -> str:
    return r["model"] if r["dofs"] is None else f"{r['model']}, {r['dofs']}"


def peak_table(rows: list[dict], bound: bool = True) -> str:
    header = ["case", "reference (MPa)", "source", "holeshape (MPa)", "error", "tolerance", "within",
              "error estimate"] + (["estimate >= error"] if bound else []) + ["model, DOFs", "time"]
    body = []
    for r in rows:
        body.append([r["case"], f"{r['published']:.4g}", r["source"], f"{r['holeshape']:.4f}",
                     _pct(r["error_pct"], signed=True), f"{r['tolerance_pct']:g} %", _yes(r["within"]),
                     _pct(r["error_estimate_pct"])] + ([_bounded(r)] if bound else [])
                    + [_model(r), f"{r['seconds']:.2f} s"])
    return _table(header, body)


def summary_table(result: dict) -> str:
    """The plain table of every case (the default output, and the manual's overview)."""
    body = []
    for r in result["rows"]:
        body.append([r["family"], r["case"], r["source"], f"{r['published']:.4g}", f"{r['holeshape']:.4f}",
                     _pct(r["error_pct"], signed=True), f"{r['tolerance_pct']:g} %", _yes(r["within"]),
                     _pct(r["error_estimate_pct"]), _model(r), f"{r['seconds']:.2f} s"])
    return _table(["family", "case", "source", "reference", "holeshape", "error", "tolerance", "within",
                   "error estimate", "model, DOFs", "time"], body)


def levels_table() -> str:
    body = []
    for name in ACCURACIES:
        a, s = ACCURACY_LEVELS[name], STABILITY_LEVELS[name]
        body.append([name, f"{a.spec.boundary_ratio:g}", f"{a.target_pct:g} %", f"{a.floor_pct:g} %",
                     f"1/{1 / s.spec.max_fraction:.0f}", f"{s.target_pct:g} %", f"{s.floor_pct:g} %"])
    return _table(["level", "plane stress: boundary ratio (local radius / element size)", "plane stress: target",
                   "plane stress: floor", "plate: element size / smaller panel side", "plate: target",
                   "plate: floor"], body)


# ----- the checks the test suite holds ----------------------------------------------------------------------------
# names and words by which a test states the reference its value comes from
MARKERS = (
    ("Kirsch", r"\bKirsch"), ("Inglis", r"\bInglis"), ("Howland", r"\bHowland"), ("Pilkey & Pilkey", r"\bPilkey"),
    ("Peterson", r"\bPeterson"), ("Heywood", r"\bHeywood"), ("NAFEMS", r"\bNAFEMS"),
    ("Muskhelishvili", r"\bMuskhelishvili"), ("Mansfield", r"\bMansfield"), ("Lame", r"\bLam[eé]\b"),
    ("Goodier", r"(?<!Timoshenko & )\bGoodier\b"), ("Timoshenko & Goodier", r"Timoshenko & Goodier"),
    ("Timoshenko & Gere", r"Timoshenko & Gere"), ("Bryan", r"\bBryan\b"), ("Stein & Neff", r"Stein & Neff"),
    ("Budiansky & Connor", r"Budiansky"), ("Rockey, Anderson & Cheung", r"\bRockey"),
    ("Levy, Woolley & Kroll", r"\bLevy\b"),
    ("Schlack", r"\bSchlack"), ("Schulz", r"\bSchulz"), ("Reissner & Morduchow", r"\bReissner"),
    ("Kachanov", r"\bKachanov"), ("Bjorkman & Richards", r"\bBjorkman"), ("Euler", r"\bEuler"),
    ("Rayleigh", r"\bRayleigh"), ("Airy", r"\bAiry"),
    ("Michell", r"\bMichell"), ("Argyris (independent element)", r"\bArgyris"),
    ("statics", r"\bstatics\b|\bequilibrium\b"), ("energy bounds", r"energy bounds|kinematic bound|static one"),
    ("independent computation", r"(?i)\bindependent\b"), ("derived", r"\bderived\b"),
    ("from memory", r"from memory"),
)
# markers that only qualify a reference: a test that names nothing else is not listed
QUALIFIERS = ("derived", "from memory")


DIVIDER = re.compile(r"^-{3,}.*-{3,}$")
# a citation the list above does not know: a capitalised name (or two joined by &) before a year
CITATION = re.compile(r"\b([A-Z][a-z]+(?: (?:&|and) [A-Z][a-z]+)?)(?:,? et al\.)?,? \(?(1[89]\d\d|20[0-4]\d)\b")


def _comments(path: Path) -> dict[int, str]:
    """The comments of a file by line number (the text after the #)."""
    with path.open("rb") as f:
        found = {tok.start[0]: tok.string.lstrip("#").strip() for tok in tokenize.tokenize(f.readline)
                 if tok.type == tokenize.COMMENT}
    return {k: v for k, v in found.items() if not DIVIDER.match(v)}  # section rulers say nothing of a value


def _plain(text: str) -> str:
    return " ".join(text.split())


def _clip(text: str, limit: int) -> str:
    if len(text) <= limit:
        return text
    cut = text[:limit]
    return cut[:cut.rfind(" ")] + " ..."


def _module_context(tree: ast.Module, lines: list[str], comments: dict[int, str]) -> dict[str, tuple[int, str]]:
    """What a test file says of its module-level helpers and constants, by name: a helper's docstring, a constant's
    comment block directly above it and on its own lines; with the line it starts on."""
    out: dict[str, tuple[int, str]] = {}
    above, above_end = "", -1  # the previous constant's text and last line (a block of constants shares a comment)
    for n in tree.body:
        if isinstance(n, ast.FunctionDef) and not n.name.startswith("test_"):
            doc = _plain(ast.get_docstring(n) or "")
            if doc:
                out[n.name] = (n.lineno, doc)
        elif isinstance(n, (ast.Assign, ast.AnnAssign)):
            targets = n.targets if isinstance(n, ast.Assign) else [n.target]
            said, line = [], n.lineno - 1
            while line >= 1 and lines[line - 1].lstrip().startswith("#"):
                said.insert(0, comments.get(line, ""))
                line -= 1
            said += [comments[k] for k in range(n.lineno, n.end_lineno + 1) if k in comments]
            text = _plain(" ".join(said))
            if not text and n.lineno == above_end + 1:
                text = above
            above, above_end = text, n.end_lineno
            for t in targets:
                if isinstance(t, ast.Name) and text:
                    out[t.id] = (n.lineno, text)
    return out


def _named(text: str) -> list[str]:
    out = [label for label, rx in MARKERS if re.search(rx, text)]
    for m in CITATION.finditer(text):
        name = m.group(1)
        if not any(name.split()[0] in label for label in out):
            out.append(name)
    return out


def suite_checks(tests_dir: Path = ROOT / "tests") -> list[dict]:
    """Every test function whose docstring or comments, or the docstrings and comments of the module-level helpers
    and constants it uses, name a published source, an independent computation or a derivation: its file, name, the
    references named, its own words and what the file says of the values it uses."""
    rows = []
    for path in sorted(tests_dir.glob("test_*.py")):
        source = path.read_text(encoding="utf-8")
        tree = ast.parse(source)
        comments = _comments(path)
        context = _module_context(tree, source.splitlines(), comments)
        for node in tree.body:
            if not isinstance(node, ast.FunctionDef) or not node.name.startswith("test_"):
                continue
            own = [_plain(ast.get_docstring(node) or "")]
            own += [c for line, c in sorted(comments.items()) if node.lineno <= line <= node.end_lineno]
            own_text = _plain(" ".join(s for s in own if s))
            used = {n.id for n in ast.walk(node) if isinstance(n, ast.Name)}
            uses = sorted((context[name] for name in used if name in context), key=lambda lt: lt[0])
            used_text = _plain(" ".join(text for _, text in uses))
            named = _named(own_text + " " + used_text)
            if not [n for n in named if n not in QUALIFIERS]:
                continue
            rows.append({"file": f"tests/{path.name}", "test": node.name, "named": named, "said": own_text,
                         "context": used_text})
    return rows


def suite_table(rows: list[dict]) -> str:
    body = [[f"`{r['file']}`", f"`{r['test']}`", ", ".join(r["named"]), _clip(r["said"], 400) or "-",
             _clip(r["context"], 300) or "-"] for r in rows]
    return _table(["test file", "test", "reference named", "what the test says (its own comments)",
                   "what the file says of the helpers and values the test uses"], body)


# ----- the manual -------------------------------------------------------------------------------------------------
def _git() -> str:
    try:
        head = subprocess.run(["git", "rev-parse", "--short", "HEAD"], cwd=ROOT, capture_output=True, text=True,
                              check=True).stdout.strip()
        dirty = subprocess.run(["git", "status", "--porcelain", "--untracked-files=no"], cwd=ROOT,
                               capture_output=True, text=True, check=True).stdout.strip()
    except (OSError, subprocess.CalledProcessError):
        return "not a git checkout"
    return f"commit {head}" + (" with uncommitted changes in the working tree" if dirty else "")


def manual(result: dict) -> str:
    rows, acc = result["rows"], result["accuracy"]
    fam = {f: [r for r in rows if r["family"] == f] for f in FAMILIES}
    within = all(r["within"] for r in rows)
    checked_bound = [r for r in rows if r["error_estimate_pct"] is not None and r["family"] in ("kirsch", "inglis",
                                                                                                 "reinforced",
                                                                                                 "buckling")]
    bound = all(r["error_estimate_pct"] >= abs(r["error_pct"]) for r in checked_bound)
    suite = suite_checks()
    appendix = [r for r in rows if r["in_appendix"]]
    when = datetime.datetime.now(datetime.timezone.utc).strftime("%Y-%m-%d %H:%M UTC")
    cpu = os.cpu_count()
    out = []
    add = out.append
    add("# holeshape verification manual\n")
    add(f"Generated by `.venv/bin/python benchmarks/validation.py {acc} --write docs/verification.md` on {when}:"
        f" holeshape {__version__}, {_git()}; Python {platform.python_version()} on {platform.system()},"
        f" {cpu} cores. Every table below was produced by that run or read from the code and the test suite at that"
        " moment; none is typed by hand. Rerun the command to regenerate this file.\n")
    add(f"Accuracy level of the run: **{acc}**. {len(rows)} cases solved in {result['seconds']:.1f} s of wall time."
        f" Every case within its tolerance: **{_yes(within)}**. The error estimate at least the error against the"
        f" exact closed forms and the converged plate values (Kirsch, Inglis, reinforced holes, plate buckling):"
        f" **{_yes(bound)}**.\n")
    add("Units: mm, N, MPa. Stresses are the magnitude of the hoop (tangential) stress at the edge unless a row says"
        " otherwise; Kt-type ratios are stresses over a remote stress of 100 MPa.\n")

    add("## What is checked, and how\n")
    add("Each case below is a problem with a published or closed-form answer, posed to holeshape as a study would pose"
        " it: the same mesher (gmsh, with the curved P2 edge on the exact outline), the same plane-stress solve"
        " (scikit-fem), the same two mesh levels, peak read-out and error estimate as the evaluation of a design"
        f" (`holeshape.evaluate.evaluate`, called with the library's reference material E = {E_REF:g} MPa,"
        f" nu = {NU_REF:g}, and the `hoop` stress measure). Two families use a narrower path, and say so: NAFEMS LE1 is"
        " not a panel with a cutout, so it is meshed by gmsh on its own ellipse arcs and solved and read by the solve"
        " layer's own functions (`holeshape.validation.le1_sigma_yy_at_d`); the plate-buckling cases run the"
        " stability layer (`holeshape.stability.buckling`) on the unperforated panel, whose structured meshes give"
        " every design's \"without the cutout\" factor, with the same plate elements, levels and Richardson"
        " extrapolation as a design's buckling check.\n")
    add("The tolerance rule: where the reference is an exact closed form (Kirsch, Inglis, Lame, Mansfield's neutral"
        " hole), the tolerance is 0.1 %: the true error measured at the standard level, with room. Where the"
        " reference is a table or a target quoted to three figures (Howland's strip, NAFEMS LE1, Stein & Neff's"
        " 9.34), the tolerance is 1 %: the precision of the reference, not of holeshape. Bryan's exact k = 4 through"
        " the plate check carries 0.5 %. The tolerances were set for the standard level; a run at `draft` may"
        " exceed the 0.1 % ones, and says so in its `within` column.\n")
    add("The error estimate column is what holeshape reports for the same case in a design's output: the change of"
        " the peak between two mesh levels of one family plus the measured scatter floor of the level (for buckling,"
        " the whole Richardson step plus a floor). It is meant to bound the discretisation error, not the"
        " difference from a reference that is itself rounded; where the reference is exact the `estimate >= error`"
        " column checks the bound. The levels' targets and floors, read from the code:\n")
    add(levels_table() + "\n")
    add("Every report (`report.html` of `optimise`, `compare` and `sweep`) carries a validation appendix"
        " (`validation.json` in the run folder) in which the same functions solve a subset of these cases at the"
        " level of the run's final checks (`fine`; a sweep at its study's level); the plate-buckling rows are added"
        " when the study has `[stability]`, the fatigue row (the reserve factor of a small hole cycled 0 -> S, against"
        " Kirsch's 3 S with Basquin's curve and Goodman's line by hand) when it has `[fatigue]`. The subset, read from"
        " `holeshape.validation.reference_cases(full=False)`, `buckling_cases` and `fatigue_cases`:\n")
    add(_table(["case", "source"], [[r["case"], r["source"]] for r in appendix]) + "\n")
    add("## Overview\n")
    add(summary_table(result) + "\n")

    add("## Kirsch: circular hole in a large plate\n")
    add(f"A circle of radius 10 mm at the centre of a {BIG:g} mm square panel, 1 mm thick, traction edges (400 hole"
        " sizes across: the finite-panel effect on the peak is about 0.005 %). Kirsch (1898), as given in Timoshenko"
        " & Goodier, Theory of Elasticity: the hoop stress round the edge is"
        " (sx + sy) - 2 (sx - sy) cos 2theta - 4 txy sin 2theta, so the peak magnitude is 3 s uniaxial, 2 s"
        " equibiaxial, 3 sx - sy for sx > sy > 0, and 4 t in pure shear. The pure-shear case has no mirror symmetry"
        " of the load and runs on the whole panel; the others on a quarter.\n")
    add(peak_table(fam["kirsch"]) + "\n")

    add("## Inglis: elliptical hole in a large plate\n")
    add("An ellipse with semi-axis a = 10 mm along x and b = a / r along y, same panel. Inglis (1913): the peak is"
        " (1 + 2a/b) s loaded across the long axis (sy = s, at the ends of the long axis) and (1 + 2b/a) s loaded"
        " along it (sx = s, at the ends of the short axis). At a/b = 8 the tip radius b^2 / a is 0.156 mm:"
        " the case that tests the curved boundary and the grading of the mesh hardest.\n")
    add(peak_table(fam["inglis"]) + "\n")

    add("## Howland: circular hole in a finite-width strip\n")
    add("A strip 100 mm wide and 1000 mm long (the loaded ends 5 widths from the hole), 1 mm thick, in tension"
        " along its length, a central hole of diameter d. Howland (1930) gives the gross-section Kt of an infinitely"
        " long strip in a table to three figures; the tolerance of 1 % is that table's precision. A second reference"
        " is the curve fit of Pilkey & Pilkey, Peterson's Stress Concentration Factors, 3rd ed. (2008), Chart 4.1"
        " (the form the test suite uses), which agrees with Howland to about 0.5 %. The error estimate bounds the"
        " discretisation error only; the difference from the table includes the table's own rounding and is not"
        " expected to lie within the estimate.\n")
    hrows = []
    for r in fam["howland"]:
        fit = 100.0 * howland_fit(r["d_over_w"])
        hrows.append([r["case"], f"{r['published']:.4g}", r["source"], f"{fit:.2f}",
                      "Pilkey & Pilkey (2008), Chart 4.1 fit", f"{r['holeshape']:.4f}",
                      _pct(r["error_pct"], signed=True),
                      _pct(100.0 * (r["holeshape"] / fit - 1.0), signed=True), f"{r['tolerance_pct']:g} %",
                      _yes(r["within"]), _pct(r["error_estimate_pct"]), _model(r), f"{r['seconds']:.2f} s"])
    add(_table(["case", "Howland (MPa)", "source", "chart fit (MPa)", "source", "holeshape (MPa)", "error vs Howland",
                "error vs fit", "tolerance (vs Howland)", "within", "error estimate", "model, DOFs", "time"], hrows)
        + "\n")

    add("## NAFEMS LE1: elliptic membrane\n")
    add("The Standard NAFEMS Benchmarks, Rev. 3 (1990), test LE1: a quarter of the region between the ellipses"
        " x^2/2000^2 + y^2/1000^2 = 1 and x^2/3250^2 + y^2/2750^2 = 1 (mm), E = 210000 MPa, nu = 0.3, a uniform"
        " outward pressure of 10 MPa on the outer ellipse, symmetry on both axes; the target is sigma_yy = 92.7 MPa"
        f" at D = (2000, 0) mm. Meshed by gmsh on its own arcs (element size {LE1_MESH_MM:g} mm, a quarter of that at"
        " D), 6-node triangles with their mid-side nodes on the exact ellipses, solved by the plane-stress solve and"
        " read at D by the boundary stress recovery. One mesh level only, so no error estimate: the check is of"
        " the solve and the recovery on a benchmark geometry, not of the evaluation's peak search. Tolerance 1 %:"
        " the target is given to three figures.\n")
    add(peak_table(fam["nafems"], bound=False) + "\n")

    add("## Reinforced holes: Mansfield's neutral hole and the Lame doubler ring\n")
    add("A circle of radius a = 10 mm in the large panel under equibiaxial stress s = 100 MPa, reinforced as a study's"
        " `[reinforcement]` would reinforce it. Doubler ring (`kind = \"ring\"`, width 10 mm, so b = 2a): the Lame"
        " solutions of the ring (sigma_r = P (1 - a^2/r^2)) and of the web beyond it (sigma_r = s + Q/r^2), joined by"
        " force per unit length and by hoop strain at r = b, give the hoop stress 2 P at the hole edge"
        " (`holeshape.validation.lame_ring_hoop`, a closed form derived for this idealisation). Flange"
        " (`kind = \"flange\"`, an edge member of area A carrying hoop force only): the Lame solution of the sheet"
        " with the member's hoop strain equal to the sheet's at the edge; the member takes the radial stress"
        " q = 2 s / (1 + nu + a t / A), and the sheet's hoop stress at the edge is 2 s - q. At A = a t / (1 - nu)"
        " the sheet stays uniform (Kt = 1): Mansfield's (1953) neutral hole. With a reinforcement the peak a design"
        " reports is the largest over every place it is looked for (the cutout edge, the web at a ring's outer"
        " edge, a flange's own axial stress); the `governs at` column says which one governed each case.\n")
    rows_r = []
    for r in fam["reinforced"]:
        rows_r.append([r["case"], f"{r['published']:.4g}", r["source"], f"{r['holeshape']:.4f}", r["location"],
                       _pct(r["error_pct"], signed=True), f"{r['tolerance_pct']:g} %", _yes(r["within"]),
                       _pct(r["error_estimate_pct"]), _bounded(r), _model(r), f"{r['seconds']:.2f} s"])
    add(_table(["case", "reference (MPa)", "source", "holeshape (MPa)", "governs at", "error", "tolerance",
                "within", "error estimate", "estimate >= error", "model, DOFs", "time"], rows_r) + "\n")

    add("## Plate buckling: the simply supported square\n")
    add(f"A square plate of side b = 200 mm, 1 mm thick, E = {E_REF:g} MPa, nu = {NU_REF:g}, every edge simply"
        " supported (deflection held, free to rotate), loaded by 10 MPa of uniaxial compression or of shear on"
        " traction edges."
        " The critical stress is sigma_cr = k pi^2 E / (12 (1 - nu^2)) (t / b)^2; the reference load factor is that"
        " stress over 10 MPa. Bryan (1891): k = 4 in compression, exact. Stein & Neff (1947), NACA TN 1222, as"
        " tabulated by Timoshenko & Gere (1961): k = 9.34 in shear, about 0.17 % above the converged 9.3245, hence"
        " the 1 % tolerance. Solved by the stability layer: Morley plate triangles on two nested structured meshes,"
        " the reported factor their Richardson extrapolation, the estimate the whole extrapolation step plus a"
        " floor.\n")
    brow = []
    for r in fam["buckling"]:
        brow.append([r["case"], f"{r['k_published']:g}", r["source"], f"{r['published']:.4f}",
                     f"{r['holeshape']:.4f}", f"{r['k_holeshape']:.4f}", _pct(r["error_pct"], signed=True),
                     f"{r['tolerance_pct']:g} %", _yes(r["within"]), _pct(r["error_estimate_pct"], 2), _bounded(r),
                     f"{r['dofs']}", f"{r['seconds']:.2f} s"])
    add(_table(["case", "reference k", "source", "reference load factor", "holeshape load factor", "holeshape k",
                "error", "tolerance", "within", "error estimate", "estimate >= error", "plate DOFs", "time"], brow)
        + "\n")
    add("Buckling of plates with an opening is checked in the test suite against an independent computed table"
        " (the C1 Argyris element on the same prestress) and against published design rules and trends; those"
        " checks are listed in the next section.\n")

    add("## Checks held by the test suite\n")
    add("The test suite (`make test`) repeats the cases above at the standard level and adds checks that have no"
        " row here: whole-boundary distributions, the convergence rate, beam-web load cases, rows of openings, the"
        " net section, the effective stiffness, reinforcement limits and edge beams, buckling of holed plates and"
        " the error estimate's bound. The table below is read from the tests' own docstrings and comments: every test"
        " function that names a published source, a derivation or a law of statics beside its value, with the"
        " references it names and its own words (cut at about 400 characters). \"from memory\" marks a value the"
        " test recalls without a source at hand; such a check is weaker evidence than a cited one. Each test's"
        " tolerance is justified in the comment beside its assertion.\n")
    add(suite_table(suite) + "\n")
    add(f"{len(suite)} tests listed, from {len({r['file'] for r in suite})} test files.\n")
    return "\n".join(out)


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description="holeshape against published solutions")
    ap.add_argument("accuracy", nargs="?", default="standard", choices=ACCURACIES)
    ap.add_argument("--write", metavar="PATH", help="write the whole verification manual (Markdown) to PATH")
    args = ap.parse_args(argv)
    result = solve(args.accuracy)
    print(f"Validation at accuracy = {args.accuracy!r} (panel {BIG:g} mm square for the infinite-plate cases)\n")
    print(summary_table(result))
    print(f"\nall within tolerance: {all(r['within'] for r in result['rows'])}")
    if args.write:
        path = Path(args.write)
        path.parent.mkdir(parents=True, exist_ok=True)
        tmp = path.with_name(path.name + ".tmp")
        tmp.write_text(manual(result), encoding="utf-8")
        tmp.replace(path)
        print(f"wrote {path}: {len(result['rows'])} cases at {args.accuracy!r} in {result['seconds']:.1f} s")
    return 0


if __name__ == "__main__":
    sys.exit(main())
