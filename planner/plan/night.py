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

import sys
from dataclasses import dataclass

import numpy as np
import pandas as pd

from planner import __version__
from planner.catalogs import read_target_list, restrict
from planner.catalogs.catalog import Catalog, load_catalog
from planner.catalogs.constellations import constellation as constellation_abbreviation
from planner.errors import InputError
from planner.motion import pair_geometry
from planner.motion.epochs import to_epoch_yr
from planner.optics.telescope import Telescope
from planner.plan import club
from planner.plan.model import SCHEDULE_COLUMNS, NightPlan, NightRequest, ScopePlan
from planner.plan.observations import apply_log, flag_done
from planner.plan.schedule import greedy_schedule
from planner.plan.score import score_pairs
from planner.plan.session import Session
from planner.sky.atmosphere import airmass
from planner.sky.night import sun_alt_deg, sun_sep_deg
from planner.sky.constellations import constellation_of
from planner.sky.placement import FastAltAz, conditions_at, visibility
from planner.verdict import judge

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


# -- filters ------------------------------------------------------------------------

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
        wanted = {(constellation_abbreviation(c) or c.strip()).lower() for c in f["constellations"]}
        cons = constellation_of(table["ra_deg"].to_numpy(float), table["dec_deg"].to_numpy(float))
        keep &= np.isin(np.char.lower(cons.astype(str)), list(wanted)) if len(cons) else keep
    out = table[keep]
    if f.get("targets"):
        out = restrict_to_targets(out, f["targets"], catalog)
    return out


def restrict_to_targets(table: pd.DataFrame, path, catalog=None) -> pd.DataFrame:
    """Keep the pairs named in a user's target list (CSV of WDS ids or designations)."""
    if catalog is None:
        raise InputError("a target list needs the catalogue it refers to")
    sub = restrict(catalog, read_target_list(path))
    unmatched = sub.pairs.attrs.get("unmatched") or []
    if unmatched:
        names = ", ".join(repr(q) for q, _ in unmatched[:5])
        print(f"splitplan: note: {len(unmatched)} name(s) in {path} match no pair: {names}", file=sys.stderr)
    out = table[table.index.isin(sub.pairs.index)]
    # the observer's note for each listed pair travels with it (schedule, exports)
    return out.assign(user_note=sub.pairs["user_note"].reindex(out.index).fillna("").astype(str).to_numpy())


def target_report(path, catalog, scopes: list) -> pd.DataFrame:
    """Every entry of the observer's target list with what became of it: one row per listed
    name (``query``, ``user_note``, ``pair``, ``status``); ``status`` is "not in the catalogue"
    (with the closest names), or per telescope the pair's ``plan_status`` (scheduled at HH:MM, or
    why not).  ``scopes``: the finished :class:`ScopePlan` objects."""
    from planner.catalogs.catalog import find_pair
    from planner.errors import UnknownPairError

    rows = []
    for q, note in zip(*[read_target_list(path)[c].tolist() for c in ("query", "note")]):
        try:
            lab = find_pair(catalog, q)
        except UnknownPairError as exc:
            sugg = list(getattr(exc, "suggestions", []) or [])[:3]
            rows.append({"query": q, "user_note": note, "pair": "",
                         "status": "not in the catalogue" + (f" (closest: {', '.join(sugg)})" if sugg else "")})
            continue
        r = catalog.pairs.loc[lab]
        label = f"{r['wds_id']} {r['discoverer']} {r['components']}".strip()
        parts = []
        for sp in scopes:
            c = sp.candidates
            if c is None or lab not in c.index:
                parts.append((sp.name, "left out by the filters (or no separation known tonight)"))
                continue
            st = str(c.loc[lab, "plan_status"]) if "plan_status" in c else ""
            if st.startswith("scheduled") and sp.schedule is not None and len(sp.schedule):
                s = sp.schedule
                hit = s[(s["wds_id"] == r["wds_id"]) & (s["components"] == r["components"])]
                if len(hit):
                    st = f"{st} at {hit['slot_local'].iloc[0]}"
            parts.append((sp.name, st))
        if len(scopes) == 1:
            status = parts[0][1] if parts else ""
        else:
            sched = [f"{n}: {st}" for n, st in parts if st.startswith("scheduled")]
            if sched:
                status = "; ".join(sched)
            elif len({st for _, st in parts}) == 1:
                status = f"{parts[0][1]} (every telescope)"
            else:
                status = "; ".join(f"{n}: {st}" for n, st in parts)
        rows.append({"query": q, "user_note": note, "pair": label, "status": status})
    return pd.DataFrame(rows, columns=["query", "user_note", "pair", "status"])


