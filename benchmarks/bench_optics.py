"""Benchmark: judging a whole catalogue, and building the separability table.

Run by hand:  python benchmarks/bench_optics.py [--build]
Results go to docs/performance.md, section "Optics and verdict".
"""

from __future__ import annotations

import argparse
import platform
import time

import numpy as np
from _timing import best_and_median


def best_of(fn, repeat=5):
    return best_and_median(fn, repeat)


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--n", type=int, default=157_000)
    ap.add_argument("--build", action="store_true", help="also time a full table build (~40 s)")
    args = ap.parse_args()

    from planner.optics import Telescope, required_separation_arcsec
    from planner.optics.separability import build_table, load_table
    from planner.verdict import judge

    rng = np.random.default_rng(2026)
    n = args.n
    rho = rng.lognormal(np.log(3.0), 1.2, n)
    mag1 = rng.uniform(2, 10, n)
    mag2 = mag1 + rng.exponential(1.5, n)
    airmass = 1.0 / np.sin(np.radians(rng.uniform(15, 90, n)))
    sky = rng.uniform(18.5, 21.8, n)
    scope = Telescope(203, 0.33, 2032, "sct", (40, 25, 12, 8), 3.76)

    t0 = time.perf_counter()
    load_table()
    t_load = time.perf_counter() - t0
    print(f"machine: {platform.processor() or platform.machine()}, Python {platform.python_version()}")
    print(f"load shipped table (first call): {t_load * 1e3:.1f} ms")

    b, m = best_of(lambda: required_separation_arcsec(203, mag2 - mag1, 0.33, 2.0, airmass))
    print(f"required_separation_arcsec, {n} pairs: best {b * 1e3:.1f} ms, median {m * 1e3:.1f} ms")
    b, m = best_of(lambda: judge(rho, mag1, mag2, airmass, scope, 2.0, sky))
    print(f"judge, {n} pairs: best {b * 1e3:.1f} ms, median {m * 1e3:.1f} ms")

    if args.build:
        t0 = time.perf_counter()
        tab = build_table()
        print(f"full table build {tab['table'].shape}: {time.perf_counter() - t0:.1f} s")


if __name__ == "__main__":
    main()
