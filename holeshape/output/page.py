"""The pieces a report is made of: one value, parameter or requirement set for people, and the page (HTML with every
image embedded, or Markdown with the figures beside it). No results are computed here."""

from __future__ import annotations

import base64
import html
from pathlib import Path
from typing import TYPE_CHECKING, Any

from holeshape.output.files import atomic_write
from holeshape.output.numbers import fmt

if TYPE_CHECKING:
    from holeshape.checks.base import Section

CSS = """body{font-family:sans-serif;max-width:60em;margin:2em auto;color:#111;line-height:1.4}
h1{font-size:1.6em}h2{font-size:1.25em;border-bottom:1px solid #888;margin-top:1.6em}
table{border-collapse:collapse;margin:.6em 0}td,th{border:1px solid #999;padding:.25em .6em;text-align:left}
th{background:#eee}img{max-width:100%;border:1px solid #ccc;margin:.4em 0}.warn{color:#a00;font-weight:bold}
.caution{border:2px solid #333;padding:.6em 1em}.summary{border:2px solid #333;padding:.2em 1em;margin:1em 0}
.pass{color:#060;font-weight:bold}@media print{h2{page-break-after:avoid}img{page-break-inside:avoid}}"""


# marks every image once the page has loaded, so a headless browser's DOM dump shows whether each one decoded
LOAD_CHECK = ("<script>window.addEventListener('load',function(){var n=0;document.querySelectorAll('img')"
              ".forEach(function(i){var ok=i.complete&&i.naturalWidth>0;i.setAttribute('data-loaded',ok?'yes':'no');"
              "if(ok){n++;}});document.body.setAttribute('data-images-loaded',String(n));});</script>")


def render_table(rows: list[dict], cols: list[tuple[str, str]], md: bool) -> str:
    def cell_of(r: dict, k: str) -> str:
        return fmt(k, r.get(k))

    if md:
        head = "| " + " | ".join(t for _, t in cols) + " |\n|" + "---|" * len(cols) + "\n"
        return head + "\n".join("| " + " | ".join(cell_of(r, k) for k, _ in cols) + " |" for r in rows) + "\n"
    out = "<table><tr>" + "".join(f"<th>{html.escape(t)}</th>" for _, t in cols) + "</tr>"
    for r in rows:
        out += "<tr>" + "".join(f"<td>{html.escape(cell_of(r, k))}</td>" for k, _ in cols) + "</tr>"
    return out + "</table>"


LENGTH_KEYS = ("radius", "a", "b", "length", "width", "corner_radius", "radii", "center")


def describe_params(params: dict) -> str:
    """Shape parameters for people: lengths to 0.1 mm, angles to 0.1 degree, the exponent to 3 figures."""
    def one(k: str, v: Any) -> str:
        if k.startswith("reinforcement."):
            from holeshape.geometry.reinforcement import value_text

            return value_text(k.split(".")[-1], v) if isinstance(v, (int, float)) and not isinstance(v, bool) \
                else f"{v}"
        if isinstance(v, list):
            return "(" + ", ".join(one(k, x) for x in v) + ")"
        if not isinstance(v, (int, float)) or isinstance(v, bool):
            return str(v)
        if k in ("rotation", "direction") or k.endswith((".rotation", ".direction")):
            return f"{v:.1f} deg"
        if k == "count":
            return f"{int(v)}"
        if k == "pitch":
            return f"{v:.1f} mm"
        if k == "exponent":
            return f"{v:.2f}"
        return f"{v:.1f} mm" if k in LENGTH_KEYS and k != "center" else f"{v:.1f}"
    kind = params.get("reinforcement.kind")

    def label(k: str) -> str:
        if k.startswith("reinforcement."):
            return f"{kind} {k.split('.', 1)[1].replace('_', ' ')}"
        return k.replace("_", " ")
    return ", ".join(f"{label(k)} {one(k, v)}" + (" mm" if k == "center" else "")
                     for k, v in params.items() if k != "reinforcement.kind")


def describe_value(v: Any) -> str:
    if isinstance(v, dict):
        out = f"searched from {v['min']:g} to {v['max']:g}"
        return out + (f" (current design {v['value']:g})" if v.get("value") is not None else "")
    return f"{v:g}" if isinstance(v, float) else str(v)


