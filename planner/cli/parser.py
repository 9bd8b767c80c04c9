"""The command-line machinery, on the standard library's :mod:`argparse`.

A :class:`Command` is one leaf (``splitplan pair``): a name, a help text, a
function that declares its arguments on an :class:`argparse.ArgumentParser`
and a function that runs it with the parsed :class:`argparse.Namespace`.
A :class:`Group` holds commands or further groups (``splitplan profile site``).
:func:`dispatch` walks the words of the command line down the tree and builds
the parser of the one command that runs, so ``splitplan --help`` and a
one-pair check build nothing else.

Usage errors (an unknown command or option, a value that is not a number, a
missing argument) raise :class:`UsageError`: one line that names the value
and points at the command's ``-h``; the entry point prints it with exit code 2.
"""

from __future__ import annotations

import argparse
import re
import shutil
import sys
import textwrap
from typing import Callable

from planner.errors import InputError

PROG = "splitplan"
#: help is laid out for at most this many columns (narrower terminals get narrower help)
HELP_COLUMNS = 80


class UsageError(InputError):
    """A command-line parsing error (exit code 2); the message ends with where to get help."""

    def __init__(self, message: str, where: str = PROG):
        self.where = where
        super().__init__(f"{message.rstrip('. ')} (see '{where} -h')")


def help_width() -> int:
    """Columns for help text: the terminal's, at most :data:`HELP_COLUMNS`."""
    return max(40, min(HELP_COLUMNS, shutil.get_terminal_size((HELP_COLUMNS, 24)).columns)) - 1


class HelpFormatter(argparse.HelpFormatter):
    """argparse's layout, at most 80 columns wide, help column at 24."""

    def __init__(self, prog: str):
        super().__init__(prog, width=help_width(), max_help_position=24)


def _tidy(message: str) -> str:
    """argparse's own error text in our words: ``--lon 'abc' is not a number``."""
    m = re.match(r"argument ([^:/\s]+)(?:/\S+)?: (.*)", message, re.S)
    if not m:
        return message
    name, rest = m.groups()
    rest = re.sub(r"invalid (float|complex) value: ('.*')", r"\2 is not a number", rest)
    rest = re.sub(r"invalid int value: ('.*')", r"\1 is not an integer (a whole number)", rest)
    rest = re.sub(r"^expected one argument$", "needs a value", rest)
    rest = re.sub(r"^expected at least one argument$", "needs at least one value", rest)
    rest = re.sub(r"^ignored explicit argument ('.*')$", r"takes no value; got \1", rest)
    return f"{name} {rest}"


class Parser(argparse.ArgumentParser):
    """An ArgumentParser that raises :class:`UsageError` instead of printing and exiting,
    never accepts abbreviated options, and lays help out at 80 columns."""

    def __init__(self, prog: str, description: str = "", usage: str | None = None):
        super().__init__(prog=prog, description=description, usage=usage, add_help=False,
                         allow_abbrev=False, formatter_class=HelpFormatter)
        self._positionals.title = "Arguments"
        self._optionals.title = "Options"
        # a value such as -1e6, -.5 or -inf after an option is a number, not an unknown option
        self._negative_number_matcher = re.compile(r"^-(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$|^-(inf|nan)$", re.I)

    def error(self, message: str):  # argparse calls this for every parsing error
        raise UsageError(_tidy(message), self.prog)


class Command:
    """One command: ``arguments(parser)`` declares its options, ``run(args)`` does the work.

    ``summary`` is the one line shown in the command listing, ``help`` the text at the
    top of the command's own ``-h`` (the first sentence of ``help`` when no summary is
    given); ``usage`` is what follows ``splitplan NAME [options]`` in the usage line.
    """

    def __init__(self, name: str, *, help: str, arguments: Callable[[argparse.ArgumentParser], None],
                 run: Callable[[argparse.Namespace], int | None], usage: str = "", summary: str = "",
                 no_args_is_help: bool = False):
        self.name, self.help, self.arguments, self.run = name, help, arguments, run
        self.usage, self.summary, self.no_args_is_help = usage, summary, no_args_is_help

    def short(self) -> str:
        return self.summary or _first_sentence(self.help)

    def parser(self, path: str) -> Parser:
        """The argparse parser of this command (``path``: the words that led here)."""
        usage = f"{path} [options]" + (f" {self.usage}" if self.usage else "")
        p = Parser(path, description=self.help, usage=usage)
        self.arguments(p)
        p.add_argument("-h", "--help", action="help", help="Show this help and exit.")
        return p


