"""``splitplan pair`` with a site and a telescope: the verdict for one evening.

What is checked, and against what:
* the best time and its altitude against astropy's AltAz frame (an independent
  reduction; refraction from astropy's own model with standard pressure), to 0.2 deg;
* the "transits at midnight" date against the Sun's position from astropy
  (``get_sun``): on that date the Sun is opposite the pair in right ascension
  to within 2 deg (about two days of the Sun's motion);
* that the verdict agrees with the library call it wraps (planner.plan.single.check_pair);
* bad combinations of options give one line and exit code 2.
"""

import json

import pytest

CAPE = ["--lat", "-33.9", "--lon", "18.4", "--tz", "Africa/Johannesburg"]


def run_json(cli, *args):
    code, out, err = cli("pair", *args, "--json")
    assert code == 0, err
    return json.loads(out)


def test_verdict_70_oph_from_a_southern_site_in_june(cli):
    rep = run_json(cli, "STF2272AB", *CAPE, "--aperture", "102", "--seeing", "1.5", "--date", "2026-06-05")
    t = rep["tonight"]
    assert t["observable"] and t["verdict"] == "split"
    # rho from the orbit (ORB6 Pbx2000b), far above the Dawes limit of 102 mm (1.14", Dawes 1867)
    assert t["rho_arcsec"] == pytest.approx(rep["rho_arcsec"], abs=0.01)
    assert t["margin"] == pytest.approx(t["rho_arcsec"] / t["limit_arcsec"], rel=1e-6)
    # the limit tonight is never below the Dawes limit of the aperture (4.56"/inch, Dawes 1867:
    # 1.136" at 102 mm), and 70 Oph (about 5-6" in the 2020s, ORB6) is well above it
    assert t["limit_arcsec"] >= 4.56 * 25.4 / 102 - 1e-9
    assert t["rho_arcsec"] > 2 * 4.56 * 25.4 / 102

    from astropy import units as u
    from astropy.coordinates import AltAz, EarthLocation, SkyCoord
    from astropy.time import Time

    loc = EarthLocation(lat=-33.9 * u.deg, lon=18.4 * u.deg, height=0 * u.m)
    when = Time(t["best_utc"].replace("Z", ""), scale="utc")
    frame = AltAz(obstime=when, location=loc, pressure=1013.25 * u.hPa, temperature=10 * u.deg_C,
                  relative_humidity=0.0, obswl=0.55 * u.micron)
    alt = SkyCoord(t["ra_deg"] * u.deg, t["dec_deg"] * u.deg).transform_to(frame).alt.deg
    assert t["alt_best_deg"] == pytest.approx(alt, abs=0.2)
    # inside the dark window
    assert t["dark_start_utc"] <= t["best_utc"] <= t["dark_end_utc"]


def test_best_dates_against_astropy_sun(cli):
    from astropy.coordinates import get_sun
    from astropy.time import Time

    rep = run_json(cli, "STF2272AB", *CAPE, "--aperture", "102", "--date", "2026-06-05")
    day = rep["tonight"]["best_dates"]["midnight_transit"]
    # local midnight at 18.4 deg E is 22:46 UT of the previous day; take 0 h UT of that date
    sun = get_sun(Time(f"{day}T00:00:00", scale="utc"))
    anti = (sun.ra.deg + 180.0) % 360.0
    diff = (rep["tonight"]["ra_deg"] - anti + 180.0) % 360.0 - 180.0
    assert abs(diff) < 2.0


def test_not_placed_tonight_is_said(cli):
    # 70 Oph (RA 18 h) in early December evenings from 52 N sets in twilight
    code, out, err = cli("pair", "STF2272AB", "--lat", "52.19", "--lon", "-2.41", "--tz", "Europe/London",
                         "--aperture", "102", "--date", "2026-12-05")
    assert code == 0, err
    assert "not up in the dark tonight" in out and "optics alone" in out


def test_text_and_library_agree(cli):
    from planner.plan.single import check_pair

    rep = run_json(cli, "STF 1938 Ba,Bb", *CAPE, "--aperture", "80", "--seeing", "2.5", "--date", "2026-05-14")
    lib = check_pair("sample", "STF 1938 Ba,Bb", {"lat_deg": -33.9, "lon_deg": 18.4, "tz": "Africa/Johannesburg"},
                     "2026-05-14", {"aperture_mm": 80.0}, 2.5)
    for k in ("verdict", "limit_arcsec", "margin", "best_utc"):
        assert rep["tonight"][k] == lib[k]


@pytest.mark.parametrize("args, words", [
    (["--seeing", "2"], "needs a site"),
    (["--aperture", "102"], "no site"),
    (["--lat", "52", "--lon", "0", "--tz", "UTC"], "no telescope"),
    (["--lat", "52", "--lon", "0", "--aperture", "100", "--epoch", "2030"], "--date"),
    (["--lat", "52", "--lon", "0", "--aperture", "100", "--darkness", "pitch"], "civil, nautical"),
    (["--lat", "52", "--lon", "0", "--aperture", "100", "--aperture", "200"], "one telescope"),
])
def test_bad_verdict_options_one_line_exit_2(cli, args, words):
    code, out, err = cli("pair", "STF2272AB", *args)
    assert code == 2
    lines = [ln for ln in err.splitlines() if ln.strip()]
    assert len(lines) == 1 and words in lines[0] and "Traceback" not in err


def test_season_across_new_year_has_real_years():
    # Castor (STF 1110 AB, RA 7h35m) transits at local midnight in mid-January (the Sun at
    # RA ~19.6 h then; Astronomical Almanac low-precision Sun, checked against astropy above):
    # seen from a December evening the season runs from early December into February of the
    # next year, so the dates must carry both years and be in order.
    import datetime as dt

    from planner.plan.single import best_dates

    r = best_dates(113.65, 31.89, 52.0, "2026-12-05")
    a, k, b = (dt.date.fromisoformat(r[x]) for x in ("good_from", "midnight_transit", "good_to"))
    assert a < k < b
    assert (a.year, k.year, b.year) == (2026, 2027, 2027)
    assert 80 <= (b - a).days <= 100  # +-3 h of transit at ~4 min a day: about +-45 days
    assert k.month == 1 and 5 <= k.day <= 20
