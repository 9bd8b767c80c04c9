"""Right ascension and declination as sexagesimal text, for reports.

``ra_text(271.3634)`` gives ``18h05m27.2s`` and ``dec_text(2.5024)`` gives
``+02d30m09s`` (the layouts of astropy's ``Angle.to_string(sep="hms"/"dms")``),
or ``18:05:27.2`` / ``+02:30:09`` with ``sep=":"`` (for CSV).  Rounding carries
into minutes and hours (59.96 s rounds to the next minute) and 24 h wraps to 0 h.
A missing value (None or NaN) gives an empty string.
"""

from __future__ import annotations

import math


def _parts(value: float, precision: int) -> tuple[str, int, int, str]:
    """sign, whole units, minutes, seconds text of ``value`` (hours or degrees)."""
    scale = 10 ** precision
    total = round(abs(value) * 3600 * scale)  # in 1/scale of a second
    whole, rem = divmod(total, 3600 * scale)
    minutes, sec = divmod(rem, 60 * scale)
    width = 2 + (precision + 1 if precision else 0)
    return ("-" if value < 0 and total else "+"), int(whole), int(minutes), f"{sec / scale:0{width}.{precision}f}"


def _missing(v) -> bool:
    try:
        return v is None or not math.isfinite(float(v))
    except (TypeError, ValueError):
        return True


def ra_text(ra_deg, precision: int = 1, sep: str = "hms") -> str:
    """Right ascension (deg) as hours, minutes, seconds of time."""
    if _missing(ra_deg):
        return ""
    _, h, m, s = _parts(float(ra_deg) % 360.0 / 15.0, precision)
    h %= 24
    return f"{h:02d}:{m:02d}:{s}" if sep == ":" else f"{h:02d}h{m:02d}m{s}s"


def dec_text(dec_deg, precision: int = 0, sep: str = "dms") -> str:
    """Declination (deg) as signed degrees, arcminutes, arcseconds."""
    if _missing(dec_deg):
        return ""
    sign, d, m, s = _parts(float(dec_deg), precision)
    return f"{sign}{d:02d}:{m:02d}:{s}" if sep == ":" else f"{sign}{d:02d}d{m:02d}m{s}s"
