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


def fail(message: str, code: int = 1) -> "typer.Exit":
    """Print one error line on stderr and return an Exit to raise."""
    print(f"splitplan: error: {message}", file=sys.stderr)
    return typer.Exit(code)


def main(argv: list[str] | None = None) -> None:
    """Console-script entry point."""
    from planner.errors import PlannerError

    _register()
    try:
        app(args=argv, prog_name="splitplan", standalone_mode=True)
    except PlannerError as exc:
        if os.environ.get("SPLITPLAN_DEBUG"):
            raise
        print(f"splitplan: error: {exc}", file=sys.stderr)
        sys.exit(exc.exit_code)
    except KeyboardInterrupt:
        print("splitplan: interrupted", file=sys.stderr)
        sys.exit(130)
