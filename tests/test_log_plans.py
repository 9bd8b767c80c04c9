"""Plans that use the observer's calibration (``--calibration mine``) and read the log.

The calibration moves the model limit to the observer's fitted 50 % point; checked here
by its definition (limit with the calibration = 50 % point x published limit, chance 50 %
there).  The log entries are SYNTHETIC, made up for the tests.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from planner.config.logbook import Logbook
from planner.errors import InputError
from planner.plan import calibration as cal
from planner.plan.model import NightRequest

SITE = {"lat_deg": 47.1, "lon_deg": 8.2, "elevation_m": 600.0, "tz": "Europe/Zurich"}


def store_fit(scope="102 mm", m50=1.3, n=150):
    """A SYNTHETIC log fitted and stored in the default log."""
    from scipy.special import expit

    rng = np.random.default_rng(3)
    x = rng.uniform(math.log(0.6), math.log(2.0), n)
    y = rng.uniform(size=n) < expit(12 * (x - math.log(m50)))
    entries = [{"margin": math.exp(v), "result": "clean" if ok else "round", "scope": scope,
                "aperture_mm": 102.0} for v, ok in zip(x, y)]
    c = cal.fit_entries(entries, scope)
    with Logbook() as log:
        log.save_fit(c.scope, c.to_dict())
    return c


def request(**kw):
    base = dict(site=SITE, scopes=[{"aperture_mm": 102.0}], date="2026-07-01", seeing_arcsec=1.5)
    base.update(kw)
    return NightRequest(**base)


def test_without_a_fit_mine_says_how_to_make_one():
    from planner.plan.night import plan_night

    with pytest.raises(InputError, match="log add"):
        plan_night(request(calibration="mine"))
    Logbook().close()
    with pytest.raises(InputError, match="log fit"):
        plan_night(request(calibration="mine"))
    with pytest.raises(InputError, match="one of published, mine"):
        plan_night(request(calibration="theirs"))


def test_night_plan_with_my_calibration():
    from planner.plan.night import plan_night
    from planner.report.html import render_html

    c = store_fit()
    plain = plan_night(request())
    mine = plan_night(request(calibration="mine"))
    a = plain.scopes[0].candidates
    b = mine.scopes[0].candidates
    common = a.index.intersection(b.index)
    assert np.allclose(b.loc[common, "limit_arcsec"], c.m50 * a.loc[common, "limit_arcsec"])
    assert any("your calibration" in n and "50 % point is 1." in n for n in mine.notes)
    assert not any("calibration" in n for n in plain.notes)
    assert mine.scopes[0].n_split < plain.scopes[0].n_split         # a 1.3x limit splits fewer
    html = render_html(mine)
    assert "Your calibration" in html and "calibration-chart" in html
    assert "Your calibration" not in render_html(plain)


def test_pair_check_and_apertures_with_my_calibration():
    from planner.plan.apertures import compare_apertures
    from planner.plan.single import check_pair

    c = store_fit(scope="")   # only a pooled fit: used for every telescope
    base = check_pair("sample", "STF2272", SITE, "2026-07-01", 102.0, 1.5)
    mine = check_pair("sample", "STF2272", SITE, "2026-07-01", 102.0, 1.5, calibration="mine")
    assert mine["limit_arcsec"] == pytest.approx(c.m50 * base["limit_arcsec"])
    assert "calibration" not in base and mine["calibration"].startswith("calibration: yours (all scopes)")
    r0 = compare_apertures(request(), [60, 102], nights=1)
    r1 = compare_apertures(request(calibration="mine"), [60, 102], nights=1)
    assert r0["calibrations"] == () and [n for n, _ in r1["calibrations"]] == ["60 mm", "102 mm"]
    assert (r1["table"]["n_split"].to_numpy() <= r0["table"]["n_split"].to_numpy()).all()


def test_plans_read_the_log_done_skip_and_prefer_new():
    from planner.plan.night import plan_night
    from planner.plan.observations import record

    plain = plan_night(request(limit=5))
    first = plain.schedule.iloc[0]
    assert "done" not in str(first["flag"])
    with Logbook() as log:
        record(log, query=f"{first['wds_id']} {first['components']}".strip(), site=SITE,
               telescope={"aperture_mm": 102.0}, when=str(first["slot_start_utc"])[:19].replace(" ", "T") + "Z",
               seeing_arcsec=1.5, result="clean")
        # a failure with another telescope does not make it done for the 102 mm
        record(log, query="STF2272", site=SITE, telescope={"aperture_mm": 60.0}, when="2026-07-01 22:30",
               seeing_arcsec=1.5, result="clean")
    marked = plan_night(request(limit=5))
    row = marked.schedule[(marked.schedule["wds_id"] == first["wds_id"])
                          & (marked.schedule["components"] == first["components"])]
    assert len(row) == 1 and "done" in row["flag"].iloc[0]
    assert any("already split in your log (marked done)" in n for n in marked.notes)
    cand = marked.scopes[0].candidates
    assert int(cand["done"].sum()) == 1
    skipped = plan_night(request(limit=5, skip_done=True))
    assert first["wds_id"] not in set(skipped.scopes[0].candidates.loc[
        skipped.scopes[0].candidates["components"] == first["components"], "wds_id"])
    newer = plan_night(request(limit=5, prefer_new=True)).scopes[0].candidates
    key = cand["done"]
    assert np.allclose(newer.loc[key[key].index, "score"], 0.5 * cand.loc[key[key].index, "score"])
    untried = cand.index[~key][:20]
    assert np.allclose(newer.loc[untried, "score"], cand.loc[untried, "score"])


def test_a_damaged_log_does_not_stop_a_plan_unless_asked_for(_isolated_user_dirs):
    from planner.errors import CorruptFileError
    from planner.plan.night import plan_night

    p = _isolated_user_dirs / "data" / "observations.sqlite3"
    p.parent.mkdir(parents=True, exist_ok=True)
    p.write_bytes(b"not a database" * 100)
    plan = plan_night(request(limit=3))
    assert any("observation log was not read" in n for n in plan.notes)
    with pytest.raises(CorruptFileError):
        plan_night(request(limit=3, skip_done=True))
    assert p.read_bytes() == b"not a database" * 100
