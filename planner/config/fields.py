"""Every input field the user can set, with its type and range: one validator per field.

The command line, saved profiles, plan and session files and the Python API
all check a value with :func:`check` (one field) or :func:`check_mapping` (a
table of them), so a value is accepted or refused the same way wherever it
comes from, with one line naming the value and what is allowed.

Rules common to all fields: a number must be an int or float (``true`` is not
a number, nor is the text ``"10"``), finite, and inside the field's range; an
integer field refuses fractions (``limit = 2.5``); a text field must be text.

This module is also the one home of the input defaults (darkness level,
minimum altitude, seeing, minutes per target) and of the darkness levels'
Sun altitudes.
"""

from __future__ import annotations

import datetime as _dt
import math
from dataclasses import dataclass
from pathlib import Path

from planner.errors import InputError

#: darkness level -> the Sun's altitude (deg) below which the sky counts as dark
#: (civil, nautical and astronomical twilight end at -6, -12, -18 deg: Astronomical Almanac, Glossary)
DARKNESS_SUN_ALT_DEG = {"civil": -6.0, "nautical": -12.0, "astronomical": -18.0}
DARKNESS = tuple(DARKNESS_SUN_ALT_DEG)
DEFAULT_DARKNESS = "nautical"
#: lowest useful apparent altitude (deg) when the site gives none (common practice, no source)
DEFAULT_MIN_ALT_DEG = 20.0
#: seeing FWHM at the zenith (arcsec) when none is given (a typical night; common practice, no source)
DEFAULT_SEEING_ARCSEC = 2.0
DEFAULT_MINUTES = 10.0

#: where the chance curve comes from: the published model or the observer's own fit (planner.plan.calibration)
CALIBRATIONS = ("published", "mine")

#: the apertures the tool accepts, mm (from small finders to the largest amateur instruments)
APERTURE_MIN_MM = 10.0
APERTURE_MAX_MM = 10000.0

#: telescope optical types, and other spellings accepted for them
TELESCOPE_KINDS = ("refractor", "newtonian", "sct", "maksutov", "cassegrain", "binocular", "other")
TELESCOPE_KIND_ALIASES = {
    "reflector": "newtonian", "dobsonian": "newtonian", "dob": "newtonian", "newton": "newtonian",
    "schmidt-cassegrain": "sct", "schmidt cassegrain": "sct", "edgehd": "sct",
    "mak": "maksutov", "maksutov-cassegrain": "maksutov", "mct": "maksutov",
    "rc": "cassegrain", "ritchey-chretien": "cassegrain", "classical cassegrain": "cassegrain",
    "apo": "refractor", "achromat": "refractor", "lens": "refractor",
    "binoculars": "binocular", "catadioptric": "other",
}


@dataclass(frozen=True)
class Field:
    """One input field: its type (``float``, ``int``, ``text``, ``bool``, ``choice``,
    ``date``, ``hhmm``, ``tz``, ``file``, ``texts``), range and how messages name it."""

    label: str
    kind: str = "float"
    lo: float | None = None
    hi: float | None = None
    unit: str = ""
    hi_open: bool = False            # the upper bound itself is not allowed
    lo_open: bool = False
    choices: tuple = ()
    hint: str = ""                   # extra words after the range

    def allowed(self) -> str:
        if self.kind == "choice":
            return "one of " + ", ".join(self.choices)
        if self.lo is not None and self.hi is not None:
            lo = f"more than {self.lo:g}" if self.lo_open else f"{self.lo:g}"
            hi = f"up to (not including) {self.hi:g}" if self.hi_open else f"to {self.hi:g}"
            text = f"{lo} {hi}" if not self.lo_open else f"{lo} and at most {self.hi:g}"
        elif self.lo is not None:
            text = f"more than {self.lo:g}" if self.lo_open else f"{self.lo:g} or more"
        else:
            text = {"int": "a whole number", "float": "a number"}.get(self.kind, self.kind)
        return " ".join(x for x in (text, self.unit, self.hint) if x)


