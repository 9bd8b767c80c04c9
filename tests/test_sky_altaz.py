"""Validation of planner.sky.altaz: geometric altitude/azimuth of ICRS positions.

References (independent implementations of the same IAU reductions):
* astropy ``SkyCoord.transform_to(AltAz(..., pressure=0))`` -- no refraction;
* skyfield ``observe(Star).apparent().altaz()`` (no refraction by default),
  DE421 ephemeris, reading the same IERS finals2000A file astropy bundles.
Cases: 1,200 seeded random site/time/star triples, latitudes -89.9..89.9 deg
(a fifth of them beyond +-80 deg), dates 2020-01-01..2027-09-30 (inside the
IERS table bundled with astropy), elevations 0..4000 m.
Requirement (issue 4): worst error <= 2 arcsec, measured as the angle
between the two (alt, az) directions, so the azimuth's blow-up at the zenith
does not count.
"""

from __future__ import annotations

import numpy as np
import pytest

import planner.sky as sky

N = 1200
ARCSEC = 1.0 / 3600.0


def _sep_arcsec(az1, alt1, az2, alt2):
    az1, alt1, az2, alt2 = (np.radians(x) for x in (az1, alt1, az2, alt2))
    s = np.sin((alt2 - alt1) / 2) ** 2 + np.cos(alt1) * np.cos(alt2) * np.sin((az2 - az1) / 2) ** 2
    return np.degrees(2 * np.arcsin(np.sqrt(s))) * 3600


@pytest.fixture(scope="module")
def cases():
    rng = np.random.default_rng(20261202)  # seeded
    ra = rng.uniform(0, 360, N)
    dec = np.degrees(np.arcsin(rng.uniform(-1, 1, N)))
    lat = rng.uniform(-89.9, 89.9, N)
    polar = rng.random(N) < 0.2
    lat[polar] = np.sign(lat[polar]) * rng.uniform(80.0, 89.9, polar.sum())
    lon = rng.uniform(-180, 180, N)
    h = rng.uniform(0, 4000, N)
    t0 = np.datetime64("2020-01-01T00:00", "ns")
    span = (np.datetime64("2027-09-30T00:00", "ns") - t0).astype(np.int64)
    t = t0 + (rng.random(N) * span).astype(np.int64).astype("timedelta64[ns]")
    alt, az = sky.altaz(ra, dec, lat, lon, t, elevation_m=h)
    return dict(ra=ra, dec=dec, lat=lat, lon=lon, h=h, t=t, alt=alt, az=az)


def test_cases_cover_high_latitudes(cases):
    assert (np.abs(cases["lat"]) > 80).sum() >= 200


def test_altaz_matches_astropy_altaz_without_refraction(cases):
    from astropy import units as u
    from astropy.coordinates import AltAz, EarthLocation, SkyCoord
    from astropy.time import Time
    from astropy.utils import iers

    iers.conf.auto_download = False  # offline: bundled IERS table only
    iers.conf.auto_max_age = None
    c = cases
    loc = EarthLocation.from_geodetic(c["lon"] * u.deg, c["lat"] * u.deg, c["h"] * u.m)
    frame = AltAz(obstime=Time(c["t"], scale="utc"), location=loc, pressure=0 * u.hPa)
    ref = SkyCoord(c["ra"] * u.deg, c["dec"] * u.deg, frame="icrs").transform_to(frame)
    err = _sep_arcsec(c["az"], c["alt"], ref.az.deg, ref.alt.deg)
    assert err.max() <= 2.0  # issue 4 requirement
    # regression tolerance near what is achieved (same ERFA reduction: ~1e-8"), so that a
    # drift far below the requirement is still seen
    assert err.max() <= 0.01, err.max()


def test_altaz_matches_skyfield(cases):
    import os

    import astropy_iers_data
    from skyfield.api import Loader, Star, utc, wgs84

    from planner.sky.night import _skyfield

    _ts, eph = _skyfield()
    # skyfield's built-in UT1 table stops in mid-2026 and its extrapolation differs from the IERS
    # predictions by up to 0.3 s (4.5") by 2027; give skyfield the same IERS Bulletin A file that
    # astropy bundles (read by skyfield's own parser, offline) so the test compares the reductions.
    ts = Loader(os.path.dirname(astropy_iers_data.IERS_A_FILE), verbose=False).timescale(builtin=False)
    earth = eph["earth"]
    c = cases
    alt_ref = np.empty(N)
    az_ref = np.empty(N)
    for i in range(N):  # reference only: one skyfield call per case (stars x times do not vectorise)
        obs = earth + wgs84.latlon(c["lat"][i], c["lon"][i], elevation_m=c["h"][i])
        star = Star(ra_hours=c["ra"][i] / 15.0, dec_degrees=c["dec"][i])
        a, z, _ = obs.at(ts.from_datetime(c["t"][i].astype("datetime64[us]").item().replace(tzinfo=utc))).observe(star).apparent().altaz()
        alt_ref[i], az_ref[i] = a.degrees, z.degrees
    err = _sep_arcsec(c["az"], c["alt"], az_ref, alt_ref)
    # skyfield ignores polar motion unless told (<0.5") and has its own UT1 table; requirement 2".
    assert err.max() <= 2.0
    # regression tolerances near what is achieved (worst 0.54", median 0.33", docs/sky.md)
    assert err.max() <= 0.6, err.max()
    assert np.median(err) <= 0.4, np.median(err)


