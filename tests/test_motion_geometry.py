"""Validation of pair_geometry and its parts (planner.motion.geometry).

What is checked, against what:

* proper motion to the date against astropy ``SkyCoord.apply_space_motion``
  (reference library; no distance given) to 0.01 mas;
* rectilinear extrapolation against hand-computed straight-line motion
  (USNO rectilinear elements, x = x0 + v t; docs/methods.md section 7), and
  the growth of its uncertainty with time (model stated in the module,
  common practice, no source);
* pair_geometry on the bundled real sample (USNO ORB6 + WDS rows): the
  module contract of DEVELOPERS.md, which method each pair gets, that grade-9
  orbits never give a separation, that the several orbits of one pair give a
  spread, and agreement with orbit_positions for the chosen orbit.
"""

from __future__ import annotations

import warnings
from types import SimpleNamespace

import numpy as np
import pandas as pd
import pytest

from planner.motion import orbit_positions, pair_geometry
from planner.motion.geometry import (
    GRADE_FLOOR_FRACTION, apply_proper_motion, linear_positions, measure_error_arcsec,
)

CONTRACT = ("rho_arcsec", "theta_deg", "method", "grade", "rho_unc_arcsec", "theta_unc_deg",
            "years_since_measure", "ra_date_deg", "dec_date_deg", "orbit_reference")


@pytest.mark.parametrize("ra, dec, pmra, pmdec", [
    (10.0, 20.0, 100.0, -50.0),
    (250.0, 85.0, -500.0, 300.0),     # near the pole
    (100.0, -60.0, 4000.0, 2000.0),   # fast star
    (359.99, 0.0, 1000.0, 0.0),       # across RA = 0
])
def test_proper_motion_against_astropy(ra, dec, pmra, pmdec):
    import astropy.units as u
    from astropy.coordinates import SkyCoord
    from astropy.time import Time

    c = SkyCoord(ra=ra * u.deg, dec=dec * u.deg, pm_ra_cosdec=pmra * u.mas / u.yr,
                 pm_dec=pmdec * u.mas / u.yr, obstime=Time("J2000"), frame="icrs")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # astropy warns that no distance was given
        c2 = c.apply_space_motion(new_obstime=Time("J2050"))
    r, d = apply_proper_motion(ra, dec, pmra, pmdec, 50.0)
    # reference: astropy apply_space_motion (erfa pmsafe); tolerance 0.01 mas
    dra = ((r - c2.ra.deg + 180) % 360 - 180) * np.cos(np.radians(d)) * 3.6e6
    assert abs(dra) < 0.01 and abs((d - c2.dec.deg) * 3.6e6) < 0.01


def test_proper_motion_missing_means_no_motion():
    r, d = apply_proper_motion(10.0, 20.0, np.nan, np.nan, 30.0)
    assert (r, d) == (pytest.approx(10.0, abs=1e-12), pytest.approx(20.0, abs=1e-12))


