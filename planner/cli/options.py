"""Command-line options that several commands share (site, telescope, air, catalogue).

Each function returns a fresh Typer option so that a command can place it in
its own help panel; names and help texts are defined once here.  The names
``--lat --lon --elevation --tz --date --aperture --obstruction --seeing
--catalog --json --out`` are part of the stable command-line contract.
"""

from __future__ import annotations

import typer

DARKNESS = ("civil", "nautical", "astronomical")


def site(panel: str | None = None):
    return typer.Option(None, "--site", help="Saved site profile (see 'splitplan profile site list').",
                        rich_help_panel=panel)


def lat(panel: str | None = None):
    return typer.Option(None, "--lat", help="Latitude, deg (north +).", rich_help_panel=panel)


def lon(panel: str | None = None):
    return typer.Option(None, "--lon", help="Longitude, deg (east +).", rich_help_panel=panel)


def elevation(panel: str | None = None):
    return typer.Option(None, "--elevation", help="Height above sea level, m.", rich_help_panel=panel)


def tz(panel: str | None = None):
    return typer.Option(None, "--tz", help="IANA time zone, e.g. Europe/Berlin.", rich_help_panel=panel)


def min_alt(panel: str | None = None):
    return typer.Option(None, "--min-alt", help="Lowest useful altitude, deg (default 20).", rich_help_panel=panel)


def scope(panel: str | None = None, many: bool = True):
    return typer.Option(None, "--scope", rich_help_panel=panel,
                        help="Saved telescope" + (" (repeat for a club session)." if many else "."))


def aperture(panel: str | None = None, many: bool = True):
    return typer.Option(None, "--aperture", rich_help_panel=panel,
                        help="Clear aperture, mm" + (" (repeatable)." if many else "."))


def obstruction(panel: str | None = None):
    return typer.Option(None, "--obstruction", help="Central obstruction, diameter ratio 0-0.9.",
                        rich_help_panel=panel)


def seeing(panel: str | None = None):
    return typer.Option(None, "--seeing", help="Seeing FWHM at the zenith, arcsec.", rich_help_panel=panel)


def steadiness(panel: str | None = None):
    return typer.Option(None, "--steadiness", rich_help_panel=panel,
                        help="Steadiness 1-10 by eye, converted by the seeing table (docs/plan.md).")


def darkness(panel: str | None = None):
    return typer.Option(None, "--darkness", rich_help_panel=panel,
                        help="How dark the window must be: civil (Sun below -6 deg), nautical (-12, default) "
                             "or astronomical (-18).")


def catalog(default: str | None = None):
    return typer.Option(default, "--catalog", help="sample (bundled), vizier (local snapshot) or a file path.")


def check_darkness(value: str | None) -> None:
    """One-line usage error for an unknown darkness level."""
    if value is not None and value not in DARKNESS:
        from planner.errors import InputError

        raise InputError(f"--darkness {value!r} is not one of {', '.join(DARKNESS)}")
