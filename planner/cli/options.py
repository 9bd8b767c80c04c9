"""Command-line options that several commands share (site, telescope, air, catalogue).

Each function adds its options to an argparse parser or argument group, so a
command places them under its own heading; names, metavars and help texts are
defined once here.  The names ``--lat --lon --elevation --tz --date
--aperture --obstruction --seeing --catalog --json --out`` are part of the
stable command-line contract.

Parsing only: these functions turn words into numbers and strings.  Building
the site, telescope and night objects from the parsed values happens after
parsing (:func:`site_values`, :func:`scope_values`, :func:`air_values` hand the
values on by name).
"""

from __future__ import annotations

from pathlib import Path

from planner.config.fields import DARKNESS, check

#: option name -> (flags, add_argument keywords); help texts in our words
SHARED = {
    "site": (("--site",), dict(metavar="NAME", help="Saved site profile (see 'splitplan profile site list').")),
    "lat": (("--lat",), dict(type=float, metavar="DEG", help="Latitude, deg (north +).")),
    "lon": (("--lon",), dict(type=float, metavar="DEG", help="Longitude, deg (east +).")),
    "elevation": (("--elevation",), dict(type=float, metavar="M", help="Height above sea level, m.")),
    "tz": (("--tz",), dict(metavar="ZONE", help="IANA time zone, e.g. Europe/Berlin.")),
    "min_alt": (("--min-alt",), dict(type=float, metavar="DEG",
                                     help="Lowest useful altitude, deg (default 20).")),
    "obstruction": (("--obstruction",), dict(type=float, action="append", metavar="RATIO",
                                             help="Central obstruction, diameter ratio 0-0.9.")),
    "seeing": (("--seeing",), dict(type=float, metavar="ARCSEC", help="Seeing FWHM at the zenith, arcsec.")),
    "steadiness": (("--steadiness",), dict(type=float, metavar="N",
                                           help="Steadiness 1-10 by eye, converted by the seeing table "
                                                "(docs/plan.md).")),
    "calibration": (("--calibration",), dict(metavar="MODEL", choices=("published", "mine"),
                                             help="Chance curve: published (the model, default) or mine "
                                                  "(fitted to your observation log by 'splitplan log fit').")),
    "darkness": (("--darkness",), dict(metavar="LEVEL",
                                       help="How dark the window must be: civil (Sun below -6 deg), "
                                            "nautical (-12, default) or astronomical (-18).")),
}


def add(group, *names: str) -> None:
    """Add the shared options ``names`` (keys of :data:`SHARED`) to ``group``."""
    for name in names:
        flags, kw = SHARED[name]
        group.add_argument(*flags, dest=name, **kw)


def site(group) -> None:
    """--site --lat --lon --elevation --tz --min-alt."""
    add(group, "site", "lat", "lon", "elevation", "tz", "min_alt")


def telescope(group, many: bool = True) -> None:
    """--scope --aperture --obstruction (each repeatable)."""
    group.add_argument("--scope", action="append", metavar="NAME",
                       help="Saved telescope" + (" (repeat for a club session)." if many else "."))
    group.add_argument("--aperture", action="append", type=float, metavar="MM",
                       help="Clear aperture, mm" + (" (repeatable)." if many else "."))
    add(group, "obstruction")


def air(group) -> None:
    """--seeing --steadiness --darkness."""
    add(group, "seeing", "steadiness", "darkness")


def catalog(group, default: str | None = None) -> None:
    group.add_argument("--catalog", default=default, metavar="SOURCE",
                       help="sample (bundled), vizier (local snapshot) or a file path"
                            + (f" (default {default})." if default else "."))


def force(group) -> None:
    """--force: replace an existing output file that splitplan did not write."""
    group.add_argument("--force", action="store_true",
                       help="Replace an existing --out/--plot file that splitplan did not write "
                            "(a read-only file is never replaced).")


def check_outputs(force: bool, **paths):
    """Each output path (``--out``, ``--plot``) checked before any work, ``~``
    expanded; returns them in order (None stays None)."""
    from planner.config.storage import check_output

    return [None if p is None else check_output(p, force=force, option=f"--{name}")
            for name, p in paths.items()]


def path(text: str) -> Path:
    """argparse type for file names."""
    return Path(text)


# -- tables to standard output (--out - with --format) -----------------------------------

#: ``--out -`` writes to standard output
STDOUT = "-"


def stream_format(group, formats: tuple) -> None:
    """--format, the format of ``--out -``."""
    group.add_argument("--format", dest="out_format", choices=formats, metavar="FORMAT",
                       help=f"With --out -: the format written to standard output, {', '.join(formats[:-1])} "
                            f"or {formats[-1]} (for pipes; notes stay on standard error).")


def to_stdout(out) -> bool:
    return out is not None and str(out) == STDOUT


def check_stream(out, out_format, as_json: bool, formats: tuple) -> None:
    """One-line usage errors for --out - and --format, before any work is done."""
    from planner.errors import InputError

    if to_stdout(out):
        if out_format is None:
            raise InputError(f"--out - writes to standard output: give --format {', '.join(formats)}")
        if as_json:
            raise InputError("--json and --out - both print to standard output; give one of them")
    elif out_format is not None:
        raise InputError("--format goes with --out - (a file's format comes from its extension)")


# -- handing parsed values on ------------------------------------------------------------


def site_values(args) -> dict:
    """The site options as keywords (for ``build_request``)."""
    return {k: getattr(args, k) for k in ("site", "lat", "lon", "elevation", "tz", "min_alt")}


def scope_values(args) -> dict:
    return {k: getattr(args, k) for k in ("scope", "aperture", "obstruction")}


def air_values(args) -> dict:
    return {k: getattr(args, k) for k in ("seeing", "steadiness", "darkness")}


def check_darkness(value: str | None) -> None:
    """One-line usage error for an unknown darkness level."""
    if value is not None:
        check("darkness", value, "--darkness")