class TestLinear:
    def test_straight_line_through_first_and_last_measure(self):
        # first (rho 5", theta 90 = east), last 10 years later at (rho 5", theta 0 = north):
        # x (north) 0 -> 5, y (east) 5 -> 0, velocity (+0.5, -0.5) "/yr; 10 years after the last
        # measure: x = 10, y = -5 -> rho = sqrt(125), theta = atan2(-5, 10) = 333.43 deg (hand computed)
        r = linear_positions(5.0, 90.0, 1990.0, 5.0, 0.0, 2000.0, 2010.0, n_obs=5).iloc[0]
        assert r.moving
        assert r.x_north_arcsec == pytest.approx(10.0, abs=1e-9)
        assert r.y_east_arcsec == pytest.approx(-5.0, abs=1e-9)
        assert r.rho_arcsec == pytest.approx(np.sqrt(125.0), abs=1e-9)
        assert r.theta_deg == pytest.approx(np.degrees(np.arctan2(-5, 10)) % 360, abs=1e-9)
        assert r.speed_arcsec_per_yr == pytest.approx(np.sqrt(0.5), abs=1e-12)

    def test_uncertainty_grows_with_time_after_the_last_measure(self):
        out = linear_positions(5.0, 90.0, 1990.0, 5.0, 0.0, 2000.0, np.array([2000.0, 2010.0, 2030.0, 2060.0]), 5)
        s = out["sigma_arcsec"].to_numpy()
        assert np.all(np.diff(s) > 0)
        # at the last measure it is the measure's own error (model: sqrt(0.1^2 + (rho * 1 deg)^2))
        assert s[0] == pytest.approx(float(measure_error_arcsec(5.0)), rel=1e-12)
        # after dt years it includes half the extrapolated shift (curvature allowance, 0.5 |v| dt)
        assert s[3] >= 0.5 * np.sqrt(0.5) * 60

    def test_no_significant_motion_keeps_the_last_measure(self):
        # 0.1" and 1 deg changes over 50 years: below 3 sigma of the measure error (0.1", 1 deg each)
        r = linear_positions(2.0, 100.0, 1950.0, 2.1, 101.0, 2000.0, 2026.0, 30).iloc[0]
        assert not r.moving
        assert (r.rho_arcsec, r.theta_deg) == (pytest.approx(2.1), pytest.approx(101.0))
        # the uncertainty still grows: the fastest motion the test could miss, times 26 years
        assert r.sigma_arcsec > float(measure_error_arcsec(2.1))

    def test_single_epoch_or_single_measure_is_not_extrapolated(self):
        same_year = linear_positions(2.0, 100.0, 2000.0, 3.0, 150.0, 2000.0, 2026.0, 2).iloc[0]
        one_obs = linear_positions(2.0, 100.0, 1950.0, 3.0, 150.0, 2000.0, 2026.0, 1).iloc[0]
        for r in (same_year, one_obs):
            assert not r.moving and r.single_epoch
            assert r.rho_arcsec == pytest.approx(3.0)


@pytest.fixture(scope="module")
def sample():
    from planner.catalogs import load_sample

    return load_sample()


@pytest.fixture(scope="module")
def geo(sample):
    return pair_geometry(sample, 2026.5)


def test_contract_columns_and_alignment(sample, geo):
    # DEVELOPERS.md, module contracts: columns of pair_geometry, aligned with catalog.pairs.index
    assert geo.index.equals(sample.pairs.index)
    for c in CONTRACT + ("n_orbits",):
        assert c in geo.columns
    assert set(geo["method"]) <= {"orbit", "orbit-interferometric", "linear", "last", "none"}
    ok = geo["rho_arcsec"].notna()
    assert (geo.loc[ok, "rho_arcsec"] >= 0).all()
    # a separation without a catalogued angle (BSC5 multiple-star fields, docs/names.md) has
    # theta NaN; every other row with rho has theta in [0, 360)
    no_angle = ok & geo["theta_deg"].isna()
    assert (sample.pairs.loc[no_angle, "source"] == "bsc5").all()
    assert sample.pairs.loc[no_angle, "pa_last_deg"].isna().all()
    assert (geo.loc[no_angle, "method"] == "last").all() and geo.loc[no_angle, "theta_unc_deg"].isna().all()
    ok &= ~no_angle
    assert geo.loc[ok, "theta_deg"].between(0, 360, inclusive="left").all()
    assert (geo.loc[ok, "rho_unc_arcsec"] > 0).all() and (geo.loc[ok, "theta_unc_deg"] > 0).all()


def test_orbit_method_exactly_where_the_catalogue_has_a_usable_orbit(sample, geo):
    # the catalogue reader's has_orbit (complete grade 1-5 orbit) and our choice agree row by row
    assert ((geo["method"] == "orbit").to_numpy() == sample.pairs["has_orbit"].to_numpy(bool)).all()


