"""Validation of orbit_positions against the catalogue's own ephemeris.

Source: USNO Sixth Catalog of Orbits of Visual Binary Stars, orbit-elements
file (``catalogs_sample/orb6_orbits.txt``, late-2008 snapshot) and the
catalogue's ephemerides for 2005.0-2009.0 (``orb6_ephemerides_2005_2009.txt``,
an earlier catalogue version); layout FORMATS.md sections B and C; matching
rule and conventions from the reference README.

Sample: every (WDS id, reference) that has exactly one row in each file and
complete elements.  Computed through ``planner.catalogs.read_orb6`` and
``planner.motion.orbit_positions`` with the default precession model
("j2000").  The catalogue prints theta to 0.1 deg and rho to 0.001", so a
perfect computation differs by up to 0.05 deg and 0.0005".

Acceptance (issue 3): at least 99.5 % of the epoch points of the visual
orbits (grades 1-5) within 0.15 deg in theta and 0.0015" in rho; every miss
listed with its reason in docs/orbit-validation.md.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from conftest import reference_file
from orb6_ephemeris import compare, one_to_one, read_ephemerides

from planner.catalogs import read_orb6
from planner.motion import orbit_positions

DOC = Path(__file__).resolve().parents[1] / "docs" / "orbit-validation.md"


@pytest.fixture(scope="module")
def matched():
    orbits = read_orb6(reference_file("orb6_orbits.txt"))
    eph = read_ephemerides(reference_file("orb6_ephemerides_2005_2009.txt"))
    m = one_to_one(orbits, eph)
    return m[m["complete"].astype(bool)].reset_index(drop=True)


@pytest.fixture(scope="module")
def results(matched):
    return {prec: compare(matched, lambda f, ep, p=prec: orbit_positions(f, ep, precession=p, astrometric=True))
            for prec in ("j2000", "equinox", "none")}


def test_sample_size_matches_the_reference_readme(matched):
    # reference README: 1,731 pairs with one row in each file and complete elements (8,655 epoch points)
    assert len(matched) == 1731
    # the file reader agrees with the ephemeris file on the grade of every matched orbit
    assert (matched["grade"].to_numpy(float) == matched["eph_grade"].to_numpy(float)).all()


def test_visual_orbits_match_the_catalogue_ephemeris(results):
    c = results["j2000"]
    v = c[c["grade"].between(1, 5)]
    # reference README: 7,025 visual epoch points
    assert len(v) == 7025
    rate = v["ok"].mean()
    # acceptance, issue 3: >= 99.5 % within 0.15 deg and 0.0015"
    assert rate >= 0.995, f"{v['ok'].sum()} of {len(v)} within tolerance"
    # most points agree to the catalogue's print precision (0.05 deg, 0.0005")
    assert np.median(np.abs(v["dtheta_deg"])) < 0.05
    assert np.median(np.abs(v["drho_arcsec"])) < 0.0005


def test_every_visual_miss_has_a_short_period_and_is_listed(results):
    c = results["j2000"]
    miss = c[~c["ok"]]
    vis = miss[miss["grade"].between(1, 5)]
    # reference README: every disagreeing visual orbit has P < 2 years
    assert (vis["period_yr"] < 2.0).all()
    # and each one is a pair the catalogue gives as closer than 0.01": far below any visual limit
    assert (vis["rho_cat"] < 0.01).all()
    text = DOC.read_text(encoding="utf-8")
    unlisted = sorted({f"{w} {r}" for w, r in zip(miss["wds_id"], miss["reference"]) if f"{w} | {r}" not in text})
    assert not unlisted, f"misses not explained in {DOC.name}: {unlisted}"


def test_precession_from_2000_fits_best(results, matched):
    # the reference README found that precessing theta from 2000 whatever the equinox column says
    # fits the catalogue's ephemeris best; checked here for our code and all three models
    ok = {k: int(v[v["grade"].between(1, 5)]["ok"].sum()) for k, v in results.items()}
    assert ok["j2000"] > ok["none"] > ok["equinox"]
    # orbits whose equinox column says 1900 or 1950: the literal reading misses most of them,
    # precessing from 2000 matches them all
    for model, expect_all in (("j2000", True), ("equinox", False)):
        c = results[model].merge(matched[["wds_id", "reference", "equinox"]], on=["wds_id", "reference"])
        old = c[c["equinox"].isin([1900.0, 1950.0]) & c["grade"].between(1, 5)]
        assert len(old) > 100
        assert old["ok"].all() if expect_all else old["ok"].mean() < 0.5


def test_all_grades_figures(results, matched):
    c = results["j2000"]
    # reference README (with a looser rho tolerance 0.0015" + 0.1 %): 8,592 of 8,655 for all grades;
    # here with 0.0015" flat: at least 99 % (astrometric and interferometric orbits of days'
    # periods are the rest, see docs/orbit-validation.md)
    assert len(c) == 8655
    assert c["ok"].mean() >= 0.99


def test_negative_semimajor_axis_row_matches_with_theta_plus_180(results):
    # reference README: the one negative-a orbit (HIP1997d, 02130+0851) is listed by the catalogue
    # with theta + 180 deg and positive rho; using a as catalogued reproduces it
    c = results["j2000"]
    row = c[(c["wds_id"] == "02130+0851") & (c["reference"] == "HIP1997d")]
    assert len(row) == 5 and row["ok"].all()
