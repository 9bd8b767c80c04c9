"""Start-up cost of the command line: wall time of ``splitplan --help`` and of
``splitplan pair STF2272AB`` (and the pair verdict with a site), each a fresh
process, as an observer runs them.

Run by hand (not a test):

    python benchmarks/bench_startup.py [--runs 15] [--label before]

Times each command ``--runs`` times with ``subprocess.run`` and
``time.perf_counter`` after one warm-up run (which also fills the catalogue
parse cache in a temporary ``SPLITPLAN_HOME``) and prints best and median
wall time and the median CPU time (user + system) as a Markdown table row, plus the heavy libraries each command
imports (``python -X importtime``).  Results go to docs/performance.md.
"""

from __future__ import annotations

import argparse
import os
import re
import resource
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

SITE = ["--lat", "52.1873", "--lon", "-2.4127", "--tz", "Europe/London", "--date", "2026-12-05",
        "--aperture", "102", "--seeing", "1.5"]
COMMANDS = [
    ("splitplan --help", ["--help"]),
    ("splitplan pair STF2272AB", ["pair", "STF2272AB"]),
    ("splitplan pair STF2272AB with a site and 102 mm", ["pair", "STF2272AB", *SITE]),
]
HEAVY = ("numpy", "pandas", "scipy", "astropy", "erfa", "matplotlib", "skyfield", "typer", "click", "pydantic")


def entry() -> list[str]:
    exe = Path(sys.executable).with_name("splitplan")
    return [str(exe)] if exe.exists() else [sys.executable, "-m", "planner"]


def _cpu() -> float:
    r = resource.getrusage(resource.RUSAGE_CHILDREN)
    return r.ru_utime + r.ru_stime


def time_runs(argv: list[str], env: dict, runs: int) -> tuple[list[float], list[float]]:
    """Wall seconds and CPU seconds (user + system, of the child) of each run.  On a
    shared, loaded machine the CPU time is the steadier figure."""
    subprocess.run(argv, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, env=env, check=False)
    wall, cpu = [], []
    for _ in range(runs):
        t, c = time.perf_counter(), _cpu()
        subprocess.run(argv, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, env=env, check=False)
        wall.append(time.perf_counter() - t)
        cpu.append(_cpu() - c)
    return wall, cpu


def heavy_imports(args: list[str], env: dict) -> list[str]:
    code = f"import sys; from planner.cli import main; sys.argv = ['splitplan', *{args!r}]; main()"
    r = subprocess.run([sys.executable, "-X", "importtime", "-c", code], capture_output=True, text=True,
                       env=env, check=False)
    found = set()
    for line in r.stderr.splitlines():
        m = re.match(r"import time:\s+\d+ \|\s+\d+ \|\s*(\S+)", line)
        if m and m.group(1).split(".")[0] in HEAVY:
            found.add(m.group(1).split(".")[0])
    return sorted(found)


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--runs", type=int, default=15)
    ap.add_argument("--label", default="")
    a = ap.parse_args()
    with tempfile.TemporaryDirectory() as home:
        env = dict(os.environ, SPLITPLAN_HOME=home, MPLBACKEND="Agg")
        print(f"{a.label}: {a.runs} runs each, load average {os.getloadavg()[0]:.2f}")
        print("| command | wall best | wall median | CPU median | heavy imports |")
        print("|---|---|---|---|---|")
        for name, args in COMMANDS:
            ts, cpu = time_runs(entry() + args, env, a.runs)
            libs = ", ".join(heavy_imports(args, env)) or "none"
            print(f"| `{name}` | {min(ts):.3f} s | {statistics.median(ts):.3f} s | "
                  f"{statistics.median(cpu):.3f} s | {libs} |")


if __name__ == "__main__":
    main()
