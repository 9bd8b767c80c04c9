"""Club sessions, the one-pair check and the aperture comparison.

* club matrix consistent with per-scope runs: each scope's column equals the
  verdict of a run with that scope alone (same inputs);
* sharing rule: every pair some scope splits is assigned to exactly one
  scope that splits it; a comfortable pair goes to the smallest comfortable
  scope unless balancing moved it to a shorter list (documented rule);
* aperture comparison: the set of pairs split grows with the aperture
  (set inclusion, not only counts);
* best dates of the year: the date the pair transits at midnight is checked
  against astropy's ``get_sun`` (the Sun opposite the pair in right
  ascension), tolerance 2 days.
"""

from __future__ import annotations

import os

import numpy as np
import pytest

from planner.plan.model import NightRequest

SITE = {"lat_deg": 52.1873, "lon_deg": -2.4127, "elevation_m": 95.0, "tz": "Europe/London"}
SCOPES = [{"name": "80", "aperture_mm": 80.0}, {"name": "102", "aperture_mm": 102.0},
          {"name": "203", "aperture_mm": 203.0, "obstruction": 0.22}]


@pytest.fixture(scope="module")
def home(tmp_path_factory):
    old = os.environ.get("SPLITPLAN_HOME")
    os.environ["SPLITPLAN_HOME"] = str(tmp_path_factory.mktemp("home"))
    yield
    if old is None:
        os.environ.pop("SPLITPLAN_HOME", None)
    else:
        os.environ["SPLITPLAN_HOME"] = old


@pytest.fixture(scope="module")
def club(home):
    from planner.plan.night import plan_night

    return plan_night(NightRequest(site=dict(SITE), scopes=SCOPES, date="2026-12-05", seeing_arcsec=1.8, limit=10))


def test_matrix_matches_single_scope_runs(club):
    from planner.plan.night import plan_night

    m = club.matrix
    assert len(m) > 20
    for sc in SCOPES:
        solo = plan_night(NightRequest(site=dict(SITE), scopes=[sc], date="2026-12-05", seeing_arcsec=1.8, limit=1))
        cand = solo.scopes[0].candidates
        v = cand.loc[m.index, "verdict"].astype(str).to_numpy()
        up = cand.loc[m.index, "up"].to_numpy(bool)
        expect = np.where((v == "split") & up, "split", np.where(v == "challenge", "near", "-"))
        assert list(m[sc["name"]]) == list(expect)
        np.testing.assert_allclose(m[f"{sc['name']} margin"], cand.loc[m.index, "margin"])
        # every pair the solo run splits is in the matrix
        assert set(cand.index[(cand["verdict"] == "split") & cand["up"]]) <= set(m.index)


def test_each_pair_goes_to_one_scope_that_splits_it(club):
    m = club.matrix
    for _, r in m.iterrows():
        if r["assigned"] != "-":  # near misses no scope splits are rows too, assigned to none
            assert r[r["assigned"]] == "split"
        else:
            assert "split" not in set(r[[sc["name"] for sc in SCOPES]])
    sched = club.schedule
    main = sched[sched["section"] == "plan"]
    assert not (main["wds_id"] + main["components"]).duplicated().any()
    for sp in club.scopes:
        got = set(sp.schedule["wds_id"] + sp.schedule["components"])
        mine = set(m.loc[m["assigned"] == sp.name, "wds_id"] + m.loc[m["assigned"] == sp.name, "components"])
        assert got <= mine


def test_sharing_prefers_the_smallest_comfortable_scope():
    import pandas as pd

    from planner.optics.telescope import Telescope
    from planner.plan.club import share
    from planner.plan.night import JudgedScope

    # three pairs all comfortable for both scopes, then one only the big scope splits
    idx = pd.Index([10, 11, 12, 13])

    def table(verdicts, margins, scores):
        return pd.DataFrame({"wds_id": ["a", "b", "c", "d"], "discoverer": "X", "components": "",
                             "verdict": verdicts, "margin": margins, "score": scores, "up": True}, index=idx)

    small = table(["split", "split", "split", "no"], [2.0, 2.0, 2.0, 0.5], [90, 80, 70, 0])
    big = table(["split", "split", "split", "split"], [4.0, 4.0, 4.0, 1.2], [95, 85, 75, 60])
    scopes = [JudgedScope(Telescope(80, name="small"), {"aperture_mm": 80}, small),
              JudgedScope(Telescope(200, name="big"), {"aperture_mm": 200}, big)]
    m, assign = share(scopes, share_margin=1.5, slack=5)
    assert assign["small"] == [10, 11, 12] and assign["big"] == [13]
    # with no slack the lists are balanced: the second comfortable pair moves to the empty list
    m, assign = share(scopes, share_margin=1.5, slack=0)
    assert len(assign["small"]) == 2 and len(assign["big"]) == 2


def test_aperture_sets_are_nested(home):
    from planner.api import compare_apertures

    res = compare_apertures(SITE, [60, 80, 102, 127, 152, 203, 254, 305], date="2026-12-05", seeing_arcsec=1.5)
    t = res["table"]
    assert list(t["n_split"]) == sorted(t["n_split"])
    first = res["pairs"]["first_aperture_mm"]
    for a, n in zip(t["aperture_mm"], t["n_split"]):
        assert (first <= a).sum() == n  # every pair split at a smaller aperture is split at this one


def _sun_ra_astropy(dates):
    from astropy.coordinates import get_sun
    from astropy.time import Time

    return get_sun(Time([f"{d}T00:00:00" for d in dates], scale="utc")).ra.deg


def test_best_dates_against_astropy_sun():
    import datetime as dt

    from planner.plan.single import best_dates

    for ra, dec in ((271.36, 2.50), (113.65, 31.89), (12.27, 57.82), (200.0, -30.0)):
        res = best_dates(ra, dec, 52.19, 2026)
        days = [dt.date(2026, 1, 1) + dt.timedelta(days=k) for k in range(365)]
        anti = (_sun_ra_astropy([d.isoformat() for d in days]) + 180.0) % 360.0
        off = np.abs((ra - anti + 180.0) % 360.0 - 180.0)
        expect = days[int(np.argmin(off))]
        got = dt.date.fromisoformat(res["midnight_transit"])
        assert abs((got - expect).days) <= 2, (ra, got, expect)
        assert res["max_alt_deg"] == pytest.approx(90.0 - abs(52.19 - dec))


def test_check_pair_70_oph(home):
    # 70 Oph (STF 2272 AB), RA 18h05m: at its best around the June solstice (Sun at RA 6h);
    # on a December evening it is low in the west after dusk.
    from planner.api import check_pair

    r = check_pair("sample", "STF2272AB", SITE, "2026-12-05", {"aperture_mm": 102.0}, 1.5)
    assert r["wds_id"] == "18055+0230" and r["method"].startswith("orbit")
    assert r["best_dates"]["midnight_transit"][5:7] == "06"
    assert r["verdict"] in ("split", "challenge", "no") and r["limit_arcsec"] > 0
    assert r["best_utc"] is not None and r["dark_start_utc"] <= r["best_utc"] <= r["dark_end_utc"]
    assert set(r) >= {"rho_arcsec", "theta_deg", "margin", "chance", "reason", "best_local", "cautions"}


def test_check_pair_unknown_name(home):
    from planner.errors import UnknownPairError
    from planner.plan.single import check_pair

    with pytest.raises(UnknownPairError):
        check_pair("sample", "XYZ 99999", SITE, "2026-12-05", 102.0, 1.5)
