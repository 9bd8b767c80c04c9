"""Steadiness estimate (1-10) to seeing FWHM in arcseconds.

Observers often judge the air by eye on a 1-10 steadiness scale rather than
in arcseconds.  The scale used here follows the *descriptions* of W. H.
Pickering's 1-10 scale (a 5-inch = 127 mm refractor: 1-3 the image is a blur
several arcseconds across, 4-5 the Airy disc is often or always visible, 6-7
good, 7-8 the disc is sharp with the rings as long arcs, 9 the inner ring
steady, 10 the whole pattern steady).  The scale is *ordinal*: only its
lowest steps carry a size, and that size is an image diameter seen in a
127 mm aperture, not a long-exposure FWHM.

**Every arcsecond value below is therefore an assumption of this project**
(common practice, no source): it is a monotone table chosen so that "4-5,
Airy disc visible" maps to seeing comparable with the 2.2" Airy disc of a
127 mm aperture, "7-8, disc sharp" to about 1", and "10, pattern steady" to
0.5".  Fractional steadiness values are interpolated linearly.

The table can be replaced without touching the code: put a TOML file named
``seeing_scale.toml`` in the user configuration directory
(``splitplan`` prints it with ``splitplan profile paths``)::

    # steadiness -> seeing FWHM in arcsec (zenith, 500 nm)
    [steadiness]
    1 = 6.0
    5 = 2.5
    10 = 0.5

At least two entries; keys 1-10; values > 0 and not increasing with the
steadiness.  A damaged file is moved aside (quarantined) and reported.
"""

from __future__ import annotations

import tomllib
from pathlib import Path

from planner.errors import InputError

#: The default table (steadiness -> seeing FWHM, arcsec, zenith, 500 nm).
#: An ASSUMPTION of this project; see the module docstring.
DEFAULT_SCALE: dict[float, float] = {
    1: 6.0, 2: 5.0, 3: 4.0, 4: 3.0, 5: 2.5,
    6: 2.0, 7: 1.5, 8: 1.0, 9: 0.7, 10: 0.5,
}

FILE_NAME = "seeing_scale.toml"


def scale_path() -> Path:
    """Where a user override of the table lives."""
    from planner.config.storage import user_dir

    return user_dir("config") / FILE_NAME


def _validate(table: dict, origin: str) -> dict[float, float]:
    out: dict[float, float] = {}
    for k, v in table.items():
        try:
            key = float(k)
            val = float(v)
        except (TypeError, ValueError):
            raise InputError(f"{origin}: steadiness entry {k!r} = {v!r} is not a number; "
                             "use lines such as '5 = 2.5'") from None
        if not 1 <= key <= 10:
            raise InputError(f"{origin}: steadiness {k!r} is outside 1-10")
        if not 0 < val < 60:
            raise InputError(f"{origin}: seeing {val!r} arcsec for steadiness {k} must be between 0 and 60")
        out[key] = val
    if len(out) < 2:
        raise InputError(f"{origin}: the steadiness table needs at least two entries")
    keys = sorted(out)
    vals = [out[k] for k in keys]
    if any(b > a for a, b in zip(vals, vals[1:])):
        raise InputError(f"{origin}: seeing must not grow with steadiness (got {vals})")
    return {k: out[k] for k in keys}


def load_scale(path: str | Path | None = None) -> tuple[dict[float, float], str]:
    """The table in force and where it came from ('default' or the file path).

    A file that cannot be parsed is quarantined (kept aside, never
    overwritten) and reported as a :class:`~planner.errors.CorruptFileError`.
    """
    from planner.config.storage import quarantine
    from planner.errors import CorruptFileError

    p = Path(path) if path is not None else scale_path()
    if not p.exists():
        if path is not None:
            raise InputError(f"seeing table {p} does not exist")
        return dict(DEFAULT_SCALE), "default"
    from planner.config.storage import read_user_file

    raw = read_user_file(p, "seeing table", "toml")
    try:
        data = tomllib.loads(raw.decode("utf-8-sig"))
    except (tomllib.TOMLDecodeError, UnicodeDecodeError, RecursionError) as exc:
        moved = quarantine(p)
        raise CorruptFileError(f"seeing table {p} is damaged ({exc}); moved aside to {moved.name}; "
                               "the default table applies until you write a new one") from None
    table = data.get("steadiness")
    if not isinstance(table, dict):
        raise InputError(f"{p}: expected a [steadiness] table of 'N = arcsec' lines")
    return _validate(table, str(p)), str(p)


def steadiness_to_seeing(steadiness: float, table: dict[float, float] | None = None) -> float:
    """Seeing FWHM (arcsec, zenith, 500 nm) for a 1-10 steadiness estimate.

    Linear interpolation in the table (default: :data:`DEFAULT_SCALE`, an
    assumption of this project describing Pickering's ordinal scale).
    """
    import numpy as np

    try:
        s = float(steadiness)
    except (TypeError, ValueError):
        raise InputError(f"steadiness {steadiness!r} is not a number; give 1 (very poor) to 10 (perfect)") from None
    if not 1 <= s <= 10:
        raise InputError(f"steadiness {steadiness!r} is outside 1-10 (1 very poor ... 10 perfect)")
    tab = table if table is not None else DEFAULT_SCALE
    keys = np.array(sorted(tab), dtype=float)
    vals = np.array([tab[k] for k in sorted(tab)], dtype=float)
    return float(np.interp(s, keys, vals))


def describe_scale(table: dict[float, float] | None = None) -> str:
    """The table as text lines, for help and documentation."""
    tab = table if table is not None else DEFAULT_SCALE
    return "\n".join(f"{k:g}: {v:g}\"" for k, v in sorted(tab.items()))
