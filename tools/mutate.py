#!/usr/bin/env python
"""Small AST mutation tester for the core physics and parsing modules.

Why our own: mutmut 3 mutates only the bodies of functions (not module-level
tables such as the WDS column spec or the sky-brightness anchors, which are
exactly where one-number slips hide) and needs a copy of the tree; this script
mutates every expression of one module, serves the mutated source through an
import hook (the file on disk is never touched) and runs the narrow test files
in a forked child of a process that has already imported numpy, scipy, pandas,
astropy and pytest, so each mutant costs only its tests.

Usage (from the repository root, one module at a time, low priority)::

    nice -n 19 python tools/mutate.py planner/catalogs/wds.py            # tests from TESTS below
    nice -n 19 python tools/mutate.py planner/verdict.py --tests tests/test_verdict.py
    python tools/mutate.py planner/catalogs/wds.py --list               # mutants only, no run
    python tools/mutate.py planner/catalogs/wds.py --only 12 40         # re-run some mutants

Tests run in the order given, with ``-x``: put the fastest, most specific file
first.  ``--every N`` runs a systematic 1-in-N sample of a large module.
Results go to ``mutation/<module>.json`` and a summary to stdout; survivors are
listed with their line and the mutated code.  A line ending in
``# pragma: no mutate`` is skipped.  Operators: arithmetic and augmented
assignment swaps (+/-, * and /, // -> /, % -> //, ** -> *, bit operators),
comparison swaps (< and <=, > and >=, == and !=, in / not in, is / is not),
and/or, removal of ``not`` and unary minus, integers n -> n + 1, floats
x -> 1.1 x (0.0 -> 1.0), True <-> False.  Strings, docstrings, annotations,
f-strings and ``__all__`` are not mutated.
"""

from __future__ import annotations

import argparse
import ast
import copy
import importlib.abc
import importlib.util
import json
import os
import signal
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]

#: The narrowest test files that exercise each module (the runner).
TESTS = {
    "planner/catalogs/wds.py": ["tests/test_catalog_wds_oracles.py", "tests/test_catalog_wds.py"],
    "planner/catalogs/orb6.py": ["tests/test_catalog_orb6_oracles.py", "tests/test_catalog_orb6.py"],
    "planner/optics/limits.py": ["tests/test_optics_limits.py", "tests/test_optics_limits_edges.py",
                                 "tests/test_outside_values.py"],
    "planner/optics/rules.py": ["tests/test_optics_rules.py", "tests/test_outside_values.py"],
    "planner/optics/seeing.py": ["tests/test_optics_seeing.py"],
    "planner/optics/separability.py": ["tests/test_optics_separability.py",
                                       "tests/test_optics_seeing.py"],
    "planner/optics/telescope.py": ["tests/test_optics_telescope.py"],
    "planner/optics/visibility_limit.py": ["tests/test_optics_visibility.py",
                                           "tests/test_outside_values.py"],
    "planner/optics/figures.py": ["tests/test_optics_figures.py"],
    "planner/sky/atmosphere.py": ["tests/test_sky_atmosphere_formulas.py", "tests/test_sky_atmosphere.py",
                                  "tests/test_outside_values.py"],
    "planner/sky/placement.py": ["tests/test_sky_altaz.py", "tests/test_sky_visibility.py"],
    "planner/motion/epochs.py": ["tests/test_motion_geometry.py", "tests/test_motion_epochs.py"],
    "planner/motion/geometry.py": ["tests/test_motion_geometry.py"],
    "planner/motion/kepler.py": ["tests/test_motion_kepler.py"],
    "planner/motion/orbits.py": ["tests/test_motion_orbits.py"],
    "planner/verdict.py": ["tests/test_verdict.py", "tests/test_outside_values.py"],
    "planner/plan/schedule.py": ["tests/test_plan_schedule_objective.py",
                                 "tests/test_plan_schedule.py"],
}

_BIN = {ast.Add: ast.Sub, ast.Sub: ast.Add, ast.Mult: ast.Div, ast.Div: ast.Mult,
        ast.FloorDiv: ast.Div, ast.Mod: ast.FloorDiv, ast.Pow: ast.Mult,
        ast.BitAnd: ast.BitOr, ast.BitOr: ast.BitAnd, ast.BitXor: ast.BitAnd,
        ast.LShift: ast.RShift, ast.RShift: ast.LShift}