# -- judging and scoring ----------------------------------------------------------

def judge_rows(tel: Telescope, pairs: pd.DataFrame, seeing_arcsec: float, airmass_x, sky_mag=None,
               dispersion_arcsec=None) -> pd.DataFrame:
    """The verdict table (positional, 0..n-1) for ``pairs`` (``rho_arcsec``, ``mag1``, ``mag2``) with this scope.

    ``airmass_x``: airmass per pair at the instant judged (NaN: not up)."""
    kw = {}
    if sky_mag is not None:
        kw["sky_mag_arcsec2"] = np.asarray(sky_mag, float)
    if dispersion_arcsec is not None:
        kw["dispersion_arcsec"] = np.nan_to_num(np.asarray(dispersion_arcsec, float))
    return judge(pairs["rho_arcsec"].to_numpy(float), pairs["mag1"].to_numpy(float),
                 pairs["mag2"].to_numpy(float), np.asarray(airmass_x, float), tel, float(seeing_arcsec), **kw)


def judge_at_best(tel: Telescope, table: pd.DataFrame, vis: pd.DataFrame, seeing: float) -> pd.DataFrame:
    """The verdict table for ``table`` at each pair's best time (airmass, sky and dispersion from ``vis``)."""
    x = vis["airmass_best"].to_numpy(float)
    sky = vis["sky_mag_arcsec2"].to_numpy(float) if "sky_mag_arcsec2" in vis else None
    disp = vis["dispersion_arcsec"].to_numpy(float) if "dispersion_arcsec" in vis else None
    return judge_rows(tel, table, seeing, x, sky_mag=sky, dispersion_arcsec=disp)


def judge_scope(tel: Telescope, table: pd.DataFrame, vis: pd.DataFrame, seeing: float, min_alt: float) -> pd.DataFrame:
    """Verdict at the best time and score for every row, for one telescope."""
    v = judge_at_best(tel, table, vis, seeing)
    v = v.reset_index(drop=True)
    v.index = table.index
    out = pd.concat([table, vis.drop(columns=[c for c in vis.columns if c in table.columns]), v], axis=1)
    out["score"] = score_pairs(out, min_alt)
    return out


#: airmasses at which the scheduler pre-judges each candidate (1 to 10, geometric steps of ~10 %)
REJUDGE_AIRMASS = np.geomspace(1.0, 10.0, 25)


def _rejudge_fn(tel, cand: pd.DataFrame, seeing: float, site=None, accept=("split",)):
    """Feasibility at a slot: still split (a verdict in ``accept``) at the slot's airmass.

    Every candidate is judged once, in one vectorised call, at the airmasses of
    :data:`REJUDGE_AIRMASS`; the largest airmass up to which it splits at every
    grid step is its limit, and a slot is feasible when the slot's airmass is
    within it.  The required separation grows and the companion fades with
    airmass, so the verdict is monotone; the grid makes the test slightly
    conservative (a pair is never scheduled where it would not split).  The
    judgement reads what the verdict at the best time read: the pair's sky
    brightness (from its best time) and the atmospheric dispersion at each grid
    airmass (altitude from the plane-parallel airmass, asin(1/X), a grid-level
    approximation).  The rows finally shown are judged again at their slot's
    own instant (:func:`_finish_rows`), and a row is shown in the section its
    verdict there belongs to (:func:`_consistent_sections`)."""
    n, k = len(cand), len(REJUDGE_AIRMASS)
    small = cand[["rho_arcsec", "mag1", "mag2"]].reset_index(drop=True)  # what the verdict reads
    rep = small.iloc[np.repeat(np.arange(n), k)]
    kw = {}
    if "sky_mag_arcsec2" in cand:
        kw["sky_mag"] = np.repeat(cand["sky_mag_arcsec2"].to_numpy(float), k)
    if site is not None:
        from planner.sky.atmosphere import dispersion_arcsec

        alt_grid = np.degrees(np.arcsin(1.0 / REJUDGE_AIRMASS))
        kw["dispersion_arcsec"] = np.tile(np.asarray(dispersion_arcsec(alt_grid, pressure_hpa=site.pressure_hpa,
                                                                       temperature_c=site.temperature_c), float), n)
    v = judge_rows(tel, rep, seeing, np.tile(REJUDGE_AIRMASS, n), **kw)
    ok = np.isin(v["verdict"].astype(str).to_numpy(), list(accept)).reshape(n, k)
    n_ok = np.logical_and.accumulate(ok, axis=1).sum(axis=1)
    x_max = np.where(n_ok > 0, REJUDGE_AIRMASS[np.maximum(n_ok - 1, 0)], 0.0)

    def fn(idx, alt_deg, when):
        return np.asarray(airmass(np.maximum(alt_deg, 1.0)), float) <= x_max[idx]

    return fn


