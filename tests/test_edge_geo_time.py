"""Edge geography and time through the whole command line (issue 7, item 6).

The sky engine's own tests (tests/test_sky_night.py, test_sky_visibility.py)
validate twilight, polar cases, DST and the date line at library level.  This
file checks the same situations end to end, through ``splitplan night`` and
``splitplan apertures``, where the local-time formatting, the scheduler and
the exports could still go wrong:

* the dark window printed by ``night`` ("dark (nautical): HH:MM - HH:MM
  local") against an independent skyfield computation (``almanac.find_settings``
  / ``find_risings`` with the Sun at -12 deg, DE421 from skyfield-data) converted
  to local time with Python's ``zoneinfo`` (IANA tz database); tolerance
  1 minute (issue 4 asks <= 1 min; the print is to the minute);
* every scheduled slot: its local clock time (``slot_local``) equals the UTC
  instant (``slot_start_utc``) converted by ``zoneinfo`` -- this is where a
  wrong UTC offset or a missed daylight-saving change would show; the slot
  lies inside the dark window (skyfield), and the Sun's altitude reported for
  the slot agrees with skyfield's to 0.1 deg;
* polar day gives a clear statement and an empty plan, never a crash; polar
  night, the date line (lon +-179.9; UTC+14 Kiritimati, UTC-11 Pago Pago), southern
  sites (-33, -45 deg), DST nights (Europe/Berlin and America/New_York, both
  changes) and New Year's Eve give a plan;
* ``--start`` at a local time that does not exist (spring forward) or exists
  twice (fall back) does not crash and is honoured.
"""

from __future__ import annotations

import datetime as dt
import json
import re
from zoneinfo import ZoneInfo

import numpy as np
import pytest

# (id, lat, lon, tz, local date): real places or the brief's edge values
CASES = [
    ("polar-night-78N", 78.0, 15.0, "Arctic/Longyearbyen", "2026-12-21"),
    ("kiritimati-utc+14-new-year", 1.87, -157.4, "Pacific/Kiritimati", "2026-12-31"),
    ("lon+179.9-kiritimati-zone", -16.0, 179.9, "Pacific/Kiritimati", "2026-08-10"),
    ("lon-179.9-pago-pago-zone", -14.28, -179.9, "Pacific/Pago_Pago", "2026-08-10"),
    ("pago-pago-new-year", -14.28, -170.7, "Pacific/Pago_Pago", "2026-12-31"),
    ("sydney-33S-winter", -33.87, 151.21, "Australia/Sydney", "2026-06-20"),
    ("dunedin-45S-dst-start", -45.87, 170.50, "Pacific/Auckland", "2026-09-26"),
    ("berlin-spring-forward", 52.52, 13.40, "Europe/Berlin", "2026-03-28"),
    ("berlin-fall-back", 52.52, 13.40, "Europe/Berlin", "2026-10-24"),
    ("new-york-spring-forward", 40.71, -74.01, "America/New_York", "2026-03-07"),
    ("new-york-fall-back", 40.71, -74.01, "America/New_York", "2026-10-31"),
    ("berlin-new-year", 52.52, 13.40, "Europe/Berlin", "2026-12-31"),
]


def _skyfield():
    import warnings

    from skyfield.api import Loader
    from skyfield_data import get_skyfield_data_path

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        load = Loader(get_skyfield_data_path(), verbose=False)
        return load.timescale(builtin=True), load("de421.bsp")


def _nautical_window(lat, lon, tz, date):
    """(dusk, dawn) as aware UTC datetimes from skyfield, between local noon and the next local
    noon; None where the Sun does not cross -12 deg."""
    from skyfield import almanac
    from skyfield.api import wgs84

    ts, eph = _skyfield()
    zone = ZoneInfo(tz)
    d = dt.date.fromisoformat(date)
    noon0 = dt.datetime.combine(d, dt.time(12), zone).astimezone(dt.timezone.utc)
    noon1 = dt.datetime.combine(d + dt.timedelta(days=1), dt.time(12), zone).astimezone(dt.timezone.utc)
    obs = eph["earth"] + wgs84.latlon(lat, lon)
    t0, t1 = ts.from_datetime(noon0), ts.from_datetime(noon1)
    sets, ok_s = almanac.find_settings(obs, eph["sun"], t0, t1, horizon_degrees=-12.0)
    rises, ok_r = almanac.find_risings(obs, eph["sun"], t0, t1, horizon_degrees=-12.0)
    dusk = [t.utc_datetime() for t, ok in zip(sets, ok_s) if ok]
    dawn = [t.utc_datetime() for t, ok in zip(rises, ok_r) if ok]
    return (dusk[0] if dusk else None), (dawn[-1] if dawn else None), noon0, noon1


