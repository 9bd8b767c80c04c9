"""Ordering the chosen pairs into a schedule through the night.

Method: a greedy time-stepping scheduler over a ranked pool.  The session
runs from the start of the observing window (the dark window, optionally cut
by the observer's own start and end times) in consecutive slots of
``minutes`` each.

* **Pool** (when the caller gives each pair's best altitude) -- the ``limit`` best-ranked pairs that can still be observed near
  their best time.  A pair whose chance has passed (after its best time and
  already more than ``near_best_deg`` below its best altitude) leaves the pool
  and the next-ranked pair takes its place, so the list stays the best
  ``limit`` pairs that fit the night.
* **Near its best time** -- a pair is eligible for a slot only while its
  altitude is within ``near_best_deg`` (default 15 deg) of the highest it
  reaches in tonight's window.  Without this rule a greedy scheduler packs the
  whole list into the first hours of dusk and shows a pair that transits at
  2 am low in the east at 8 pm.
* At every slot the scheduler looks at the eligible pool, *vectorised over
  the candidates*:

  1. **feasibility** -- the pair must be above the minimum altitude at the
     start, middle and end of the slot (a slot is short, so altitude is
     monotone or has one maximum inside it; three samples bound it), near its
     best altitude (above), and pass any extra check the caller supplies (the
     planner re-judges the split at the slot's airmass);
  2. **objective** -- among feasible pairs it takes the largest ::

         W["rank"] * score / max(score)
       + W["best"] * exp(-(dt_best / 1.5 h)^2)        # near its best time tonight
       + W["urgency"] * exp(-t_left / 1 h)             # soon sets or the window closes
       - W["slew"] * slew / 180 deg                    # short slews from the last target

     where ``dt_best`` is the distance of the slot's middle from the pair's
     best time, ``t_left`` the time from the slot's end until the pair sinks
     below the minimum altitude (or the window closes) and ``slew`` the
     great-circle angle, on the sky at the slot start, from the previous target.

When no pool pair is feasible the clock advances by ``step_min`` and tries
again, so the schedule has gaps rather than badly placed targets.  The loop
runs over slots only (at most a few hundred steps per night); each step is
numpy over the pool.  Greedy scheduling is not optimal (it can strand a pair
that sets early behind a better-ranked one); the urgency term limits that.
The weights and the 15 deg tolerance are project choices (common practice,
no source).
"""

from __future__ import annotations

from typing import Callable

import numpy as np
import pandas as pd

#: default objective weights (project choices, common practice, no source)
SCHEDULE_WEIGHTS = {"rank": 1.0, "best": 0.5, "urgency": 0.5, "slew": 0.4}
BEST_SCALE_H = 1.5
#: a pair is scheduled only while within this many degrees of its best altitude
NEAR_BEST_DEG = 15.0
URGENCY_SCALE_H = 1.0

_NS_PER_H = 3_600_000_000_000


def _sep_deg(alt1, az1, alt2, az2):
    a1, z1, a2, z2 = map(np.radians, (alt1, az1, alt2, az2))
    c = np.sin(a1) * np.sin(a2) + np.cos(a1) * np.cos(a2) * np.cos(z1 - z2)
    return np.degrees(np.arccos(np.clip(c, -1.0, 1.0)))


