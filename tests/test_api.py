"""The public Python API (planner.api): cheap to import, every name resolves, and the
job-level call agrees with the command line on the same inputs."""

import subprocess
import sys

import planner.api as api


def test_import_is_light():
    # a fresh interpreter: importing the API loads none of the heavy libraries
    code = ("import sys, planner.api; "
            "print(sorted(m for m in ('pandas', 'astropy', 'scipy', 'matplotlib', 'skyfield') if m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout
    assert out.strip() == "[]"


def test_every_public_name_resolves():
    for name in api.__all__:
        assert callable(getattr(api, name)), name


def test_dawes_through_the_api():
    # Dawes 1867: 115.8"/D mm -> 1.158" at 100 mm (docs/methods.md section 1)
    assert abs(api.dawes_limit_arcsec(100) - 1.158) < 1e-3


def test_plan_night_matches_the_command_line(cli):
    import json

    site = {"lat_deg": 52.1873, "lon_deg": -2.4127, "elevation_m": 95.0, "tz": "Europe/London"}
    plan = api.plan_night(site, [{"aperture_mm": 102.0}], "2026-12-05", seeing_arcsec=1.5, limit=8)
    code, out, err = cli("night", "--lat", "52.1873", "--lon", "-2.4127", "--elevation", "95",
                         "--tz", "Europe/London", "--date", "2026-12-05", "--aperture", "102",
                         "--seeing", "1.5", "--limit", "8", "--json")
    assert code == 0, err
    rows = json.loads(out)
    assert [r["wds_id"] for r in rows] == plan.schedule["wds_id"].tolist()
