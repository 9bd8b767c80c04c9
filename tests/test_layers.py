"""The import rules of DEVELOPERS.md, checked on the source (AST), not by convention.

Layers, left to right: the foundation (``errors``, ``schema``, ``config``, ``utc``, ``units``
and the package root), then ``catalogs`` -> ``motion`` -> ``sky`` -> ``optics`` -> ``verdict``
-> ``plan`` -> ``report``, then the public ``api`` and the command line.  A module may import
from its own layer and from layers to its left, never from a layer to its right; in particular
``plan`` never imports ``report`` and ``config`` never imports ``plan``.  Imports inside
functions count too.
"""

from __future__ import annotations

import ast
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1] / "planner"

FOUNDATION = {"errors", "schema", "config", "utc", "units", "__init__"}
ORDER = ["catalogs", "motion", "sky", "optics", "verdict", "plan", "report", "api", "cli", "__main__"]


def layer_of(top: str) -> int:
    """0 for the foundation, then 1, 2, ... left to right."""
    if top in FOUNDATION:
        return 0
    return ORDER.index(top) + 1


def _top(module: str) -> str | None:
    parts = module.split(".")
    if parts[0] != "planner":
        return None
    if len(parts) == 1:
        return "__init__"
    return parts[1].removesuffix(".py")


def _imports(path: Path):
    tree = ast.parse(path.read_text("utf-8"), filename=str(path))
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            for a in node.names:
                yield node.lineno, a.name
        elif isinstance(node, ast.ImportFrom) and node.module and node.level == 0:
            yield node.lineno, node.module
            if node.module == "planner":  # from planner import X -> planner.X
                for a in node.names:
                    yield node.lineno, f"planner.{a.name}"


def _modules():
    for p in sorted(ROOT.rglob("*.py")):
        rel = p.relative_to(ROOT)
        top = rel.parts[0].removesuffix(".py")
        yield p, top


def _violations():
    out = []
    for path, top in _modules():
        me = layer_of(top)
        for line, mod in _imports(path):
            other = _top(mod)
            if other is None or other == "__init__" and mod == "planner":
                continue
            if other not in FOUNDATION and other not in ORDER:
                continue  # a module of the foundation not listed (e.g. a new file): judged below
            if layer_of(other) > me:
                out.append(f"{path.relative_to(ROOT.parent)}:{line} imports {mod} (layer {other!r} is to the right "
                           f"of {top!r})")
    return out


def test_every_top_level_module_has_a_layer():
    tops = {top for _, top in _modules()}
    unknown = sorted(t for t in tops if t not in FOUNDATION and t not in ORDER)
    assert unknown == [], f"add these to a layer in tests/test_layers.py and DEVELOPERS.md: {unknown}"


def test_no_module_imports_a_layer_to_its_right():
    assert _violations() == []


@pytest.mark.parametrize("layer, forbidden", [("plan", "report"), ("config", "plan"), ("config", "sky"),
                                               ("config", "optics"), ("catalogs", "plan")])
def test_named_rules(layer, forbidden):
    bad = [f"{p.relative_to(ROOT.parent)}:{line} {mod}" for p, top in _modules() if top == layer
           for line, mod in _imports(p) if _top(mod) == forbidden]
    assert bad == []


def test_the_checker_sees_a_violation(tmp_path):
    # the checker itself must be able to fail: a plan module importing report is caught
    src = "def f():\n    from planner.report.exports import render_text\n"
    p = tmp_path / "x.py"
    p.write_text(src)
    found = [mod for _, mod in _imports(p)]
    assert found == ["planner.report.exports"] and layer_of(_top(found[0])) > layer_of("plan")