def greedy_schedule(ra_deg, dec_deg, score, best_utc, set_utc, start_utc, end_utc, *,
                    minutes: float, altaz_fn: Callable, min_alt_deg: float, limit: int,
                    weights: dict | None = None, step_min: float = 5.0,
                    busy: list[tuple] | None = None,
                    feasible_fn: Callable | None = None,
                    alt_best_deg=None, near_best_deg: float = NEAR_BEST_DEG) -> pd.DataFrame:
    """Schedule candidates into consecutive slots; see the module docstring.

    Parameters
    ----------
    ra_deg, dec_deg, score : arrays over the candidates
    best_utc, set_utc : datetime64[ns] arrays (``NaT`` set time: does not set)
    start_utc, end_utc : numpy datetime64 bounds of the session
    altaz_fn : ``altaz_fn(idx, when_utc) -> (alt_deg, az_deg)`` for the candidates
        at positions ``idx`` (geometric altitude)
    busy : list of (start, end) datetime64 intervals already taken
    feasible_fn : optional ``feasible_fn(idx, alt_deg, when_utc) -> bool array``
    alt_best_deg : the highest (geometric) altitude of each candidate inside the
        window; with it, a pair is eligible only within ``near_best_deg`` of it
        and the pool holds the ``limit`` best-ranked pairs still placeable

    Returns
    -------
    DataFrame with one row per scheduled slot: ``cand`` (position in the
    input arrays), ``slot_start_utc``, ``slot_end_utc``, ``alt_start_deg``,
    ``az_start_deg``, ``slew_deg``, ``objective``.
    """
    w = dict(SCHEDULE_WEIGHTS, **(weights or {}))
    ra = np.asarray(ra_deg, float)
    sc = np.asarray(score, float)
    best = np.asarray(best_utc, "datetime64[ns]")
    sets = np.asarray(set_utc, "datetime64[ns]")
    start = np.datetime64(start_utc, "ns")
    end = np.datetime64(end_utc, "ns")
    dur = np.timedelta64(int(round(minutes * 60e9)), "ns")
    step = np.timedelta64(int(round(step_min * 60e9)), "ns")
    busy = [(np.datetime64(a, "ns"), np.datetime64(b, "ns")) for a, b in (busy or [])]
    rows: list[dict] = []
    if len(ra) == 0 or limit <= 0 or minutes <= 0:
        return _empty()
    remaining = np.ones(len(ra), bool)
    rank_n = sc / max(float(np.nanmax(sc)), 1e-9)
    by_rank = np.argsort(-np.nan_to_num(sc, nan=-np.inf), kind="stable")
    ranked_pool = alt_best_deg is not None
    if ranked_pool:
        alt_best = np.asarray(alt_best_deg, float)
        remaining &= ~(alt_best < min_alt_deg)  # never high enough tonight
        floor = np.where(np.isfinite(alt_best), alt_best - near_best_deg, -np.inf)
    else:
        floor = np.full(len(ra), -np.inf)
    prev = None  # position of the previous target
    t = start
    while t + dur <= end and len(rows) < limit and remaining.any():
        clash = [b for b in busy if t < b[1] and t + dur > b[0]]
        if clash:
            t = max(b[1] for b in clash)
            continue
        if ranked_pool:
            # pool: the best-ranked pairs not yet observed and not past their chance
            cand = by_rank[remaining[by_rank]]
            alt_c, az_c = altaz_fn(cand, t)
            passed = (~np.isnat(best[cand])) & (best[cand] < t) & (alt_c < floor[cand])
            remaining[cand[passed]] = False
            take = np.flatnonzero(~passed)[: max(limit - len(rows), 0)]
            if len(take) == 0:
                break
            take = take[np.argsort(cand[take], kind="stable")]  # candidate order, as before
            idx, alt0, az0 = cand[take], alt_c[take], az_c[take]  # positions at t computed once
        else:
            idx = np.flatnonzero(remaining)
            alt0, az0 = altaz_fn(idx, t)
        altm, _ = altaz_fn(idx, t + dur // 2)
        alt1, _ = altaz_fn(idx, t + dur)
        low = np.minimum(np.minimum(alt0, altm), alt1)
        ok = (low >= min_alt_deg) & (low >= floor[idx])
        if feasible_fn is not None and ok.any():
            ok[ok] = np.asarray(feasible_fn(idx[ok], alt0[ok], t), bool)
        if not ok.any():
            t = t + step
            continue
        mid = t + dur // 2
        dt_best_h = np.abs((best[idx] - mid).astype("int64")) / _NS_PER_H
        dt_best_h = np.where(np.isnat(best[idx]), 12.0, dt_best_h)
        s = sets[idx]
        horizon_end = np.where(np.isnat(s) | (s <= t) | (s > end), end, s)
        left_h = np.maximum((horizon_end - (t + dur)).astype("int64") / _NS_PER_H, 0.0)
        if prev is not None:
            palt, paz = altaz_fn(np.array([prev]), t)
            slew = _sep_deg(alt0, az0, palt[0], paz[0])
        else:
            slew = np.zeros(len(idx))
        obj = (w["rank"] * rank_n[idx]
               + w["best"] * np.exp(-(dt_best_h / BEST_SCALE_H) ** 2)
               + w["urgency"] * np.exp(-left_h / URGENCY_SCALE_H)
               - w["slew"] * slew / 180.0)
        obj = np.where(ok, obj, -np.inf)
        k = int(np.argmax(obj))
        c = int(idx[k])
        rows.append({"cand": c, "slot_start_utc": t, "slot_end_utc": t + dur,
                     "alt_start_deg": float(alt0[k]), "az_start_deg": float(az0[k]),
                     "slew_deg": float(slew[k]), "objective": float(obj[k])})
        remaining[c] = False
        prev = c
        t = t + dur
    if not rows:
        return _empty()
    out = pd.DataFrame(rows)
    out["slot_start_utc"] = out["slot_start_utc"].astype("datetime64[ns]")
    out["slot_end_utc"] = out["slot_end_utc"].astype("datetime64[ns]")
    return out


def _empty() -> pd.DataFrame:
    return pd.DataFrame({"cand": pd.Series(dtype=int),
                         "slot_start_utc": pd.Series(dtype="datetime64[ns]"),
                         "slot_end_utc": pd.Series(dtype="datetime64[ns]"),
                         "alt_start_deg": pd.Series(dtype=float),
                         "az_start_deg": pd.Series(dtype=float),
                         "slew_deg": pd.Series(dtype=float),
                         "objective": pd.Series(dtype=float)})
