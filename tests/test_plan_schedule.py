"""The greedy slot scheduler on its own, with the sky engine's positions.

Checks: slots are consecutive, do not overlap, stay inside the session and
follow the clock; every scheduled target is above the minimum altitude at
the start, middle and end of its slot -- verified INDEPENDENTLY with astropy
``AltAz`` (no refraction; astropy's own IERS-free path, tolerance 0.05 deg
for the sky engine's fast vs full astrometry); busy intervals are skipped;
the limit is honoured.
"""

from __future__ import annotations

import numpy as np

from planner.plan.schedule import greedy_schedule
from planner.sky.site import Site
from planner.sky.placement import alt_az_at

SITE = Site(lat_deg=46.2, lon_deg=7.4, elevation_m=800.0, tz="Europe/Zurich", min_alt_deg=25.0)
START = np.datetime64("2026-12-02T18:00:00", "ns")
END = np.datetime64("2026-12-03T04:00:00", "ns")


def _targets(n=300, seed=7):
    rng = np.random.default_rng(seed)
    ra = rng.uniform(0, 360, n)
    dec = np.degrees(np.arcsin(rng.uniform(-0.6, 1.0, n)))
    score = rng.uniform(0, 100, n)
    return ra, dec, score


def _astropy_alt(ra, dec, when):
    from astropy import units as u
    from astropy.coordinates import AltAz, EarthLocation, SkyCoord
    from astropy.time import Time
    from astropy.utils import iers

    iers.conf.auto_download = False
    loc = EarthLocation(lat=SITE.lat_deg * u.deg, lon=SITE.lon_deg * u.deg, height=SITE.elevation_m * u.m)
    c = SkyCoord(ra=np.atleast_1d(ra) * u.deg, dec=np.atleast_1d(dec) * u.deg)
    return c.transform_to(AltAz(obstime=Time(when, scale="utc"), location=loc)).alt.deg


