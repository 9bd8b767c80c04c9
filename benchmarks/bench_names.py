"""Star names: cost of the offline name index (run by hand, never by the tests).

    python benchmarks/bench_names.py [--runs 7]

Measures, with the demo inputs of the README (52.1873 N, 2.4127 W, 95 m, Europe/London,
2026-12-05, 102 mm, seeing 1.5") and a temporary ``SPLITPLAN_HOME`` whose catalogue cache
is warmed first:

* reading the shipped index (``planner.catalogs.names.load_index``) in a fresh process;
* ``find_pairs`` for observer names on the bundled catalogue (warm, in-process);
* ``splitplan pair NAME`` wall time, a fresh process each run (target < 0.5 s, issue 10),
  next to ``splitplan pair STF2272AB`` (no name index needed);
* what the names add to a warm ``night``: ``plan_night`` in-process with the names
  (``planner.plan.night.add_names``) and with them switched off, and the index read
  (target < 30 ms added, issue 10).
"""

from __future__ import annotations

import argparse
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
from _timing import best_and_median  # noqa: E402

NAMES = ["Albireo", "eps Lyr", "70 Oph", "HD 165341", "zeta Her", "Mizar", "ε¹ Lyr", "Albiero"]


def fresh_load_ms(runs: int) -> list[float]:
    code = ("import time, numpy; t=time.perf_counter(); import planner.catalogs.names as n; "
            "n.load_index(); print((time.perf_counter()-t)*1000)")
    out = []
    for _ in range(runs):
        r = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
        out.append(float(r.stdout.strip()))
    return out


def cli_wall(args: list[str], runs: int, env) -> tuple[float, float]:
    exe = Path(sys.executable).with_name("splitplan")
    times = []
    for _ in range(runs + 1):
        t0 = time.perf_counter()
        subprocess.run([str(exe), *args], capture_output=True, env=env)
        times.append(time.perf_counter() - t0)
    times = times[1:]  # first run warms the caches
    return min(times), statistics.median(times)


def main() -> int:
    ap = argparse.ArgumentParser()
    ap.add_argument("--runs", type=int, default=7)
    a = ap.parse_args()
    home = tempfile.mkdtemp(prefix="splitplan-bench-")
    os.environ["SPLITPLAN_HOME"] = home
    env = dict(os.environ)

    loads = fresh_load_ms(a.runs)
    print(f"index read, fresh process: best {min(loads):.1f} ms, median {statistics.median(loads):.1f} ms")

    from planner.catalogs import find_pairs, load_sample
    from planner.errors import UnknownPairError

    cat = load_sample()

    def look():
        for q in NAMES:
            try:
                find_pairs(cat, q)
            except UnknownPairError:
                pass

    look()
    b, m = best_and_median(look, a.runs)
    print(f"find_pairs, {len(NAMES)} names, warm: best {b * 1000:.1f} ms, median {m * 1000:.1f} ms "
          f"({m * 1000 / len(NAMES):.2f} ms per name)")

    for args in (["pair", "Albireo"], ["pair", "eps Lyr"], ["pair", "STF2272AB"]):
        b, m = cli_wall(args, a.runs, env)
        print(f"splitplan {' '.join(args)}: best {b:.3f} s, median {m:.3f} s wall")

    from planner.plan import night as nightmod
    from planner.plan.model import NightRequest

    req = NightRequest(site={"lat_deg": 52.1873, "lon_deg": -2.4127, "elevation_m": 95.0,
                             "tz": "Europe/London"},
                       scopes=[{"name": "102 mm", "aperture_mm": 102.0, "obstruction": 0.0}],
                       date="2026-12-05", seeing_arcsec=1.5)
    nightmod.plan_night(req, cat)  # warm
    b1, m1 = best_and_median(lambda: nightmod.plan_night(req, cat), a.runs)
    real = nightmod.add_names
    nightmod.add_names = lambda catalog, sched: sched
    try:
        b0, m0 = best_and_median(lambda: nightmod.plan_night(req, cat), a.runs)
    finally:
        nightmod.add_names = real
    plan = nightmod.plan_night(req, cat)
    sched = plan.scopes[0].schedule
    from planner.catalogs import pair_names

    bn, mn = best_and_median(lambda: pair_names(cat, rows=sched), a.runs)
    print(f"warm night plan_night: with names best {b1 * 1000:.0f} ms / median {m1 * 1000:.0f} ms; "
          f"without best {b0 * 1000:.0f} ms / median {m0 * 1000:.0f} ms")
    print(f"names of the {len(sched)} scheduled pairs (pair_names): best {bn * 1000:.1f} ms, "
          f"median {mn * 1000:.1f} ms; plus the index read once per process (above)")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
