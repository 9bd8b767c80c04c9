"""Who may import whom, checked by reading the modules' syntax trees (every ``import``,
at the top or inside a function): the command line talks only to the public API, the
report layer, config and errors; the plan layer never imports the report layer
(DEVELOPERS.md, "Architecture and data flow"; issue 14 "Must show")."""

from __future__ import annotations

import ast
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parents[1] / "planner"
CLI_MAY_IMPORT = ("planner.api", "planner.report", "planner.config", "planner.errors", "planner.cli")


def planner_imports(path: Path, package: str | None = None) -> list[tuple[int, str]]:
    """(line, module) of every import of a planner module in the file; ``from planner import x``
    counts as ``planner.x``, a relative import is resolved against the file's package."""
    tree = ast.parse(path.read_text(encoding="utf-8"), filename=str(path))
    if package is None:
        package = ".".join(path.relative_to(PACKAGE.parent).with_suffix("").parts[:-1])
    found = []
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            found += [(node.lineno, a.name) for a in node.names]
        elif isinstance(node, ast.ImportFrom):
            base = node.module or ""
            if node.level:
                parts = package.split(".")[: len(package.split(".")) - node.level + 1]
                base = ".".join(parts + ([base] if base else []))
            if base == "planner":
                found += [(node.lineno, f"planner.{a.name}") for a in node.names]
            else:
                found.append((node.lineno, base))
    return [(n, m) for n, m in found if m == "planner" or m.startswith("planner.")]


def _allowed(module: str, prefixes) -> bool:
    return any(module == p or module.startswith(p + ".") for p in prefixes)


CLI_FILES = sorted((PACKAGE / "cli").glob("*.py"))


@pytest.mark.parametrize("path", CLI_FILES, ids=lambda p: p.name)
def test_cli_imports_only_the_public_api_report_config_errors(path):
    bad = [(n, m) for n, m in planner_imports(path) if not _allowed(m, CLI_MAY_IMPORT)]
    assert not bad, f"{path.name} imports {bad}"


@pytest.mark.parametrize("path", sorted((PACKAGE / "plan").glob("*.py")), ids=lambda p: p.name)
def test_plan_never_imports_report(path):
    bad = [(n, m) for n, m in planner_imports(path) if _allowed(m, ("planner.report", "planner.cli"))]
    assert not bad, f"{path.name} imports {bad}"


def test_the_checker_sees_imports_inside_functions(tmp_path):
    """The check would catch the old pair command, which imported planner.motion inside a function."""
    p = tmp_path / "probe.py"
    p.write_text("def f():\n    from planner.motion.epochs import JD_B1900\n    from planner import sky\n"
                 "    from ..plan import night\n")
    found = planner_imports(p, package="planner.cli")
    assert found == [(2, "planner.motion.epochs"), (3, "planner.sky"), (4, "planner.plan")]
    assert not _allowed(found[0][1], CLI_MAY_IMPORT)
