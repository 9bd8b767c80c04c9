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

from planner.utc import besselian_year_from_jd, jd_from_besselian_year

__all__ = ["besselian_year_from_jd", "jd_from_besselian_year", "julian_year_from_jd", "jd_from_datetime64",
           "to_epoch_yr", "today_epoch_yr"]

JD_J2000 = 2451545.0
JULIAN_YEAR_D = 365.25
_JD_UNIX_EPOCH = 2440587.5  # 1970-01-01T00:00 UTC

#: Epochs (Besselian years) the motion code accepts: orbits and linear
#: motion are extrapolated at most a few thousand years (one home for the range).
EPOCH_MIN_YR = -3000.0
EPOCH_MAX_YR = 5000.0


def check_epoch_yr(epoch_yr, what: str = "epoch"):
    """``epoch_yr`` (float or array) if every value is a finite year from
    :data:`EPOCH_MIN_YR` to :data:`EPOCH_MAX_YR`; else a one-line InputError
    stating the range."""
    from planner.errors import InputError

    arr = np.asarray(epoch_yr, dtype=float)
    bad = ~(np.isfinite(arr) & (arr >= EPOCH_MIN_YR) & (arr <= EPOCH_MAX_YR))
    if bad.any():
        first = arr[bad].flat[0]
        raise InputError(f"{what} {first:g} is out of range; give a year from {EPOCH_MIN_YR:.0f} "
                         f"to {EPOCH_MAX_YR:.0f}, such as 2031.5")
    return epoch_yr


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
    """Julian date of numpy ``datetime64`` value(s), read as UTC; NaN for NaT.

    Values are converted in their own unit when it is coarser than a
    microsecond (microseconds span +/- 290,000 years), so a date such as
    1600-01-01 is never squeezed into nanoseconds (which overflow outside
    1678-2262)."""
    t = np.asarray(t)
    if t.dtype.kind != "M":
        t = t.astype("datetime64[ns]")
    unit = np.datetime_data(t.dtype)[0]
    if unit in ("ns", "ps", "fs", "as"):
        ticks, per_day = t.astype("datetime64[ns]").astype("int64"), 86400e9
    else:
        ticks, per_day = t.astype("datetime64[us]").astype("int64"), 86400e6
    out = _JD_UNIX_EPOCH + ticks.astype(float) / per_day
    return np.where(np.isnat(t), np.nan, out)


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
        return float(besselian_year_from_jd(jd_from_datetime64(np.datetime64(epoch, "us"))))
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
