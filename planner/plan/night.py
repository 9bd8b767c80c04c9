"""The night plan: filter, judge, rank and schedule the catalogue for one night.

Flow (all vectorised over the catalogue; loops only over telescopes and over
the schedule's slots):

1. resolve the seeing (arcsec, or a 1-10 steadiness via
   :mod:`planner.config.seeing_scale`);
2. the site's night for the local date and darkness (sky engine);
3. tonight's rho and theta for every pair (motion), then the user's filters;
4. visibility of every pair in the dark window (sky engine);
5. per telescope, the verdict at the best time (optics/verdict) and the
   ranking score (:mod:`planner.plan.score`);
6. the best-ranked pairs that split are ordered through the night by the
   greedy scheduler (:mod:`planner.plan.schedule`), re-judging the split at
   each slot's own airmass; near misses ("challenges") go in the free slots
   after, kept in their own section;
7. with several telescopes, the pairs are first shared out between them
   (:mod:`planner.plan.club`), then each scope's list is scheduled.
"""

from __future__ import annotations

import datetime as _dt

import numpy as np
import pandas as pd

from planner.errors import InputError
from planner.plan import bridge
from planner.plan.model import DARKNESS, SCHEDULE_COLUMNS, NightPlan, NightRequest, ScopePlan

#: at most this many best-ranked pairs enter the scheduler per section
POOL_SIZE = 1500
#: Sun altitude (deg) above which a slot is flagged as twilight in the report
TWILIGHT_FLAG_SUN_ALT = -12.0
#: a target closer than this to the Sun (deg) is flagged
SUN_AVOID_DEG = 30.0

CAUTIONS = (
    "Never point a telescope or finder at or near the Sun; a slot flagged 'twilight' or 'sun' "
    "starts with the Sun up or close below the horizon - wait until it has set well.",
    "At public or club sessions follow the local rules of the site and the organisers.",
    "Separations come from orbits or old measures; a pair marked 'linear' or 'last' may have moved.",
)


# -- inputs -----------------------------------------------------------------------

def resolve_seeing(request: NightRequest) -> tuple[float, str]:
    """Seeing FWHM (arcsec) and a text saying where it came from."""
    from planner.config.seeing_scale import load_scale, steadiness_to_seeing

    if request.seeing_arcsec is not None and request.steadiness is not None:
        raise InputError("give either --seeing (arcsec) or --steadiness (1-10), not both")
    if request.seeing_arcsec is not None:
        s = float(request.seeing_arcsec)
        if not 0.0 <= s <= 20.0:
            raise InputError(f"seeing {s} arcsec is outside 0-20 (typical nights 1-3)")
        return s, f"{s:g}\" FWHM as given"
    if request.steadiness is not None:
        table, origin = load_scale()
        s = steadiness_to_seeing(request.steadiness, table)
        src = "default table (an assumption)" if origin == "default" else origin
        return s, f"steadiness {float(request.steadiness):g}/10 -> {s:.2f}\" via {src}"
    return 2.0, "2\" FWHM (default; give --seeing or --steadiness)"


def now_utc() -> np.datetime64:
    """The current instant, UTC (one place, so tests can fix the clock)."""
    return np.datetime64(_dt.datetime.now(_dt.timezone.utc).replace(tzinfo=None), "ns")


def tonight(site) -> str:
    """Local date of tonight's evening at the site (before noon: last night)."""
    now = pd.Timestamp(now_utc()).tz_localize("UTC").to_pydatetime().astimezone(site.zone)
    if now.hour < 12:
        now = now - _dt.timedelta(days=1)
    return now.date().isoformat()


def parse_date(text: str | None, site) -> str:
    if text is None:
        return tonight(site)
    try:
        return _dt.date.fromisoformat(str(text)).isoformat()
    except ValueError:
        raise InputError(f"date {text!r} is not a valid YYYY-MM-DD date") from None


