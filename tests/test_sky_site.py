"""Validation of the Site and Horizon inputs: ranges, messages, file parsing, local time.

Ranges are the project's own choices (documented in planner/sky/site.py);
daylight-saving dates are those of the IANA tz database (EU rule: last
Sunday of March / October at 01:00 UTC).
"""

from __future__ import annotations

import dataclasses

import numpy as np

import pytest

from planner.errors import InputError
from planner.sky import Horizon, Site


def test_valid_site_and_defaults():
    s = Site(48.85, 2.35, elevation_m=35, tz="Europe/Paris", name="Paris")
    assert s.min_alt_deg == 20.0
    # standard atmosphere at 35 m: 1013.25 (1 - 2.25577e-5 * 35)^5.25588 = 1009.05 hPa (ISO 2533)
    assert s.pressure_hpa == pytest.approx(1009.05, abs=0.01)
    assert s.zone.key == "Europe/Paris"


def test_longitude_0_360_is_folded_to_east_positive():
    """Our convention: east positive, -180..180; 350 E is stored as -10."""
    assert Site(10, 350).lon_deg == pytest.approx(-10.0)
    assert Site(10, 180).lon_deg == 180.0
    assert Site(10, -179.9).lon_deg == -179.9


@pytest.mark.parametrize("kwargs, pattern", [
    ({"lat_deg": 91, "lon_deg": 0}, r"latitude 91 is out of range; allowed -90 to 90"),
    ({"lat_deg": "north", "lon_deg": 0}, r"latitude 'north' is not a number"),
    ({"lat_deg": 0, "lon_deg": -181}, r"longitude -181 is out of range"),
    ({"lat_deg": 0, "lon_deg": 361}, r"longitude 361 is out of range"),
    ({"lat_deg": 0, "lon_deg": float("nan")}, r"longitude nan is out of range"),
    ({"lat_deg": 0, "lon_deg": 0, "elevation_m": 12000}, r"elevation 12000 is out of range; allowed -500 to 9000 m"),
    ({"lat_deg": 0, "lon_deg": 0, "min_alt_deg": 85}, r"minimum altitude 85 is out of range; allowed 0 to 80"),
    ({"lat_deg": 0, "lon_deg": 0, "tz": "Mars/Olympus"}, r"time zone 'Mars/Olympus' is unknown"),
    ({"lat_deg": 0, "lon_deg": 0, "tz": ""}, r"time zone '' is not valid"),
    ({"lat_deg": 0, "lon_deg": 0, "pressure_hpa": -3}, r"pressure -3 is out of range"),
])
def test_bad_values_raise_one_line_input_error(kwargs, pattern):
    with pytest.raises(InputError, match=pattern) as exc:
        Site(**kwargs)
    assert "\n" not in str(exc.value)
    assert exc.value.exit_code == 2


def test_site_is_frozen():
    s = Site(0, 0)
    # a frozen dataclass refuses the assignment with its own error, naming the field
    with pytest.raises(dataclasses.FrozenInstanceError, match="cannot assign to field 'lat_deg'"):
        s.lat_deg = 5
    assert s.lat_deg == 0


def test_horizon_file_parsing_and_circular_interpolation(tmp_path):
    p = tmp_path / "garden.txt"
    p.write_text("# my garden\n0 10\n90, 30  # the house\n\n180 10\n270 20\n", encoding="utf-8")
    h = Horizon.read(p)
    assert h.alt_at(45.0) == pytest.approx(20.0)  # halfway between 10 and 30
    assert h.alt_at(315.0) == pytest.approx(15.0)  # between 270 (20) and 360 = 0 (10): wraps
    assert h.alt_at(-45.0) == pytest.approx(15.0)
    s = Site(50, 5, horizon=p)
    np.testing.assert_allclose(s.limit_alt_deg([90.0, 180.0]), [30.0, 20.0])  # max(min_alt, profile)


@pytest.mark.parametrize("text, pattern", [
    ("0 10\n90 x\n", r"garden.txt line 2: expected two numbers"),
    ("0 10\n90 20 30\n", r"garden.txt line 2: expected two numbers"),
    ("# header\n\n0 95\n", r"garden.txt line 3: altitude 95 must be -10 to 90"),
    ("# only comments\n", r"has no 'azimuth altitude' lines"),
])
def test_bad_horizon_file_names_the_line(tmp_path, text, pattern):
    p = tmp_path / "garden.txt"
    p.write_text(text, encoding="utf-8")
    with pytest.raises(InputError, match=pattern):
        Horizon.read(p)


def test_missing_horizon_file_is_input_error(tmp_path):
    with pytest.raises(InputError, match="cannot read horizon file"):
        Horizon.read(tmp_path / "nope.txt")


def test_local_time_follows_daylight_saving():
    """IANA tz database, EU rule: CET (UTC+1) until 2026-03-29 01:00 UTC, then CEST (UTC+2)."""
    s = Site(48.85, 2.35, tz="Europe/Paris")
    assert s.format_local(np.datetime64("2026-03-29T00:30"), "%H:%M %Z") == "01:30 CET"
    assert s.format_local(np.datetime64("2026-03-29T01:30"), "%H:%M %Z") == "03:30 CEST"
    assert s.format_local(np.datetime64("NaT")) == "-"
    idx = s.local_time(np.array(["2026-07-01T12:00", "2026-12-01T12:00"], dtype="datetime64[ns]"))
    assert [t.hour for t in idx] == [14, 13]