FIELDS: dict[str, Field] = {
    # the site
    "lat_deg": Field("latitude", lo=-90.0, hi=90.0, unit="deg", hint="(north positive)"),
    "lon_deg": Field("longitude", lo=-180.0, hi=360.0, unit="deg", hint="(east positive; 0 to 360 also accepted)"),
    "elevation_m": Field("elevation", lo=-500.0, hi=9000.0, unit="m"),
    "tz": Field("time zone", "tz"),
    "min_alt_deg": Field("minimum altitude", lo=0.0, hi=80.0, unit="deg"),
    "horizon_file": Field("horizon file", "file"),
    "temperature_c": Field("temperature", lo=-60.0, hi=50.0, unit="degC"),
    "pressure_hpa": Field("pressure", lo=0.0, hi=1100.0, unit="hPa"),
    "sky_mag_zenith": Field("zenith sky brightness", lo=14.0, hi=23.0, unit="mag/arcsec^2"),
    "extinction_k": Field("extinction coefficient", lo=0.0, hi=2.0, unit="mag/airmass"),
    "note": Field("note", "text"),
    "name": Field("name", "text"),
    # a telescope
    "aperture_mm": Field("aperture", lo=APERTURE_MIN_MM, hi=APERTURE_MAX_MM, unit="mm", hint="(clear aperture)"),
    "obstruction": Field("obstruction", lo=0.0, hi=1.0, hi_open=True, hint="(a diameter ratio, e.g. 0.33)"),
    "focal_mm": Field("focal length", lo=0.0, lo_open=True, hi=1e6, unit="mm"),
    "wavelength_nm": Field("wavelength", lo=200.0, hi=5000.0, unit="nm"),
    "kind": Field("telescope kind", "choice", choices=TELESCOPE_KINDS),
    # the night
    "date": Field("date", "date"),
    "darkness": Field("darkness", "choice", choices=DARKNESS),
    "seeing_arcsec": Field("seeing", lo=0.0, hi=20.0, unit="arcsec FWHM", hint="(typical nights 1-3)"),
    "steadiness": Field("steadiness", lo=1.0, hi=10.0, hint="(by eye)"),
    "minutes": Field("minutes per target", lo=1.0, hi=240.0, unit="min"),
    "limit": Field("limit", "int", lo=1, hi=10000, unit="pairs per scope",
                   hint="(leave it out to fill the night)"),
    "challenges": Field("challenges", "bool"),
    "start_local": Field("start", "hhmm"),
    "end_local": Field("end", "hhmm"),
    "share_margin": Field("share margin", lo=0.5, hi=10.0, hint="(default 1.5)"),
    "catalog": Field("catalogue", "text"),
    "site_name": Field("site name", "text"),
    "nights": Field("nights", "int", lo=1, hi=366, unit="nights sampled"),
    "calibration": Field("calibration", "choice", choices=CALIBRATIONS),
    "skip_done": Field("skip pairs already split", "bool"),
    "prefer_new": Field("prefer pairs never tried", "bool"),
    "wide_factor": Field("close-double ceiling", lo=0.0, hi=1e6, unit="x the Dawes limit", hint="(0: none)"),
    # filters
    "mag_max": Field("largest primary magnitude", lo=-30.0, hi=30.0, unit="mag"),
    "mag2_max": Field("largest companion magnitude", lo=-30.0, hi=30.0, unit="mag"),
    "dm_max": Field("largest magnitude difference", lo=0.0, hi=30.0, unit="mag"),
    "sep_min_arcsec": Field("smallest separation", lo=0.0, hi=1e6, unit="arcsec"),
    "sep_max_arcsec": Field("largest separation", lo=0.0, hi=1e6, unit="arcsec"),
    "ra_from_h": Field("RA window start", lo=0.0, hi=24.0, unit="h", hint="(an hour of RA)"),
    "ra_to_h": Field("RA window end", lo=0.0, hi=24.0, unit="h", hint="(an hour of RA)"),
    "orbits_only": Field("orbits only", "bool"),
    "constellations": Field("constellations", "texts"),
    "targets": Field("target list", "file"),
}

SITE_FIELDS = ("lat_deg", "lon_deg", "elevation_m", "tz", "min_alt_deg", "horizon_file", "note")
SCOPE_FIELDS = ("aperture_mm", "obstruction", "kind", "focal_mm", "wavelength_nm", "note")
FILTER_FIELDS = ("mag_max", "mag2_max", "dm_max", "sep_min_arcsec", "sep_max_arcsec", "constellations",
                 "ra_from_h", "ra_to_h", "orbits_only", "targets")


def _show(value) -> str:
    if isinstance(value, float):
        return f"{value:g}"
    return repr(value) if isinstance(value, (str, bool)) or value is None else f"{value}"