def decimal_year(when_utc) -> float:
    """Julian epoch (e.g. 2026.92) of a UTC instant."""
    t = np.datetime64(when_utc, "ns")
    days = (t - np.datetime64("2000-01-01T12:00:00", "ns")).astype("int64") / 86400e9
    return 2000.0 + days / 365.25


# -- the night --------------------------------------------------------------------

def night_summary(night, site) -> dict:
    """Flatten the sky engine's night object into plain values for reports."""
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


def _has_window(ninfo: dict) -> bool:
    a, b = ninfo.get("dark_start_utc"), ninfo.get("dark_end_utc")
    return a is not None and b is not None and not pd.isna(a) and not pd.isna(b)


def _utc64(value) -> np.datetime64:
    """A UTC instant (naive numpy, pandas or aware datetime) as numpy datetime64[ns]."""
    ts = pd.Timestamp(value)
    if ts.tzinfo is not None:
        ts = ts.tz_convert("UTC").tz_localize(None)
    return np.datetime64(ts.to_datetime64(), "ns")


def local_clock_utc(hhmm: str, site, local_date: str, now=None) -> np.datetime64:
    """The UTC instant of an HH:MM local clock time on the night of ``local_date``.

    Times before noon are the next calendar morning.  ``"now"`` is the current
    instant (``now`` when given, else :func:`now_utc`)."""
    if str(hhmm).strip().lower() == "now":
        return _utc64(now if now is not None else now_utc())
    try:
        h, m = (int(x) for x in str(hhmm).split(":"))
        assert 0 <= h < 24 and 0 <= m < 60
    except Exception:
        raise InputError(f"time {hhmm!r} is not HH:MM (24-hour local clock) or 'now'") from None
    day = _dt.date.fromisoformat(local_date)
    if h < 12:  # after midnight: the next calendar day
        day = day + _dt.timedelta(days=1)
    local = _dt.datetime(day.year, day.month, day.day, h, m, tzinfo=site.zone)
    return np.datetime64(local.astimezone(_dt.timezone.utc).replace(tzinfo=None), "ns")


def session_window(ninfo: dict, site, local_date: str, start_local, end_local, now=None):
    """The dark window, cut to the observer's optional HH:MM (or ``now``) start and end."""
    a = _utc64(ninfo["dark_start_utc"])
    b = _utc64(ninfo["dark_end_utc"])
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
        dark = f"{site.format_local(ninfo['dark_start_utc'], '%H:%M')}-{site.format_local(ninfo['dark_end_utc'], '%H:%M')}"
        raise InputError(f"the chosen times (start {start_local or 'dark'}, end {end_local or 'dawn'}) leave no "
                         f"time inside the night's dark window ({dark} local on {local_date})")
    return a, b


def window_night(night, window):
    """The sky engine's night with its dark window cut to the observing ``window``
    (so visibility, best time and altitude are those inside the window)."""
    import dataclasses

    a, b = window
    if a == _utc64(night.dark_start_utc) and b == _utc64(night.dark_end_utc):
        return night
    return dataclasses.replace(night, dark_start_utc=np.datetime64(a, "ns"), dark_end_utc=np.datetime64(b, "ns"))


# -- filters ------------------------------------------------------------------------

def constellation_of(ra_deg, dec_deg) -> np.ndarray:
    """IAU constellation abbreviation per position (astropy ``get_constellation``, vectorised)."""
    from astropy.coordinates import SkyCoord, get_constellation

    ra = np.asarray(ra_deg, float)
    if ra.size == 0:
        return np.array([], dtype=object)
    c = SkyCoord(ra=ra, dec=np.asarray(dec_deg, float), unit="deg", frame="icrs")
    return np.asarray(get_constellation(c, short_name=True), dtype=object)


def constellation_abbreviations() -> set[str]:
    """The 88 IAU constellation abbreviations, lower case (astropy's data file of
    the IAU names, the same one ``get_constellation`` uses)."""
    from importlib import resources

    text = (resources.files("astropy.coordinates") / "data" / "constellation_names.dat").read_text()
    return {ln.split()[0].lower() for ln in text.splitlines() if ln.strip() and not ln.startswith("#")}


