"""The ``splitplan`` command line: a thin layer over the public API.

Each command group lives in its own module and registers itself on :data:`app`.
Modules import heavy libraries (pandas, astropy, skyfield, matplotlib) inside
the command functions, never at import time, so ``splitplan --help`` and a
one-pair check start fast.

Errors: every :class:`planner.errors.PlannerError` becomes one line on stderr
(``splitplan: error: ...``) and its exit code (1 failure, 2 usage); click's own
usage errors keep their exit code 2.  No traceback reaches the user unless
``SPLITPLAN_DEBUG=1`` is set.
"""

from __future__ import annotations

import os
import sys

import typer

app = typer.Typer(
    name="splitplan",
    help=(
        "Which close double stars can your telescope split tonight?\n\n"
        "Reads the USNO double-star and orbit catalogues (a real sample is bundled), "
        "moves each binary along its orbit to tonight, works out when it is well up "
        "in the dark at your site, and judges it against your aperture and seeing."
    ),
    no_args_is_help=True,
    add_completion=False,
    pretty_exceptions_enable=False,
    context_settings={"help_option_names": ["-h", "--help"]},
)


def _register() -> None:
    # Each command module adds its commands to ``app``.  Import order is the
    # order of the help listing.
    from planner.cli import catalog_cmd  # noqa: F401

    for name in ("pair_cmd", "night_cmd", "apertures_cmd", "profile_cmd"):
        try:
            __import__(f"planner.cli.{name}")
        except ModuleNotFoundError as exc:  # command not built yet
            if exc.name != f"planner.cli.{name}":
                raise


def _given_value(argv: list[str], param) -> str | None:
    """The text the user gave for option ``param`` (for the error line), if found."""
    if getattr(param, "multiple", False):  # a repeated option: which one is bad is not known
        return None
    opts = [o for o in (getattr(param, "opts", None) or []) if o.startswith("-")]
    found = None  # the last occurrence wins, as in the parser
    for i, a in enumerate(argv):
        for o in opts:
            if a == o and i + 1 < len(argv):
                found = argv[i + 1]
            elif a.startswith(o + "="):
                found = a[len(o) + 1:]
    return found


def _usage_line(exc, argv: list[str]) -> str:
    """One line for a command-line parsing error (unknown option, bad number...)."""
    msg = " ".join(exc.format_message().split())
    value = _given_value(argv, getattr(exc, "param", None)) if getattr(exc, "param", None) else None
    if value is not None and repr(value) not in msg:
        msg = msg.rstrip('. ') + f"; got {value!r}"
    ctx = getattr(exc, "ctx", None)
    where = ctx.command_path if ctx is not None else "splitplan"
    return f"{msg.rstrip('. ')} (see '{where} -h')"


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
    from typer._click.exceptions import ClickException, NoArgsIsHelpError, UsageError
    from typer.exceptions import Abort

    from planner.errors import PlannerError

    args = list(sys.argv[1:] if argv is None else argv)
    debug = bool(os.environ.get("SPLITPLAN_DEBUG"))
    _register()
    try:
        rv = app(args=args, prog_name="splitplan", standalone_mode=False)
    except PlannerError as exc:
        if debug:
            raise
        _say(f"splitplan: error: {exc}")
        sys.exit(exc.exit_code)
    except NoArgsIsHelpError as exc:  # the help has been printed already
        sys.exit(exc.exit_code)
    except UsageError as exc:
        if debug:
            raise
        _say(f"splitplan: error: {_usage_line(exc, args)}")
        sys.exit(exc.exit_code)
    except ClickException as exc:
        if debug:
            raise
        _say(f"splitplan: error: {' '.join(exc.format_message().split())}")
        sys.exit(exc.exit_code)
    except (KeyboardInterrupt, Abort):
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
