"""Regenerate the demo screenshots in docs/img/ (run by hand from the repository root).

    python docs/make_demo_images.py

Runs the invented demo club's plan files (examples/) through ``splitplan night``,
renders the HTML plans in headless Chromium (Debian package ``chromium``) and crops
three views: the top of the 102 mm plan, the first per-scope lists of the club
night and the "who splits what" matrix.  Sections are found by the navy table
headers of the page, so the crops follow the layout.  Also redraws the aperture
comparison chart.  Needs no network.
"""

from __future__ import annotations

import os
import subprocess
import sys
import tempfile
from pathlib import Path

import numpy as np
from PIL import Image

ROOT = Path(__file__).resolve().parents[1]
IMG = ROOT / "docs" / "img"
WIDTH = 1200
CHROMIUM = ["chromium", "--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
            "--disable-component-update", "--disable-sync", "--no-first-run", "--hide-scrollbars"]


def splitplan(*args: str, env: dict) -> None:
    subprocess.run([sys.executable, "-c", "from planner.cli import main; main()", *args], check=True, env=env,
                   cwd=ROOT, stdout=subprocess.DEVNULL)


def screenshot(html: Path, png: Path, tmp: Path) -> Image.Image:
    subprocess.run([*CHROMIUM, f"--user-data-dir={tmp / 'profile'}", f"--window-size={WIDTH},9000",
                    f"--screenshot={png}", html.as_uri()], check=True, capture_output=True)
    return Image.open(png).convert("RGB")


def table_tops(im: Image.Image) -> list[int]:
    """Pixel rows where a table header (navy #22405e) starts."""
    a = np.asarray(im).astype(int)
    navy = (abs(a[..., 0] - 0x22) < 12) & (abs(a[..., 1] - 0x40) < 14) & (abs(a[..., 2] - 0x5E) < 16)
    rows = np.flatnonzero(navy.sum(axis=1) > 0.65 * WIDTH)
    return [int(r) for i, r in enumerate(rows) if i == 0 or r - rows[i - 1] > 5]


def main() -> None:
    with tempfile.TemporaryDirectory() as d:
        tmp = Path(d)
        env = dict(os.environ, SPLITPLAN_HOME=str(tmp / "home"), MPLBACKEND="Agg")
        splitplan("night", "--plan", "examples/brackenfold-102mm.plan.toml", "--out", str(tmp / "demo.html"), env=env)
        splitplan("night", "--plan", "examples/brackenfold-club.plan.toml", "--out", str(tmp / "club.html"), env=env)
        splitplan("apertures", "60", "80", "102", "127", "152", "203", "254", "305", "--lat", "52.1873",
                  "--lon", "-2.4127", "--elevation", "95", "--tz", "Europe/London", "--date", "2026-12-05",
                  "--seeing", "1.5", "--plot", str(IMG / "demo_apertures.png"), env=env)
        demo = screenshot(tmp / "demo.html", tmp / "demo.png", tmp)
        demo.crop((0, 0, WIDTH, 1500)).save(IMG / "demo_plan.png")
        club = screenshot(tmp / "club.html", tmp / "club.png", tmp)
        tops = table_tops(club)
        # first scope list (with the end of the chart above it) and the matrix (the last table)
        club.crop((0, tops[0] - 62, WIDTH, tops[2] - 120)).save(IMG / "demo_club_lists.png")
        club.crop((0, tops[-1] - 70, WIDTH, tops[-1] + 1040)).save(IMG / "demo_club_matrix.png")
    print(f"wrote demo_plan.png, demo_club_lists.png, demo_club_matrix.png, demo_apertures.png in {IMG}")


if __name__ == "__main__":
    main()