def apply_filters(table: pd.DataFrame, filters: dict, catalog=None) -> pd.DataFrame:
    """Keep the rows that pass the user's filters (all vectorised)."""
    f = dict(filters or {})
    keep = np.ones(len(table), bool)
    mag1 = table["mag1"].to_numpy(float)
    mag2 = table["mag2"].to_numpy(float)
    rho = table["rho_arcsec"].to_numpy(float)
    if f.get("mag_max") is not None:
        keep &= mag1 <= float(f["mag_max"])
    if f.get("mag2_max") is not None:
        keep &= mag2 <= float(f["mag2_max"])
    if f.get("dm_max") is not None:
        keep &= np.abs(mag2 - mag1) <= float(f["dm_max"])
    if f.get("sep_min_arcsec") is not None:
        keep &= rho >= float(f["sep_min_arcsec"])
    if f.get("sep_max_arcsec") is not None:
        keep &= rho <= float(f["sep_max_arcsec"])
    if f.get("ra_from_h") is not None or f.get("ra_to_h") is not None:
        lo = float(f.get("ra_from_h", 0.0)) * 15.0
        hi = float(f.get("ra_to_h", 24.0)) * 15.0
        ra = table["ra_deg"].to_numpy(float) % 360.0
        keep &= ((ra >= lo) & (ra <= hi)) if lo <= hi else ((ra >= lo) | (ra <= hi))
    if f.get("orbits_only"):
        method = table["method"].astype(str).to_numpy()
        keep &= np.char.startswith(method.astype(str), "orbit")
    if f.get("constellations"):
        wanted = {c.strip().lower() for c in f["constellations"]}
        cons = constellation_of(table["ra_deg"].to_numpy(float), table["dec_deg"].to_numpy(float))
        keep &= np.array([c.lower() in wanted for c in cons], bool) if len(cons) else keep
    out = table[keep]
    if f.get("targets"):
        out = restrict_to_targets(out, f["targets"], catalog)
    return out


def restrict_to_targets(table: pd.DataFrame, path, catalog=None) -> pd.DataFrame:
    """Keep the pairs named in a user's target list (CSV of WDS ids or designations)."""
    from planner.catalogs import read_target_list, restrict

    if catalog is None:
        raise InputError("a target list needs the catalogue it refers to")
    sub = restrict(catalog, read_target_list(path))
    unmatched = sub.pairs.attrs.get("unmatched") or []
    if unmatched:
        import sys

        names = ", ".join(repr(q) for q, _ in unmatched[:5])
        print(f"splitplan: note: {len(unmatched)} name(s) in {path} match no pair: {names}", file=sys.stderr)
    return table[table.index.isin(sub.pairs.index)]


# -- judging and scoring ----------------------------------------------------------

def judge_scope(tel, table: pd.DataFrame, vis: pd.DataFrame, seeing: float, min_alt: float) -> pd.DataFrame:
    """Verdict at the best time and score for every row, for one telescope."""
    from planner.plan.score import score_pairs

    x = vis["airmass_best"].to_numpy(float)
    sky = vis["sky_mag_arcsec2"].to_numpy(float) if "sky_mag_arcsec2" in vis else None
    disp = vis["dispersion_arcsec"].to_numpy(float) if "dispersion_arcsec" in vis else None
    v = bridge.judge(tel, table, seeing, x, sky_mag=sky, dispersion_arcsec=disp)
    v = v.reset_index(drop=True)
    v.index = table.index
    out = pd.concat([table, vis.drop(columns=[c for c in vis.columns if c in table.columns]), v], axis=1)
    out["score"] = score_pairs(out, min_alt)
    return out


