"""Regenerate the shipped star-name index and the BSC5 bright pairs.

    python scripts/build_name_index.py PATH/bsc5.dat PATH/iau_star_names.txt

reads the Yale Bright Star Catalogue (5th revised ed., CDS V/50 ``catalog``
file) and the IAU Catalog of Star Names (IAU WGSN, CC BY 4.0), joins them with
the bundled ORB6 orbits and WDS rows, and writes
``catalogs_sample/star_index.npz`` and ``catalogs_sample/bsc5_pairs.csv``
(see docs/names.md).  Prints the counts and the time taken.
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))


def main(argv: list[str]) -> int:
    if len(argv) != 2:
        print(__doc__, file=sys.stderr)
        return 2
    t0 = time.perf_counter()
    from planner.catalogs.orb6 import read_orb6
    from planner.catalogs.wds import read_wds
    from planner.catalogs.names import write_index
    from planner.catalogs.starnames_build import build

    sample = ROOT / "catalogs_sample"
    orbits = read_orb6(sample / "orb6_orbits.txt")
    wds = read_wds(sample / "wds_summary_rows.txt")
    stars, pairs = build(argv[0], argv[1], orbits, wds)
    index = sample / "star_index.npz"
    write_index(index, stars)
    cols = ["wds_id", "discoverer", "components", "ra_deg", "dec_deg", "mag1", "mag2",
            "sep_last_arcsec", "pa_last_deg", "year_last", "spectral_type", "dm_id",
            "pm1_ra_masyr", "pm1_dec_masyr", "wds_join", "rule", "hr1", "hr2"]
    out = pairs[cols]
    (sample / "bsc5_pairs.csv").write_text(out.to_csv(index=False, float_format="%.6g",
                                                      lineterminator="\n"), encoding="utf-8")
    dt = time.perf_counter() - t0
    print(f"stars: {len(stars)} ({(stars['iau_name'] != '').sum()} with an IAU name); "
          f"IAU joins: {stars['name_join'].value_counts().to_dict()}")
    print(f"star WDS ids: {stars['wds_join'].value_counts().to_dict()}")
    print(f"BSC5 pairs: {len(pairs)} {pairs['rule'].value_counts().to_dict()}; "
          f"WDS ids: {pairs['wds_join'].value_counts().to_dict()}")
    print(f"{index.name}: {index.stat().st_size / 1024:.0f} KiB; "
          f"bsc5_pairs.csv: {(sample / 'bsc5_pairs.csv').stat().st_size / 1024:.0f} KiB; "
          f"built in {dt:.1f} s")
    return 0


if __name__ == "__main__":
    raise SystemExit(main(sys.argv[1:]))