def check(name: str, value, label: str | None = None):
    """``value`` of field ``name`` checked and converted (float, int, str, bool, ...).

    ``label`` names the value in the message (e.g. ``--lat`` on the command
    line); by default the field's own label.  Raises
    :class:`~planner.errors.InputError` with one line otherwise."""
    f = FIELDS[name]
    label = label or f.label
    bad = InputError(f"{label} {_show(value)} is out of range; allowed {f.allowed()}")
    if f.kind in ("float", "int"):
        if isinstance(value, bool) or not isinstance(value, (int, float)) and not _is_np_number(value):
            raise InputError(f"{label} {_show(value)} is not a number; allowed {f.allowed()}")
        v = float(value)
        if not math.isfinite(v):
            raise bad
        if f.kind == "int":
            if not v.is_integer():
                raise InputError(f"{label} {_show(value)} is not a whole number; allowed {f.allowed()}")
            v = int(v)
        if f.lo is not None and (v < f.lo or (f.lo_open and v == f.lo)):
            raise bad
        if f.hi is not None and (v > f.hi or (f.hi_open and v == f.hi)):
            raise bad
        return v
    if f.kind == "bool":
        if not isinstance(value, bool):
            raise InputError(f"{label} {_show(value)} is not true or false")
        return value
    if f.kind == "texts":
        if isinstance(value, str) or not isinstance(value, (list, tuple)) or \
                not all(isinstance(x, str) for x in value):
            raise InputError(f"{label} {_show(value)} is not a list of names")
        return [x.strip() for x in value]
    if not isinstance(value, str):
        raise InputError(f"{label} {_show(value)} is not text")
    if f.kind == "choice":
        v = value.strip().lower()
        if name == "kind":
            v = TELESCOPE_KIND_ALIASES.get(v, v)
        if v not in f.choices:
            raise InputError(f"{label} {_show(value)} is unknown; choose one of {', '.join(f.choices)}")
        return v
    if f.kind == "date":
        try:
            return _dt.date.fromisoformat(value.strip()).isoformat()
        except ValueError:
            raise InputError(f"{label} {_show(value)} is not a valid YYYY-MM-DD date") from None
    if f.kind == "hhmm":
        if value.strip().lower() == "now":  # the current instant (the plan resolves it)
            return "now"
        parts = value.strip().split(":")
        ok = len(parts) == 2 and all(p.isdigit() for p in parts) and int(parts[0]) < 24 and int(parts[1]) < 60
        if not ok:
            raise InputError(f"time {value!r} is not HH:MM (24-hour local clock)")
        return f"{int(parts[0]):02d}:{int(parts[1]):02d}"
    if f.kind == "tz":
        return check_zone(value, label)
    if f.kind == "file":
        if not value.strip():
            raise InputError(f"{label} {_show(value)} is empty; give a file name")
        return value
    return value


def _is_np_number(value) -> bool:
    kind = getattr(getattr(value, "dtype", None), "kind", "")
    return kind in ("i", "u", "f") and getattr(value, "ndim", 1) == 0


def check_zone(name, label: str = "time zone"):
    """The IANA zone name, stripped, or InputError."""
    from zoneinfo import ZoneInfo, ZoneInfoNotFoundError

    if not isinstance(name, str) or not name.strip():
        raise InputError(f"{label} {name!r} is not valid; give an IANA name such as 'Europe/Paris' or 'UTC'")
    try:
        ZoneInfo(name.strip())
    except (ZoneInfoNotFoundError, ValueError, OSError):
        raise InputError(
            f"{label} {name!r} is unknown; give an IANA name such as 'Europe/Paris', "
            "'America/New_York' or 'UTC' (on Windows install the 'tzdata' package)"
        ) from None
    return name.strip()


def check_mapping(what: str, d, allowed, required=()) -> dict:
    """A table of fields (a site, a telescope, filters) checked field by field.

    ``None`` values are dropped; a key outside ``allowed`` or a missing
    ``required`` key is refused."""
    if not isinstance(d, dict):
        raise InputError(f"{what} must be a table of fields ({', '.join(allowed)}), not {_show(d)}")
    out = {}
    for k, v in d.items():
        if v is None:
            continue
        if k not in allowed:
            raise InputError(f"unknown {what} field {k!r}; allowed: {', '.join(allowed)}")
        out[k] = check(k, v, label=f"{FIELDS[k].label} ({k})")
    for k in required:
        if k not in out:
            raise InputError(f"a {what} needs {k}")
    return out


def check_filters(filters) -> dict:
    """The user's filters checked, and refused when they could only ever select nothing."""
    f = check_mapping("filter", filters or {}, FILTER_FIELDS)
    lo, hi = f.get("sep_min_arcsec"), f.get("sep_max_arcsec")
    if lo is not None and hi is not None and lo > hi:
        raise InputError(f"smallest separation {lo:g} is larger than the largest {hi:g}")
    return f


def existing_file(path, label: str) -> Path:
    """``path`` if it names an existing regular file (``~`` expanded), else InputError."""
    p = Path(str(path)).expanduser()
    if not p.is_file():
        raise InputError(f"{label} {str(path)!r} does not exist or is not a file")
    return p
