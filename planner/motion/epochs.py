"""Epoch conventions used by the motion code.

Every epoch inside :mod:`planner.motion` is a **Besselian year** (float), the
time scale in which ORB6 quotes the time of periastron ``T`` (unit code ``y``)
and the one in which the catalogue's own ephemerides (2005.0 ... 2009.0) fit
best (see ``docs/orbit-validation.md``)::

    B = 1900.0 + (JD - 2415020.31352) / 365.242198781

(Lieske, J. H. 1979, A&A 73, 282; the same expression is used by the IAU SOFA
routine ``epb``).  A Julian year is ``J = 2000.0 + (JD - 2451545.0) / 365.25``;
the two differ by about 0.0013 yr (half a day) near 2000, which only matters
for orbits with periods of days.

ORB6 ``T`` with unit code ``d`` is a truncated Julian date, JD - 2,400,000;
the catalogue reader converts it to a Besselian year with the formula above.
Calendar dates and ``datetime`` values are taken as UTC and converted without
the TT - UTC offset (about 69 s, 2e-6 yr: negligible for visual binaries);
an astropy ``Time`` is converted exactly through its TT scale, as
``Time.byear`` does.
"""

from __future__ import annotations

import datetime as _dt

import numpy as np

#: JD of B1900.0 and the tropical year in days (Lieske 1979; SOFA ``epb``).
JD_B1900 = 2415020.31352
TROPICAL_YEAR_D = 365.242198781
JD_J2000 = 2451545.0
JULIAN_YEAR_D = 365.25
_JD_UNIX_EPOCH = 2440587.5  # 1970-01-01T00:00 UTC


def besselian_year_from_jd(jd):
    """Besselian year for a Julian date (Lieske 1979; SOFA ``epb``)."""
    return 1900.0 + (np.asarray(jd, dtype=float) - JD_B1900) / TROPICAL_YEAR_D


def jd_from_besselian_year(year):
    """Julian date of a Besselian year (inverse of :func:`besselian_year_from_jd`)."""
    return JD_B1900 + (np.asarray(year, dtype=float) - 1900.0) * TROPICAL_YEAR_D


def calendar_date_from_jd(jd) -> str:
    """The calendar date (proleptic Gregorian, ISO 8601 text) of the day that holds the
    Julian date ``jd``; a day runs from JD ``n - 0.5`` to ``n + 0.5``.

    Integer algorithm of Richards (2013), *Explanatory Supplement to the Astronomical
    Almanac*, 3rd ed., section 15.11.3 (Gregorian constants), valid for JD >= 0 (from
    4713 BC); years outside 0-9999 are written with a sign (ISO 8601 expanded years,
    ``-1234-05-06``), which :mod:`datetime` cannot hold.
    """
    j = int(np.floor(float(jd) + 0.5))
    f = j + 1401 + (((4 * j + 274277) // 146097) * 3) // 4 - 38
    e = 4 * f + 3
    g = (e % 1461) // 4
    h = 5 * g + 2
    day = (h % 153) // 5 + 1
    month = (h // 153 + 2) % 12 + 1
    year = e // 1461 - 4716 + (12 + 2 - month) // 12
    return f"{year:04d}-{month:02d}-{day:02d}" if 0 <= year <= 9999 else f"{year:+05d}-{month:02d}-{day:02d}"


def julian_year_from_jd(jd):
    """Julian year (J2000.0 = JD 2451545.0, 365.25-day years; IAU 1976)."""
    return 2000.0 + (np.asarray(jd, dtype=float) - JD_J2000) / JULIAN_YEAR_D


def jd_from_datetime64(t):
    """Julian date of numpy ``datetime64`` value(s), read as UTC."""
    t = np.asarray(t, dtype="datetime64[ns]")
    ns = t.astype("int64").astype(float)
    return _JD_UNIX_EPOCH + ns / 86400e9


def to_epoch_yr(epoch):
    """Convert an epoch given in any accepted form to a Besselian year (float or array).

    Accepted: a float/int year or array of them (taken as Besselian years, the
    catalogue's convention); an astropy ``Time``; a ``datetime.datetime`` /
    ``datetime.date`` / ``numpy.datetime64`` (UTC); a pandas Timestamp or
    DatetimeIndex.
    """
    if hasattr(epoch, "jd1") and hasattr(epoch, "jd2"):  # astropy Time, no import needed
        tt = epoch.tt  # Besselian epochs are defined on TT (Lieske 1979; astropy Time.byear)
        out = besselian_year_from_jd(np.asarray(tt.jd1) + np.asarray(tt.jd2))
        return float(out) if np.ndim(out) == 0 else out
    if isinstance(epoch, _dt.datetime):
        if epoch.tzinfo is not None:
            epoch = epoch.astimezone(_dt.timezone.utc).replace(tzinfo=None)
        return float(besselian_year_from_jd(jd_from_datetime64(np.datetime64(epoch, "ns"))))
    if isinstance(epoch, _dt.date):
        return float(besselian_year_from_jd(jd_from_datetime64(np.datetime64(epoch, "D"))))
    arr = np.asarray(epoch)
    if arr.dtype.kind == "M":
        return besselian_year_from_jd(jd_from_datetime64(arr))
    if arr.dtype.kind == "O":  # e.g. a list of datetimes or Timestamps
        try:
            return besselian_year_from_jd(jd_from_datetime64(arr.astype("datetime64[ns]")))
        except (TypeError, ValueError):
            pass
    out = np.asarray(arr, dtype=float)
    return float(out) if out.ndim == 0 else out


def today_epoch_yr() -> float:
    """The current moment as a Besselian year (UTC clock)."""
    now = _dt.datetime.now(_dt.timezone.utc).replace(tzinfo=None)
    return to_epoch_yr(now)
