"""The README stays true to the code: its commands run as written.

Checked: the first of the two fresh-machine commands (after the install) runs the
night plan on the bundled sample and writes the HTML plan; the second is the test
command that .ci/run uses; every ``splitplan`` line in "Other things it does" runs
(in a temporary folder, with the repository's examples/ paths, network blocked).
"""

from __future__ import annotations

import re
import shlex
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
README = (ROOT / "README.md").read_text("utf-8")


def code_blocks(text: str) -> list[str]:
    return re.findall(r"```\n(.*?)```", text, flags=re.S)


def test_two_fresh_machine_commands():
    blocks = code_blocks(README.split("## Two commands", 1)[1])
    first, second = blocks[0].strip(), blocks[1].strip()
    assert first.startswith("python -m pip install . && splitplan night ")
    assert second == 'python -m pip install ".[test]" && python -m pytest -q'
    ci = (ROOT / ".ci" / "run").read_text("utf-8")
    assert "\npython -m pytest -q\n" in ci
    # the demo command CI runs on the installed package is the README's
    night = first.split("&&", 1)[1].split()
    assert " ".join(night[1:]).replace("demo-plan.html", "") in " ".join(ci.replace("\\\n", " ").split())


def test_first_command_runs_on_the_sample(cli, tmp_path, monkeypatch):
    first = code_blocks(README.split("## Two commands", 1)[1])[0]
    args = shlex.split(first.split("&&", 1)[1])[1:]
    monkeypatch.chdir(tmp_path)
    code, out, err = cli(*args)
    assert code == 0, err
    assert (tmp_path / "demo-plan.html").stat().st_size > 10_000
    # the trimmed output shown in the README is the real output, line for line
    shown = code_blocks(README.split("## What the first command prints", 1)[1])[0].splitlines()
    real = out.splitlines()
    for line in shown:
        if line.strip() in ("...",) or line.startswith("!") or line.startswith("splitplan:"):
            continue
        assert line in real, line


def _other_commands() -> list[list[str]]:
    block = code_blocks(README.split("## Other things it does", 1)[1])[0]
    cmds = []
    for line in block.splitlines():
        if not line.startswith("splitplan "):
            continue
        argv = shlex.split(line.split("#", 1)[0])[1:]
        cmds.append([str(ROOT / a) if a.startswith("examples/") else a for a in argv])
    return cmds


@pytest.mark.parametrize("argv", _other_commands(), ids=lambda a: " ".join(a[:2]))
def test_other_commands_run(cli, tmp_path, monkeypatch, argv):
    monkeypatch.chdir(tmp_path)
    if argv[:1] == ["night"] and "--plan" not in argv and "--date" not in argv:
        argv = [*argv, "--date", "2026-12-05"]
    code, out, err = cli(*argv)
    assert code == 0, err


def test_log_fit_on_the_invented_demo_log(cli, tmp_path, monkeypatch):
    """The observation-log section: its import and fit run, and the lines shown are the real output."""
    part = README.split("## Your own limit", 1)[1]
    blocks = code_blocks(part)
    cmds = [shlex.split(line.split("#", 1)[0])[1:] for line in blocks[0].splitlines()
            if line.startswith("splitplan log ") and "log add" not in line]
    assert [c[:2] for c in cmds] == [["log", "import"], ["log", "fit"]]
    monkeypatch.chdir(tmp_path)
    code, out, err = cli(*[str(ROOT / a) if a.startswith("examples/") else a for a in cmds[0]])
    assert code == 0, err
    code, out, err = cli(*cmds[1])
    assert code == 0, err
    real = out.splitlines()
    for line in blocks[1].splitlines():
        assert line in real, line
