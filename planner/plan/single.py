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
from planner.plan.model import DARKNESS
from planner.plan.night import CAUTIONS, judge_at_best
from planner.plan.session import parse_date
from planner.sky.night import night_for
from planner.sky.placement import visibility
from planner.sky.site import Site
from planner.utc import iso_utc


def sun_ra_deg(jd) -> np.ndarray:
    """Apparent right ascension of the Sun (deg), low-precision formula (Astronomical Almanac, sec. C)."""
    n = np.asarray(jd, float) - 2451545.0
    L = (280.460 + 0.9856474 * n) % 360.0
    g = np.radians((357.528 + 0.9856003 * n) % 360.0)
    lam = np.radians(L + 1.915 * np.sin(g) + 0.020 * np.sin(2 * g))
    eps = np.radians(23.439 - 0.0000004 * n)
    return np.degrees(np.arctan2(np.cos(eps) * np.sin(lam), np.cos(lam))) % 360.0


def best_dates(ra_deg: float, dec_deg: float, lat_deg: float, around, season_hours: float = 3.0) -> dict:
    """The nearest date on which the pair transits at local midnight, and the good season around it.

    ``around``: the evening's date (``datetime.date``, ISO text, or a year as int, meaning
    1 July of that year).  The year-long window centred on it holds exactly one midnight
    transit, so the answer is the nearest one (this season, whether just past or to come),
    and the season is given with its real years even when it spans New Year.
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
    good = np.abs(off_h) <= season_hours
    max_alt = 90.0 - abs(lat_deg - dec_deg)

    def d(o):
        return _dt.date.fromordinal(int(o)).isoformat()

    a, b = _run_around(good, k)
    return {"midnight_transit": d(days[k]),
            "good_from": d(days[a]) if good[k] else None,
            "good_to": d(days[b]) if good[k] else None,
            "season_hours": season_hours, "max_alt_deg": float(max_alt),
            "ever_up": bool(max_alt > 0)}


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


def check_pair(catalog, query_or_index, site, local_date, telescope, seeing_arcsec: float = 2.0,
               darkness: str = "nautical", minutes: float = 10.0, calibration: str | None = None) -> dict:
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
    if darkness not in DARKNESS:
        raise InputError(f"darkness {darkness!r} is not one of {', '.join(DARKNESS)}")
    date = parse_date(None if local_date is None else str(local_date), site)
    night = night_for(site, date, darkness=darkness)
    geo = pair_geometry(small, np.datetime64(night.middle_utc, "ns"))
    geo = geo.drop(columns=[c for c in geo.columns if c in row.columns])
    table = pd.concat([row, geo], axis=1)
    ra, dec = float(row["ra_deg"].iloc[0]), float(row["dec_deg"].iloc[0])
    vis = visibility(np.array([ra]), np.array([dec]), site, night).reset_index(drop=True)
    v = judge_at_best(tel, table.reset_index(drop=True), vis, float(seeing_arcsec)).iloc[0]
    g = table.iloc[0]
    vis0 = vis.iloc[0]
    up_ok = bool(vis0["observable"]) and float(vis0["up_dark_min"]) >= minutes

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
        "best_dates": best_dates(ra, dec, site.lat_deg, date),
        "cautions": list(CAUTIONS[:2]),
    }
    if cal_used is not None:
        out["calibration"] = cal_used.header()
    if not up_ok:
        out["reason"] = (out["reason"] + "; " if out["reason"] else "") + \
            f"not above {site.min_alt_deg:g} deg for {minutes:g} min in tonight's dark window"
    return out
