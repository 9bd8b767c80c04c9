"""UTC instants: the one home of the package's time helpers.

Inside the package an instant is a numpy ``datetime64[ns]`` in UTC (naive);
these helpers convert to and from that, and format it for reports.
"""

from __future__ import annotations

import pandas as pd


def iso_utc(t) -> str | None:
    """ISO 8601 UTC text ``YYYY-MM-DDTHH:MM:SSZ`` of an instant (None for None/NaT)."""
    if t is None or (not isinstance(t, str) and pd.isna(t)):
        return None
    ts = pd.Timestamp(t)
    if ts.tzinfo is not None:
        ts = ts.tz_convert("UTC").tz_localize(None)
    return ts.strftime("%Y-%m-%dT%H:%M:%SZ")
