"""Command-line conventions (issue 12, items 16 and 17): help that reads at 80 columns,
--version, shell completion generated from the parser.

The conventions themselves are common practice for Unix command-line tools (no source):
help wrapped at the terminal width up to 80 columns, ``--version`` printing the program's
name and version, completion scripts printed on stdout for the user to install.
"""

from __future__ import annotations

import re
import shutil
import subprocess

import pytest


def _all_help_pages(cli):
    from planner.cli import command_tree
    from planner.cli.parser import walk

    pages = {}
    for path, _ in walk(command_tree()):
        code, out, err = cli(*path.split()[1:], "--help")
        assert code == 0, (path, err)
        pages[path] = out
    return pages


def test_help_fits_80_columns_without_type_tags(cli, monkeypatch):
    """Even on a wide terminal, no help line is longer than 80 columns, and option values are
    named in plain words, never type tags such as <list[float]> or <bool>."""
    monkeypatch.setenv("COLUMNS", "200")
    pages = _all_help_pages(cli)
    assert len(pages) >= 12
    for path, text in pages.items():
        for line in text.splitlines():
            assert len(line) <= 80, (path, line)
        assert not re.search(r"<(str|int|float|bool|path|list\[\w+\])>", text), path
        assert "--aperture MM" in pages["splitplan night"] and "--date YYYY-MM-DD" in pages["splitplan night"]


def test_help_paragraphs_are_filled_not_broken_mid_sentence(cli, monkeypatch):
    """The description of 'pair' is one paragraph refilled to the width: no line ends early
    in the middle of a sentence ("with method and / uncertainty" before)."""
    monkeypatch.setenv("COLUMNS", "80")
    code, out, _ = cli("pair", "--help")
    para = out.split("\n\n")[1].splitlines()
    assert para[0].startswith("Separation and position angle")
    for line, nxt in zip(para, para[1:]):
        # the next line's first word would not have fitted on this line
        assert len(line) + 1 + len(nxt.split()[0]) > 79, (line, nxt)


def test_version(cli):
    from planner import __version__

    code, out, err = cli("--version")
    assert code == 0 and out.strip() == f"splitplan {__version__}" and err == ""


# -- completion --------------------------------------------------------------------------------

BASH = shutil.which("bash")


def _complete(script: str, words: list[str]) -> list[str]:
    """Run the generated bash function on a command line; the words it offers."""
    cword = len(words) - 1
    quoted = " ".join("'" + w.replace("'", "'\\''") + "'" for w in words)
    prog = (f"{script}\nCOMP_WORDS=({quoted}); COMP_CWORD={cword}; _splitplan; "
            'printf "%s\\n" "${COMPREPLY[@]}"')
    r = subprocess.run([BASH, "--norc", "--noprofile", "-c", prog], capture_output=True, text=True, timeout=60)
    assert r.returncode == 0, r.stderr
    return [w for w in r.stdout.splitlines() if w]


@pytest.fixture
def bash_script(cli):
    code, out, err = cli("completion", "bash")
    assert code == 0 and err == ""
    return out


@pytest.mark.skipif(BASH is None, reason="bash is not installed")
def test_bash_completion_is_valid_bash(bash_script, tmp_path):
    p = tmp_path / "splitplan.bash"
    p.write_text(bash_script)
    r = subprocess.run([BASH, "-n", str(p)], capture_output=True, text=True, timeout=60)
    assert r.returncode == 0, r.stderr
    assert "complete -o default -F _splitplan splitplan" in bash_script


@pytest.mark.skipif(BASH is None, reason="bash is not installed")
def test_bash_completion_completes_commands_and_options(bash_script):
    assert _complete(bash_script, ["splitplan", "ni"]) == ["night"]
    assert set(_complete(bash_script, ["splitplan", ""])) >= {"pair", "night", "apertures", "catalog",
                                                               "profile", "completion", "--version"}
    assert _complete(bash_script, ["splitplan", "profile", "s"]) == ["site", "scope"]
    assert _complete(bash_script, ["splitplan", "profile", "site", "a"]) == ["add"]
    assert _complete(bash_script, ["splitplan", "night", "--apert"]) == ["--aperture"]
    assert set(_complete(bash_script, ["splitplan", "night", "--lat", "52", "--l"])) == {"--lat", "--lon",
                                                                                        "--limit"}
    assert _complete(bash_script, ["splitplan", "pair", "STF2272", "--darkness", "n"]) == ["nautical"]
    # after an option that takes a value, no option names are offered (file names by the shell)
    assert _complete(bash_script, ["splitplan", "night", "--out", ""]) == []


def test_zsh_completion_uses_the_same_function(cli):
    code, out, _ = cli("completion", "zsh")
    assert code == 0 and out.startswith("#compdef splitplan")
    assert "bashcompinit" in out and "_splitplan()" in out


def test_completion_unknown_shell_is_one_line(cli):
    code, out, err = cli("completion", "fish")
    assert code == 2 and err.startswith("splitplan: error: shell") and "'fish'" in err and "bash" in err