def test_broadcasting_and_astropy_time_input():
    """Stars along one axis, times along the other; astropy Time accepted at the edge."""
    from astropy.time import Time

    ra = np.array([10.0, 200.0, 300.0])
    dec = np.array([-20.0, 5.0, 60.0])
    times = np.array(["2026-12-02T20:00", "2026-12-02T23:00"], dtype="datetime64[ns]")
    alt, az = sky.altaz(ra[:, None], dec[:, None], 48.85, 2.35, times[None, :])
    assert alt.shape == (3, 2)
    alt2, az2 = sky.altaz(ra[:, None], dec[:, None], 48.85, 2.35, Time(times)[None, :])
    np.testing.assert_allclose(alt2, alt, atol=1e-9)
    one, _ = sky.altaz(ra[1], dec[1], 48.85, 2.35, times[1])
    assert one == pytest.approx(alt[1, 1], abs=1e-9)


def test_altaz_bad_input():
    from planner.errors import InputError

    with pytest.raises(InputError, match="declination 95.0 is out of range"):
        sky.altaz(10.0, 95.0, 0.0, 0.0, np.datetime64("2026-01-01"))
    with pytest.raises(InputError, match="latitude"):
        sky.altaz(10.0, 5.0, 100.0, 0.0, np.datetime64("2026-01-01"))
    with pytest.raises(InputError, match="time 'yesterday-ish' is not understood"):
        sky.altaz(10.0, 5.0, 10.0, 0.0, "yesterday-ish")


def test_alt_az_at_fast_path_agrees_with_full_path():
    """visibility() uses a once-per-night apparent place and a linear hour angle; its best-time
    altitude/azimuth must agree with the full ERFA path of alt_az_at (refracted) to 2"."""
    site = sky.Site(-31.27, 149.07, elevation_m=1150, tz="Australia/Sydney")
    night = sky.night_for(site, "2026-05-10")
    rng = np.random.default_rng(7)
    ra = rng.uniform(0, 360, 500)
    dec = rng.uniform(-89, 40, 500)
    vis = sky.visibility(ra, dec, site, night)
    ok = vis["observable"].to_numpy()
    alt, az = sky.alt_az_at(ra[ok], dec[ok], site, vis["best_utc"].to_numpy()[ok], refracted=True)
    err = _sep_arcsec(az, alt, vis["az_best_deg"].to_numpy()[ok], vis["alt_best_deg"].to_numpy()[ok])
    assert ok.sum() > 100
    assert err.max() <= 2.0          # requirement
    assert err.max() <= 0.8, err.max()   # regression: achieved 0.71" (docs/sky.md)


def test_numpy_apparent_place_matches_erfa_atciq():
    """The once-per-night apparent place (numpy: ERFA's relativistic aberration + bias-precession-
    nutation matrix) vs erfa.atciq itself (which adds the Sun's light deflection): within 0.03"
    for targets more than 20 deg from the Sun.  Light bending by the Sun is 0.0041" (1 + cos e) /
    sin e at elongation e (1.75" at the limb; GR, from memory): 0.023" at 20 deg, 0.004" at 90."""
    import erfa

    from planner.sky._astrometry import astrom_at
    from planner.sky.placement import _cirs_fast

    rng = np.random.default_rng(99)
    ra, dec = rng.uniform(0, 360, 5000), np.degrees(np.arcsin(rng.uniform(-1, 1, 5000)))
    when = np.datetime64("2026-12-02T23:40", "ns")
    ast = astrom_at(when, 48.85, 2.35, 35.0)
    ri, di, _ = _cirs_fast(np.radians(ra), np.radians(dec), ast)
    ri2, di2 = erfa.atciq(np.radians(ra), np.radians(dec), 0.0, 0.0, 0.0, 0.0, ast)
    sun = sky.sun_sep_deg(ra, dec, sky.Site(48.85, 2.35, 35), when)
    far = sun > 20
    err = _sep_arcsec(np.degrees(ri), np.degrees(di), np.degrees(ri2), np.degrees(di2))
    assert far.sum() > 4000
    assert err[far].max() < 0.03
