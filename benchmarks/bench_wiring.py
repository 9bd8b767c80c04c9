"""Whole-process timings of the targets of the wiring work (issue 14), each paired with the astropy
AltAz time-grid baseline measured in the same run on the same pairs.

Run by hand (not a test):

    python benchmarks/bench_wiring.py [--runs 5] [--sizes 157000 1000000] [--grid-steps 48]

For each catalogue size a synthetic WDS file is written (``bench_catalog.synthetic_wds``, USNO
layout) and deleted afterwards, then, in fresh processes with their own ``SPLITPLAN_HOME``:

* ``splitplan night DEMO --catalog FILE`` cold (empty cache: parse, merge, write the cache) and
  warm (the cache filled), wall time and peak resident memory (``os.wait4``'s ``ru_maxrss``);
* the baseline: a fresh Python process that imports astropy and computes AltAz altitudes of the
  same pairs at ``--grid-steps`` instants across the same dark window (chunks of 100,000 pairs),
  wall time and peak memory -- what a plain astropy script pays for visibility alone.

Then ``splitplan pair STF2272AB`` and the same with a site, telescope and seeing (warm), and
``splitplan --help``.  DEMO: 52.1873 N, 2.4127 W, 95 m, Europe/London, 2026-12-05, 102 mm, 1.5".
"""

from __future__ import annotations

import argparse
import os
import platform
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

from bench_catalog import synthetic_wds  # noqa: E402

SITE = ["--lat", "52.1873", "--lon", "-2.4127", "--elevation", "95", "--tz", "Europe/London"]
DEMO = [*SITE, "--date", "2026-12-05", "--aperture", "102", "--seeing", "1.5"]

GRID = r"""
import sys, time
t0 = time.perf_counter()
import numpy as np
from astropy import units as u
from astropy.coordinates import AltAz, EarthLocation, SkyCoord
from astropy.time import Time
from astropy.utils import iers
iers.conf.auto_download = False
sys.path.insert(0, {here!r})
from planner.catalogs.catalog import load_catalog
from planner.sky.night import night_for
from planner.sky.site import Site
cat = load_catalog({path!r})
ra, dec = cat.pairs["ra_deg"].to_numpy(float), cat.pairs["dec_deg"].to_numpy(float)
ok = np.isfinite(ra) & np.isfinite(dec)
ra, dec = ra[ok], dec[ok]
site = Site(52.1873, -2.4127, 95.0, "Europe/London")
night = night_for(site, "2026-12-05", darkness="nautical")
a, b = np.datetime64(night.dark_start_utc, "ns"), np.datetime64(night.dark_end_utc, "ns")
times = Time(a + (b - a) * np.linspace(0, 1, {steps}), scale="utc")
loc = EarthLocation(lat=52.1873 * u.deg, lon=-2.4127 * u.deg, height=95 * u.m)
frame = AltAz(obstime=times[:, None], location=loc)
best = np.empty(len(ra))
for i in range(0, len(ra), 100_000):
    c = SkyCoord(ra=ra[i:i + 100_000] * u.deg, dec=dec[i:i + 100_000] * u.deg)
    best[i:i + 100_000] = c[None, :].transform_to(frame).alt.deg.max(axis=0)
print(f"{{len(ra)}} pairs, {{(best > 20).sum()}} above 20 deg at some step")
"""


def run(argv, env) -> tuple[float, float, float]:
    """Wall time (s), peak RSS (MB) and CPU time (user + system, s) of one fresh process.

    On a shared, loaded machine the wall time includes waiting for a core; the CPU time is
    what the process itself used and is the steadier figure."""
    t = time.perf_counter()
    p = subprocess.Popen(argv, env=env, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
    _, status, usage = os.wait4(p.pid, 0)
    wall = time.perf_counter() - t
    err = p.stderr.read().decode(errors="replace")
    p.stderr.close()
    code = os.waitstatus_to_exitcode(status)
    if code != 0:
        print("  (failed)", " ".join(argv[-6:]), err.strip()[-300:])
    return wall, usage.ru_maxrss / 1024.0, usage.ru_utime + usage.ru_stime


def series(argv, env, runs):
    """Best and median wall time, max peak RSS, best and median CPU time."""
    walls, rss, cpus = [], [], []
    for _ in range(runs):
        w, m, c = run(argv, env)
        walls.append(w)
        rss.append(m)
        cpus.append(c)
    return min(walls), statistics.median(walls), max(rss), min(cpus), statistics.median(cpus)


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--runs", type=int, default=5)
    ap.add_argument("--sizes", type=int, nargs="+", default=[157_000, 1_000_000])
    ap.add_argument("--grid-steps", type=int, default=48)
    args = ap.parse_args()
    exe = shutil.which("splitplan")
    cmd = [exe] if exe else [sys.executable, "-m", "planner"]
    print(f"machine: {platform.machine()}, {os.cpu_count()} cores, Python {platform.python_version()}; "
          f"runs per figure: {args.runs} (best / median wall, max peak RSS)")
    with tempfile.TemporaryDirectory() as tmp:
        tmp = Path(tmp)
        env = dict(os.environ, SPLITPLAN_HOME=str(tmp / "home"), MPLBACKEND="Agg")
        for n in args.sizes:
            wds = tmp / f"synthetic_{n}.txt"
            wds.write_bytes(synthetic_wds(n))
            night = [*cmd, "night", *DEMO, "--catalog", str(wds)]
            shutil.rmtree(tmp / "home", ignore_errors=True)
            cold = run(night, env)
            warm = series(night, env, args.runs)
            grid = run([sys.executable, "-c", GRID.format(here=str(HERE.parent), path=str(wds),
                                                          steps=args.grid_steps)], env)
            print(f"night, {n:,} WDS lines: cold {cold[0]:.2f} s wall / {cold[2]:.2f} s CPU ({cold[1]:.0f} MB); "
                  f"warm wall best {warm[0]:.2f} s, median {warm[1]:.2f} s; CPU best {warm[3]:.2f} s, "
                  f"median {warm[4]:.2f} s; peak RSS {warm[2]:.0f} MB")
            print(f"  astropy AltAz grid, same pairs, {args.grid_steps} steps (whole process): {grid[0]:.2f} s wall / "
                  f"{grid[2]:.2f} s CPU ({grid[1]:.0f} MB); warm night uses {grid[2] / warm[4]:.1f}x less CPU")
            wds.unlink()
        pair = series([*cmd, "pair", "STF2272AB"], env, args.runs)
        pair_site = series([*cmd, "pair", "STF2272AB", *DEMO], env, args.runs)
        helpt = series([*cmd, "--help"], env, args.runs)
        for label, r in (("pair STF2272AB", pair), ("pair STF2272AB with site, 102 mm, seeing", pair_site),
                         ("--help", helpt)):
            print(f"{label}: wall best {r[0]:.3f} s, median {r[1]:.3f} s; CPU best {r[3]:.3f} s, "
                  f"median {r[4]:.3f} s; {r[2]:.0f} MB")


if __name__ == "__main__":
    main()
