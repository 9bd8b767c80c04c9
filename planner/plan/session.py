"""The resolved session: every input of a night plan as typed objects, built once.

A :class:`~planner.plan.model.NightRequest` holds the inputs as the user gave
them (plain values, what a plan file records).  :meth:`Session.from_request`
checks them and builds, once, the objects every later step uses: the
:class:`~planner.sky.site.Site`, one :class:`~planner.optics.telescope.Telescope`
per scope, the local date, the sky engine's night, the seeing.  The night
plan, the aperture comparison and the reports receive the session and never
rebuild any of these.  The request is never modified; ``session.request`` is a
copy with the resolved date filled in (so a saved plan reruns the same night).
"""

from __future__ import annotations

import dataclasses
import datetime as _dt

import numpy as np
import pandas as pd

from planner.config.fields import (DEFAULT_SEEING_ARCSEC, SCOPE_FIELDS, SITE_FIELDS, check,
                                   check_filters, check_mapping)
from planner.config.seeing_scale import load_scale, steadiness_to_seeing
from planner.errors import InputError
from planner.optics.telescope import Telescope
from planner.plan.model import NightRequest
from planner.catalogs.constellations import constellation
from planner.sky.night import Night, night_for
from planner.sky.site import Site


@dataclasses.dataclass(frozen=True)
class Session:
    """One night's inputs, resolved.  Build with :meth:`from_request`."""

    request: NightRequest            # the inputs, with ``date`` resolved to the local date
    site: Site
    telescopes: tuple                # of Telescope, each with its display name
    night: Night
    night_info: dict                 # plain values for reports (see :func:`night_summary`)
    seeing_arcsec: float
    seeing_origin: str
    calibrations: tuple = ()         # (scope name, Calibration) when request.calibration == "mine"
    window_utc: tuple | None = None   # the observing window (dark window cut to --start/--end), UTC

    @property
    def local_date(self) -> str:
        return self.request.date

    @property
    def minutes(self) -> float:
        return float(self.request.minutes)

    @property
    def has_window(self) -> bool:
        """True when the night has a dark window."""
        a, b = self.night_info.get("dark_start_utc"), self.night_info.get("dark_end_utc")
        return a is not None and b is not None and not pd.isna(a) and not pd.isna(b)

    @classmethod
    def from_request(cls, request: NightRequest, need_scopes: bool = True) -> "Session":
        """Check ``request`` and build the session (the request itself is left as it is)."""
        if need_scopes and not request.scopes:
            raise InputError("no telescope given; use --aperture MM or --scope NAME")
        request = checked(request)
        seeing, seeing_origin = resolve_seeing(request)
        site = site_of(request)
        local_date = parse_date(request.date, site)
        night = night_for(site, local_date, darkness=request.darkness)
        info = night_summary(night, site)
        info["local_date"] = local_date
        telescopes = tuple(Telescope.from_mapping(sd, scope_name(sd)) for sd in request.scopes)
        window = None
        if night.has_dark:
            # computed once, so '--start now' is one instant for the whole plan
            window = session_window(info, site, local_date, request.start_local, request.end_local)
            info["window_start_utc"], info["window_end_utc"] = window
        calibrations = ()
        if request.calibration is not None:
            from planner.plan.observations import calibrate

            telescopes, calibrations = calibrate(telescopes, request.calibration)
        return cls(request=dataclasses.replace(request, date=local_date), site=site, telescopes=telescopes,
                   night=night, night_info=info, seeing_arcsec=seeing, seeing_origin=seeing_origin,
                   calibrations=calibrations, window_utc=window)

    def window(self):
        """The observing window (two UTC ``datetime64[ns]``): the dark window cut to the optional
        HH:MM (or ``now``) start and end."""
        if self.window_utc is None:
            raise InputError(f"no dark window on {self.local_date} at this site")
        return self.window_utc

    @property
    def window_night(self) -> Night:
        """The night with its dark window cut to the observing window: visibility, best time and
        altitude computed on it are those inside the window, so candidates are chosen for it."""
        if self.window_utc is None:
            return self.night
        a, b = self.window_utc
        if a == _ns(self.night.dark_start_utc) and b == _ns(self.night.dark_end_utc):
            return self.night
        return dataclasses.replace(self.night, dark_start_utc=np.datetime64(a, "ns"),
                                   dark_end_utc=np.datetime64(b, "ns"))


