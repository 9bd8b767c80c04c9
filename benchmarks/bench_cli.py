"""Whole command line: wall time and peak memory of ``splitplan`` commands as an
observer runs them (a fresh process each time), and which libraries each
command imports.

Run by hand (not a test):

    python benchmarks/bench_cli.py [--runs 10] [--pairs 157000] [--no-hyperfine]

Commands timed (demo inputs of the README: 52.1873 N, 2.4127 W, 95 m,
Europe/London, 2026-12-05, 102 mm, seeing 1.5"):

* ``splitplan --help``
* ``splitplan pair STF2272AB``                       (target < 1.0 s wall, issue 7)
* ``splitplan catalog show``
* ``splitplan night DEMO`` on the bundled sample      (target < 2 s, issue 6)
* ``splitplan night DEMO --catalog synthetic.txt``    157,000 lines (target < 3 s, issue 6)
* ``splitplan apertures 60 80 102 127 152 203 254 305 DEMO``

Timing uses hyperfine (``apt-get install hyperfine``) when it is on the PATH
(``--shell=none``, one warm-up run, mean +- standard deviation, min and
max), else repeated ``subprocess.run`` with ``time.perf_counter`` (best and
median).  The user folders point at a temporary ``SPLITPLAN_HOME`` whose
catalogue parse cache is warmed first (the state after the first run on a
machine); the synthetic catalogue comes from ``bench_catalog.synthetic_wds``
(USNO layout, 130 columns) and is deleted afterwards.

Peak memory: the maximum resident set size of each command's own process,
from GNU ``/usr/bin/time -f %M`` (see :func:`peak_rss_mb`).

Compute: ``plan_night`` in-process on the full-size catalogue and, in the same
run, the astropy AltAz 48-step time-grid baseline over the same pairs and dark
window; the ratio is printed (``--no-compute`` skips it; it needs about 1 GB).

Imports: ``python -X importtime`` for ``import planner.cli`` (what ``--help``
pays) and for the ``pair`` command; the script lists the heavy libraries
(pandas, astropy, scipy, matplotlib, skyfield, astroquery) each one loads.
"""

from __future__ import annotations

import argparse
import importlib.util
import json
import os
import platform
import re
import shlex
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
DEMO = ["--lat", "52.1873", "--lon", "-2.4127", "--elevation", "95", "--tz", "Europe/London",
        "--date", "2026-12-05", "--aperture", "102", "--seeing", "1.5"]
DEMO_SITE = DEMO[:-4]
HEAVY = ("numpy", "pandas", "scipy", "astropy", "erfa", "matplotlib", "skyfield", "astroquery", "requests")


def splitplan() -> list[str]:
    exe = Path(sys.executable).with_name("splitplan")
    return [str(exe)] if exe.exists() else [sys.executable, "-m", "planner"]


def peak_rss_mb(argv: list[str], env: dict) -> tuple[float, float]:
    """(wall seconds, peak RSS in MB of this one child).

    GNU ``/usr/bin/time -f %M`` when present: it forks from a small process, so
    the figure is the command's own.  (``os.wait4`` from this Python would
    report at least this benchmark's own size: Linux keeps the high-water
    mark of the forked copy across ``exec``.)"""
    gnu_time = Path("/usr/bin/time")
    wrap = [str(gnu_time), "-f", "MAXRSS_KB=%M"] if gnu_time.exists() else []
    t = time.perf_counter()
    p = subprocess.Popen(wrap + argv, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, env=env)
    _, status, ru = os.wait4(p.pid, 0)
    wall = time.perf_counter() - t
    code = os.waitstatus_to_exitcode(status)
    err = p.stderr.read().decode(errors="replace") if p.stderr else ""
    if code != 0:
        raise SystemExit(f"{shlex.join(argv)} failed ({code}): {err.strip()}")
    m = re.search(r"MAXRSS_KB=(\d+)", err)
    return wall, (int(m.group(1)) if m else ru.ru_maxrss) / 1024.0


def cpu_name() -> str:
    try:
        for ln in Path("/proc/cpuinfo").read_text().splitlines():
            if ln.startswith("model name"):
                return ln.split(":", 1)[1].strip()
    except OSError:
        pass
    return platform.processor() or "unknown CPU"


