"""One pair, one telescope, one night: the verdict with its reasons, the best time
tonight and the best dates of the year.

The best dates are found analytically: a star is best placed for an evening
observer when it crosses the meridian near local midnight, i.e. when the Sun
is opposite it in right ascension.  The Sun's right ascension over the year
comes from the low-precision solar formulae of the *Astronomical Almanac*
(section C, "low precision formulas for the Sun", about 0.01 deg, 1950-2050),
vectorised over the days of the year.  Midnight is local mean solar
midnight (the equation of time, at most about 16 minutes, is ignored).
The *good season* is the span of dates on which the transit falls within
``season_hours`` (default 3) of midnight: the transit moves about 4 minutes
a day, so roughly +-45 days.  Both are taken in the year-long window centred
on the evening asked about, so they are the nearest season, with real years.
"""

from __future__ import annotations

import datetime as _dt
import numpy as np
import pandas as pd

from planner.catalogs import find_pair
from planner.catalogs.catalog import Catalog, load_catalog
from planner.errors import InputError
from planner.motion import pair_geometry
from planner.optics.telescope import Telescope
from planner.config.fields import DEFAULT_DARKNESS, DEFAULT_MINUTES, DEFAULT_SEEING_ARCSEC, check
from planner.plan.night import CAUTIONS, judge_at_best
from planner.plan.model import DARKNESS
from planner.plan.night import CAUTIONS, judge_at_best, judge_rows
from planner.plan.session import parse_date
from planner.sky.atmosphere import airmass
from planner.sky.night import DARKNESS_LEVELS, night_for
from planner.sky.placement import visibility
from planner.sky.site import Site
from planner.utc import iso_utc


def sun_ra_deg(jd) -> np.ndarray:
    """Apparent right ascension of the Sun (deg), low-precision formula (Astronomical Almanac, sec. C)."""
    return sun_radec_deg(jd)[0]


def sun_radec_deg(jd):
    """Apparent right ascension and declination of the Sun (deg), low-precision formulae of the
    *Astronomical Almanac* (section C; about 0.01 deg, 1950-2050)."""
    n = np.asarray(jd, float) - 2451545.0
    L = (280.460 + 0.9856474 * n) % 360.0
    g = np.radians((357.528 + 0.9856003 * n) % 360.0)
    lam = np.radians(L + 1.915 * np.sin(g) + 0.020 * np.sin(2 * g))
    eps = np.radians(23.439 - 0.0000004 * n)
    ra = np.degrees(np.arctan2(np.cos(eps) * np.sin(lam), np.cos(lam))) % 360.0
    dec = np.degrees(np.arcsin(np.sin(eps) * np.sin(lam)))
    return ra, dec


def _alt_deg(ra_deg, dec_deg, lat_deg, lst_deg):
    ha = np.radians(lst_deg - ra_deg)
    phi, d = np.radians(lat_deg), np.radians(dec_deg)
    return np.degrees(np.arcsin(np.clip(np.sin(phi) * np.sin(d) + np.cos(phi) * np.cos(d) * np.cos(ha), -1, 1)))


def dark_up_minutes(ra_deg: float, dec_deg: float, lat_deg: float, lon_deg: float, days_ordinal,
                    sun_limit_deg: float, min_alt_deg: float, step_min: float = 5.0) -> np.ndarray:
    """Minutes, per evening, during which the target is above ``min_alt_deg`` while the Sun is
    below ``sun_limit_deg`` (local mean noon to the next noon), vectorised over the dates.

    Sun from the *Astronomical Almanac* low-precision formulae (:func:`sun_radec_deg`); sidereal
    time from the GMST formula of Meeus (1998, *Astronomical Algorithms*, eq. 12.4); the target's
    J2000 place is used without precession (a fraction of a degree, i.e. well under a day in the
    dates), no refraction and no horizon profile.  Sampled every ``step_min`` minutes: good to a
    step, ample for choosing the dates of a season."""
    days = np.asarray(days_ordinal, int)
    frac = np.arange(0.0, 1.0, step_min / 1440.0)
    # local mean noon of each date, as a Julian date (UT)
    jd0 = days - _dt.date(2000, 1, 1).toordinal() + 2451545.0 - float(lon_deg) / 360.0
    jd = jd0[:, None] + frac[None, :]
    gmst = (280.46061837 + 360.98564736629 * (jd - 2451545.0)) % 360.0
    lst = gmst + float(lon_deg)
    sra, sdec = sun_radec_deg(jd)
    dark = _alt_deg(sra, sdec, lat_deg, lst) < sun_limit_deg
    up = _alt_deg(float(ra_deg), float(dec_deg), lat_deg, lst) >= min_alt_deg
    return (dark & up).sum(axis=1) * float(step_min)


