"""The command-line machinery (planner/cli/parser.py, argparse): dispatch, help, usage errors,
and what the start-up path imports.

Exit codes follow the common command-line convention (common practice, no source): 0 done,
1 failure, 2 usage error, 130 interrupted (128 + SIGINT 2, POSIX shells).
"""

from __future__ import annotations

import json
import subprocess
import sys

import pytest

HEAVY = ("numpy", "pandas", "scipy", "astropy", "erfa", "matplotlib", "skyfield", "typer", "click", "pydantic")


def _every_command():
    from planner.cli import command_tree
    from planner.cli.parser import Command, walk

    return [path.split()[1:] for path, node in walk(command_tree()) if isinstance(node, Command)]


def test_start_up_imports_nothing_heavy():
    """Building the whole command tree (what --help pays) loads no numeric or plotting
    library and no third-party command-line framework."""
    code = ("import sys, json, planner.cli; planner.cli.command_tree(); "
            "print(json.dumps(sorted({m.split('.')[0] for m in sys.modules})))")
    r = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=120, check=True)
    loaded = set(json.loads(r.stdout))
    assert not loaded & set(HEAVY), loaded & set(HEAVY)


def test_pyproject_has_no_cli_framework():
    import tomllib
    from pathlib import Path

    deps = tomllib.loads((Path(__file__).resolve().parents[1] / "pyproject.toml").read_text())["project"]
    names = [d.split(">")[0].split("=")[0].split(";")[0].strip().lower() for d in deps["dependencies"]]
    assert "typer" not in names and "click" not in names


@pytest.mark.parametrize("words", _every_command(), ids=" ".join)
def test_every_command_has_help(cli, words):
    code, out, err = cli(*words, "--help")
    assert code == 0 and err == ""
    assert out.startswith(f"usage: splitplan {' '.join(words)}")


@pytest.mark.parametrize("words", [[], ["catalog"], ["profile"], ["profile", "site"], ["pair"], ["night"]])
def test_bare_command_shows_help_with_exit_2(cli, words):
    code, out, err = cli(*words)
    assert code == 2 and out.startswith("usage: splitplan") and err == ""


def test_abbreviated_options_are_refused(cli):
    """'--plo' is not taken for '--plot' (a typo must not silently pick an option)."""
    code, out, err = cli("pair", "STF2272", "--plo", "x.png")
    assert code == 2 and out == ""
    assert err.startswith("splitplan: error: no option --plo; did you mean --plot")


def test_options_and_positionals_mix_in_any_order(cli):
    code, out, _ = cli("pair", "--epoch", "2030.5", "STF2272AB", "--json")
    assert code == 0 and json.loads(out)["epoch_yr"] == 2030.5


def test_missing_value_is_one_line(cli):
    code, out, err = cli("night", "--lat")
    assert code == 2 and err.strip() == "splitplan: error: --lat needs a value (see 'splitplan night -h')"


def test_interrupt_is_one_line_and_130(cli, monkeypatch):
    import planner.cli.pair_cmd as pair_cmd

    def interrupted(a):
        raise KeyboardInterrupt

    monkeypatch.setattr(pair_cmd.COMMAND, "run", interrupted)
    code, out, err = cli("pair", "STF2272")
    assert code == 130 and err.strip() == "splitplan: interrupted"


@pytest.mark.parametrize("value", ["-1e6", "-2.5e3", "-.5", "-inf"])
def test_negative_numbers_in_any_form_are_values(cli, value):
    """'-1e6' after an option is a (bad) number to check, not an unknown option
    ('--aperture needs a value' before: argparse only knew -1 and -1.5)."""
    code, out, err = cli("night", "--lat", "52", "--lon", "0", "--tz", "UTC", "--date", "2026-12-05",
                         "--aperture", value)
    assert code == 2 and "needs a value" not in err and "aperture" in err and "10000 mm" in err
