"""Saved sites and telescopes: round trip, validation, and no data loss.

Checks: what is saved is what is read back; bad values are refused with one
clear line (validated by the sky engine's Site and the optics Telescope);
a damaged profile file is moved aside and reported, never overwritten.
"""

from __future__ import annotations

import tomllib

import pytest

from planner.config import profiles
from planner.errors import CorruptFileError, InputError

SITE = {"lat_deg": 47.05, "lon_deg": 8.31, "elevation_m": 640.0, "tz": "Europe/Zurich", "min_alt_deg": 25.0}


def test_site_round_trip_and_remove():
    profiles.add("site", "Hilltop \"field\" #2", SITE)
    got = profiles.get("site", "Hilltop \"field\" #2")
    assert got == SITE  # exact: floats written with repr() and read back by tomllib
    # the file is valid TOML on its own (read with the standard library)
    data = tomllib.loads(profiles.profile_path("site").read_text("utf-8"))
    assert data["site"]["Hilltop \"field\" #2"]["tz"] == "Europe/Zurich"
    profiles.remove("site", "Hilltop \"field\" #2")
    assert profiles.list_profiles("site") == {}


def test_scope_round_trip_and_duplicate_name():
    profiles.add("scope", "club 8in", {"aperture_mm": 203, "obstruction": 0.33, "kind": "newtonian", "focal_mm": 1200})
    assert profiles.get("scope", "club 8in")["aperture_mm"] == 203.0
    with pytest.raises(InputError, match="already exists"):
        profiles.add("scope", "club 8in", {"aperture_mm": 150})
    profiles.add("scope", "club 8in", {"aperture_mm": 150}, replace=True)
    assert profiles.get("scope", "club 8in") == {"aperture_mm": 150.0}


@pytest.mark.parametrize("kind, fields, words", [
    ("site", dict(SITE, lat_deg=95.0), "latitude"),
    ("site", dict(SITE, tz="Mars/Olympus"), "time zone"),
    ("site", {"lat_deg": 10.0, "lon_deg": 5.0}, "tz"),
    ("scope", {"aperture_mm": 0.0}, "aperture"),
    ("scope", {"aperture_mm": 100.0, "obstruction": 1.2}, "obstruction"),
    ("scope", {"aperture_mm": 100.0, "colour": "red"}, "unknown scope field"),
])
def test_bad_values_are_refused_with_a_clear_line(kind, fields, words):
    with pytest.raises(InputError) as exc:
        profiles.add(kind, "x", fields)
    msg = str(exc.value)
    assert words in msg and "\n" not in msg
    assert profiles.list_profiles(kind) == {}


def test_unknown_name_lists_what_exists():
    profiles.add("site", "home", SITE)
    with pytest.raises(InputError, match="saved: home"):
        profiles.get("site", "nowhere")


def test_corrupted_profile_file_is_quarantined_not_overwritten():
    profiles.add("site", "home", SITE)
    path = profiles.profile_path("site")
    damaged = b"[site.home]\nlat_deg = 47.0\nthis is = = not toml\n"
    path.write_bytes(damaged)
    with pytest.raises(CorruptFileError, match="moved aside"):
        profiles.list_profiles("site")
    assert not path.exists()
    kept = list(path.parent.glob("sites.toml.corrupt-*"))
    assert len(kept) == 1 and kept[0].read_bytes() == damaged  # the user's bytes are intact


def test_profile_cli_add_list_remove(cli):
    code, out, err = cli("profile", "scope", "add", "travel 80", "--aperture", "80")
    assert code == 0, err
    code, out, err = cli("profile", "scope", "list", "--json")
    assert code == 0 and '"travel 80"' in out
    code, out, err = cli("profile", "site", "add", "bad", "--lat", "91", "--lon", "0", "--tz", "UTC")
    assert code == 2 and "latitude" in err and "Traceback" not in err
    code, out, err = cli("profile", "scope", "remove", "travel 80")
    assert code == 0