_CMP = {ast.Lt: ast.LtE, ast.LtE: ast.Lt, ast.Gt: ast.GtE, ast.GtE: ast.Gt,
        ast.Eq: ast.NotEq, ast.NotEq: ast.Eq, ast.In: ast.NotIn, ast.NotIn: ast.In,
        ast.Is: ast.IsNot, ast.IsNot: ast.Is}


class _Mutator(ast.NodeTransformer):
    """Walks the tree in a fixed order; counts mutation sites and applies the
    one numbered ``target`` (``None``: only count and describe)."""

    def __init__(self, source_lines: list[str], target: int | None = None):
        self.lines = source_lines
        self.target = target
        self.count = 0
        self.sites: list[dict] = []

    # -- helpers -----------------------------------------------------------
    def _skip_line(self, node) -> bool:
        line = self.lines[node.lineno - 1] if getattr(node, "lineno", None) else ""
        return "pragma: no mutate" in line

    def _site(self, node, what: str) -> bool:
        """Register a site; True when it is the one to apply."""
        if self._skip_line(node):
            return False
        n = self.count
        self.count += 1
        if self.target is None:
            self.sites.append({"id": n, "line": node.lineno, "col": node.col_offset,
                               "what": what,
                               "code": self.lines[node.lineno - 1].strip()})
        return n == self.target

    # -- nodes that are never mutated -----------------------------------
    def visit_JoinedStr(self, node):
        return node

    def visit_FunctionDef(self, node):
        node.args = self.visit(node.args)
        node.body = self._body(node.body)
        return node

    visit_AsyncFunctionDef = visit_FunctionDef

    def visit_ClassDef(self, node):
        node.body = self._body(node.body)
        return node

    def visit_Module(self, node):
        node.body = self._body(node.body)
        return node

    def _body(self, body):
        out = []
        for i, stmt in enumerate(body):
            if i == 0 and isinstance(stmt, ast.Expr) and isinstance(stmt.value, ast.Constant) \
                    and isinstance(stmt.value.value, str):
                out.append(stmt)          # docstring
                continue
            out.append(self.visit(stmt))
        return out

    def visit_arg(self, node):
        return node                       # annotations

    def visit_AnnAssign(self, node):
        if node.value is not None:
            node.value = self.visit(node.value)
        return node

    def visit_Assign(self, node):
        if any(isinstance(t, ast.Name) and t.id == "__all__" for t in node.targets):
            return node
        return self.generic_visit(node)

    def visit_Import(self, node):
        return node

    visit_ImportFrom = visit_Import

    # -- mutations -----------------------------------------------------------
    def visit_BinOp(self, node):
        self.generic_visit(node)
        new = _BIN.get(type(node.op))
        if new and self._site(node, f"{type(node.op).__name__} -> {new.__name__}"):
            node.op = new()
        return node

    def visit_AugAssign(self, node):
        self.generic_visit(node)
        new = _BIN.get(type(node.op))
        if new and self._site(node, f"{type(node.op).__name__}= -> {new.__name__}="):
            node.op = new()
        return node

    def visit_Compare(self, node):
        self.generic_visit(node)
        for i, op in enumerate(node.ops):
            new = _CMP.get(type(op))
            if new and self._site(node, f"{type(op).__name__} -> {new.__name__}"):
                node.ops[i] = new()
        return node

    def visit_BoolOp(self, node):
        self.generic_visit(node)
        new = ast.Or if isinstance(node.op, ast.And) else ast.And
        if self._site(node, f"{type(node.op).__name__} -> {new.__name__}"):
            node.op = new()
        return node

    def visit_UnaryOp(self, node):
        self.generic_visit(node)
        if isinstance(node.op, (ast.Not, ast.USub, ast.Invert)):
            if self._site(node, f"drop {type(node.op).__name__}"):
                return node.operand
        return node

    def visit_Constant(self, node):
        v = node.value
        if isinstance(v, bool):
            if self._site(node, f"{v} -> {not v}"):
                return ast.copy_location(ast.Constant(not v), node)
        elif isinstance(v, int):
            if self._site(node, f"{v} -> {v + 1}"):
                return ast.copy_location(ast.Constant(v + 1), node)
        elif isinstance(v, float):
            new = v * 1.1 if v else 1.0
            if self._site(node, f"{v!r} -> {new!r}"):
                return ast.copy_location(ast.Constant(new), node)
        return node


