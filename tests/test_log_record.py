"""planner.plan.observations: recording attempts, done pairs, last attempts, stored calibrations.

Time-zone checks follow the IANA database through Python's zoneinfo: Europe/Zurich is UTC+2
in summer, UTC+1 in winter; on 2026-03-29 clocks went from 02:00 to 03:00 and on 2026-10-25
from 03:00 back to 02:00 (EU summer time rule, last Sunday of March / October).
The entries are made up for the tests.
"""

from __future__ import annotations

import datetime as dt

import pytest

from planner.config.logbook import Logbook
from planner.errors import InputError, UnknownPairError
from planner.plan import observations as obs

SITE = {"lat_deg": 47.1, "lon_deg": 8.2, "elevation_m": 600.0, "tz": "Europe/Zurich"}
SCOPE = {"aperture_mm": 102.0, "obstruction": 0.0}
NOW = dt.datetime(2026, 12, 2, 20, 0, tzinfo=dt.timezone.utc)


@pytest.mark.parametrize("text, want", [
    ("2026-07-01 22:30", "2026-07-01T20:30:00Z"),           # summer: UTC+2
    ("2026-01-15T21:05:30", "2026-01-15T20:05:30Z"),        # winter: UTC+1
    ("2026-10-25 02:30", "2026-10-25T00:30:00Z"),           # twice that night: the first (summer time)
    ("2026-07-01T20:30:00Z", "2026-07-01T20:30:00Z"),
    ("2026-07-01T22:30:00+02:00", "2026-07-01T20:30:00Z"),
    ("now", "2026-12-02T20:00:00Z"),
    (None, "2026-12-02T20:00:00Z"),
])
def test_when_is_read_in_the_sites_zone(text, want):
    assert obs.parse_when(text, "Europe/Zurich", now=NOW) == want


@pytest.mark.parametrize("text, match", [
    ("2026-03-29 02:30", "does not exist"),
    ("yesterday evening", "not a date and time"),
    ("2026-12-03 23:00", "in the future"),
    ("1700-01-01 20:00", "before 1800"),
])
def test_bad_moments_are_refused(text, match):
    with pytest.raises(InputError, match=match):
        obs.parse_when(text, "Europe/Zurich", now=NOW)


def test_record_resolves_the_name_and_stores_the_circumstances(tmp_path):
    with Logbook(tmp_path / "l.sqlite3") as log:
        e = obs.record(log, query="stf 2272", site=SITE, telescope=SCOPE, when="2026-07-01 22:30",
                       seeing_arcsec=1.5, result="clean", note="steady", site_name="Hilltop")
        assert e["id"] == 1 and e["wds_id"] == "18055+0230" and e["name_typed"] == "stf 2272"
        assert e["when_utc"] == "2026-07-01T20:30:00Z" and e["tz"] == "Europe/Zurich"
        assert e["site"] == "Hilltop" and e["scope"] is None and e["aperture_mm"] == 102.0
        assert e["margin"] == pytest.approx(e["rho_arcsec"] / e["limit_arcsec"])
        assert e["seeing_used_arcsec"] == 1.5 and e["alt_deg"] > 20
        with pytest.raises(UnknownPairError):
            obs.record(log, query="no such star", site=SITE, telescope=SCOPE, when="2026-07-01 22:30",
                       result="clean")
        with pytest.raises(InputError, match="not one of clean"):
            obs.record(log, query="STF2272", site=SITE, telescope=SCOPE, result="good")
        assert log.count() == 1


def test_steadiness_is_converted_by_the_seeing_table(tmp_path):
    from planner.config.seeing_scale import steadiness_to_seeing

    with Logbook(tmp_path / "l.sqlite3") as log:
        e = obs.record(log, query="STF2272", site=SITE, telescope=SCOPE, when="2026-07-01 22:30",
                       steadiness=7, result="split")
    assert e["steadiness"] == 7 and e["seeing_arcsec"] is None
    assert e["seeing_used_arcsec"] == steadiness_to_seeing(7)


def test_done_tried_and_last_attempts(tmp_path):
    with Logbook(tmp_path / "l.sqlite3") as log:
        for when, res in (("2026-06-01 23:00", "round"), ("2026-07-01 22:30", "clean")):
            obs.record(log, query="STF2272", site=SITE, telescope=SCOPE, when=when, seeing_arcsec=2, result=res)
        obs.record(log, query="STF1938", site=SITE, telescope=SCOPE, when="2026-07-01 22:40",
                   seeing_arcsec=2, result="elongated")
        obs.record(log, query="STF1938", site=SITE, telescope={"aperture_mm": 203.0, "obstruction": 0.3},
                   scope_name="club 8-inch", when="2026-07-01 22:50", seeing_arcsec=2, result="split")
        assert obs.done_pairs(log, SCOPE) == {("18055+0230", "AB")}
        assert obs.done_pairs(log, {"aperture_mm": 203.0}, "club 8-inch") == {("15245+3723", "Ba,Bb")}
        assert len(obs.tried_pairs(log)) == 2
        last = obs.last_attempts(log, "18055+0230")
        assert [e["result"] for e in last] == ["clean", "round"]          # newest first


def test_calibration_for_prefers_the_scopes_own_fit(tmp_path):
    with Logbook(tmp_path / "l.sqlite3") as log:
        assert obs.calibration_for(log, SCOPE) is None
        obs.record(log, query="STF2272", site=SITE, telescope=SCOPE, when="2026-07-01 22:30",
                   seeing_arcsec=2, result="clean")
        cals = obs.fit_and_store(log)
        assert [c.scope for c in cals] == ["102 mm", ""]
        assert obs.calibration_for(log, SCOPE).scope == "102 mm"
        assert obs.calibration_for(log, {"aperture_mm": 80.0}).scope == ""      # the pooled one
