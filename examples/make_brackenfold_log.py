"""Write examples/brackenfold-log.json: an INVENTED observation log of the demo club.

Everything this script makes up is invented for the documentation: the Brackenfold Valley
Stargazers do not exist, nobody made these observations, and the results are drawn at
random (fixed seed) from a made-up curve -- the 102 mm refractor splits half the time at
1.15 x the model limit, the 8-inch Dobsonian at 1.30 x.  The pairs, their separations and
the circumstances (altitude, airmass, limit) are the planner's real computations for the
bundled USNO sample at the fictional field on the invented evenings.

Run from the repository root:  python examples/make_brackenfold_log.py
"""

from __future__ import annotations

import json
import math
import sys
import tempfile
from pathlib import Path

import numpy as np

HERE = Path(__file__).resolve().parent
OUT = HERE / "brackenfold-log.json"
SITE = {"lat_deg": 52.1873, "lon_deg": -2.4127, "elevation_m": 95.0, "tz": "Europe/London"}
SITE_NAME = "Brackenfold Common (fictional)"
#: (scope name, aperture, obstruction, invented 50 % point x model limit, invented steepness)
SCOPES = [("Loan 102 mm refractor", 102.0, 0.0, 1.15, 11.0),
          ("Club 8-inch Dobsonian", 203.0, 0.22, 1.30, 9.0)]
#: invented evenings (local time 21:00 to 01:00) and the seeing noted
NIGHTS = [("2026-09-12", 1.6), ("2026-09-26", 2.2), ("2026-10-10", 1.4), ("2026-10-17", 1.9),
          ("2026-11-07", 1.7), ("2026-11-21", 2.4), ("2026-12-05", 1.8), ("2026-12-12", 1.5)]
PER_SESSION = 8
ABOUT = ("INVENTED demo data: an observation log of the fictional Brackenfold Valley Stargazers, "
         "made up for the documentation by examples/make_brackenfold_log.py (results drawn at random "
         "from an invented curve). Not real observations.")


def main() -> None:
    import os

    from scipy.special import expit

    tmp = tempfile.mkdtemp()
    os.environ["SPLITPLAN_HOME"] = tmp  # never touch the real log
    from planner.catalogs import load_catalog
    from planner.config.logbook import Logbook, export_text
    from planner.optics.telescope import Telescope
    from planner.plan.observations import record_many
    from planner.plan.observed import circumstances
    from planner.sky.site import Site

    rng = np.random.default_rng(20261205)
    cat = load_catalog("sample")
    site = Site.from_mapping(SITE, SITE_NAME)
    labels = list(cat.pairs.index)
    log = Logbook(Path(tmp) / "demo.sqlite3")
    for date, seeing in NIGHTS:
        for name, ap, obs, m50, k in SCOPES:
            tel = Telescope(aperture_mm=ap, obstruction=obs, name=name)
            minutes = int(rng.integers(21 * 60, 24 * 60 + 30))
            when = np.datetime64(_to_utc(date, minutes, SITE["tz"]), "ns")
            circ = circumstances(cat, labels, site, tel, when, seeing)
            pick = [i for i, c in enumerate(circ) if c["margin"] is not None and c["alt_deg"] > 25
                    and 0.55 < c["margin"] < 2.4]
            # spread the attempts over the margins, as an observer working near the limit would
            chosen = []
            for target in np.exp(rng.uniform(math.log(0.6), math.log(2.2), PER_SESSION)):
                free = [i for i in pick if i not in chosen]
                if free:
                    chosen.append(min(free, key=lambda i: abs(math.log(circ[i]["margin"] / target))))
            items = []
            for i in sorted(chosen):
                c = circ[i]
                seen = c["mag_limit"] is None or c["mag_faint"] is None or \
                    rng.uniform() < expit((c["mag_limit"] - c["mag_faint"]) / 0.3)
                ok = rng.uniform() < expit(k * (math.log(c["margin"]) - math.log(m50)))
                if not seen:
                    result = "unseen"
                elif ok:
                    result = "clean" if c["margin"] > 1.35 * m50 else "split"
                else:
                    result = "round" if c["margin"] < 0.8 * m50 else rng.choice(["notched", "elongated"])
                typed = f"{c['discoverer'] or c['wds_id']}{(' ' + c['components']) if c['components'] else ''}"
                items.append({"label": labels[i], "query": typed, "result": str(result),
                              "when": str(np.datetime_as_string(when, unit="s")) + "Z",
                              "note": "invented demo entry"})
            record_many(log, items, site=SITE, telescope={"aperture_mm": ap, "obstruction": obs},
                        seeing_arcsec=seeing, site_name=SITE_NAME, scope_name=name, catalog=cat)
    entries = log.entries()
    log.close()
    doc = json.loads(export_text(entries, "json"))
    doc = {"about": ABOUT, **doc}
    OUT.write_text(json.dumps(doc, indent=1, ensure_ascii=False) + "\n", encoding="utf-8")
    print(f"wrote {OUT} ({len(entries)} invented entries)", file=sys.stderr)


def _to_utc(date: str, minutes: int, tz: str) -> str:
    """``minutes`` after local midnight starting ``date`` (the evening), as UTC text."""
    import datetime as dt
    from zoneinfo import ZoneInfo

    local = dt.datetime.fromisoformat(date) + dt.timedelta(minutes=minutes)
    t = local.replace(tzinfo=ZoneInfo(tz)).astimezone(dt.timezone.utc)
    return t.strftime("%Y-%m-%dT%H:%M:%S")


if __name__ == "__main__":
    main()
