"""The night: Sun, twilight, dark window and Moon for one local date at a site.

Everything is computed with skyfield and the JPL DE421 ephemeris shipped by
the ``skyfield-data`` package, with skyfield's built-in time-scale tables:
nothing is downloaded.  Twilight comes from ``skyfield.almanac.dark_twilight_day``
and ``find_discrete``, called once per night (never per target).

States of ``dark_twilight_day`` (skyfield documentation): 0 night (Sun below
-18 deg), 1 astronomical twilight (-18..-12), 2 nautical (-12..-6), 3 civil
(-6..-0.8333), 4 day (upper limb above the refracted horizon).

The night of ``local_date`` is searched from local noon of that date to
local noon of the next day, in the site's time zone.  The dark window is the
longest stretch of that interval in which the Sun's centre is below the
chosen darkness level: civil -6 deg, nautical -12 deg (default; bright pairs
tolerate it) or astronomical -18 deg.

All instants are numpy ``datetime64[ns]`` in UTC; ``NaT`` where an event
does not happen (polar summer, polar winter).
"""

from __future__ import annotations

import datetime as _dt
import warnings
from dataclasses import dataclass, field

import numpy as np

from planner.config.fields import DARKNESS_SUN_ALT_DEG, DEFAULT_DARKNESS
from planner.errors import InputError
from planner.sky._astrometry import NS_PER_DAY, to_utc64
from planner.sky.site import Site
from planner.units import wrap_public

__all__ = ["Night", "night_for", "DARKNESS_LEVELS", "sun_alt_deg", "sun_sep_deg", "moon_position"]

#: Darkness level name -> (Sun altitude in deg, dark_twilight_day states that count as dark);
#: the levels and their Sun altitudes live in planner.config.fields.
DARKNESS_LEVELS = {name: (alt, state) for (name, alt), state in zip(DARKNESS_SUN_ALT_DEG.items(), (2, 1, 0))}

#: Number of Moon samples through the dark window.
MOON_SAMPLES = 9

NAT = np.datetime64("NaT", "ns")

_cache: dict = {}


def _skyfield():
    """(timescale, ephemeris) loaded once, offline."""
    if "eph" not in _cache:
        import skyfield_data
        from skyfield.api import Loader

        with warnings.catch_warnings():
            # skyfield-data warns that its copy of finals2000A.all is old; the
            # built-in timescale below does not use that file.
            warnings.simplefilter("ignore")
            path = skyfield_data.get_skyfield_data_path()
        load = Loader(path, verbose=False)
        _cache["ts"] = load.timescale(builtin=True)
        _cache["eph"] = load("de421.bsp")
    return _cache["ts"], _cache["eph"]


def sf_time(t64):
    """skyfield Time for datetime64[ns] UTC instants (any shape)."""
    ts, _ = _skyfield()
    ns = np.asarray(t64, dtype="datetime64[ns]").astype(np.int64)
    days = np.floor_divide(ns, NS_PER_DAY)
    sec = (ns - days * NS_PER_DAY) / 1e9
    return ts.utc(1970, 1, 1 + days, 0, 0, sec)


def to64(t) -> np.ndarray:
    """skyfield Time -> datetime64[ns] UTC array (rounded to the microsecond)."""
    dts = t.utc_datetime()
    if isinstance(dts, _dt.datetime):
        return np.datetime64(dts.replace(tzinfo=None), "ns")
    return np.array([d.replace(tzinfo=None) for d in dts], dtype="datetime64[ns]")


def _observer(site: Site):
    from skyfield.api import wgs84

    _, eph = _skyfield()
    return eph["earth"] + wgs84.latlon(site.lat_deg, site.lon_deg, elevation_m=site.elevation_m)


def sun_alt_deg(site: Site, when) -> np.ndarray:
    """Geometric altitude of the Sun's centre (deg) at UTC instant(s), vectorised (skyfield, DE421)."""
    _, eph = _skyfield()
    t64 = to_utc64(when)
    t = sf_time(t64.ravel())
    alt, _az, _d = _observer(site).at(t).observe(eph["sun"]).apparent().altaz()
    return np.asarray(alt.degrees).reshape(t64.shape)


def sun_sep_deg(ra_deg, dec_deg, site: Site, when) -> np.ndarray:
    """Angular distance (deg) of ICRS targets from the Sun at one UTC instant, vectorised.

    Use it to warn: never point a telescope near the Sun.
    """
    _, eph = _skyfield()
    t = sf_time(to_utc64(when))
    ra_s, dec_s, _ = _observer(site).at(t).observe(eph["sun"]).apparent().radec()
    return _sep_deg(ra_deg, dec_deg, ra_s._degrees, dec_s.degrees)


