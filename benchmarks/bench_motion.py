"""Benchmark: orbit ephemerides for the whole ORB6 visual sample.

Run by hand:  python benchmarks/bench_motion.py
Figures go to docs/performance.md, section "Orbit ephemerides".

Measures (best of several repeats, wall clock):
1. orbit_grid: all 1,595 complete visual orbits (grade 1-5) of the bundled
   ORB6 file at 100 epochs each (159,500 positions), one vectorised call;
2. orbit_positions on the same 159,500 (orbit, epoch) rows given as one long
   table (per-row epochs);
3. pair_geometry on the whole bundled sample at one date;
4. the Kepler solver alone on 1,000,000 random (M, e) with e up to 0.999.
"""

from __future__ import annotations

import platform

import numpy as np
from _timing import best_and_median


def best(fn, repeat=7):
    return best_and_median(fn, repeat)


def main() -> None:
    import pandas as pd

    from planner.catalogs import load_sample
    from planner.motion import orbit_grid, orbit_positions, pair_geometry
    from planner.motion.kepler import solve_kepler

    cat = load_sample()
    o = cat.orbits
    vis = o[o["complete"].astype(bool) & o["grade"].between(1, 5)].reset_index(drop=True)
    epochs = np.linspace(2000.0, 2050.0, 100)
    print(f"machine: {platform.processor() or platform.machine()}, Python {platform.python_version()}, "
          f"numpy {np.__version__}, pandas {pd.__version__}")
    print(f"visual orbits: {len(vis)}; epochs: {len(epochs)}")

    b, m = best(lambda: orbit_grid(vis, epochs))
    print(f"orbit_grid {len(vis)} x {len(epochs)}: best {b * 1e3:.1f} ms, median {m * 1e3:.1f} ms")

    long = vis.loc[vis.index.repeat(len(epochs))].reset_index(drop=True)
    t_long = np.tile(epochs, len(vis))
    b, m = best(lambda: orbit_positions(long, t_long))
    print(f"orbit_positions {len(long)} rows: best {b * 1e3:.1f} ms, median {m * 1e3:.1f} ms")

    b, m = best(lambda: pair_geometry(cat, 2026.5))
    print(f"pair_geometry {len(cat.pairs)} pairs / {len(o)} orbits: best {b * 1e3:.1f} ms, median {m * 1e3:.1f} ms")

    rng = np.random.default_rng(0)
    M = rng.uniform(-100, 100, 1_000_000)
    e = rng.uniform(0, 0.999, M.size)
    b, m = best(lambda: solve_kepler(M, e), repeat=3)
    print(f"solve_kepler 1e6: best {b * 1e3:.0f} ms, median {m * 1e3:.0f} ms")


if __name__ == "__main__":
    main()