def time_python(argv: list[str], env: dict, runs: int) -> dict:
    times = []
    for _ in range(runs):
        t = time.perf_counter()
        r = subprocess.run(argv, capture_output=True, env=env)
        times.append(time.perf_counter() - t)
        if r.returncode != 0:
            raise SystemExit(f"{shlex.join(argv)} failed: {r.stderr.decode(errors='replace').strip()}")
    return {"tool": "perf_counter", "best": min(times), "median": statistics.median(times),
            "mean": statistics.fmean(times), "max": max(times), "runs": runs}


def time_hyperfine(argv: list[str], env: dict, runs: int, tmp: Path) -> dict:
    out = tmp / "hf.json"
    cmd = ["hyperfine", "--shell=none", "--warmup", "1", "--runs", str(runs), "--style", "none",
           "--export-json", str(out), shlex.join(argv)]
    subprocess.run(cmd, check=True, env=env, stdout=subprocess.DEVNULL)
    r = json.loads(out.read_text())["results"][0]
    return {"tool": "hyperfine", "best": r["min"], "median": r["median"], "mean": r["mean"],
            "stddev": r["stddev"], "max": r["max"], "runs": len(r["times"])}


def import_profile(code_or_args: list[str], env: dict) -> tuple[float, list[str], list[tuple[float, str]]]:
    """Total import time (s), heavy top-level packages imported, the five slowest top-level imports."""
    r = subprocess.run([sys.executable, "-X", "importtime", *code_or_args], capture_output=True, text=True,
                       env=env)
    rows = []
    for ln in r.stderr.splitlines():
        m = re.match(r"import time:\s+(\d+) \|\s+(\d+) \|( *)(\S+)", ln)
        if m:
            rows.append((int(m.group(2)) / 1e6, len(m.group(3)), m.group(4)))
    top = [(c, name) for c, depth, name in rows if depth == 1]
    heavy = sorted({name.split(".")[0] for _, _, name in rows if name.split(".")[0] in HEAVY})
    return sum(c for c, _ in top), heavy, sorted(top, reverse=True)[:5]


