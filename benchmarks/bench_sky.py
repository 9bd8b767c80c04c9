"""Benchmark: whole-catalogue visibility for one night vs an astropy AltAz time-grid baseline.

Run by hand (not a test):  python benchmarks/bench_sky.py [--pairs 157000] [--steps 48]

Measures, for N random ICRS positions and one night at one site:
1. ``planner.sky.visibility`` (analytic, the full computation: apparent place,
   transit, rise/set, time in the dark window, best time, alt/az, airmass,
   refraction, dispersion, Moon distance, sky brightness);
2. the baseline: ``SkyCoord(...).transform_to(AltAz(obstime=grid))`` over the
   same N positions on a grid of ``--steps`` instants across the dark
   window (what a time-grid approach needs just for the altitudes).
Reports wall time of each (best of ``--repeat`` for ours; the baseline once),
their ratio, and the peak Python memory of each step (tracemalloc) plus the
process's maximum resident set size (resource.getrusage).
The night, ephemeris and IERS tables are loaded before timing (one-off
start-up costs, reported separately).
"""

from __future__ import annotations

import argparse
import platform
import resource
import time
import tracemalloc

import numpy as np


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--pairs", type=int, default=157_000)
    ap.add_argument("--steps", type=int, default=48)
    ap.add_argument("--repeat", type=int, default=5)
    ap.add_argument("--date", default="2026-12-02")
    args = ap.parse_args()

    import planner.sky as sky

    t0 = time.perf_counter()
    site = sky.Site(48.85, 2.35, 35, tz="Europe/Paris", name="Paris")
    night = sky.night_for(site, args.date)
    rng = np.random.default_rng(157)
    ra = rng.uniform(0, 360, args.pairs)
    dec = np.degrees(np.arcsin(rng.uniform(-1, 1, args.pairs)))
    sky.visibility(ra[:10], dec[:10], site, night)  # warm-up: IERS table, erfa, pandas
    t_setup = time.perf_counter() - t0

    times = []
    for _ in range(args.repeat):
        t = time.perf_counter()
        vis = sky.visibility(ra, dec, site, night)
        times.append(time.perf_counter() - t)
    t_ours = min(times)
    tracemalloc.start()
    sky.visibility(ra, dec, site, night)
    _, peak_ours = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    rss_ours_mb = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0

    from astropy import units as u
    from astropy.coordinates import AltAz, EarthLocation, SkyCoord
    from astropy.time import Time
    from astropy.utils import iers

    iers.conf.auto_download = False
    iers.conf.auto_max_age = None
    loc = EarthLocation.from_geodetic(site.lon_deg * u.deg, site.lat_deg * u.deg, site.elevation_m * u.m)
    grid = night.dark_start_utc + (night.dark_end_utc - night.dark_start_utc) // (args.steps - 1) * np.arange(args.steps)
    tracemalloc.start()
    t = time.perf_counter()
    frame = AltAz(obstime=Time(grid)[:, None], location=loc)
    aa = SkyCoord(ra * u.deg, dec * u.deg).transform_to(frame)
    alt_grid = aa.alt.deg
    t_base = time.perf_counter() - t
    _, peak_base = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    maxrss_mb = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0

    # sanity: the grid's best altitude never exceeds ours (ours is the true maximum in the window)
    excess = (np.nanmax(alt_grid, axis=0) - (vis["alt_best_deg"].to_numpy()
              - vis["refraction_arcmin"].fillna(0).to_numpy() / 60.0)).max()

    print(f"machine: {platform.processor() or platform.machine()}, {platform.system()} {platform.release()}, "
          f"python {platform.python_version()}, numpy {np.__version__}")
    print(f"pairs: {args.pairs:,}; site {site.name} {args.date}; dark window {night.dark_minutes / 60:.1f} h")
    print(f"set-up (night, ephemeris, IERS, first call): {t_setup:.2f} s")
    print(f"visibility (analytic, full): {t_ours:.3f} s (best of {args.repeat}; all: "
          f"{', '.join(f'{x:.3f}' for x in times)}); peak traced memory {peak_ours / 2**20:.0f} MB")
    print(f"astropy AltAz grid ({args.steps} steps): {t_base:.2f} s; peak traced memory {peak_base / 2**20:.0f} MB")
    print(f"ratio baseline / ours: {t_base / t_ours:.0f}x")
    print(f"max resident set size: {rss_ours_mb:.0f} MB after our part (includes python, numpy, pandas, "
          f"astropy, skyfield, IERS table); {maxrss_mb:.0f} MB after the baseline")
    print(f"check: grid max altitude minus our best geometric altitude, worst case: {excess * 3600:.1f} arcsec "
          f"(<= 0 expected up to arcsec-level noise)")
    print(f"observable: {vis['observable'].mean():.1%} of targets")


if __name__ == "__main__":
    main()
