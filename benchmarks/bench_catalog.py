"""Catalogue loading speed: cold parse and cached reload of a WDS-sized file.

Writes a synthetic, format-conformant WDS summary file of 157,000 lines (the
size of the full USNO WDS) into a temporary directory -- it is not shipped --
then times ``read_wds`` (cold parse) and the cached reload through
:mod:`planner.catalogs.cache`.  Run by hand:

    python benchmarks/bench_catalog.py [n_lines]

Targets (issue 2): cold parse < 1.5 s, cached reload < 0.2 s on the 2-core
development machine.  Results go to docs/performance.md.
"""

from __future__ import annotations

import os
import platform
import sys
import tempfile
import time
from pathlib import Path

import numpy as np


def synthetic_wds(n: int, seed: int = 1) -> bytes:
    """``n`` WDS summary lines, 130 columns each, fields in the USNO layout
    (random but valid values; about 10 % with blank precise positions,
    5 % with magnitude flags, some blank proper motions)."""
    rng = np.random.default_rng(seed)
    ra_h = rng.uniform(0, 24, n)
    dec = rng.uniform(-89.9, 89.9, n)
    codes = np.array(["STF", "BU", "A", "HU", "COU", "STT", "HDS", "RST", "J", "ES"])
    out = []
    ra_cs = np.round(ra_h * 360000).astype(np.int64)  # hundredths of a second of time
    dec_ds = np.round(np.abs(dec) * 36000).astype(np.int64)  # tenths of an arcsecond
    for i in range(n):
        h, rest = divmod(int(ra_cs[i]), 360000)
        m = rest / 6000.0
        s = (rest % 6000) / 100.0
        dd, rest = divmod(int(dec_ds[i]), 36000)
        dm = rest / 600.0
        ds = (rest % 600) / 10.0
        sign = "-" if dec[i] < 0 else "+"
        wid = f"{h:02d}{int(m):02d}{int((m - int(m)) * 10)}{sign}{dd:02d}{int(dm):02d}"
        code = codes[i % len(codes)]
        num = str(1 + (i * 7) % 9999)
        disc = code.ljust(7 - len(num)) + num if len(code) + len(num) <= 7 else (code + num)[:7]
        comp = ["", "AB", "AC", "Aa,Ab", "BC"][i % 5]
        y1 = 1780 + i % 200
        y2 = min(2024, y1 + i % 60)
        nobs = 1 + i % 300
        pa1, pa2 = i % 360, (i * 3) % 360
        s1, s2 = 0.1 + (i % 997) / 10.0, 0.2 + (i % 991) / 10.0
        m1 = 4 + (i % 900) / 100.0
        m2 = m1 + (i % 500) / 100.0
        f1 = "K" if i % 20 == 0 else " "
        sp = ["A0V", "G2V", "K0III", "F5", "", "B9.5V+A0"][i % 6]
        pm = "" if i % 7 == 0 else f"{(i % 400) - 200:+04d}{(i % 300) - 150:+04d}"
        pm2 = "" if i % 3 else f"{(i % 200) - 100:+04d}{(i % 100) - 50:+04d}"
        dmid = f"{sign}{dd:02d} {i % 9999:4d}" if i % 4 else ""
        notes = ["", "N", "NX", "O", "V"][i % 5]
        pos = "" if i % 10 == 0 else f"{h:02d}{int(m):02d}{s:05.2f}{sign}{dd:02d}{int(dm):02d}{ds:04.1f}"
        line = (f"{wid}{disc:<7}{comp:<5} {y1:4d} {y2:4d} {nobs:4d} {pa1:3d} {pa2:3d} "
                f"{s1:5.1f} {s2:5.1f} {m1:5.2f}{f1}{m2:5.2f} {sp:<9} {pm:<8} {pm2:<8} "
                f"{dmid:<8} {notes:<4} {pos:<18}")
        assert len(line) == 130, (len(line), line)
        out.append(line)
    return ("\n".join(out) + "\n").encode("ascii")


def main(n: int = 157_000) -> None:
    import numpy
    import pandas

    from planner.catalogs import cache
    from planner.catalogs.wds import read_wds

    with tempfile.TemporaryDirectory() as tmp:
        os.environ["SPLITPLAN_HOME"] = str(Path(tmp) / "home")
        path = Path(tmp) / "wds_synthetic.txt"
        t0 = time.perf_counter()
        path.write_bytes(synthetic_wds(n))
        t_gen = time.perf_counter() - t0

        cold = []
        for _ in range(3):
            t0 = time.perf_counter()
            df = read_wds(path)
            cold.append(time.perf_counter() - t0)
        t0 = time.perf_counter()
        cache.store(path, "wds", df)
        t_store = time.perf_counter() - t0
        warm = []
        for _ in range(5):
            t0 = time.perf_counter()
            df2 = cache.load_cached(path, "wds")
            warm.append(time.perf_counter() - t0)
        assert df2 is not None and len(df2) == len(df)
        # the whole user-facing load: kind detection, cache, merge into a Catalog
        from planner.catalogs.catalog import load_catalog

        full = []
        for _ in range(3):
            t0 = time.perf_counter()
            cat = load_catalog(str(path))
            full.append(time.perf_counter() - t0)
        assert len(cat.pairs) == len(df)
        size = path.stat().st_size

    print(f"machine: {platform.machine()}, {os.cpu_count()} cores, Python {platform.python_version()}, "
          f"numpy {numpy.__version__}, pandas {pandas.__version__}")
    print(f"synthetic WDS file: {n} lines, {size / 1e6:.1f} MB (generated in {t_gen:.1f} s), "
          f"{len(df)} rows parsed, {len(df.attrs['problems'])} problems")
    print(f"cold parse (read_wds): best {min(cold):.3f} s, median {sorted(cold)[1]:.3f} s  (target < 1.5 s)")
    print(f"cache write: {t_store:.3f} s")
    print(f"cached reload: best {min(warm):.3f} s, median {sorted(warm)[2]:.3f} s  (target < 0.2 s)")
    print(f"load_catalog(path) with a warm cache (detect kind + reload + merge): "
          f"best {min(full):.3f} s, median {sorted(full)[1]:.3f} s")


if __name__ == "__main__":
    main(int(sys.argv[1]) if len(sys.argv) > 1 else 157_000)