def plan_compute_vs_grid(wds: Path, env: dict, runs: int, steps: int = 48) -> None:
    """In this process: ``plan_night`` on the full-size catalogue (compute only: the
    catalogue is loaded and the one-off tables are warm) and, in the same run, the
    astropy AltAz time-grid baseline of issue 4 (``steps`` instants across the same dark
    window, the same pair positions, altitudes only); their ratio; peak traced memory."""
    import tracemalloc

    import numpy as np

    os.environ["SPLITPLAN_HOME"] = env["SPLITPLAN_HOME"]
    from planner.catalogs import load_catalog
    from planner.plan.model import NightRequest
    from planner.plan.night import plan_night

    cat = load_catalog(str(wds))
    site = {"lat_deg": 52.1873, "lon_deg": -2.4127, "elevation_m": 95.0, "tz": "Europe/London"}

    def req():
        return NightRequest(site=dict(site), scopes=[{"aperture_mm": 102.0}], date="2026-12-05", seeing_arcsec=1.5)

    plan = plan_night(req(), catalog=cat)  # first call: one-off table loads
    ts = []
    for _ in range(runs):
        t = time.perf_counter()
        plan = plan_night(req(), catalog=cat)
        ts.append(time.perf_counter() - t)
    tracemalloc.start()
    plan_night(req(), catalog=cat)
    _, peak_ours = tracemalloc.get_traced_memory()
    tracemalloc.stop()

    from astropy import units as u
    from astropy.coordinates import AltAz, EarthLocation, SkyCoord
    from astropy.time import Time
    from astropy.utils import iers

    iers.conf.auto_download = False  # as bench_sky.py: offline, predictive IERS values of any age
    iers.conf.auto_max_age = None
    loc = EarthLocation.from_geodetic(site["lon_deg"] * u.deg, site["lat_deg"] * u.deg, site["elevation_m"] * u.m)
    t0, t1 = plan.night["dark_start_utc"], plan.night["dark_end_utc"]
    grid = t0 + (t1 - t0) // (steps - 1) * np.arange(steps)
    ra = cat.pairs["ra_deg"].to_numpy(float)
    dec = cat.pairs["dec_deg"].to_numpy(float)
    tracemalloc.start()
    t = time.perf_counter()
    SkyCoord(ra * u.deg, dec * u.deg).transform_to(AltAz(obstime=Time(grid)[:, None], location=loc)).alt.deg
    t_grid = time.perf_counter() - t
    _, peak_grid = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    best = min(ts)
    print(f"plan_night in-process, {len(cat.pairs):,} pairs (geometry, visibility, verdict, schedule): "
          f"best {best:.3f} s, median {statistics.median(ts):.3f} s of {runs}; peak traced memory "
          f"{peak_ours / 2**20:.0f} MB")
    print(f"astropy AltAz grid baseline, same pairs, {steps} steps over the same dark window, altitudes only: "
          f"{t_grid:.2f} s; peak traced memory {peak_grid / 2**20:.0f} MB")
    print(f"ratio baseline / plan_night: {t_grid / best:.1f}x")


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--runs", type=int, default=10)
    ap.add_argument("--pairs", type=int, default=157_000)
    ap.add_argument("--no-hyperfine", action="store_true")
    ap.add_argument("--no-compute", action="store_true", help="skip the in-process plan_night vs astropy grid part")
    a = ap.parse_args()
    use_hf = shutil.which("hyperfine") is not None and not a.no_hyperfine

    spec = importlib.util.spec_from_file_location("bench_catalog", HERE / "bench_catalog.py")
    bc = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(bc)

    import numpy
    import pandas

    print(f"machine: {platform.machine()}, {os.cpu_count()} cores, {cpu_name()}; "
          f"Python {platform.python_version()}, numpy {numpy.__version__}, pandas {pandas.__version__}; "
          f"load average {os.getloadavg()[0]:.2f}; timing by {'hyperfine' if use_hf else 'perf_counter'}")
    with tempfile.TemporaryDirectory() as tmpd:
        tmp = Path(tmpd)
        env = dict(os.environ, SPLITPLAN_HOME=str(tmp / "home"), MPLBACKEND="Agg")
        env.pop("SPLITPLAN_DEBUG", None)
        wds = tmp / "synthetic_wds.txt"
        wds.write_bytes(bc.synthetic_wds(a.pairs))
        sp = splitplan()
        cmds = [
            ("splitplan --help", ["--help"], None),
            ("splitplan pair STF2272AB", ["pair", "STF2272AB"], 1.0),
            ("splitplan catalog show", ["catalog", "show"], None),
            ("splitplan night (sample)", ["night", *DEMO], 2.0),
            (f"splitplan night ({a.pairs:,} pairs)", ["night", *DEMO, "--catalog", str(wds)], 3.0),
            ("splitplan apertures 60..305 (8 sizes)",
             ["apertures", "60", "80", "102", "127", "152", "203", "254", "305", *DEMO_SITE, "--seeing", "1.5"], None),
        ]
        # warm the parse caches (sample and synthetic) once, and time the cold full-size run
        subprocess.run(sp + ["catalog", "show"], check=True, env=env, capture_output=True)
        cold, cold_rss = peak_rss_mb(sp + cmds[4][1], env)
        results = []
        for label, args, target in cmds:
            argv = sp + args
            t = time_hyperfine(argv, env, a.runs, tmp) if use_hf else time_python(argv, env, a.runs)
            _, rss = peak_rss_mb(argv, env)
            results.append((label, t, rss, target))
        print()
        print("| command | best | median | mean +- sd | peak RSS | target | met |")
        print("|---|---|---|---|---|---|---|")
        for label, t, rss, target in results:
            sd = f" +- {t['stddev']:.2f}" if "stddev" in t else ""
            met = "" if target is None else ("yes" if t["median"] < target else "no")
            tg = "" if target is None else f"< {target:g} s"
            print(f"| `{label}` | {t['best']:.2f} s | {t['median']:.2f} s | {t['mean']:.2f}{sd} s | "
                  f"{rss:.0f} MB | {tg} | {met} |")
        print(f"| `splitplan night ({a.pairs:,} pairs)` first run, cold parse + cache write | {cold:.2f} s | | | "
              f"{cold_rss:.0f} MB | | |")
        print()
        for label, args in (("import planner.cli (what --help pays)", ["-c", "import planner.cli; planner.cli.command_tree()"]),
                            ("splitplan pair STF2272AB", ["-m", "planner", "pair", "STF2272AB"]),
                            ("splitplan night (sample)", ["-m", "planner", "night", *DEMO])):
            total, heavy, top = import_profile(args, env)
            print(f"imports, {label}: {total:.3f} s in top-level imports; heavy packages: "
                  f"{', '.join(heavy) or 'none'}; slowest: "
                  + ", ".join(f"{n} {c:.3f} s" for c, n in top))
        if not a.no_compute:
            print()
            plan_compute_vs_grid(wds, env, max(3, a.runs // 2))


if __name__ == "__main__":
    main()