class Group:
    """Commands (or groups) under one word: ``splitplan catalog show``.

    ``flags``: extra options of the group itself, as (flags, help, function returning an
    exit code), e.g. ``--version`` on the top level."""

    def __init__(self, name: str, *, help: str, children: list, summary: str = "", flags: list = ()):
        self.name, self.help, self.children = name, help, list(children)
        self.summary, self.flags = summary, list(flags)

    def short(self) -> str:
        return self.summary or _first_sentence(self.help)

    def child(self, word: str, path: str):
        for c in self.children:
            if c.name == word:
                return c
        import difflib

        names = [c.name for c in self.children]
        close = difflib.get_close_matches(word, names, n=1)
        hint = f"; did you mean '{close[0]}'?" if close else f"; commands: {', '.join(names)}"
        raise UsageError(f"no command {word!r}{hint}", path)

    def format_help(self, path: str) -> str:
        width = help_width()
        flags = "".join(f" [{fl[0]}]" for fl, _, _ in self.flags)
        out = [f"usage: {path} [-h]{flags} COMMAND ...", ""]
        out += textwrap.wrap(self.help, width) + [""]
        out.append("Commands:")
        pad = max(16, max(len(c.name) for c in self.children) + 4)
        for c in self.children:
            out += textwrap.wrap(c.short(), width, initial_indent=f"  {c.name}".ljust(pad),
                                 subsequent_indent=" " * pad)
        out += ["", "Options:", "  -h, --help".ljust(pad) + "Show this help and exit."]
        for flags, text, _ in self.flags:
            out += textwrap.wrap(text, width, initial_indent=f"  {', '.join(flags)}".ljust(pad),
                                 subsequent_indent=" " * pad)
        out += ["", f"Run '{path} COMMAND -h' for the options of a command."]
        return "\n".join(out) + "\n"


def _first_sentence(text: str) -> str:
    text = " ".join(text.split())
    return text.split(". ", 1)[0].rstrip(".") + "."


def walk(node, path: str = PROG):
    """Every (path, node) of the tree, groups before their children (for completion)."""
    yield path, node
    if isinstance(node, Group):
        for c in node.children:
            yield from walk(c, f"{path} {c.name}")


def dispatch(node, argv: list[str], path: str = PROG) -> int | None:
    """Follow the command words in ``argv`` down the tree and run the command found."""
    while isinstance(node, Group):
        if not argv:  # a bare group word: show what it holds (exit 2, as for any usage error)
            sys.stdout.write(node.format_help(path))
            return 2
        word = argv[0]
        if word in ("-h", "--help"):
            sys.stdout.write(node.format_help(path))
            return 0
        for flags, _, action in node.flags:
            if word in flags:
                return action()
        if word.startswith("-"):
            raise UsageError(f"no option {word} here; give a command first", path)
        node = node.child(word, path)
        path = f"{path} {word}"
        argv = argv[1:]
    p = node.parser(path)
    if not argv and node.no_args_is_help:
        sys.stdout.write(p.format_help())
        return 2
    args, extra = p.parse_known_intermixed_args(argv)
    if extra:
        opts = [e for e in extra if e.startswith("-") and len(e) > 1]
        if opts:
            import difflib

            bad = opts[0].split("=", 1)[0]
            known = [s for a in p._actions for s in a.option_strings if s.startswith("--")]
            close = difflib.get_close_matches(bad, known, n=3)
            hint = f"; did you mean {' or '.join(close)}?" if close else ""
            raise UsageError(f"no option {bad}{hint}", path)
        raise UsageError(f"unexpected extra argument(s): {' '.join(extra)}", path)
    return node.run(args)