#: the request's scalar fields checked by the field table (planner.config.fields)
_SCALARS = ("darkness", "minutes", "limit", "seeing_arcsec", "steadiness", "share_margin", "start_local",
            "end_local", "min_alt_deg", "challenges", "catalog", "site_name", "calibration", "wide_factor")


def checked(request: NightRequest) -> NightRequest:
    """A copy of ``request`` with every field checked by :mod:`planner.config.fields`
    (the same checks as the command line, profiles and plan files)."""
    kw = {k: check(k, getattr(request, k)) for k in _SCALARS if getattr(request, k) is not None}
    if request.date is not None:
        kw["date"] = check("date", str(request.date) if isinstance(request.date, _dt.date) else request.date)
    site = check_mapping("site", request.site, (*SITE_FIELDS, "name"))
    if not isinstance(request.scopes, (list, tuple)):
        raise InputError("the telescopes must be a list of tables ([[scopes]] in a plan file)")
    scopes = [check_mapping("telescope", sd, (*SCOPE_FIELDS, "name")) for sd in request.scopes]
    filters = check_filters(request.filters)
    unknown = [c for c in filters.get("constellations", []) if constellation(c) is None]
    if unknown:
        raise InputError(f"--constellation {unknown[0]!r} is not an IAU constellation (abbreviation "
                         "or Latin name, e.g. Cyg, Cygnus, Cygni, UMa, Ursae Majoris)")
    return dataclasses.replace(request, site=site, scopes=scopes, filters=filters, **kw)


def site_of(request: NightRequest) -> Site:
    """The request's site, with its ``min_alt_deg`` override applied."""
    d = dict(request.site)
    if request.min_alt_deg is not None:
        d["min_alt_deg"] = request.min_alt_deg
    return Site.from_mapping(d, request.site_name)


def scope_name(sd: dict) -> str:
    """A scope's display name: its own, else its aperture ("102 mm")."""
    if sd.get("name"):
        return str(sd["name"])
    try:
        return f"{float(sd.get('aperture_mm')):g} mm"
    except (TypeError, ValueError):
        return ""


def resolve_seeing(request: NightRequest):
    """Seeing FWHM (arcsec) and a text saying where it came from."""
    if request.seeing_arcsec is not None and request.steadiness is not None:
        raise InputError("give either --seeing (arcsec) or --steadiness (1-10), not both")
    if request.seeing_arcsec is not None:
        s = check("seeing_arcsec", request.seeing_arcsec)
        return s, f"{s:g}\" FWHM as given"
    if request.steadiness is not None:
        table, origin = load_scale()
        s = steadiness_to_seeing(request.steadiness, table)
        src = "default table (an assumption)" if origin == "default" else origin
        return s, f"steadiness {float(request.steadiness):g}/10 -> {s:.2f}\" via {src}"
    return DEFAULT_SEEING_ARCSEC, f"{DEFAULT_SEEING_ARCSEC:g}\" FWHM (default; give --seeing or --steadiness)"


def now_utc() -> np.datetime64:
    """The current instant, UTC (one place, so tests can fix the clock)."""
    return np.datetime64(_dt.datetime.now(_dt.timezone.utc).replace(tzinfo=None), "ns")


def tonight(site: Site) -> str:
    """Local date of tonight's evening at the site (before noon: last night)."""
    now = pd.Timestamp(now_utc()).tz_localize("UTC").to_pydatetime().astimezone(site.zone)
    if now.hour < 12:
        now = now - _dt.timedelta(days=1)
    return now.date().isoformat()