#: airmasses at which the scheduler pre-judges each candidate (1 to 10, geometric steps of ~10 %)
REJUDGE_AIRMASS = np.geomspace(1.0, 10.0, 25)


def _rejudge_fn(tel, cand: pd.DataFrame, seeing: float, min_alt: float):
    """Feasibility at a slot: still split at the slot's airmass.

    Every candidate is judged once, in one vectorised call, at the airmasses of
    :data:`REJUDGE_AIRMASS`; the largest airmass up to which it splits at every
    grid step is its limit, and a slot is feasible when the slot's airmass is
    within it.  The required separation grows and the companion fades with
    airmass, so the verdict is monotone; the grid makes the test slightly
    conservative (a pair is never scheduled where it would not split).  The
    rows finally shown are judged again at their slot's own airmass."""
    n, k = len(cand), len(REJUDGE_AIRMASS)
    small = cand[["rho_arcsec", "mag1", "mag2"]].reset_index(drop=True)  # what the verdict reads
    rep = small.iloc[np.repeat(np.arange(n), k)]
    v = bridge.judge(tel, rep, seeing, np.tile(REJUDGE_AIRMASS, n))
    ok = (v["verdict"].to_numpy() == "split").reshape(n, k)
    n_ok = np.logical_and.accumulate(ok, axis=1).sum(axis=1)
    x_max = np.where(n_ok > 0, REJUDGE_AIRMASS[np.maximum(n_ok - 1, 0)], 0.0)

    def fn(idx, alt_deg, when):
        return bridge.airmass(np.maximum(alt_deg, 1.0)) <= x_max[idx]

    return fn


def empty_schedule() -> pd.DataFrame:
    return pd.DataFrame({c: pd.Series(dtype=object) for c in SCHEDULE_COLUMNS})