def _consistent_sections(parts: list) -> pd.DataFrame:
    """One pair, one verdict: each scheduled row goes in the section its verdict at its own slot
    belongs to (``plan`` when it splits there, ``challenge`` otherwise), whichever list put it in
    the schedule; rows in time order within a section, numbered from 1.  The index (the
    candidates' labels) is kept."""
    if not parts:
        return empty_schedule()
    sched = pd.concat(parts)
    sched["section"] = np.where(sched["verdict"].astype(str) == "split", "plan", "challenge")
    order = {"plan": 0, "challenge": 1}
    sched = sched.assign(_o=sched["section"].map(order)).sort_values(["_o", "slot_start_utc"], kind="stable")
    sched = sched.drop(columns="_o")
    sched["slot"] = sched.groupby("section").cumcount().to_numpy() + 1
    return sched


#: why a candidate is not in the schedule (the ``plan_status`` column of a scope's candidates)
STATUS_SCHEDULED = "scheduled"
STATUS_SCHEDULED_NEAR = "scheduled as a near miss"
STATUS_NOT_UP = "not up in the dark for one slot"
STATUS_NO_DARK = "no dark window on this date"
STATUS_TOO_WIDE = "wider than the close-double ceiling"
STATUS_NO_SLOT = "no free slot near its best time"
STATUS_NEAR = "near miss (shown with --challenges)"
STATUS_OTHER_SCOPE = "on another telescope's share"


def plan_status(j: pd.DataFrame, sched: pd.DataFrame, cut_by_limit, limit, challenges: bool,
                shared_out=None) -> pd.Series:
    """Per candidate, what became of it tonight: scheduled (in which section) or why not --
    not up in the dark, the verdict's reason when it does not split, a near miss without
    --challenges, beyond --limit, on another telescope's share, or no free slot near its best
    time (every slot while it was near its best altitude was taken by a better-ranked pair)."""
    verdict = j["verdict"].astype(str).to_numpy()
    up = j["up"].to_numpy(bool)
    reason = j["reason"]
    if isinstance(reason, pd.DataFrame):  # the geometry's note is also called 'reason'; the verdict's is last
        reason = reason.iloc[:, -1]
    st = np.full(len(j), STATUS_NO_SLOT, dtype=object)
    st[verdict == "challenge"] = STATUS_NO_SLOT if challenges else STATUS_NEAR
    no = verdict == "no"
    st[no] = np.char.add("does not split: ", reason.astype(str).to_numpy()[no].astype(str)).astype(object)
    if shared_out is not None:
        st[j.index.isin(shared_out)] = STATUS_OTHER_SCOPE
    if "too_wide" in j:
        st[j["too_wide"].to_numpy(bool)] = STATUS_TOO_WIDE
    st[j.index.isin(list(cut_by_limit))] = f"beyond --limit {limit}"
    st[~up] = STATUS_NOT_UP
    if len(sched):
        sec = sched["section"].astype(str).to_numpy()
        st[j.index.isin(sched.index[sec == "plan"])] = STATUS_SCHEDULED
        st[j.index.isin(sched.index[sec != "plan"])] = STATUS_SCHEDULED_NEAR
    return pd.Series(st, index=j.index, dtype=object)