def _sep_deg(ra1, dec1, ra2, dec2):
    """Great-circle separation (deg), Vincenty's atan2 form (stable at 0 and 180 deg)."""
    ra1, dec1, ra2, dec2 = (np.radians(np.asarray(x, dtype=float)) for x in (ra1, dec1, ra2, dec2))
    dra = ra2 - ra1
    s1, c1, s2, c2 = np.sin(dec1), np.cos(dec1), np.sin(dec2), np.cos(dec2)
    num = np.hypot(c2 * np.sin(dra), c1 * s2 - s1 * c2 * np.cos(dra))
    return np.degrees(np.arctan2(num, s1 * s2 + c1 * c2 * np.cos(dra)))


def moon_position(site: Site, when):
    """Moon at UTC instants: dict of alt_deg, az_deg, ra_deg, dec_deg (ICRS axes), illum, phase_angle_deg."""
    _, eph = _skyfield()
    t64 = to_utc64(when)
    t = sf_time(t64.ravel())
    app = _observer(site).at(t).observe(eph["moon"]).apparent()
    alt, az, _ = app.altaz()
    ra, dec, _ = app.radec()
    illum = np.asarray(app.fraction_illuminated(eph["sun"]))
    phase = np.degrees(np.arccos(np.clip(2.0 * illum - 1.0, -1.0, 1.0)))
    shape = t64.shape
    return {
        "alt_deg": np.asarray(alt.degrees).reshape(shape),
        "az_deg": np.asarray(az.degrees).reshape(shape),
        "ra_deg": np.asarray(ra._degrees).reshape(shape),
        "dec_deg": np.asarray(dec.degrees).reshape(shape),
        "illum": illum.reshape(shape),
        "phase_angle_deg": phase.reshape(shape),
    }


@dataclass(frozen=True, eq=False)
class Night:
    """Sun and Moon for the night of ``local_date`` at ``site`` (all instants UTC datetime64[ns]).

    ``state`` is ``"dark"`` (a normal night), ``"all-dark"`` (the Sun stays
    below the darkness level for the whole noon-to-noon interval: polar
    night) or ``"no-dark"`` (it never gets there: polar or summer twilight
    night; ``dark_start_utc``/``dark_end_utc`` are NaT).  ``status`` says
    the same in one sentence for the observer.
    """

    site: Site
    local_date: _dt.date
    darkness: str
    dark_level_deg: float
    search_start_utc: np.datetime64
    search_end_utc: np.datetime64
    sunset_utc: np.datetime64
    sunrise_utc: np.datetime64
    civil_end_utc: np.datetime64
    civil_start_utc: np.datetime64
    nautical_end_utc: np.datetime64
    nautical_start_utc: np.datetime64
    astro_end_utc: np.datetime64
    astro_start_utc: np.datetime64
    dark_start_utc: np.datetime64
    dark_end_utc: np.datetime64
    state: str
    status: str
    sun_min_alt_deg: float
    moon_times_utc: np.ndarray = field(repr=False)
    moon_alt_deg: np.ndarray = field(repr=False)
    moon_az_deg: np.ndarray = field(repr=False)
    moon_ra_deg: np.ndarray = field(repr=False)
    moon_dec_deg: np.ndarray = field(repr=False)
    moon_illum: np.ndarray = field(repr=False)
    moon_phase_angle_deg: np.ndarray = field(repr=False)

    # -- derived ------------------------------------------------------------
    @property
    def has_dark(self) -> bool:
        return self.state != "no-dark"

    @property
    def dark_minutes(self) -> float:
        if not self.has_dark:
            return 0.0
        return float((self.dark_end_utc - self.dark_start_utc) / np.timedelta64(1, "m"))

    @property
    def middle_utc(self) -> np.datetime64:
        """Middle of the dark window (of the search interval when there is none)."""
        a, b = (self.dark_start_utc, self.dark_end_utc) if self.has_dark else (
            self.search_start_utc, self.search_end_utc)
        return a + (b - a) // 2

    def sun_alt_deg(self, when) -> np.ndarray:
        """Sun's altitude (deg) at UTC instant(s); see :func:`sun_alt_deg`."""
        return sun_alt_deg(self.site, when)

    def moon_at(self, when):
        """Moon RA/Dec/alt (deg) and illuminated fraction interpolated from the samples at UTC instant(s).

        Linear interpolation of the Moon's unit vector between samples that
        are at most a couple of hours apart: error well under 0.1 deg, ample
        for sky brightness and Moon distance.  ``xyz`` holds the (not
        renormalised) interpolated unit vector, ICRS axes.
        """
        t = to_utc64(when).astype(np.int64)
        ts = self.moon_times_utc.astype(np.int64)
        # one bracket search, reused for every interpolated quantity
        j = np.clip(np.searchsorted(ts, t, side="right") - 1, 0, ts.size - 2)
        w = np.clip((t - ts[j]) / (ts[j + 1] - ts[j]), 0.0, 1.0)

        def lerp(v):
            return v[j] + w * (v[j + 1] - v[j])

        ra, dec = np.radians(self.moon_ra_deg), np.radians(self.moon_dec_deg)
        x, y, z = (lerp(c) for c in (np.cos(dec) * np.cos(ra), np.cos(dec) * np.sin(ra), np.sin(dec)))
        return {
            "ra_deg": np.degrees(np.arctan2(y, x)) % 360.0,
            "dec_deg": np.degrees(np.arctan2(z, np.hypot(x, y))),
            "alt_deg": lerp(self.moon_alt_deg),
            "illum": lerp(self.moon_illum),
            "phase_angle_deg": lerp(self.moon_phase_angle_deg),
            "xyz": (x, y, z),
        }

    def moon_sep_deg(self, ra_deg, dec_deg, when=None) -> np.ndarray:
        """Distance (deg) from the Moon of ICRS targets, vectorised; ``when`` broadcast
        against the targets (default: the middle of the dark window)."""
        m = self.moon_at(self.middle_utc if when is None else when)
        return _sep_deg(ra_deg, dec_deg, m["ra_deg"], m["dec_deg"])

    def local(self, when_utc) -> str:
        """An instant in the site's local time, e.g. ``2026-12-02 18:04 CET``."""
        return self.site.format_local(when_utc)

    def summary(self) -> str:
        """A few lines for the observer, in local time (daylight saving included)."""
        L = self.local
        lines = [
            f"Night of {self.local_date.isoformat()} at {self.site.name or f'{self.site.lat_deg:.3f}, {self.site.lon_deg:.3f}'} ({self.site.tz})",
            f"  sunset {L(self.sunset_utc)}; sunrise {L(self.sunrise_utc)}",
            f"  civil twilight ends {L(self.civil_end_utc)}, begins {L(self.civil_start_utc)}",
            f"  nautical twilight ends {L(self.nautical_end_utc)}, begins {L(self.nautical_start_utc)}",
            f"  astronomical twilight ends {L(self.astro_end_utc)}, begins {L(self.astro_start_utc)}",
            f"  {self.status}",
        ]
        m = float(np.nanmax(self.moon_illum)) if self.moon_illum.size else float("nan")
        up = self.moon_alt_deg > 0
        lines.append(
            f"  Moon {100 * m:.0f}% lit, above the horizon for "
            f"{'none' if not up.any() else ('all' if up.all() else 'part')} of the window")
        lines.append("  Safety: never point a telescope near the Sun; in twilight check where it is.")
        return "\n".join(lines)


