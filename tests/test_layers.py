"""The one-way layers of DEVELOPERS.md hold: a module imports only from its own layer or the layers below it
(lazy imports inside functions included), and no module imports another module's private names."""

from __future__ import annotations

import ast
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parents[1] / "holeshape"

# lowest first, as in the DEVELOPERS.md layer table
LAYERS = [
    ("holeshape", "holeshape.errors", "holeshape.progress", "holeshape.tablefields"),
    ("holeshape.geometry", "holeshape.elastic", "holeshape.fatigue"),
    ("holeshape.study", "holeshape.parameters", "holeshape.goals"),
    ("holeshape.mesh",),
    ("holeshape.solve", "holeshape.homogenise"),
    ("holeshape.plate",),
    ("holeshape.stability",),
    ("holeshape.evaluate",),
    ("holeshape.checks",),
    ("holeshape.studyfile",),
    ("holeshape.search", "holeshape.validation"),
    ("holeshape.record",),
    ("holeshape.output",),
    ("holeshape.optimise", "holeshape.finish", "holeshape.final", "holeshape.checkrun"),
    ("holeshape.compare", "holeshape.sweep"),
    ("holeshape.cli",),
]


def rank(module: str) -> int:
    best = None
    for i, names in enumerate(LAYERS):
        for name in names:
            if (module == name or module.startswith(name + ".")) and (best is None or len(name) > best[1]):
                best = (i, len(name))
    if best is None:
        raise AssertionError(f"{module} is in no layer of DEVELOPERS.md")
    return best[0]


def modules():
    for path in sorted(PACKAGE.rglob("*.py")):
        rel = path.relative_to(PACKAGE.parent).with_suffix("")
        parts = list(rel.parts)
        if parts[-1] == "__init__":
            parts = parts[:-1]
        yield ".".join(parts), ast.parse(path.read_text())


@pytest.mark.parametrize("name,tree", list(modules()), ids=lambda v: v if isinstance(v, str) else "")
def test_imports_go_down_the_layers(name, tree):
    mine = rank(name)
    for node in ast.walk(tree):
        if isinstance(node, ast.ImportFrom) and node.module and node.module.startswith("holeshape"):
            targets = [node.module]
            private = [a.name for a in node.names if a.name.startswith("_") and not a.name.startswith("__")]
            assert not private, f"{name} imports private names {private} from {node.module}"
        elif isinstance(node, ast.Import):
            targets = [a.name for a in node.names if a.name.startswith("holeshape")]
        else:
            continue
        for target in targets:
            assert rank(target) <= mine, f"{name} (layer {mine}) imports {target} (layer {rank(target)})"