def count_summary(j: pd.DataFrame, status: pd.Series, when: str, club_share: int | None = None,
                  challenges: bool = False) -> str:
    """The scope's header line: how many pairs split, how many are scheduled, why the rest are not."""
    splits = (j["verdict"].astype(str) == "split") & j["up"].astype(bool)
    near = (j["verdict"].astype(str) == "challenge") & j["up"].astype(bool)
    n_sched = int((status == STATUS_SCHEDULED).sum())
    head = f"{int(splits.sum())} pairs split {when}, {int(near.sum())} near misses"
    if club_share is not None:
        head += f"; {club_share} of the splits on this telescope's share"
    head += f"; {n_sched} scheduled"
    if challenges:
        head += f" + {int((status == STATUS_SCHEDULED_NEAR).sum())} near misses"
    why = status[splits & (status != STATUS_SCHEDULED) & (status != STATUS_SCHEDULED_NEAR)].value_counts()
    if len(why):
        head += "; not scheduled: " + ", ".join(f"{n} {w}" for w, n in why.items())
    return head


def empty_schedule() -> pd.DataFrame:
    return pd.DataFrame({c: pd.Series(dtype=object) for c in SCHEDULE_COLUMNS})


@dataclass(frozen=True)
class Section:
    """What one schedule section needs besides its candidates: the scope, the
    window, how many slots, and what to call the rows."""

    tel: Telescope
    window: tuple
    limit: int
    name: str                        # "plan" or "challenge"
    busy: list | None = None
    rejudge: bool = True
    accept: tuple = ("split",)       # verdicts a slot must give to be feasible


