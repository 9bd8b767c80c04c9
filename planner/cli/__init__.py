"""The ``splitplan`` command line: a thin layer over the public API.

Built on the standard library's :mod:`argparse` (:mod:`planner.cli.parser`).
Each command lives in its own module and is listed in :func:`command_tree`.
Modules import heavy libraries (pandas, astropy, skyfield, matplotlib) inside
the command functions, never at import time, so ``splitplan --help`` and a
one-pair check start fast.

Errors: every :class:`planner.errors.PlannerError` becomes one line on stderr
(``splitplan: error: ...``) and its exit code (1 failure, 2 usage); parsing
errors (:class:`planner.cli.parser.UsageError`) are usage errors, exit 2.
No traceback reaches the user unless ``SPLITPLAN_DEBUG=1`` is set.
"""

from __future__ import annotations

import os
import sys

from planner.cli.parser import PROG, Group, dispatch

HELP = ("Which close double stars can your telescope split tonight? "
        "Reads the USNO double-star and orbit catalogues (a real sample is bundled), "
        "moves each binary along its orbit to tonight, works out when it is well up "
        "in the dark at your site, and judges it against your aperture and seeing.")


def command_tree() -> Group:
    """Every command, in the order of the help listing.  To add a command, write a
    module with ``arguments(parser)``, ``run(args)`` and a ``COMMAND`` (or a ``GROUP``)
    and list it here (see DEVELOPERS.md, "Adding a command or an option")."""
    from planner.cli import apertures_cmd, catalog_cmd, completion_cmd, log_cmd, night_cmd, pair_cmd, profile_cmd

    return Group(PROG, help=HELP, flags=[(("--version",), "Show the version and exit.", _version)], children=[
        pair_cmd.COMMAND,
        night_cmd.COMMAND,
        apertures_cmd.COMMAND,
        catalog_cmd.GROUP,
        profile_cmd.GROUP,
        log_cmd.GROUP,
        completion_cmd.COMMAND,
    ])


def _version() -> int:
    from planner.api import __version__

    print(f"{PROG} {__version__}")
    return 0


def _say(line: str) -> None:
    """Print one diagnostic line on stderr.  Any control character in it (a newline or an
    escape sequence inside a file name, pair name or catalogue text the user passed) becomes
    a space, so the message stays one line and cannot drive the terminal."""
    from planner.report.safe import terminal_text

    print(terminal_text(line, one_line=True), file=sys.stderr)


def main(argv: list[str] | None = None) -> None:
    """Console-script entry point.

    Every failure ends as one line on stderr and a non-zero exit code: a
    :class:`PlannerError` with its own code (1 failure, 2 usage), a
    command-line parsing error with 2, a file-system error with 1, and any
    unexpected exception with 1 as an "internal error" line (the traceback
    only with ``SPLITPLAN_DEBUG=1``)."""
    from planner.errors import PlannerError

    args = list(sys.argv[1:] if argv is None else argv)
    debug = bool(os.environ.get("SPLITPLAN_DEBUG"))
    try:
        rv = dispatch(command_tree(), args)
    except PlannerError as exc:  # usage errors (UsageError) included: exit 2
        if debug:
            raise
        _say(f"splitplan: error: {exc}")
        sys.exit(exc.exit_code)
    except KeyboardInterrupt:
        _say("splitplan: interrupted")
        sys.exit(130)
    except OSError as exc:
        if debug:
            raise
        what = f" {exc.filename}" if getattr(exc, "filename", None) else ""
        _say(f"splitplan: error: cannot access{what}: {exc.strerror or exc}")
        sys.exit(1)
    except Exception as exc:  # a bug: still one line, the traceback on request
        if debug:
            raise
        first = (str(exc).splitlines() or [""])[0][:200]
        _say(f"splitplan: internal error: {type(exc).__name__}: {first} "
             "(please report it; SPLITPLAN_DEBUG=1 shows the traceback)")
        sys.exit(1)
    sys.exit(rv if isinstance(rv, int) and not isinstance(rv, bool) else 0)