def _mutants(path: Path) -> tuple[ast.Module, list[dict]]:
    src = path.read_text()
    tree = ast.parse(src)
    m = _Mutator(src.splitlines())
    m.visit(copy.deepcopy(tree))
    return tree, m.sites


def _mutated_source(tree: ast.Module, lines: list[str], target: int | None) -> str:
    t = copy.deepcopy(tree)
    if target is not None:
        m = _Mutator(lines, target)
        t = m.visit(t)
    ast.fix_missing_locations(t)
    return ast.unparse(t)


class _Loader(importlib.abc.Loader):
    def __init__(self, path: str, source: str):
        self.path, self.source = path, source

    def create_module(self, spec):
        return None

    def exec_module(self, module):
        code = compile(self.source, self.path, "exec")
        exec(code, module.__dict__)


class _Finder(importlib.abc.MetaPathFinder):
    def __init__(self, name: str, path: str, source: str):
        self.name, self.path, self.source = name, path, source

    def find_spec(self, fullname, path=None, target=None):
        if fullname != self.name:
            return None
        return importlib.util.spec_from_loader(fullname, _Loader(self.path, self.source),
                                               origin=self.path)


def _run_child(modname: str, path: str, source: str, tests: list[str], verbose: bool) -> int:
    """In a forked child: serve ``source`` for ``modname`` and run pytest."""
    for k in [k for k in sys.modules if k == "planner" or k.startswith("planner.")]:
        del sys.modules[k]
    sys.meta_path.insert(0, _Finder(modname, path, source))
    if not verbose:
        fd = os.open(os.devnull, os.O_WRONLY)
        os.dup2(fd, 1)
        os.dup2(fd, 2)
    import pytest
    os.environ.setdefault("HYPOTHESIS_PROFILE", "ci")
    return int(pytest.main([*tests, "-x", "-q", "-p", "no:cacheprovider", "--no-header",
                            "-W", "ignore"]))