def describe_constraints(cons: dict) -> list[dict]:
    """The study's constraints as labelled rows (requirement, value with its unit)."""
    rows = []
    labels = {"min_area": ("removed area at least", "mm^2"), "max_area": ("removed area at most", "mm^2"),
              "area": ("removed area exactly", "mm^2"), "clearance": ("clearance round the access envelope", "mm"),
              "min_ligament": ("ligament to every panel edge at least", "mm"),
              "min_radius": ("smallest radius of the outline at least", "mm"),
              "min_margin": ("margin of safety at least", ""), "min_buckling_factor": ("buckling factor at least", ""),
              "max_added_mass": ("added mass of the reinforcement at most", "kg"),
              "max_reinforcement_area": ("reinforcement cross-section at most", "mm^2")}
    acc = cons.get("access")
    if acc:
        where = ("centred on the cutout" if acc.get("center") is None
                 else f"centred at ({acc['center'][0]:.1f}, {acc['center'][1]:.1f}) mm")
        size = (f"circle of diameter {acc['diameter']:.1f} mm" if acc.get("diameter") is not None
                else f"{acc['width']:.1f} x {acc['height']:.1f} mm rectangle")
        rot = f", turned {acc['rotation']:.1f} deg" if acc.get("rotation") else ""
        rows.append({"constraint": "access envelope the opening must contain", "value": f"{size}, {where}{rot}"})
    for k, (label, unit) in labels.items():
        v = cons.get(k)
        if v is None or (k == "clearance" and not v):
            continue
        shown = f"{v:+.2f}" if k == "min_margin" else (f"{v:.0f}" if unit == "mm^2" else f"{v:g}")
        rows.append({"constraint": label, "value": f"{shown} {unit}".strip()})
    for k, v in cons.get("more") or ():  # the keys the registered checks read (Check.constraint_keys)
        words = k.replace("_", " ")
        label = (words[4:] + " at least" if words.startswith("min ") else
                 words[4:] + " at most" if words.startswith("max ") else words)
        rows.append({"constraint": label, "value": f"{v:g}"})
    return rows


class Page:
    """The report being written: HTML or Markdown blocks in order, images embedded (HTML) or beside it (Markdown)."""

    parts: list[str]

    def __init__(self, run: Path, md: bool) -> None:
        self.run, self.md, self.parts = run, md, []

    def h2(self, t: str) -> None:
        self.parts.append(f"\n## {t}\n" if self.md else
                          f'<h2 id="{t.lower().replace(" ", "-")}">{html.escape(t)}</h2>')

    def para(self, t: str, cls: str | None = None) -> None:
        self.parts.append(f"\n{t}\n" if self.md else
                          f"<p{f' class={chr(34)}{cls}{chr(34)}' if cls else ''}>{html.escape(t)}</p>")

    def table(self, rows: list[dict], cols: list[tuple[str, str]]) -> None:
        self.parts.append(render_table(rows, cols, self.md))

    def raw(self, block: str) -> None:
        self.parts.append(block)

    def img(self, name: str, alt: str) -> None:
        p = self.run / name
        if not p.exists():
            return
        if self.md:
            self.parts.append(f"\n![{alt}]({name})\n")
        else:
            data = base64.b64encode(p.read_bytes()).decode()
            self.parts.append(f'<img alt="{html.escape(alt)}" src="data:image/png;base64,{data}">')

    def section(self, s: Section | dict, heading: bool = True) -> None:
        """A check's section (:class:`~holeshape.checks.Section` or its dict): heading, paragraphs, tables, images."""
        from holeshape.checks.base import Section

        s = s if isinstance(s, Section) else Section.from_dict(s)
        if heading:
            self.h2(s.title)
        for i, p in enumerate(s.paragraphs):
            self.para(("WARNING: " if s.warn and i == 0 else "") + p, "warn" if s.warn and i == 0 else None)
        for t in s.tables:
            self.table(list(t.rows), list(t.columns))
        for name, alt in s.images:
            self.img(name, alt)

    def write(self, title: str, stem: str = "report") -> Path:
        if self.md:
            return atomic_write(self.run / f"{stem}.md", "\n".join(self.parts))
        doc = (f"<!DOCTYPE html><html lang=\"en\"><head><meta charset=\"utf-8\"><title>{html.escape(title)}</title>"
               f"<style>{CSS}</style></head><body>" + "\n".join(self.parts) + LOAD_CHECK + "</body></html>\n")
        return atomic_write(self.run / f"{stem}.html", doc)