def best_dates(ra_deg: float, dec_deg: float, lat_deg: float, around, season_hours: float = 3.0, *,
               lon_deg: float | None = None, sun_limit_deg: float = -12.0, min_alt_deg: float = 20.0,
               minutes: float = 10.0) -> dict:
    """The nearest date on which the pair transits at local midnight, and the good season around it.

    ``around``: the evening's date (``datetime.date``, ISO text, or a year as int, meaning
    1 July of that year).  The year-long window centred on it holds exactly one midnight
    transit, so the answer is the nearest one (this season, whether just past or to come),
    and the season is given with its real years even when it spans New Year.

    With the site's longitude (``lon_deg``) the season also respects darkness: a date is in it
    only when the pair is above ``min_alt_deg`` for at least ``minutes`` while the Sun is below
    ``sun_limit_deg`` (:func:`dark_up_minutes`).  When no date near the midnight transit is dark
    enough (high latitudes in summer) the season is the run of dates around the one on which the
    pair is up longest in the dark, where it is up at least half as long; ``season_basis``
    says which rule gave the dates and ``note`` says why the midnight transit is not usable.
    """
    if isinstance(around, int):
        around = _dt.date(around, 7, 1)
    elif isinstance(around, str):
        around = _dt.date.fromisoformat(around[:10])
    pad = 120  # days beyond the year-long window, so a season at its edge is not cut short
    days = around.toordinal() + np.arange(-182 - pad, 183 + pad)
    jd = days - _dt.date(2000, 1, 1).toordinal() + 2451544.5 + 0.5  # ~ midnight of each date (UT)
    anti = (sun_ra_deg(jd) + 180.0) % 360.0
    off_h = ((ra_deg - anti + 180.0) % 360.0 - 180.0) / 15.0  # transit minus midnight, hours
    k = pad + int(np.argmin(np.abs(off_h[pad:-pad])))
    near = np.abs(off_h) <= season_hours
    max_alt = 90.0 - abs(lat_deg - dec_deg)

    def d(o):
        return _dt.date.fromordinal(int(o)).isoformat()

    out = {"midnight_transit": d(days[k]), "good_from": None, "good_to": None,
           "season_hours": season_hours, "max_alt_deg": float(max_alt), "ever_up": bool(max_alt > 0),
           "season_basis": f"transit within {season_hours:g} h of midnight", "note": ""}
    if lon_deg is None:
        if near[k]:
            a, b = _run_around(near, k)
            out["good_from"], out["good_to"] = d(days[a]), d(days[b])
        return out
    up_min = dark_up_minutes(ra_deg, dec_deg, lat_deg, lon_deg, days, sun_limit_deg, min_alt_deg)
    out["dark_up_min_at_transit"] = float(up_min[k])
    good = near & (up_min >= minutes)
    centre = np.arange(len(days))
    inside = (centre >= pad) & (centre < len(days) - pad)
    if not good[k]:
        out["note"] = (f"at its midnight transit ({d(days[k])}) it is not above {min_alt_deg:g} deg for "
                       f"{minutes:g} min in the dark (Sun below {sun_limit_deg:g} deg)")
    if good[k] or (good & inside).any():
        kk = k if good[k] else int(np.flatnonzero(good & inside)[np.argmin(np.abs(np.flatnonzero(good & inside) - k))])
        a, b = _run_around(good, kk)
    elif ((up_min >= minutes) & inside).any():
        inner = np.where(inside, up_min, -1.0)
        top = float(inner.max())
        cand = np.flatnonzero(inner == top)
        kk = int(cand[np.argmin(np.abs(cand - k))])
        a, b = _run_around((up_min >= max(minutes, 0.5 * top)), kk)
        out["season_basis"] = (f"up longest in the dark ({top:.0f} min above {min_alt_deg:g} deg on "
                               f"{d(days[kk])}; dates with at least half as long)")
    else:
        out["note"] = (f"never above {min_alt_deg:g} deg for {minutes:g} min while the Sun is below "
                       f"{sun_limit_deg:g} deg, on any date of the year from this site")
        return out
    out["good_from"], out["good_to"] = d(days[a]), d(days[b])
    return out


