"""planner.plan.observed: the model's view of a pair at the logged moment.

Outside checks: the altitude against astropy ``AltAz`` without refraction (an independent
implementation of the IAU reductions), the airmass against Pickering's (2002, DIO 12, 20)
formula X = 1 / sin(h + 244 / (165 + 47 h^1.1)) written out here, and the margin as
rho / limit of planner.verdict.judge (its definition).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from planner.catalogs import find_pair, load_catalog
from planner.optics import Telescope
from planner.plan.observed import circumstances
from planner.sky import Site
from planner.verdict import judge

SITE = Site(lat_deg=47.1, lon_deg=8.2, elevation_m=600.0, tz="Europe/Zurich")


@pytest.fixture(scope="module")
def cat():
    return load_catalog("sample")


def test_altitude_airmass_and_margin_at_the_logged_moment(cat):
    from astropy import units as u
    from astropy.coordinates import AltAz, EarthLocation, SkyCoord
    from astropy.time import Time
    from astropy.utils import iers

    iers.conf.auto_download = False  # offline: the bundled IERS table
    label = find_pair(cat, "STF2272")  # 70 Oph, an evening object in July
    when = np.datetime64("2026-07-01T21:30:00", "ns")
    c = circumstances(cat, [label], SITE, Telescope(aperture_mm=102.0), when, 1.5)[0]
    assert c["wds_id"] == "18055+0230" and c["discoverer"] == "STF 2272"
    row = cat.pairs.loc[label]
    loc = EarthLocation(lon=8.2 * u.deg, lat=47.1 * u.deg, height=600 * u.m)
    aa = SkyCoord(row["ra_deg"] * u.deg, row["dec_deg"] * u.deg).transform_to(
        AltAz(obstime=Time("2026-07-01T21:30:00", scale="utc"), location=loc, pressure=0 * u.hPa))
    assert c["alt_deg"] == pytest.approx(aa.alt.deg, abs=1.0 / 60)       # astropy, to 1 arcmin
    h = c["alt_deg"]
    assert c["airmass"] == pytest.approx(1 / math.sin(math.radians(h + 244 / (165 + 47 * h ** 1.1))), rel=1e-9)
    v = judge(c["rho_arcsec"], row["mag1"], row["mag2"], c["airmass"], 102.0, 1.5).iloc[0]
    assert c["limit_arcsec"] == pytest.approx(v["limit_arcsec"])
    assert c["margin"] == pytest.approx(c["rho_arcsec"] / c["limit_arcsec"])
    assert c["seeing_used_arcsec"] == 1.5 and c["model_version"].startswith("splitplan")


def test_below_the_horizon_there_is_no_limit(cat):
    label = find_pair(cat, "STF2272")
    when = np.datetime64("2026-01-01T18:00:00", "ns")  # 70 Oph is below the horizon of 47 N then
    c = circumstances(cat, [label], SITE, Telescope(aperture_mm=102.0), when, 1.5)[0]
    assert c["alt_deg"] < 0
    assert c["airmass"] is None and c["margin"] is None and c["limit_arcsec"] is None
    assert c["rho_arcsec"] is not None


def test_several_pairs_and_moments_in_one_call(cat):
    labels = [find_pair(cat, q) for q in ("STF2272", "STF1938")]
    when = np.array(["2026-07-01T21:30:00", "2026-07-01T22:10:00"], "datetime64[ns]")
    both = circumstances(cat, labels, SITE, Telescope(aperture_mm=102.0), when, [1.5, 2.0])
    one = circumstances(cat, labels[1:], SITE, Telescope(aperture_mm=102.0), when[1], 2.0)
    assert both[1] == one[0]