def _parse_date(local_date) -> _dt.date:
    if isinstance(local_date, _dt.datetime):
        return local_date.date()
    if isinstance(local_date, _dt.date):
        return local_date
    if isinstance(local_date, np.datetime64):
        local_date = str(local_date.astype("datetime64[D]"))
    if isinstance(local_date, str):
        try:
            return _dt.date.fromisoformat(local_date.strip())
        except ValueError:
            raise InputError(f"date {local_date!r} is not a valid calendar date; give YYYY-MM-DD") from None
    raise InputError(f"date {local_date!r} is not understood; give YYYY-MM-DD")


def night_for(site: Site, local_date, darkness: str = DEFAULT_DARKNESS) -> Night:
    """Sun, twilight, dark window and Moon for the evening of ``local_date`` (site's zone) to next morning.

    ``darkness``: ``"civil"`` (-6 deg), ``"nautical"`` (-12 deg, default) or
    ``"astronomical"`` (-18 deg).  Never raises for polar summer or winter;
    see :class:`Night` ``state`` and ``status``.
    """
    from skyfield import almanac

    if not isinstance(site, Site):
        raise InputError(f"site must be a planner.sky.Site, got {type(site).__name__}")
    if darkness not in DARKNESS_LEVELS:
        raise InputError(f"darkness {darkness!r} is unknown; choose one of: {', '.join(DARKNESS_LEVELS)}")
    date = _parse_date(local_date)
    if not (1900 <= date.year <= 2052):
        raise InputError(f"date {date.isoformat()} is outside the DE421 ephemeris; allowed 1900 to 2052")
    level_deg, dark_state = DARKNESS_LEVELS[darkness]
    zone = site.zone
    noon = _dt.datetime(date.year, date.month, date.day, 12, tzinfo=zone)
    nxt = date + _dt.timedelta(days=1)
    noon2 = _dt.datetime(nxt.year, nxt.month, nxt.day, 12, tzinfo=zone)
    t0_64 = np.datetime64(noon.astimezone(_dt.timezone.utc).replace(tzinfo=None), "ns")
    t1_64 = np.datetime64(noon2.astimezone(_dt.timezone.utc).replace(tzinfo=None), "ns")

    ts, eph = _skyfield()
    from skyfield.api import wgs84

    topos = wgs84.latlon(site.lat_deg, site.lon_deg, elevation_m=site.elevation_m)
    f = almanac.dark_twilight_day(eph, topos)
    t0, t1 = sf_time(t0_64), sf_time(t1_64)
    times, states = almanac.find_discrete(t0, t1, f)
    ev64 = to64(times) if len(times) else np.array([], dtype="datetime64[ns]")
    ev64 = np.atleast_1d(ev64)
    states = np.asarray(states, dtype=int)
    s0 = int(f(t0))

    # Segments [start, end) with their state.
    starts = np.concatenate([[t0_64], ev64])
    ends = np.concatenate([ev64, [t1_64]])
    seg_state = np.concatenate([[s0], states])
    prev_state = np.concatenate([[s0], seg_state[:-1]])

    def crossing(b: int):
        down = np.flatnonzero((prev_state[1:] >= b) & (seg_state[1:] < b))
        up = np.flatnonzero((prev_state[1:] < b) & (seg_state[1:] >= b))
        ev = ev64
        evening = ev[down[0]] if down.size else NAT
        if down.size:
            up = up[ev[up] > evening]
        morning = ev[up[-1]] if up.size else NAT
        return evening, morning

    sunset, sunrise = crossing(4)
    civil_end, civil_start = crossing(3)
    naut_end, naut_start = crossing(2)
    astro_end, astro_start = crossing(1)

    # Dark window: longest run of consecutive segments with state <= dark_state.
    is_dark = seg_state <= dark_state
    best, best_len, run_start = None, np.timedelta64(-1, "ns"), None
    for i, d in enumerate(is_dark):  # a handful of segments per night
        if d and run_start is None:
            run_start = starts[i]
        if run_start is not None and (not d or i == len(is_dark) - 1):
            run_end = ends[i] if d else starts[i]
            if run_end - run_start > best_len:
                best, best_len = (run_start, run_end), run_end - run_start
            run_start = None

    # Lowest Sun altitude (for the status text), 10-minute samples + refinement.
    n = 145
    grid = t0_64 + ((t1_64 - t0_64) // (n - 1)) * np.arange(n)
    salt = sun_alt_deg(site, grid)
    sun_min = float(np.min(salt))

    where = site.name or f"latitude {site.lat_deg:.2f}"
    if best is None:
        state = "no-dark"
        dark_start = dark_end = NAT
        status = (f"no dark window: at {where} the Sun stays above {level_deg:g} deg ({darkness} darkness) "
                  f"all night (lowest {sun_min:.1f} deg); try a lighter darkness level or another date")
        moon_t = grid[:: (n - 1) // (MOON_SAMPLES - 1)]
    else:
        dark_start, dark_end = best
        if dark_start == t0_64 and dark_end == t1_64:
            state = "all-dark"
            status = (f"dark all day: at {where} the Sun stays below {level_deg:g} deg (polar night); "
                      f"the window runs noon to noon, local time")
        else:
            state = "dark"
            mins = (dark_end - dark_start) / np.timedelta64(1, "m")
            status = (f"{darkness} dark from {site.format_local(dark_start, '%H:%M')} to "
                      f"{site.format_local(dark_end, '%H:%M %Z')} ({mins / 60:.1f} h)")
        step = (dark_end - dark_start) // (MOON_SAMPLES - 1)
        moon_t = dark_start + step * np.arange(MOON_SAMPLES)
        moon_t[-1] = dark_end
    moon = moon_position(site, moon_t)
    return Night(
        site=site, local_date=date, darkness=darkness, dark_level_deg=level_deg,
        search_start_utc=t0_64, search_end_utc=t1_64,
        sunset_utc=sunset, sunrise_utc=sunrise,
        civil_end_utc=civil_end, civil_start_utc=civil_start,
        nautical_end_utc=naut_end, nautical_start_utc=naut_start,
        astro_end_utc=astro_end, astro_start_utc=astro_start,
        dark_start_utc=dark_start, dark_end_utc=dark_end,
        state=state, status=status, sun_min_alt_deg=sun_min,
        moon_times_utc=moon_t, moon_alt_deg=moon["alt_deg"], moon_az_deg=moon["az_deg"],
        moon_ra_deg=moon["ra_deg"], moon_dec_deg=moon["dec_deg"], moon_illum=moon["illum"],
        moon_phase_angle_deg=moon["phase_angle_deg"],
    )


# every public function above accepts astropy Quantity arguments (planner.units)
wrap_public(globals())
