"""The HTML plan in a real browser (headless Chromium, Debian packages chromium + chromium-driver).

Checks: the page renders (Chromium's serialised DOM after load holds the
schedule table, both chart images and the pair diagrams), Chromium logs no
console message and no failed load, and a screenshot is saved as a test
artifact (its path is printed) and is not blank.  Skipped with the reason
when Chromium is not installed.
"""

from __future__ import annotations

import os
import re
import shutil
import subprocess

import numpy as np
import pytest

pytestmark = pytest.mark.browser

CHROMIUM = shutil.which("chromium") or shutil.which("chromium-browser") or shutil.which("google-chrome")
FLAGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
         "--disable-extensions", "--no-first-run", "--disable-dev-shm-usage", "--hide-scrollbars"]


@pytest.fixture(scope="module")
def page(tmp_path_factory):
    if CHROMIUM is None:
        pytest.skip("headless Chromium not installed (apt-get install chromium chromium-driver)")
    home = tmp_path_factory.mktemp("home")
    old = os.environ.get("SPLITPLAN_HOME")
    os.environ["SPLITPLAN_HOME"] = str(home)
    try:
        from planner.plan.model import NightRequest
        from planner.plan.night import plan_night
        from planner.report import write_report

        req = NightRequest(site={"lat_deg": 52.1873, "lon_deg": -2.4127, "elevation_m": 95.0, "tz": "Europe/London"},
                           scopes=[{"name": "Loan 102 mm refractor", "aperture_mm": 102.0}],
                           site_name="Brackenfold Common (fictional)", date="2026-12-05", seeing_arcsec=1.5,
                           limit=12, challenges=True)
        out = tmp_path_factory.mktemp("browser") / "plan.html"
        write_report(plan_night(req), out)
        return out
    finally:
        if old is None:
            os.environ.pop("SPLITPLAN_HOME", None)
        else:
            os.environ["SPLITPLAN_HOME"] = old


def _run(args, tmp):
    env = dict(os.environ, HOME=str(tmp))
    return subprocess.run([CHROMIUM, *FLAGS, f"--user-data-dir={tmp / 'profile'}", *args],
                          capture_output=True, text=True, timeout=120, env=env)


def test_renders_with_table_and_charts_and_no_console_errors(page, tmp_path):
    r = _run(["--enable-logging=stderr", "--v=0", "--virtual-time-budget=3000", "--dump-dom", page.as_uri()],
             tmp_path)
    dom = r.stdout
    assert "<table" in dom and dom.count("<tr>") >= 12
    assert re.search(r'<img id="altitude-chart"[^>]*src="data:image/png;base64,', dom)
    assert re.search(r'<img id="sky-chart"[^>]*src="data:image/png;base64,', dom)
    assert dom.count("<svg") >= 12  # one diagram per scheduled pair
    console = [ln for ln in r.stderr.splitlines() if "CONSOLE" in ln or "Failed to load" in ln
               or "net::ERR" in ln]
    assert console == []


def test_screenshot_artifact(page, tmp_path):
    from matplotlib import image

    shot = page.with_name("plan-screenshot.png")
    r = _run(["--window-size=1280,2200", f"--screenshot={shot}", page.as_uri()], tmp_path)
    assert shot.exists(), r.stderr[-500:]
    print(f"\nscreenshot of the HTML plan: {shot}")
    img = image.imread(str(shot))
    assert img.shape[0] >= 2000 and img.shape[1] >= 1200
    assert float(np.std(img[..., :3])) > 0.05  # not a blank page
