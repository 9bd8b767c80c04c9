"""Write the recorded-VizieR-reply fixtures used by tests/test_catalog_vizier.py.

Run once by hand from the repository root:  python tests/data/make_vizier_fixtures.py

The rows are real catalogue data taken from the bundled USNO sample
(catalogs_sample/): the three WDS summary rows and 40 ORB6 orbit lines (the
first 30 plus ten rows with quirks).  They are laid out as a VizieR VOTable
reply would be, with the column labels planner/catalogs/vizier.py expects.
Only the B/wds/wds labels WDS, Disc, Comp, pa2, sep2, mag1, mag2, SpType,
pmRA1, pmDE1, RAJ2000, DEJ2000 are seen in public code that queries VizieR;
the other labels and the ORB6 table name are unconfirmed (see docs/catalogs.md).
Values are copied from the text by column, as strings or numbers, in the
catalogue's own units (ORB6 unit codes kept in u_* columns).
"""

from pathlib import Path

import numpy as np
from astropy.io.votable import from_table
from astropy.table import MaskedColumn, Table

ROOT = Path(__file__).resolve().parents[2]
HERE = Path(__file__).resolve().parent


def _f(s):
    s = s.strip()
    return np.nan if s in ("", ".") else float(s)


def _col(values, name, kind):
    if kind == "f":
        arr = np.array([_f(v) for v in values])
        return MaskedColumn(arr, name=name, mask=np.isnan(arr))
    return MaskedColumn([v.strip() for v in values], name=name, dtype=object)


def write(table, name, path):
    vot = from_table(table)
    vot.get_first_table().name = name
    vot.to_xml(str(path))


def wds():
    lines = (ROOT / "catalogs_sample" / "wds_summary_rows.txt").read_text().splitlines()
    lines = [ln.ljust(130) for ln in lines if ln.strip()]
    spec = [("WDS", 1, 10, "s"), ("Disc", 11, 17, "s"), ("Comp", 18, 22, "s"),
            ("Obs1", 24, 27, "f"), ("Obs2", 29, 32, "f"), ("Nobs", 34, 37, "f"),
            ("pa1", 39, 41, "f"), ("pa2", 43, 45, "f"), ("sep1", 47, 51, "f"),
            ("sep2", 53, 57, "f"), ("mag1", 59, 63, "f"), ("mag2", 65, 69, "f"),
            ("SpType", 71, 79, "s"), ("pmRA1", 81, 84, "f"), ("pmDE1", 85, 88, "f"),
            ("pmRA2", 90, 93, "f"), ("pmDE2", 94, 97, "f"), ("DM", 99, 106, "s"),
            ("Notes", 108, 111, "s")]
    t = Table([_col([ln[a - 1:b] for ln in lines], name, k) for name, a, b, k in spec])
    pos = [ln[112:130] for ln in lines]
    t["RAJ2000"] = [f"{p[0:2]} {p[2:4]} {p[4:9]}" for p in pos]
    t["DEJ2000"] = [f"{p[9:12]} {p[12:14]} {p[14:18]}" for p in pos]
    write(t, "B/wds/wds", HERE / "vizier_wds_reply.vot")


def orb6():
    raw = (ROOT / "catalogs_sample" / "orb6_orbits.txt").read_text().splitlines()
    data = raw[7:]
    refs = ("Bod2005a", "Bod2006", "Zha2007", "Ghe2003", "Hop1967", "Rmn1994")
    pick = data[:30] + [ln for ln in data[30:] if ln[237:245].strip() in refs
                        or "02130+0851" in ln[19:29]][:10]
    spec = [("WDS", 20, 29, "s"), ("Disc", 31, 44, "s"), ("ADS", 46, 50, "f"),
            ("HD", 52, 58, "s"), ("HIP", 59, 65, "s"), ("mag1", 67, 71, "f"),
            ("n_mag1", 72, 72, "s"), ("mag2", 74, 78, "f"), ("n_mag2", 79, 79, "s"),
            ("Per", 81, 92, "f"), ("u_Per", 93, 93, "s"), ("e_Per", 94, 104, "f"),
            ("Axis", 105, 114, "f"), ("u_Axis", 115, 115, "s"), ("e_Axis", 116, 124, "f"),
            ("Incl", 125, 133, "f"), ("e_Incl", 134, 142, "f"), ("Node", 143, 151, "f"),
            ("n_Node", 152, 152, "s"), ("e_Node", 153, 161, "f"), ("T0", 162, 174, "f"),
            ("u_T0", 175, 175, "s"), ("e_T0", 176, 186, "f"), ("e", 187, 195, "f"),
            ("e_e", 196, 204, "f"), ("omega", 205, 213, "f"), ("n_omega", 214, 214, "s"),
            ("e_omega", 215, 222, "f"), ("Eq", 223, 227, "f"), ("Last", 228, 232, "f"),
            ("Grade", 233, 235, "f"), ("n_WDS", 236, 236, "s"), ("Ref", 238, 245, "s"),
            ("Png", 247, 264, "s")]
    t = Table([_col([ln[a - 1:b] for ln in pick], name, k) for name, a, b, k in spec])
    t["RAJ2000"] = [f"{ln[0:2]} {ln[2:4]} {ln[4:9]}" for ln in pick]
    t["DEJ2000"] = [f"{ln[9:12]} {ln[12:14]} {ln[14:18]}" for ln in pick]
    write(t, "B/orb6/orb6orbits", HERE / "vizier_orb6_reply.vot")


if __name__ == "__main__":
    wds()
    orb6()