def test_grade_9_orbits_never_give_a_separation(sample, geo):
    # ORB6 format: grade 9 = astrometric (photocentre) orbit; FORMATS.md B field 25
    assert not (geo["grade"] == 9).any()
    only9 = geo["reason"].str.contains("astrometric orbit only")
    assert only9.sum() > 300  # the sample holds 469 grade-9 orbits (reference README)
    assert geo.loc[only9, "method"].isin(["last", "linear", "none"]).all()


def test_chosen_orbit_position_equals_orbit_positions(sample, geo):
    # eta CrB (STF1937AB, 15232+3017): pair_geometry uses the preferred visual orbit unchanged
    o = sample.orbits
    row = geo[(sample.pairs["wds_id"] == "15232+3017") & (geo["method"] == "orbit")].iloc[0]
    orb = o[(o["wds_id"] == "15232+3017") & (o["reference"] == row.orbit_reference)]
    p = orbit_positions(orb, 2026.5).iloc[0]
    assert row.rho_arcsec == pytest.approx(p.rho_arcsec, abs=1e-12)
    assert row.theta_deg == pytest.approx(p.theta_deg, abs=1e-12)


def test_several_orbits_give_a_spread_at_least_the_grade_floor(sample, geo):
    multi = geo[(geo["method"] == "orbit") & (geo["n_orbits"] > 1)]
    assert len(multi) > 20
    floor = multi["grade"].map(GRADE_FLOOR_FRACTION) * multi["rho_arcsec"]
    assert (multi["rho_unc_arcsec"] >= floor - 1e-12).all()
    # at least one pair whose orbits disagree by more than the floor: the spread is used there
    assert (multi["rho_unc_arcsec"] > floor * 1.5).any()


def _toy_catalog():
    """Three hand-made pairs (values chosen for the test, not catalogue data)."""
    pairs = pd.DataFrame({
        "wds_id": ["00001+0001", "00002+0002", "00003+0003"], "discoverer": ["TST 1", "TST 2", "TST 3"],
        "components": ["", "AB", ""],
        "ra_deg": [0.1, 0.2, 0.3], "dec_deg": [1.0, 2.0, 3.0],
        "sep_first_arcsec": [5.0, 3.0, np.nan], "sep_last_arcsec": [5.0, 3.05, np.nan],
        "pa_first_deg": [90.0, 200.0, np.nan], "pa_last_deg": [0.0, 200.5, np.nan],
        "year_first": [1990.0, 1900.0, np.nan], "year_last": [2000.0, 2010.0, np.nan],
        "n_obs": [5.0, 12.0, np.nan], "pm1_ra_masyr": [1000.0, np.nan, 0.0], "pm1_dec_masyr": [0.0, np.nan, 0.0],
    }, index=[10, 20, 30])
    orbits = pd.DataFrame(columns=["wds_id", "components", "grade"])
    return SimpleNamespace(pairs=pairs, orbits=orbits)


def test_methods_on_hand_made_pairs():
    g = pair_geometry(_toy_catalog(), 2010.0)
    assert list(g.index) == [10, 20, 30]
    assert list(g["method"]) == ["linear", "last", "none"]
    assert g.loc[20, "years_since_measure"] == pytest.approx(0.0)
    assert np.isnan(g.loc[30, "rho_arcsec"])
    # proper motion 1000 mas/yr east for 10 years at dec 1 deg: 10" of arc (astropy-checked function)
    assert (g.loc[10, "ra_date_deg"] - 0.1) * np.cos(np.radians(1.0)) * 3600 == pytest.approx(10.0, rel=1e-4)


def test_epoch_default_is_now(sample):
    from planner.motion.epochs import today_epoch_yr

    g = pair_geometry(SimpleNamespace(pairs=sample.pairs.head(3), orbits=sample.orbits))
    assert g["epoch_yr"].iloc[0] == pytest.approx(today_epoch_yr(), abs=1e-3)
