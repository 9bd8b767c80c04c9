"""UTC instants: the one home of the package's time helpers.

Inside the package an instant is a numpy ``datetime64[ns]`` in UTC (naive);
these helpers convert to and from that, and format it for reports.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

#: JD of B1900.0 and the tropical year in days: Besselian epochs (Lieske 1979, A&A 73, 282; SOFA ``epb``)
JD_B1900 = 2415020.31352
TROPICAL_YEAR_D = 365.242198781


def besselian_year_from_jd(jd):
    """Besselian year of a Julian date: B = 1900.0 + (JD - 2415020.31352) / 365.242198781
    (Lieske 1979; docs/methods.md section 7)."""
    return 1900.0 + (np.asarray(jd, dtype=float) - JD_B1900) / TROPICAL_YEAR_D


def jd_from_besselian_year(year):
    """Julian date of a Besselian year (inverse of :func:`besselian_year_from_jd`)."""
    return JD_B1900 + (np.asarray(year, dtype=float) - 1900.0) * TROPICAL_YEAR_D


def iso_utc(t) -> str | None:
    """ISO 8601 UTC text ``YYYY-MM-DDTHH:MM:SSZ`` of an instant (None for None/NaT)."""
    if t is None or (not isinstance(t, str) and pd.isna(t)):
        return None
    ts = pd.Timestamp(t)
    if ts.tzinfo is not None:
        ts = ts.tz_convert("UTC").tz_localize(None)
    return ts.strftime("%Y-%m-%dT%H:%M:%SZ")