def _schedule_section(tel, scope_name, cand, site, seeing, window, minutes, limit, section,
                      busy=None, rejudge=True):
    from planner.plan.schedule import greedy_schedule

    if len(cand) == 0 or limit <= 0:
        return empty_schedule()
    # The schedule is built for the whole observing window and only then cut to ``limit``: the
    # pairs shown with --limit 5 are the first five of the full window's schedule, never a
    # different (and worse-placed) choice.
    fill = _window_slots(window, minutes)
    pool = cand.sort_values("score", ascending=False, kind="stable").head(POOL_SIZE)
    altaz_fn = bridge.FastAltAz(pool["ra_deg"].to_numpy(float), pool["dec_deg"].to_numpy(float), site,
                                window[0] + (window[1] - window[0]) // 2)
    feas = _rejudge_fn(tel, pool, seeing, site.min_alt_deg) if rejudge else None
    sched = greedy_schedule(
        pool["ra_deg"].to_numpy(float), pool["dec_deg"].to_numpy(float), pool["score"].to_numpy(float),
        _as_ns(pool["best_utc"]), _as_ns(pool["set_utc"]) if "set_utc" in pool else None,
        window[0], window[1], minutes=minutes, altaz_fn=altaz_fn, min_alt_deg=site.min_alt_deg,
        limit=fill, busy=busy, feasible_fn=feas, alt_best_deg=_geometric_best_alt(pool))
    sched = sched.head(int(limit))
    if len(sched) == 0:
        return empty_schedule()
    rows = pool.iloc[sched["cand"].to_numpy()].reset_index(drop=True)
    return _finish_rows(tel, scope_name, rows, sched, site, seeing, section)


def _window_slots(window, minutes: float) -> int:
    """How many slots of ``minutes`` the observing window holds (at least one)."""
    span_min = (np.datetime64(window[1], "ns") - np.datetime64(window[0], "ns")).astype("int64") / 60e9
    return max(1, int(span_min // float(minutes)))


def _slot_limit(request: NightRequest, window, challenge: bool = False) -> int:
    """Pairs per scope: ``request.limit`` if given (half of it for the near
    misses), else as many slots as the observing window holds (the near misses
    then fill the gaps the main list leaves)."""
    if request.limit is not None:
        return max(1, int(request.limit) // 2) if challenge else int(request.limit)
    return _window_slots(window, request.minutes)


def _geometric_best_alt(pool: pd.DataFrame) -> np.ndarray:
    """Highest geometric altitude inside the window (the sky engine reports the
    apparent one; the scheduler's altitudes are geometric)."""
    alt = pool["alt_best_deg"].to_numpy(float)
    if "refraction_arcmin" in pool:
        alt = alt - np.nan_to_num(pool["refraction_arcmin"].to_numpy(float)) / 60.0
    return alt


def _as_ns(s) -> np.ndarray:
    if s is None:
        return None
    v = pd.to_datetime(s)
    if getattr(v.dt, "tz", None) is not None:
        v = v.dt.tz_convert("UTC").dt.tz_localize(None)
    return v.to_numpy("datetime64[ns]")


def _finish_rows(tel, scope_name, rows, sched, site, seeing, section) -> pd.DataFrame:
    """Schedule rows: position, airmass and verdict at each slot's start."""
    t0 = sched["slot_start_utc"].to_numpy("datetime64[ns]")
    alt, az = bridge.altaz(rows["ra_deg"].to_numpy(float), rows["dec_deg"].to_numpy(float), site, t0)
    x = bridge.airmass(alt)
    v = bridge.judge(tel, rows, seeing, x).reset_index(drop=True)
    out = pd.DataFrame({
        "section": section,
        "slot": np.arange(1, len(rows) + 1),
        "slot_start_utc": t0,
        "slot_end_utc": sched["slot_end_utc"].to_numpy("datetime64[ns]"),
        "slot_local": [site.format_local(t, "%H:%M") for t in t0],
        "scope": scope_name,
        "wds_id": rows["wds_id"].astype(str).to_numpy(),
        "discoverer": rows["discoverer"].astype(str).to_numpy(),
        "components": rows["components"].astype(str).to_numpy(),
        "constellation": constellation_of(rows["ra_deg"], rows["dec_deg"]),
        "ra_deg": rows["ra_deg"].to_numpy(float),
        "dec_deg": rows["dec_deg"].to_numpy(float),
        "rho_arcsec": rows["rho_arcsec"].to_numpy(float),
        "theta_deg": rows["theta_deg"].to_numpy(float),
        "method": rows["method"].astype(str).to_numpy(),
        "mag1": rows["mag1"].to_numpy(float),
        "mag2": rows["mag2"].to_numpy(float),
        "dm": (rows["mag2"] - rows["mag1"]).to_numpy(float),
        "alt_deg": np.asarray(alt, float),
        "az_deg": np.asarray(az, float),
        "airmass": np.asarray(x, float),
        "limit_arcsec": v["limit_arcsec"].to_numpy(float),
        "margin": v["margin"].to_numpy(float),
        "chance": v["chance"].to_numpy(float),
        "verdict": v["verdict"].astype(str).to_numpy(),
        "reason": v["reason"].astype(str).to_numpy(),
        "power_min": v["power_min"].to_numpy(float) if "power_min" in v else np.nan,
        "power_max": v["power_max"].to_numpy(float) if "power_max" in v else np.nan,
        "score": rows["score"].to_numpy(float),
        "best_utc": _as_ns(rows["best_utc"]),
    })
    sun_alt, sun_sep = sun_position(site, t0, out["ra_deg"].to_numpy(), out["dec_deg"].to_numpy())
    out["sun_alt_deg"] = sun_alt
    flag = np.where(sun_alt > -0.833, "sun up", np.where(sun_alt > TWILIGHT_FLAG_SUN_ALT, "twilight", ""))
    flag = np.where(sun_sep < SUN_AVOID_DEG, "NEAR SUN", flag)
    out["flag"] = flag
    return out[list(SCHEDULE_COLUMNS)]


def sun_position(site, when_utc, ra_deg, dec_deg):
    """Sun altitude at the site and its angular distance from each target (deg), via the sky engine."""
    when = np.asarray(when_utc, "datetime64[ns]")
    if when.size == 0:
        return np.array([]), np.array([])
    return bridge.sun_alt_sep(site, when, ra_deg, dec_deg)


# -- the whole plan ----------------------------------------------------------------

def prepare(request: NightRequest, catalog=None):
    """Everything before the telescopes: site, night, catalogue, visibility, geometry, filters.

    The returned table holds the pairs of every system that is up in the dark window for at
    least one slot (``request.minutes``) -- or, with a target list, every listed pair -- with
    tonight's geometry; ``vis`` is aligned with it."""
    if request.darkness not in DARKNESS:
        raise InputError(f"darkness {request.darkness!r} is not one of {', '.join(DARKNESS)}")
    if not (0 < float(request.minutes) <= 240):
        raise InputError(f"minutes per target {request.minutes!r} must be between 1 and 240")
    if request.limit is not None and int(request.limit) < 1:
        raise InputError(f"limit {request.limit!r} must be at least 1 (leave it out to fill the night)")
    site_d = dict(request.site)
    if request.min_alt_deg is not None:
        site_d["min_alt_deg"] = request.min_alt_deg
    site = bridge.make_site(site_d, request.site_name)
    local_date = parse_date(request.date, site)
    request.date = local_date
    night = bridge.make_night(site, local_date, request.darkness)
    ninfo = night_summary(night, site)
    ninfo["local_date"] = local_date
    # the observing window (dark window cut to --start/--end): candidates are chosen for it
    vis_night = night
    if _has_window(ninfo):
        window = session_window(ninfo, site, local_date, request.start_local, request.end_local)
        ninfo["window_start_utc"], ninfo["window_end_utc"] = window
        vis_night = window_night(night, window)
    cat = catalog if catalog is not None else bridge.load_catalog(request.catalog)
    pairs = cat.pairs
    if _has_window(ninfo):
        mid = np.datetime64(pd.Timestamp(ninfo["dark_start_utc"]).tz_localize(None) if pd.Timestamp(ninfo["dark_start_utc"]).tzinfo else ninfo["dark_start_utc"], "ns")
    else:
        mid = np.datetime64(f"{local_date}T23:59:00", "ns")
    if hasattr(night, "middle_utc"):
        mid = np.datetime64(night.middle_utc, "ns")
    from planner.motion.epochs import to_epoch_yr

    epoch = float(to_epoch_yr(mid))
    # Visibility first (it needs positions only), then the orbit geometry only for the systems
    # that are up in the dark long enough: a pair that never is cannot be scheduled, and the
    # geometry is the costlier step.  Whole systems (all rows of a WDS id) are kept together, so
    # orbits link to pairs exactly as on the full catalogue.  With the observer's own target list
    # every listed pair stays, so the plan can say which of them are not placed tonight.
    pos_ok = np.isfinite(pairs["ra_deg"].to_numpy(float)) & np.isfinite(pairs["dec_deg"].to_numpy(float))
    placed = pairs[pos_ok]
    vis = bridge.visibility(placed["ra_deg"].to_numpy(float), placed["dec_deg"].to_numpy(float), site, vis_night)
    vis = vis.reset_index(drop=True)
    vis.index = placed.index
    up = vis["observable"].to_numpy(bool) & (vis["up_dark_min"].to_numpy(float) >= float(request.minutes))
    if not (request.filters or {}).get("targets"):
        wid = placed["wds_id"]
        placed = placed[wid.isin(wid[up]).to_numpy()]
    from types import SimpleNamespace

    geo = bridge.geometry(SimpleNamespace(pairs=placed, orbits=getattr(cat, "orbits", None)), mid)
    keep_cols = [c for c in ("wds_id", "discoverer", "components", "ra_deg", "dec_deg", "mag1", "mag2",
                             "has_orbit", "note_flags") if c in pairs.columns]
    geo = geo.drop(columns=[c for c in geo.columns if c in keep_cols])
    table = pd.concat([placed[keep_cols], geo], axis=1)
    table = table[np.isfinite(table["rho_arcsec"].to_numpy(float))]
    table = apply_filters(table, request.filters, cat)
    vis = vis.loc[table.index]
    return site, night, ninfo, cat, table, vis, epoch


def plan_night(request: NightRequest, catalog=None) -> NightPlan:
    """Build the night plan for every telescope of ``request``; see the module docstring."""
    from planner import __version__
    from planner.plan import club

    if not request.scopes:
        raise InputError("no telescope given; use --aperture MM or --scope NAME")
    seeing, seeing_origin = resolve_seeing(request)
    site, night, ninfo, cat, table, vis, epoch = prepare(request, catalog)
    plan = NightPlan(request=request, version=__version__, catalog_source=str(getattr(cat, "source", "")),
                     catalog_retrieved=str(getattr(cat, "retrieved", "")), night=ninfo,
                     seeing_arcsec=seeing, seeing_origin=seeing_origin, scopes=[],
                     cautions=list(CAUTIONS))
    plan.notes.append(f"rho and theta computed for epoch {epoch:.3f}")
    minutes = float(request.minutes)
    up = vis["observable"].to_numpy(bool) & (vis["up_dark_min"].to_numpy(float) >= minutes)
    judged = []
    for i, sd in enumerate(request.scopes):
        name = sd.get("name") or f"{sd.get('aperture_mm', 0):g} mm"
        tel = bridge.make_telescope(sd, name)
        j = judge_scope(tel, table, vis, seeing, site.min_alt_deg)
        j["up"] = up
        judged.append((name, tel, sd, j))
    if not _has_window(ninfo):
        plan.notes.append(str(ninfo.get("note") or ninfo.get("status") or "no dark window on this date"))
        for name, tel, sd, j in judged:
            plan.scopes.append(ScopePlan(name=name, telescope=dict(sd), candidates=j,
                                         schedule=empty_schedule()))
        return plan
    window = (ninfo["window_start_utc"], ninfo["window_end_utc"])
    assign = None
    if len(judged) > 1:
        plan.matrix, assign = club.share(judged, share_margin=request.share_margin)
        chal_assign = club.share_challenges(judged)
    for name, tel, sd, j in judged:
        split = j[(j["verdict"] == "split") & j["up"]]
        chal = j[(j["verdict"] == "challenge") & j["up"]]
        if assign is not None:
            split = split[split.index.isin(assign.get(name, []))]
            chal = chal[chal.index.isin(chal_assign.get(name, []))]
        main = _schedule_section(tel, name, split, site, seeing, window, minutes, _slot_limit(request, window),
                                 "plan")
        parts = [main]
        if request.challenges and len(chal):
            busy = list(zip(main["slot_start_utc"], main["slot_end_utc"])) if len(main) else []
            extra = _schedule_section(tel, name, chal, site, seeing, window, minutes,
                                      _slot_limit(request, window, challenge=True), "challenge", busy=busy,
                                      rejudge=False)
            parts.append(extra)
        sched = pd.concat([p for p in parts if len(p)], ignore_index=True) if any(len(p) for p in parts) \
            else empty_schedule()
        n_all = int(((j["verdict"] == "split") & j["up"]).sum())
        n_near = int(((j["verdict"] == "challenge") & j["up"]).sum())
        if assign is None:
            summary = f"{n_all} pairs split tonight, {n_near} near misses"
        else:
            summary = (f"splits {n_all} pairs tonight; {len(split)} of them are on its share of the club list"
                       + (f", plus {len(chal)} near misses" if request.challenges else ""))
        plan.scopes.append(ScopePlan(name=name, telescope=dict(sd), candidates=j, schedule=sched,
                                     n_split=n_all, n_challenge=n_near, summary=summary))
    return plan
