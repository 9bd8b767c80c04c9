"""Night-plan speed: ``splitplan night`` with the demo inputs, on the bundled sample
and on a 157,000-pair synthetic WDS catalogue.

Run by hand (not a test):

    python benchmarks/bench_plan.py [--runs 3] [--pairs 157000]

Each figure is the wall-clock time of a whole command (a fresh process, as
the observer runs it: interpreter start, imports, catalogue load, plan,
output), best and median of ``--runs``; peak resident memory of the child
from ``resource.getrusage(RUSAGE_CHILDREN)``.  The synthetic catalogue is
written by ``benchmarks/bench_catalog.py``'s generator (USNO layout, 130
columns per line) into a temporary folder and deleted afterwards; its first
run parses the file cold and fills the parse cache, later runs read the
cache.  A third line times the library call ``plan_night`` in-process
(imports and the catalogue already loaded) to separate compute from start-up.

Targets (issue 6): sample < 2 s wall; 157,000 pairs < 3 s wall.
"""

from __future__ import annotations

import argparse
import importlib.util
import os
import platform
import resource
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
DEMO = ["--lat", "52.1873", "--lon", "-2.4127", "--elevation", "95", "--tz", "Europe/London",
        "--date", "2026-12-05", "--aperture", "102", "--seeing", "1.5"]


def _splitplan() -> list[str]:
    exe = Path(sys.executable).with_name("splitplan")
    return [str(exe)] if exe.exists() else [sys.executable, "-m", "planner.cli"]


def run_cmd(args, runs, env):
    times = []
    for _ in range(runs):
        t = time.perf_counter()
        r = subprocess.run(_splitplan() + args, capture_output=True, text=True, env=env)
        times.append(time.perf_counter() - t)
        if r.returncode != 0:
            raise SystemExit(f"command failed: {r.stderr.strip()}")
    rss_mb = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss / 1024
    return min(times), statistics.median(times), rss_mb, r.stdout


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--runs", type=int, default=3)
    ap.add_argument("--pairs", type=int, default=157_000)
    a = ap.parse_args()
    spec = importlib.util.spec_from_file_location("bench_catalog", HERE / "bench_catalog.py")
    bc = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(bc)
    print(f"machine: {platform.machine()}, {os.cpu_count()} cores, Python {platform.python_version()}")
    with tempfile.TemporaryDirectory() as tmp:
        env = dict(os.environ, SPLITPLAN_HOME=str(Path(tmp) / "home"), MPLBACKEND="Agg")
        # warm the sample's parse cache once (as after the first run on a machine)
        run_cmd(["catalog", "show"], 1, env)
        best, med, rss, out = run_cmd(["night", *DEMO], a.runs, env)
        n = sum(1 for ln in out.splitlines() if ln[3:5].strip().isdigit() and ":" in ln[6:12])
        print(f"sample, text output:        best {best:.2f} s  median {med:.2f} s  (rows {n})")
        html = Path(tmp) / "demo.html"
        best, med, rss, _ = run_cmd(["night", *DEMO, "--out", str(html)], a.runs, env)
        print(f"sample, with --out .html:   best {best:.2f} s  median {med:.2f} s")
        wds = Path(tmp) / "synthetic_wds.txt"
        wds.write_bytes(bc.synthetic_wds(a.pairs))
        t = time.perf_counter()
        b1, _, _, _ = run_cmd(["night", *DEMO, "--catalog", str(wds)], 1, env)
        print(f"{a.pairs} pairs, first run (cold parse + cache): {b1:.2f} s")
        best, med, rss, out = run_cmd(["night", *DEMO, "--catalog", str(wds)], a.runs, env)
        print(f"{a.pairs} pairs, cached:     best {best:.2f} s  median {med:.2f} s  peak RSS {rss:.0f} MB")
        # library call, in-process (compute only)
        os.environ["SPLITPLAN_HOME"] = env["SPLITPLAN_HOME"]
        from planner.catalogs import load_catalog
        from planner.plan.model import NightRequest
        from planner.plan.night import plan_night

        for label, cat_spec in (("sample", "sample"), (f"{a.pairs} pairs", str(wds))):
            cat = load_catalog(cat_spec)
            req = lambda: NightRequest(site={"lat_deg": 52.1873, "lon_deg": -2.4127, "elevation_m": 95.0,  # noqa: E731
                                             "tz": "Europe/London"}, scopes=[{"aperture_mm": 102.0}],
                                       date="2026-12-05", seeing_arcsec=1.5)
            plan_night(req(), catalog=cat)  # first call pays one-off table loads
            ts = []
            for _ in range(a.runs):
                t = time.perf_counter()
                plan_night(req(), catalog=cat)
                ts.append(time.perf_counter() - t)
            print(f"plan_night in-process, {label}: best {min(ts):.2f} s  median {statistics.median(ts):.2f} s")


if __name__ == "__main__":
    main()