def _sun_alt(lat, lon, when_utc):
    from skyfield.api import wgs84

    ts, eph = _skyfield()
    t = ts.from_datetimes(when_utc)
    alt, _, _ = (eph["earth"] + wgs84.latlon(lat, lon)).at(t).observe(eph["sun"]).apparent().altaz()
    return alt.degrees


def _minutes(hm: str) -> int:
    h, m = hm.split(":")
    return int(h) * 60 + int(m)


def _close_hm(a: str, b: str, tol: int = 1) -> bool:
    d = abs(_minutes(a) - _minutes(b)) % 1440
    return min(d, 1440 - d) <= tol


def _utc(s: str) -> dt.datetime:
    return dt.datetime.fromisoformat(s.replace("Z", "+00:00"))


def _args(lat, lon, tz, date):
    return ["--lat", str(lat), "--lon", str(lon), "--tz", tz, "--date", date, "--seeing", "1.5",
            "--catalog", "sample", "--aperture", "127"]


@pytest.mark.parametrize("lat, lon, tz, date", [c[1:] for c in CASES], ids=[c[0] for c in CASES])
def test_night_window_and_slots_in_local_time(cli, lat, lon, tz, date):
    zone = ZoneInfo(tz)
    dusk, dawn, noon0, noon1 = _nautical_window(lat, lon, tz, date)
    lo = dusk or noon0
    hi = dawn or noon1

    # -- the text output: the dark window in local clock time ------------------------------
    code, text, err = cli("night", *_args(lat, lon, tz, date), "--limit", "40")
    assert code == 0 and err == "", err
    # times are labelled with the site's zone (issue 12 item 5: never "local" for another clock)
    m = re.search(r"dark \(nautical\): (\d\d:\d\d) - (\d\d:\d\d) " + re.escape(tz), text)
    assert m, text[:400]
    assert _close_hm(m.group(1), lo.astimezone(zone).strftime("%H:%M")), (m.group(1), lo.astimezone(zone))
    assert _close_hm(m.group(2), hi.astimezone(zone).strftime("%H:%M")), (m.group(2), hi.astimezone(zone))

    # -- the JSON output: every slot's local time and place in the window --------------------
    code, out, err = cli("night", *_args(lat, lon, tz, date), "--limit", "40", "--json")
    assert code == 0, err
    rows = json.loads(out)
    assert len(rows) >= 5
    starts = [_utc(r["slot_start_utc"]) for r in rows]
    for r, t in zip(rows, starts):
        assert r["slot_local"] == t.astimezone(zone).strftime("%H:%M"), (r["slot_local"], t, tz)
        assert lo - dt.timedelta(minutes=1) <= t <= hi + dt.timedelta(minutes=1), (t, lo, hi)
    np.testing.assert_allclose([r["sun_alt_deg"] for r in rows], _sun_alt(lat, lon, starts), atol=0.1)
    # the schedule runs forward in time, without overlaps
    ends = [_utc(r["slot_end_utc"]) for r in rows]
    order = np.argsort(starts)
    assert all(ends[i] <= starts[j] for i, j in zip(order[:-1], order[1:]))


def test_polar_day_is_a_clear_statement_and_an_empty_plan(cli):
    """78 N on 21 June: the midnight Sun; its lowest altitude is lat + declination - 90 =
    78 + 23.44 - 90 = +11.4 deg (geometry, refraction neglected; no source needed)."""
    args = _args(78.0, 15.0, "Arctic/Longyearbyen", "2026-06-21")
    code, text, err = cli("night", *args)
    assert code == 0 and err == ""
    assert "no dark window" in text and "78.00" in text and "nautical" in text
    m = re.search(r"lowest (-?\d+\.\d) deg", text)
    assert m and float(m.group(1)) == pytest.approx(78 + 23.44 - 90, abs=0.3)
    code, out, err = cli("night", *args, "--json")
    assert code == 0 and json.loads(out) == []
    code, out, err = cli("apertures", "60", "102", "203", *args[:-2], "--json")
    assert code == 0, err
    assert [a["n_split"] for a in json.loads(out)["apertures"]] == [0, 0, 0]