def _run(**kw):
    ra, dec, score = _targets()
    nat = np.full(len(ra), np.datetime64("NaT"), "datetime64[ns]")
    best = np.full(len(ra), START + (END - START) // 2)
    args = dict(minutes=15, altaz_fn=lambda idx, t: alt_az_at(ra[idx], dec[idx], SITE, t), min_alt_deg=SITE.min_alt_deg,
                limit=30)
    args.update(kw)
    return ra, dec, greedy_schedule(ra, dec, score, best, nat, START, END, **args)


def test_slots_follow_the_clock_without_overlap():
    ra, dec, s = _run()
    assert len(s) == 30  # 300 random stars: plenty are up
    a = s["slot_start_utc"].to_numpy()
    b = s["slot_end_utc"].to_numpy()
    assert np.all(b - a == np.timedelta64(15, "m"))
    assert np.all(a[1:] >= b[:-1])
    assert a[0] >= START and b[-1] <= END
    assert s["cand"].is_unique


def test_every_slot_is_above_the_minimum_altitude_by_astropy():
    ra, dec, s = _run()
    for when in ("slot_start_utc", "slot_end_utc"):
        t = s[when].to_numpy()
        c = s["cand"].to_numpy()
        alt = np.array([_astropy_alt(ra[k], dec[k], ti)[0] for k, ti in zip(c, t)])
        assert np.all(alt >= SITE.min_alt_deg - 0.05)


def test_busy_intervals_are_skipped_and_limit_holds():
    busy = [(START, START + np.timedelta64(120, "m"))]
    ra, dec, s = _run(busy=busy, limit=5)
    assert len(s) == 5
    assert s["slot_start_utc"].min() >= busy[0][1]


def test_feasibility_hook_can_veto_everything():
    ra, dec, s = _run(feasible_fn=lambda idx, alt, t: np.zeros(len(idx), bool))
    assert len(s) == 0


def test_fast_positions_agree_with_the_full_path():
    # FastAltAz (apparent place once, linear hour angle) vs the sky engine's full ERFA path:
    # agreement to 0.01 deg over a night is ample for scheduling (common practice, no source)
    from planner.sky.placement import FastAltAz

    ra, dec, _ = _targets(200)
    fast = FastAltAz(ra, dec, SITE, START + (END - START) // 2)
    for t in (START, END):
        a1, z1 = fast(np.arange(200), t)
        a2, z2 = alt_az_at(ra, dec, SITE, t)
        assert np.max(np.abs(a1 - a2)) < 0.01
        up = a2 < 89
        assert np.max(np.abs(((z1 - z2 + 180) % 360 - 180)[up] * np.cos(np.radians(a2[up])))) < 0.01


def test_slew_weight_shortens_the_path():
    # with a strong slew weight the mean slew between consecutive targets must not grow
    _, _, loose = _run(weights={"slew": 0.0})
    _, _, tight = _run(weights={"slew": 5.0})
    assert tight["slew_deg"].iloc[1:].mean() <= loose["slew_deg"].iloc[1:].mean()


def _astropy_grid_best(ra, dec, n=121):
    """Highest altitude of each star in the session, from a 5-minute astropy grid (independent)."""
    ts = START + (END - START) * np.linspace(0, 1, n)
    alts = np.array([_astropy_alt(ra, dec, t) for t in ts])  # (n, stars)
    return alts.max(axis=0), ts[alts.argmax(axis=0)]


def test_pairs_are_placed_near_their_best_altitude():
    # The near-best rule: with each pair's best altitude given, a pair is scheduled only while
    # within 15 deg of it (a project choice, common practice, no source); checked with astropy.
    ra, dec, score = _targets(120, seed=3)
    alt_best, t_best = _astropy_grid_best(ra, dec)
    nat = np.full(len(ra), np.datetime64("NaT"), "datetime64[ns]")
    s = greedy_schedule(ra, dec, score, t_best.astype("datetime64[ns]"), nat, START, END, minutes=15,
                        altaz_fn=lambda idx, t: alt_az_at(ra[idx], dec[idx], SITE, t),
                        min_alt_deg=SITE.min_alt_deg, limit=25, alt_best_deg=alt_best)
    assert len(s) == 25
    c = s["cand"].to_numpy()
    for when in ("slot_start_utc", "slot_end_utc"):
        alt = np.array([_astropy_alt(ra[k], dec[k], t)[0] for k, t in zip(c, s[when].to_numpy())])
        assert np.all(alt >= alt_best[c] - 15.0 - 0.1)
        assert np.all(alt >= SITE.min_alt_deg - 0.05)


def test_late_targets_wait_for_their_time():
    # Two groups on the meridian one hour after the start and one hour before the end: the late group
    # scores higher, yet it is observed late in the night, not packed into the first slots.
    # RA that transits at a given instant = local sidereal time then (astropy)
    from astropy import units as u
    from astropy.coordinates import EarthLocation
    from astropy.time import Time

    loc = EarthLocation(lat=SITE.lat_deg * u.deg, lon=SITE.lon_deg * u.deg)
    lst = lambda t: Time(t, scale="utc").sidereal_time("apparent", longitude=loc.lon).deg
    early_t, late_t = START + np.timedelta64(60, "m"), END - np.timedelta64(60, "m")
    ra = np.r_[lst(early_t) + np.linspace(-2, 2, 6), lst(late_t) + np.linspace(-2, 2, 6)] % 360
    dec = np.full(12, 46.0)
    score = np.r_[np.full(6, 10.0), np.full(6, 90.0)]
    best = np.r_[np.full(6, early_t), np.full(6, late_t)].astype("datetime64[ns]")
    nat = np.full(12, np.datetime64("NaT"), "datetime64[ns]")
    s = greedy_schedule(ra, dec, score, best, nat, START, END, minutes=15,
                        altaz_fn=lambda idx, t: alt_az_at(ra[idx], dec[idx], SITE, t),
                        min_alt_deg=SITE.min_alt_deg, limit=12,
                        alt_best_deg=np.full(12, 90.0 - abs(SITE.lat_deg - 46.0)))  # transit altitude
    late = s[s["cand"] >= 6]
    assert len(late) == 6
    # every late-group slot is within 1.5 h of the late transit
    dt_h = np.abs((late["slot_start_utc"].to_numpy() - late_t).astype("int64")) / 3.6e12
    assert np.all(dt_h <= 1.5)