def _fork_run(modname, path, source, tests, timeout, verbose=False) -> tuple[str, float]:
    t0 = time.monotonic()
    pid = os.fork()
    if pid == 0:
        try:
            os.setpgid(0, 0)
            code = _run_child(modname, path, source, tests, verbose)
        except BaseException:
            code = 99
        os._exit(code)
    while True:
        done, status = os.waitpid(pid, os.WNOHANG)
        if done:
            code = os.waitstatus_to_exitcode(status)
            break
        if time.monotonic() - t0 > timeout:
            try:
                os.killpg(pid, signal.SIGKILL)
            except ProcessLookupError:
                pass
            os.waitpid(pid, 0)
            return "timeout", time.monotonic() - t0
        time.sleep(0.05)
    dt = time.monotonic() - t0
    if code == 0:
        return "survived", dt
    if code == 5:                       # no tests collected
        return "no-tests", dt
    return "killed", dt


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("module", nargs="?", help="e.g. planner/catalogs/wds.py")
    ap.add_argument("--summary", action="store_true",
                    help="print a Markdown table of the results in mutation/*.json and stop")
    ap.add_argument("--tests", nargs="+", help="test files (default: the TESTS table)")
    ap.add_argument("--only", nargs="+", type=int, help="mutant ids to run")
    ap.add_argument("--list", action="store_true", help="list the mutants and stop")
    ap.add_argument("--every", type=int, default=1,
                    help="run every N-th mutant only (a systematic sample, reported as such)")
    ap.add_argument("--out", help="result file (default mutation/<name>.json)")
    args = ap.parse_args(argv)

    os.chdir(ROOT)
    if args.summary:
        return _summary()
    if not args.module:
        ap.error("give a module (or --summary)")
    rel = args.module
    path = ROOT / rel
    modname = rel[:-3].replace("/", ".")
    tests = [t for t in (args.tests or TESTS.get(rel, [])) if (ROOT / t).exists()]
    if not tests:
        ap.error(f"no test files for {rel}")
    tree, sites = _mutants(path)
    lines = path.read_text().splitlines()
    if args.list:
        for s in sites:
            print(f"{s['id']:4d} L{s['line']:<4d} {s['what']:<22s} {s['code']}")
        print(f"{len(sites)} mutants")
        return 0

    # Heavy imports once, in the parent, so that each forked child pays only
    # for the project's modules and its tests.
    import numpy, scipy.special, scipy.optimize, scipy.interpolate, pandas  # noqa: F401
    import astropy.coordinates, astropy.time, astropy.units  # noqa: F401
    import hypothesis, pytest  # noqa: F401
    try:
        import skyfield.api, erfa  # noqa: F401
    except ImportError:
        pass

    base_src = _mutated_source(tree, lines, None)
    status, dt = _fork_run(modname, str(path), base_src, tests, timeout=3600)
    if status != "survived":
        print(f"baseline run does not pass ({status}); fix the tests first", file=sys.stderr)
        _fork_run(modname, str(path), base_src, tests, timeout=3600, verbose=True)
        return 2
    # generous: the machine is shared, and a slow run must not pass for a killed mutant
    timeout = 10 * dt + 60
    print(f"{rel}: {len(sites)} mutants, tests {' '.join(tests)}, baseline {dt:.1f} s", flush=True)

    out = Path(args.out or ROOT / "mutation" / (modname.replace("planner.", "") + ".json"))
    out.parent.mkdir(exist_ok=True)
    previous = {}
    if args.only and out.exists():
        previous = {r["id"]: r for r in json.loads(out.read_text())["mutants"]}
    ids = args.only if args.only else [s["id"] for s in sites][::max(1, args.every)]
    results = dict(previous)
    for i in ids:
        s = sites[i]
        try:
            src = _mutated_source(tree, lines, i)
            compile(src, str(path), "exec")
        except Exception as exc:                      # noqa: BLE001
            results[i] = {**s, "status": "invalid", "why": str(exc)}
            continue
        status, dt = _fork_run(modname, str(path), src, tests, timeout)
        results[i] = {**s, "status": status, "seconds": round(dt, 1)}
        print(f"{i:4d} L{s['line']:<4d} {status:<9s} {dt:6.1f}s {s['what']:<22s} {s['code'][:70]}",
              flush=True)

    rows = [results[k] for k in sorted(results)]
    counted = [r for r in rows if r["status"] in ("killed", "survived", "timeout")]
    killed = sum(r["status"] in ("killed", "timeout") for r in counted)
    import subprocess
    commit = subprocess.run(["git", "rev-parse", "--short", "HEAD"], capture_output=True,
                            text=True).stdout.strip()
    summary = {"module": rel, "tests": tests, "commit": commit, "every": args.every,
               "sites": len(sites), "mutants": rows,
               "killed": killed, "total": len(counted),
               "kill_rate": round(killed / len(counted), 4) if counted else None}
    out.write_text(json.dumps(summary, indent=1))
    print(f"{rel}: killed {killed}/{len(counted)}"
          f" ({100 * killed / max(1, len(counted)):.1f} %) at {commit}")
    for r in counted:
        if r["status"] == "survived":
            print(f"  SURVIVED {r['id']:4d} L{r['line']:<4d} {r['what']:<22s} {r['code']}")
    return 0


def _summary() -> int:
    print("| module | commit | mutants run (of sites) | killed | kill rate | survivors |")
    print("|---|---|---|---|---|---|")
    for f in sorted((ROOT / "mutation").glob("*.json")):
        r = json.loads(f.read_text())
        surv = [m for m in r["mutants"] if m["status"] == "survived"]
        every = r.get("every", 1)
        if every == 1 and r["total"] < r.get("sites", r["total"]):
            every = round(r["sites"] / r["total"])
        sample = f", 1 in {every}" if every > 1 else ""
        rate = f"{100 * r['kill_rate']:.1f} %" if r["kill_rate"] is not None else "-"
        ids = ", ".join(f"{m['id']} (L{m['line']}: {m['what']})" for m in surv) or "none"
        print(f"| `{r['module']}` | {r['commit']} | {r['total']} (of {r.get('sites', '?')}{sample})"
              f" | {r['killed']} | {rate} | {ids} |")
    return 0


if __name__ == "__main__":
    sys.exit(main())