def parse_date(text, site: Site) -> str:
    """The evening's local date as ISO text (None: tonight at the site)."""
    if text is None:
        return tonight(site)
    try:
        return _dt.date.fromisoformat(str(text)).isoformat()
    except ValueError:
        raise InputError(f"date {text!r} is not a valid YYYY-MM-DD date") from None


def night_summary(night: Night, site: Site) -> dict:
    """The sky engine's night as plain values for reports."""
    d: dict = {}
    for key in ("dark_start_utc", "dark_end_utc", "sunset_utc", "sunrise_utc", "darkness",
                "moon_illumination", "moon_rise_utc", "moon_set_utc", "moon_alt_max_deg",
                "status", "note", "local_date", "sun_alt_limit_deg"):
        if hasattr(night, key):
            d[key] = getattr(night, key)
    illum = getattr(night, "moon_illum", None)
    if illum is not None and np.size(illum):
        d["moon_illumination"] = float(np.nanmax(illum))
        up = np.asarray(getattr(night, "moon_alt_deg", []), float) > 0
        d["moon_up"] = "none" if not up.any() else ("all" if up.all() else "part")
    if getattr(night, "has_dark", True) is False:
        d["dark_start_utc"] = None
        d["dark_end_utc"] = None
    d["tz"] = site.tz
    return d


def _ns(t) -> np.datetime64:
    ts = pd.Timestamp(t)
    if ts.tzinfo is not None:
        ts = ts.tz_convert("UTC").tz_localize(None)
    return np.datetime64(ts.to_datetime64(), "ns")


def local_clock_utc(hhmm: str, site: Site, local_date: str, now=None) -> np.datetime64:
    """The UTC instant of an HH:MM local clock time on the night of ``local_date``.

    Times before noon are the next calendar morning.  ``"now"`` is the current
    instant (``now`` when given, else :func:`now_utc`)."""
    if str(hhmm).strip().lower() == "now":
        return _ns(now if now is not None else now_utc())
    try:
        h, m = (int(x) for x in str(hhmm).split(":"))
        ok = 0 <= h < 24 and 0 <= m < 60
    except ValueError:
        ok = False
    if not ok:
        raise InputError(f"time {hhmm!r} is not HH:MM (24-hour local clock) or 'now'")
    day = _dt.date.fromisoformat(local_date)
    if h < 12:  # after midnight: the next calendar day
        day = day + _dt.timedelta(days=1)
    local = _dt.datetime(day.year, day.month, day.day, h, m, tzinfo=site.zone)
    return np.datetime64(local.astimezone(_dt.timezone.utc).replace(tzinfo=None), "ns")


def session_window(ninfo: dict, site: Site, local_date: str, start_local, end_local, now=None):
    """The dark window, cut to the observer's optional HH:MM (or ``now``) start and end."""
    a = _ns(ninfo["dark_start_utc"])
    b = _ns(ninfo["dark_end_utc"])
    t_start = local_clock_utc(start_local, site, local_date, now) if start_local else None
    t_end = local_clock_utc(end_local, site, local_date, now) if end_local else None
    if t_start is not None and t_end is not None and t_start >= t_end:
        raise InputError(f"--start {start_local} is not before --end {end_local} (evening times before "
                         "midnight, morning times after)")
    if t_start is not None:
        a = max(a, t_start)
    if t_end is not None:
        b = min(b, t_end)
    if a >= b:
        dark = (f"{site.format_local(ninfo['dark_start_utc'], '%H:%M')}-"
                f"{site.format_local(ninfo['dark_end_utc'], '%H:%M')}")
        raise InputError(f"the chosen times (start {start_local or 'dark'}, end {end_local or 'dawn'}) leave no "
                         f"time inside the night's dark window ({dark} local on {local_date})")
    return a, b