def test_polar_day_civil_darkness_also_empty_and_reports_written(cli, tmp_path):
    args = _args(78.0, 15.0, "Arctic/Longyearbyen", "2026-06-21")
    for ext in ("html", "pdf", "csv"):
        code, _, err = cli("night", *args, "--darkness", "civil", "--out", str(tmp_path / f"p.{ext}"))
        assert code == 0, err
        assert (tmp_path / f"p.{ext}").stat().st_size > 0


def test_polar_night_apertures_and_reports(cli, tmp_path):
    args = _args(78.0, 15.0, "Arctic/Longyearbyen", "2026-12-21")
    code, out, err = cli("apertures", "60", "102", "203", *args[:-2], "--json")
    assert code == 0, err
    n = [a["n_split"] for a in json.loads(out)["apertures"]]
    assert n == sorted(n) and n[0] > 0
    code, _, err = cli("night", *args, "--out", str(tmp_path / "p.html"))
    assert code == 0, err


@pytest.mark.parametrize("tz, date, start, ok_utc", [
    # 29 March 2026 02:00 CET -> 03:00 CEST: 02:30 does not exist on the Berlin clock
    # (IANA tz database); read with the offset before the change, as zoneinfo does (fold=0)
    ("Europe/Berlin", "2026-03-28", "02:30", "2026-03-29T01:30:00+00:00"),
    # 25 October 2026 03:00 CEST -> 02:00 CET: 02:30 happens twice; the first (CEST) counts
    ("Europe/Berlin", "2026-10-24", "02:30", "2026-10-25T00:30:00+00:00"),
    # 8 March 2026 02:00 EST -> 03:00 EDT; 1 November 2026 02:00 EDT -> 01:00 EST
    ("America/New_York", "2026-03-07", "02:30", "2026-03-08T07:30:00+00:00"),
    ("America/New_York", "2026-10-31", "01:30", "2026-11-01T05:30:00+00:00"),
])
def test_start_time_on_a_daylight_saving_night(cli, tz, date, start, ok_utc):
    lat, lon = (52.52, 13.40) if tz == "Europe/Berlin" else (40.71, -74.01)
    code, out, err = cli("night", *_args(lat, lon, tz, date), "--start", start, "--limit", "6", "--json")
    assert code == 0 and err == "", err
    rows = json.loads(out)
    assert rows
    # the expected instant, independently: zoneinfo with fold=0
    local = dt.datetime.combine(dt.date.fromisoformat(date) + dt.timedelta(days=1),
                                dt.time.fromisoformat(start), ZoneInfo(tz))
    assert local.astimezone(dt.timezone.utc) == dt.datetime.fromisoformat(ok_utc)
    first = min(_utc(r["slot_start_utc"]) for r in rows)
    assert first >= dt.datetime.fromisoformat(ok_utc)
    for r in rows:
        assert r["slot_local"] == _utc(r["slot_start_utc"]).astimezone(ZoneInfo(tz)).strftime("%H:%M")


def test_new_year_epoch_and_pair_command(cli):
    """The pair command on New Year's Eve and on New Year's Day agree to within a day's motion
    (70 Oph, P = 88 yr: theta moves about 4 deg per year; Heintz orbit, common knowledge)."""
    code, a, err = cli("pair", "STF2272AB", "--date", "2026-12-31", "--json")
    assert code == 0, err
    code, b, err = cli("pair", "STF2272AB", "--date", "2027-01-01", "--json")
    assert code == 0, err
    a, b = json.loads(a), json.loads(b)
    assert b["epoch_yr"] - a["epoch_yr"] == pytest.approx(1 / 365.2422, rel=1e-3)
    assert abs(b["theta_deg"] - a["theta_deg"]) < 0.1 and abs(b["rho_arcsec"] - a["rho_arcsec"]) < 0.01
