"""One validator per field (planner/config/fields.py), shared by the command line, profiles,
plan and session files and the Python API.

Each case below was accepted or mishandled before the field table (issue 13 item 7): it must
now be one clear line and exit 2 (InputError), whichever way the value comes in.  The ranges
are the project's own choices, stated in the field table (no outside source).
"""

from __future__ import annotations

import pytest

from planner.config import fields
from planner.errors import InputError

DEMO = ["--lat", "52.1873", "--lon", "-2.4127", "--elevation", "95", "--tz", "Europe/London",
        "--date", "2026-12-05"]


def _one_error_line(err: str) -> str:
    lines = [ln for ln in err.splitlines() if ln.strip()]
    assert len(lines) == 1 and "Traceback" not in err and "internal error" not in err, err
    return lines[0]


def test_mag_max_nan_is_refused(cli):
    # before: an empty plan with exit 0
    code, out, err = cli("night", *DEMO, "--aperture", "102", "--mag-max", "nan")
    assert code == 2
    assert "nan" in _one_error_line(err)


def test_minutes_below_one_is_refused(cli):
    # before: --minutes 0.0001 passed although the message says 1-240
    code, out, err = cli("night", *DEMO, "--aperture", "102", "--minutes", "0.0001")
    assert code == 2
    line = _one_error_line(err)
    assert "0.0001" in line and "1 to 240" in line


def _plan_file(tmp_path, body: str):
    p = tmp_path / "p.plan.toml"
    p.write_text(body)
    return p


SITE = '[site]\nlat_deg = 52.1873\nlon_deg = -2.4127\nelevation_m = 95.0\ntz = "Europe/London"\n'
SCOPE = '\n[[scopes]]\naperture_mm = 102.0\nobstruction = 0.0\n'


def test_plan_file_fractional_limit_is_refused(cli, tmp_path):
    # before: limit = 2.5 was read as 2 although the command line refuses 2.5
    p = _plan_file(tmp_path, 'date = "2026-12-05"\nlimit = 2.5\n' + SITE + SCOPE)
    code, out, err = cli("night", "--plan", str(p))
    assert code == 2
    assert "2.5" in _one_error_line(err) and "whole number" in err


def test_plan_file_boolean_latitude_is_refused(cli, tmp_path):
    # before: lat_deg = true became latitude 1.0
    p = _plan_file(tmp_path, 'date = "2026-12-05"\n' + SITE.replace("52.1873", "true") + SCOPE)
    code, out, err = cli("night", "--plan", str(p))
    assert code == 2
    line = _one_error_line(err)
    assert "latitude" in line and "not a number" in line


def test_saved_site_with_boolean_latitude_is_refused(cli):
    from planner.config import profiles

    path = profiles.profile_path("site")
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text('[site.home]\nlat_deg = true\nlon_deg = 0.0\ntz = "UTC"\n')
    code, out, err = cli("night", "--site", "home", "--date", "2026-12-05", "--aperture", "102")
    assert code == 2
    assert "latitude" in _one_error_line(err)
    with pytest.raises(InputError, match="not a number"):
        profiles.get("site", "home")


def test_site_without_time_zone_shows_utc_not_none(cli, tmp_path):
    # before: the header read "(52.1873, -2.4127, 95 m, None)"
    p = _plan_file(tmp_path, 'date = "2026-12-05"\nlimit = 2\n' + SITE.replace('tz = "Europe/London"\n', "")
                   + SCOPE)
    code, out, err = cli("night", "--plan", str(p))
    assert code == 0, err
    header = out.splitlines()[0]
    assert header.endswith("95 m, UTC)") and "None" not in out


def test_apertures_nights_has_an_upper_bound(cli):
    # before: --nights 100000000 ran for minutes
    code, out, err = cli("apertures", "60", "102", *DEMO, "--to", "2027-12-05", "--nights", "100000000")
    assert code == 2
    assert "--nights" in _one_error_line(err)


def test_aperture_has_one_range_everywhere(cli):
    # the telescope, the aperture comparison and saved scopes all use the field table's range
    from planner.config import profiles
    from planner.optics.telescope import Telescope

    msgs = []
    for make in (lambda: Telescope(5.0), lambda: profiles.validate("scope", {"aperture_mm": 5.0})):
        with pytest.raises(InputError) as exc:
            make()
        msgs.append(str(exc.value))
    code, out, err = cli("apertures", "5", "102", *DEMO)
    assert code == 2
    msgs.append(_one_error_line(err))
    assert all("10 to 10000 mm" in m for m in msgs), msgs


@pytest.mark.parametrize("name, value", [
    ("lat_deg", True), ("lat_deg", "47"), ("lat_deg", float("nan")), ("lat_deg", 90.5),
    ("minutes", 0.5), ("minutes", float("inf")), ("limit", 2.5), ("limit", 0), ("nights", 367),
    ("obstruction", 1.0), ("darkness", "dusk"), ("date", "2026-13-01"), ("start_local", "25:00"),
    ("mag_max", float("nan")), ("constellations", "Cyg"), ("tz", "Nowhere/City"), ("challenges", 1),
])
def test_field_table_refuses(name, value):
    with pytest.raises(InputError) as exc:
        fields.check(name, value)
    assert "\n" not in str(exc.value)


@pytest.mark.parametrize("name, value, expected", [
    ("lat_deg", 47, 47.0), ("limit", 3.0, 3), ("kind", "Dob", "newtonian"), ("darkness", " Nautical", "nautical"),
    ("date", "2026-12-05", "2026-12-05"), ("start_local", "9:05", "09:05"), ("tz", " UTC ", "UTC"),
    ("constellations", ["Cyg ", "Lyr"], ["Cyg", "Lyr"]), ("obstruction", 0.0, 0.0),
])
def test_field_table_accepts(name, value, expected):
    assert fields.check(name, value) == expected


def test_every_request_field_has_a_validator():
    # the plan file's fields (NightRequest) all appear in the field table
    from dataclasses import fields as dc_fields

    from planner.plan.model import NightRequest

    names = {f.name for f in dc_fields(NightRequest)} - {"site", "scopes", "filters", "date"}
    assert names <= set(fields.FIELDS), names - set(fields.FIELDS)
    assert set(fields.SITE_FIELDS) <= set(fields.FIELDS) and set(fields.SCOPE_FIELDS) <= set(fields.FIELDS)