def _schedule_section(session: Session, cand: pd.DataFrame, sec: Section) -> pd.DataFrame:
    if len(cand) == 0 or sec.limit <= 0:
        return empty_schedule()
    site, window = session.site, sec.window
    # The schedule is built for the whole observing window and only then cut to the limit: the
    # pairs shown with --limit 5 are the first five of the full window's schedule, never a
    # different (and worse-placed) choice.
    fill = _window_slots(window, session.minutes)
    pool = cand.sort_values("score", ascending=False, kind="stable").head(POOL_SIZE)
    altaz_fn = FastAltAz(pool["ra_deg"].to_numpy(float), pool["dec_deg"].to_numpy(float), site,
                         window[0] + (window[1] - window[0]) // 2)
    feas = _rejudge_fn(sec.tel, pool, session.seeing_arcsec, site, sec.accept) if sec.rejudge else None
    sched = greedy_schedule(
        pool["ra_deg"].to_numpy(float), pool["dec_deg"].to_numpy(float), pool["score"].to_numpy(float),
        _as_ns(pool["best_utc"]), _as_ns(pool["set_utc"]) if "set_utc" in pool else None,
        window[0], window[1], minutes=session.minutes, altaz_fn=altaz_fn, min_alt_deg=site.min_alt_deg,
        limit=min(fill, int(sec.limit)), busy=sec.busy, feasible_fn=feas, alt_best_deg=_geometric_best_alt(pool))
    if len(sched) == 0:
        return empty_schedule()
    rows = pool.iloc[sched["cand"].to_numpy()]
    out = _finish_rows(session, sec, rows.reset_index(drop=True), sched)
    out.index = rows.index  # the candidates' labels, for the per-pair status
    return out


def _window_slots(window, minutes: float) -> int:
    """How many slots of ``minutes`` the observing window holds (at least one)."""
    span_min = (np.datetime64(window[1], "ns") - np.datetime64(window[0], "ns")).astype("int64") / 60e9
    return max(1, int(span_min // float(minutes)))


def add_names(catalog, sched: pd.DataFrame) -> pd.DataFrame:
    """The schedule with the pairs' common names (IAU proper name, Bayer, Flamsteed
    or HR of the primary; :func:`planner.catalogs.pair_names`) and, where the name
    index knows the star, its constellation."""
    if not len(sched) or catalog is None:
        return sched
    from planner.catalogs import pair_names

    nm = pair_names(catalog, rows=sched)
    out = sched.copy()
    out["name"] = nm["name"].to_numpy(object)
    known = nm["constellation"].to_numpy(object) != ""
    out["constellation"] = np.where(known, nm["constellation"].to_numpy(object),
                                    out["constellation"].to_numpy(object))
    return out


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


def _finish_rows(session: Session, sec: Section, rows: pd.DataFrame, sched: pd.DataFrame) -> pd.DataFrame:
    """Schedule rows: position, airmass and verdict at each slot's start."""
    site, tel = session.site, sec.tel
    t0 = sched["slot_start_utc"].to_numpy("datetime64[ns]")
    # the slot's own conditions, by the same models as the verdict at the best time
    cond = conditions_at(rows["ra_deg"].to_numpy(float), rows["dec_deg"].to_numpy(float), site,
                         session.night, t0)
    alt, az = cond["alt_deg"], cond["az_deg"]
    x = np.asarray(airmass(np.asarray(alt, float)), float)
    v = judge_rows(tel, rows, session.seeing_arcsec, x, sky_mag=cond["sky_mag_arcsec2"],
                   dispersion_arcsec=cond["dispersion_arcsec"]).reset_index(drop=True)
    out = pd.DataFrame({
        "section": sec.name,
        "slot": np.arange(1, len(rows) + 1),
        "slot_start_utc": t0,
        "slot_end_utc": sched["slot_end_utc"].to_numpy("datetime64[ns]"),
        "slot_local": [site.format_local(t, "%H:%M") for t in t0],
        "scope": tel.name,
        "wds_id": rows["wds_id"].astype(str).to_numpy(),
        "discoverer": rows["discoverer"].astype(str).to_numpy(),
        "components": rows["components"].astype(str).to_numpy(),
        "name": np.full(len(rows), "", dtype=object),  # filled by add_names
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
        "airmass": x,
        "limit_arcsec": v["limit_arcsec"].to_numpy(float),
        "margin": v["margin"].to_numpy(float),
        "chance": v["chance"].to_numpy(float),
        "verdict": v["verdict"].astype(str).to_numpy(),
        "reason": v["reason"].astype(str).to_numpy(),
        "power_min": v["power_min"].to_numpy(float) if "power_min" in v else np.nan,
        "power_max": v["power_max"].to_numpy(float) if "power_max" in v else np.nan,
        "score": rows["score"].to_numpy(float),
        "best_utc": _as_ns(rows["best_utc"]),
        "user_note": (rows["user_note"].astype(str).to_numpy() if "user_note" in rows else ""),
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
    return (np.asarray(sun_alt_deg(site, when), float),
            np.asarray(sun_sep_deg(np.asarray(ra_deg, float), np.asarray(dec_deg, float), site, when), float))


# -- the whole plan ----------------------------------------------------------------

@dataclass(frozen=True)
class NightTable:
    """The pairs worth judging tonight: ``table`` (tonight's geometry, filtered),
    ``vis`` (visibility, aligned with it), the ``catalog`` they came from and
    the ``epoch`` (Besselian year) of the geometry."""

    table: pd.DataFrame
    vis: pd.DataFrame
    catalog: object
    epoch: float
    minutes: float = 10.0

    @property
    def up(self) -> np.ndarray:
        """Up in the dark for at least one slot (bool per row)."""
        return self.vis["observable"].to_numpy(bool) & (self.vis["up_dark_min"].to_numpy(float) >= self.minutes)


def prepare(session: Session, catalog=None) -> NightTable:
    """Everything before the telescopes: catalogue, visibility, geometry, filters.

    The table holds the pairs of every system that is up in the dark window for at
    least one slot (``request.minutes``) -- or, with a target list, every listed pair --
    with tonight's geometry; ``vis`` is aligned with it.  Nothing passed in is modified."""
    request, site, night = session.request, session.site, session.night
    cat = catalog if catalog is not None else load_catalog(request.catalog)
    pairs = cat.pairs
    mid = np.datetime64(night.middle_utc, "ns")
    epoch = float(to_epoch_yr(mid))
    # Visibility first (it needs positions only), then the orbit geometry only for the systems
    # that are up in the dark long enough: a pair that never is cannot be scheduled, and the
    # geometry is the costlier step.  Whole systems (all rows of a WDS id) are kept together, so
    # orbits link to pairs exactly as on the full catalogue.  With the observer's own target list
    # every listed pair stays, so the plan can say which of them are not placed tonight.
    pos_ok = np.isfinite(pairs["ra_deg"].to_numpy(float)) & np.isfinite(pairs["dec_deg"].to_numpy(float))
    placed = pairs[pos_ok]
    # candidates are chosen for the observing window (the dark window cut to --start/--end)
    vis = visibility(placed["ra_deg"].to_numpy(float), placed["dec_deg"].to_numpy(float), site,
                     session.window_night)
    vis = vis.reset_index(drop=True)
    vis.index = placed.index
    up = vis["observable"].to_numpy(bool) & (vis["up_dark_min"].to_numpy(float) >= session.minutes)
    if not (request.filters or {}).get("targets"):
        wid = placed["wds_id"]
        placed = placed[wid.isin(wid[up]).to_numpy()]
    sub = Catalog(pairs=placed, orbits=getattr(cat, "orbits", None), source=str(getattr(cat, "source", "")),
                  retrieved=str(getattr(cat, "retrieved", "")))
    geo = pair_geometry(sub, mid)
    keep_cols = [c for c in ("wds_id", "discoverer", "components", "ra_deg", "dec_deg", "mag1", "mag2",
                             "has_orbit", "note_flags") if c in pairs.columns]
    geo = geo.drop(columns=[c for c in geo.columns if c in keep_cols])
    table = pd.concat([placed[keep_cols], geo], axis=1)
    table = table[np.isfinite(table["rho_arcsec"].to_numpy(float))]
    table = apply_filters(table, request.filters, cat)
    return NightTable(table=table, vis=vis.loc[table.index], catalog=cat, epoch=epoch, minutes=session.minutes)


#: default close-double ceiling: pairs wider than this many Dawes limits of the telescope are not
#: scheduled for it (project choice, common practice, no source: at 40 x Dawes a pair is split at
#: the lowest power and says nothing about the telescope; 45" for 102 mm, 23" for 203 mm).
#: ``NightRequest.wide_factor`` overrides it (0: no ceiling); ``--sep-max`` and a target list
#: replace it.
WIDE_FACTOR = 40.0


def wide_ceiling_arcsec(request: NightRequest, tel: Telescope) -> float | None:
    """The separation above which a pair is too wide for a close-double plan with ``tel``, or None.

    ``WIDE_FACTOR`` (or the request's ``wide_factor``) times the Dawes limit (Dawes 1867,
    115.8"/D[mm]) of the telescope.  None when the observer set a separation ceiling
    (``sep_max_arcsec``), gave a target list, or asked for none (``wide_factor = 0``)."""
    from planner.optics.limits import dawes_limit_arcsec

    f = request.filters or {}
    factor = WIDE_FACTOR if request.wide_factor is None else float(request.wide_factor)
    if factor < 0:
        raise InputError(f"wide_factor {factor:g} must be 0 (no ceiling) or more")
    if factor == 0 or f.get("sep_max_arcsec") is not None or f.get("targets"):
        return None
    return factor * float(dawes_limit_arcsec(float(tel.aperture_mm)))


@dataclass(frozen=True)
class JudgedScope:
    """One telescope's candidates: every pair judged and scored, with ``up`` (bool column)."""

    telescope: Telescope
    spec: dict                       # the scope as given (for reports and plan files)
    table: pd.DataFrame

    @property
    def name(self) -> str:
        return self.telescope.name


def plan_night(request: NightRequest, catalog=None, session: Session | None = None) -> NightPlan:
    """Build the night plan for every telescope of ``request``; see the module docstring.

    ``session``: the resolved session when the caller has built it already
    (:meth:`Session.from_request`); ``request`` is then ignored."""
    if session is None:
        if not request.scopes:
            raise InputError("no telescope given; use --aperture MM or --scope NAME")
        session = Session.from_request(request)
    request = session.request
    nt = prepare(session, catalog)
    cat, table, vis = nt.catalog, nt.table, nt.vis
    seeing = session.seeing_arcsec
    plan = NightPlan(request=request, version=__version__, catalog_source=str(getattr(cat, "source", "")),
                     catalog_retrieved=str(getattr(cat, "retrieved", "")), night=dict(session.night_info),
                     seeing_arcsec=seeing, seeing_origin=session.seeing_origin, scopes=[],
                     cautions=list(CAUTIONS), session=session)
    plan.notes.append(f"rho and theta computed for epoch {nt.epoch:.3f}")
    plan.catalog_skipped = len(getattr(cat, "problems", None) or [])
    if plan.catalog_skipped:
        plan.notes.append(f"{plan.catalog_skipped} catalogue line(s) could not be read and were skipped "
                          f"('splitplan catalog show --catalog {request.catalog}' lists them)")
    plan.notes += [f"{name}: limits and chances use your calibration ({cal.sentence()})"
                   for name, cal in session.calibrations]
    up = nt.up
    judged = []
    for tel, sd in zip(session.telescopes, request.scopes):
        j = judge_scope(tel, table, vis, seeing, session.site.min_alt_deg)
        j["up"] = up
        judged.append(JudgedScope(telescope=tel, spec=sd, table=j))
    judged = apply_log(judged, request, plan.notes)
    if not session.has_window:
        ninfo = session.night_info
        plan.notes.append(str(ninfo.get("note") or ninfo.get("status") or "no dark window on this date"))
        for js in judged:
            plan.scopes.append(ScopePlan(name=js.name, telescope=dict(js.spec),
                                         candidates=js.table.assign(plan_status=STATUS_NO_DARK),
                                         schedule=empty_schedule(),
                                         summary="nothing to schedule: no dark window on this date"))
        if (request.filters or {}).get("targets"):
            plan.targets = target_report(request.filters["targets"], cat, plan.scopes)
        return plan
    window = session.window()
    assign = None
    if len(judged) > 1:
        plan.matrix, assign = club.share(judged, share_margin=request.share_margin)
        chal_assign = club.share_challenges(judged)
    for js in judged:
        j, name = js.table, js.name
        ceiling = wide_ceiling_arcsec(request, js.telescope)
        wide = (j["rho_arcsec"].to_numpy(float) > ceiling) if ceiling is not None else np.zeros(len(j), bool)
        j = j.assign(too_wide=wide)
        if wide.any():
            plan.notes.append(f"{name}: pairs wider than {ceiling:.0f}\" are not scheduled, as too easy for a "
                              f"close-double list ({WIDE_FACTOR if request.wide_factor is None else request.wide_factor:g}"
                              " x the Dawes limit; --sep-max or wide_factor in a plan file sets another ceiling)")
        split = j[(j["verdict"] == "split") & j["up"] & ~j["too_wide"]]
        chal = j[(j["verdict"] == "challenge") & j["up"] & ~j["too_wide"]]
        if assign is not None:
            split = split[split.index.isin(assign.get(name, []))]
            chal = chal[chal.index.isin(chal_assign.get(name, []))]
        fill = _window_slots(window, session.minutes)
        main_full = _schedule_section(session, split, Section(js.telescope, window, fill, "plan"))
        lim = _slot_limit(request, window)
        main, cut = main_full.head(lim), list(main_full.index[lim:])
        parts = [main]
        if request.challenges and len(chal):
            busy = list(zip(main["slot_start_utc"], main["slot_end_utc"])) if len(main) else []
            extra = _schedule_section(session, chal, Section(js.telescope, window, fill, "challenge", busy=busy,
                                                             accept=("split", "challenge")))
            lim_c = _slot_limit(request, window, challenge=True)
            cut += list(extra.index[lim_c:])
            parts.append(extra.head(lim_c))
        sched = _consistent_sections([p for p in parts if len(p)])
        shared_out = None
        if assign is not None:
            shared_out = j.index[~j.index.isin(assign.get(name, [])) & ~j.index.isin(chal_assign.get(name, []))]
        j = j.assign(plan_status=plan_status(j, sched, cut, request.limit, request.challenges, shared_out))
        sched = add_names(cat, flag_done(sched.reset_index(drop=True), j))
        n_all = int(((j["verdict"] == "split") & j["up"]).sum())
        n_near = int(((j["verdict"] == "challenge") & j["up"]).sum())
        when = "tonight" if not (request.start_local or request.end_local) else (
            f"from {session.site.format_local(window[0], '%H:%M')} to {session.site.format_local(window[1], '%H:%M')}")
        summary = count_summary(j, j["plan_status"], when, None if assign is None else len(split),
                                request.challenges)
        plan.scopes.append(ScopePlan(name=name, telescope=dict(js.spec), candidates=j, schedule=sched,
                                     n_split=n_all, n_challenge=n_near, summary=summary))
    if (request.filters or {}).get("targets"):
        plan.targets = target_report(request.filters["targets"], cat, plan.scopes)
    return plan