def _run_around(mask: np.ndarray, k: int) -> tuple[int, int]:
    """First and last index of the run of True in ``mask`` that contains ``k``."""
    a = b = k
    while a > 0 and mask[a - 1]:
        a -= 1
    while b < len(mask) - 1 and mask[b + 1]:
        b += 1
    return a, b


def _as_site(site) -> Site:
    if isinstance(site, dict):
        return Site.from_mapping(site)
    return site


def _as_scope(telescope) -> Telescope:
    if isinstance(telescope, dict):
        return Telescope.from_mapping(telescope)
    if isinstance(telescope, (int, float)):
        return Telescope(aperture_mm=float(telescope))
    return telescope


def check_pair(catalog, query_or_index, site, local_date, telescope,
               seeing_arcsec: float = DEFAULT_SEEING_ARCSEC, darkness: str = DEFAULT_DARKNESS,
               minutes: float = DEFAULT_MINUTES, calibration: str | None = None) -> dict:
    """Can this telescope split this pair tonight, when, and when is its season?

    Parameters
    ----------
    catalog : Catalog or a catalogue spec (``"sample"``, ``"vizier"``, a path)
    query_or_index : a pair designation/WDS id, or an index label of ``catalog.pairs``
    site : a sky-engine ``Site`` or a dict (lat_deg, lon_deg, elevation_m, tz, min_alt_deg)
    local_date : the evening's local date (YYYY-MM-DD or date); None = tonight
    telescope : an optics ``Telescope``, a dict (aperture_mm, obstruction, ...) or an aperture in mm
    seeing_arcsec : seeing FWHM at the zenith
    calibration : None or 'published' (the published chance curve) or 'mine' (the curve fitted
        to the observation log, :mod:`planner.plan.calibration`; then ``calibration`` in the
        result says which)

    Returns
    -------
    dict with ``wds_id``, ``discoverer``, ``components``, ``ra_deg``, ``dec_deg``,
    ``mag1``, ``mag2``, ``rho_arcsec``, ``theta_deg``, ``method``, ``grade``,
    ``rho_unc_arcsec``, the verdict at the best time (``verdict``, ``limit_arcsec``,
    ``margin``, ``chance``, ``reason``, ``power_min``, ``power_max``), the night
    (``dark_start_utc``, ``dark_end_utc``), the best time tonight (``best_utc``,
    ``best_local``, ``alt_best_deg``, ``airmass_best``, ``up_dark_min``,
    ``observable``), ``best_dates`` (see :func:`best_dates`) and ``cautions``.
    Times are ISO 8601 UTC text.
    """
    cat = load_catalog(catalog) if isinstance(catalog, str) else catalog
    pairs = cat.pairs
    if not isinstance(query_or_index, str) and query_or_index in pairs.index:
        idx = query_or_index
    else:
        idx = find_pair(cat, str(query_or_index))
    row = pairs.loc[[idx]]
    orbits = getattr(cat, "orbits", None)
    if orbits is not None and len(orbits):
        orbits = orbits[orbits["wds_id"] == row["wds_id"].iloc[0]]
    small = Catalog(pairs=row, orbits=orbits, source=str(getattr(cat, "source", "")),
                    retrieved=str(getattr(cat, "retrieved", "")))
    site = _as_site(site)
    tel = _as_scope(telescope)
    cal_used = None
    if calibration is not None:
        from planner.plan.observations import calibrate

        (tel,), used = calibrate((tel,), calibration)
        cal_used = used[0][1] if used else None
    darkness = check("darkness", darkness)
    seeing_arcsec = check("seeing_arcsec", seeing_arcsec)
    minutes = check("minutes", minutes)
    date = parse_date(None if local_date is None else str(local_date), site)
    night = night_for(site, date, darkness=darkness)
    geo = pair_geometry(small, np.datetime64(night.middle_utc, "ns"))
    geo = geo.drop(columns=[c for c in geo.columns if c in row.columns])
    table = pd.concat([row, geo], axis=1)
    ra, dec = float(row["ra_deg"].iloc[0]), float(row["dec_deg"].iloc[0])
    vis = visibility(np.array([ra]), np.array([dec]), site, night).reset_index(drop=True)
    g = table.iloc[0]
    vis0 = vis.iloc[0]
    up_ok = bool(vis0["observable"]) and float(vis0["up_dark_min"]) >= minutes
    max_alt = 90.0 - abs(site.lat_deg - dec)
    if up_ok:
        # the verdict tonight: at the best time inside the dark window
        v = judge_at_best(tel, table.reset_index(drop=True), vis, float(seeing_arcsec)).iloc[0]
        basis = "at its best time tonight"
        judged_alt = float(vis0["alt_best_deg"])
    else:
        # Not observable tonight: the optical verdict alone, at the pair's highest altitude (upper
        # transit) on a dark night, so "will not split" is never said of a pair that merely is
        # not up; dark-sky brightness and no dispersion term (it is a statement about the optics).
        judged_alt = max_alt if max_alt > 0 else 90.0
        x = airmass(np.array([max(judged_alt, 1.0)]))
        basis = (f"optics alone, at its highest altitude ({max_alt:.0f} deg, at transit) on a dark night"
                 if max_alt > 0 else "optics alone (it never rises here; judged overhead)")
        v = judge_rows(tel, table.reset_index(drop=True), float(seeing_arcsec), x).iloc[0]
    if not night.has_dark:
        sky_state = "no-dark"
        low = getattr(night, "sun_min_alt_deg", None)
        sky_text = (f"not observable tonight: no dark window (the Sun stays above {_darkness_deg(darkness):g} deg, "
                    f"{darkness} darkness" + (f"; lowest {low:.1f} deg)" if low is not None else ")"))
    elif not up_ok:
        sky_state = "not-up"
        sky_text = (f"not up in the dark tonight: above {site.min_alt_deg:g} deg for "
                    f"{float(np.nan_to_num(vis0['up_dark_min'])):.0f} min of the dark window "
                    f"(needs {minutes:g} min)")
    else:
        sky_state = "up"
        sky_text = (f"up in the dark tonight for {float(vis0['up_dark_min']):.0f} min above "
                    f"{site.min_alt_deg:g} deg")

    def num(val):
        try:
            f = float(val)
        except (TypeError, ValueError):
            return None
        return None if not np.isfinite(f) else f

    out = {
        "wds_id": str(g["wds_id"]), "discoverer": str(g["discoverer"]), "components": str(g["components"]),
        "ra_deg": ra, "dec_deg": dec, "mag1": num(g["mag1"]), "mag2": num(g["mag2"]),
        "rho_arcsec": num(g["rho_arcsec"]), "theta_deg": num(g["theta_deg"]), "method": str(g["method"]),
        "grade": num(g.get("grade")), "rho_unc_arcsec": num(g.get("rho_unc_arcsec")),
        "geometry_note": str(g.get("reason", "")),
        "verdict": str(v["verdict"]), "limit_arcsec": num(v["limit_arcsec"]), "margin": num(v["margin"]),
        "chance": num(v["chance"]), "reason": str(v["reason"]), "reason_code": str(v.get("reason_code", "")),
        "power_min": num(v.get("power_min")), "power_max": num(v.get("power_max")),
        "date": date, "darkness": darkness,
        "dark_start_utc": iso_utc(night.dark_start_utc) if night.has_dark else None,
        "dark_end_utc": iso_utc(night.dark_end_utc) if night.has_dark else None,
        "best_utc": iso_utc(vis0["best_utc"]),
        "best_local": site.format_local(vis0["best_utc"]) if not pd.isna(vis0["best_utc"]) else None,
        "alt_best_deg": num(vis0["alt_best_deg"]), "airmass_best": num(vis0["airmass_best"]),
        "up_dark_min": num(vis0["up_dark_min"]), "observable": up_ok,
        "sky_state": sky_state, "sky_text": sky_text,
        "verdict_basis": basis, "verdict_alt_deg": num(judged_alt),
        "best_dates": best_dates(ra, dec, site.lat_deg, date, lon_deg=site.lon_deg,
                                 sun_limit_deg=_darkness_deg(darkness), min_alt_deg=site.min_alt_deg,
                                 minutes=minutes),
        "cautions": list(CAUTIONS[:2]),
    }
    if cal_used is not None:
        out["calibration"] = cal_used.header()
    return out


def _darkness_deg(darkness: str) -> float:
    """Sun altitude (deg) of a darkness level (the sky engine's table)."""
    return float(DARKNESS_LEVELS[darkness][0])
