"""The one-pair report in the plan layer (planner/plan/pair_report.py) and its calendar date.

The calendar date of a Julian date is checked against the IAU SOFA routine ``jd2cal``
(through pyerfa, the reference library), which uses the proleptic Gregorian calendar.
"""

from __future__ import annotations

import json

import erfa
import numpy as np
import pytest

from planner.motion.epochs import calendar_date_from_jd, jd_from_besselian_year


def _erfa_date(jd: float) -> str:
    y, m, d, _ = erfa.jd2cal(np.floor(jd - 0.5) + 0.5, 0.0)  # the 0 h that starts the day holding jd
    y, m, d = int(y), int(m), int(d)
    return f"{y:04d}-{m:02d}-{d:02d}" if 0 <= y <= 9999 else f"{y:+05d}-{m:02d}-{d:02d}"


def test_calendar_date_matches_erfa_jd2cal():
    """Every epoch the pair command accepts (-3000 to 5000) and the day boundaries at 0 h UTC."""
    rng = np.random.default_rng(20261202)
    epochs = np.concatenate([rng.uniform(-3000.0, 5000.0, 4000), [-3000.0, 1900.0, 2000.0, 2026.92, 5000.0]])
    jds = list(jd_from_besselian_year(epochs))
    # day boundaries: JD n + 0.5 is 0 h UTC; just before it is still the previous day
    jds += [2451544.5, 2451544.5 - 1e-6, 2461014.5, 2461014.4999, 2299160.5, 2299159.5]
    for jd in jds:
        assert calendar_date_from_jd(jd) == _erfa_date(jd), jd


def test_known_dates():
    # JD 2451544.5 = 2000 January 1, 0 h (Meeus 1998, Astronomical Algorithms, ch. 7);
    # JD 2299160.5 = 1582 October 15, the first Gregorian day (same source)
    assert calendar_date_from_jd(2451544.5) == "2000-01-01"
    assert calendar_date_from_jd(2451545.0) == "2000-01-01"
    assert calendar_date_from_jd(2299160.5) == "1582-10-15"


def test_pair_at_an_ancient_epoch_is_not_an_internal_error(cli):
    """--epoch -2000 is allowed (-3000 to 5000) but ended in an internal error
    (OverflowError from datetime) before the calendar date had its own helper."""
    code, out, err = cli("pair", "STF2272", "--epoch", "-2000")
    assert code == 0, err
    assert "date        -2000-" in out and "(epoch -2000.000, Besselian year)" in out


def test_pair_report_from_the_api_is_what_the_command_prints(cli):
    from planner.api import pair_report
    from planner.plan.pair_report import PairReport

    rep = pair_report("STF2272AB", "sample", 2031.5, years="2020:2030:5")
    assert isinstance(rep, PairReport)
    assert rep.orbit is not None and rep.orbit.iloc[0]["reference"] == rep.geometry["orbit_reference"]
    code, out, _ = cli("pair", "STF2272AB", "--epoch", "2031.5", "--years", "2020:2030:5", "--json")
    assert code == 0 and json.loads(out) == json.loads(json.dumps(rep.to_dict()))


def test_pair_report_does_not_change_the_catalogue():
    from planner.api import load_catalog, pair_report

    cat = load_catalog("sample")
    before = cat.pairs.copy(), cat.orbits.copy()
    pair_report("STF2272AB", cat, 2026.9, years=np.array([2020.0, 2030.0]))
    assert cat.pairs.equals(before[0]) and cat.orbits.equals(before[1])


@pytest.mark.parametrize("spec", ["2020", "2020:2010", "a:b", "2020:2030:0"])
def test_bad_year_ranges_are_input_errors(spec):
    from planner.errors import InputError
    from planner.plan.pair_report import parse_years

    with pytest.raises(InputError, match="--years"):
        parse_years(spec)
