"""The project's table schemas: one place for every column name, unit and meaning.

Two tables flow out of :mod:`planner.catalogs`:

* the **pair table** -- one row per catalogued pair (a WDS line, or an ORB6
  system that has no WDS line loaded);
* the **orbit table** -- one row per ORB6 orbit (a pair may have several).

Names carry their unit as a suffix (``_deg``, ``_arcsec``, ``_yr``, ``_masyr``).
Missing catalogue values are ``NaN`` (numbers) or ``""`` (text): nothing is
ever filled in that the catalogue does not carry.

``docs/schema.md`` is generated from these lists (``python -m planner.schema``),
so the documentation cannot drift from the code.
"""

from __future__ import annotations

import math
from typing import NamedTuple


class Column(NamedTuple):
    name: str
    dtype: str  # "float", "int" (nullable Int64), "str", "bool"
    unit: str
    meaning: str


#: Columns of the pair table.  The first fourteen are fixed by the project's
#: contract; the rest are carried where the source catalogue has them.
PAIR_COLUMNS: tuple[Column, ...] = (
    Column("wds_id", "str", "", "WDS designation HHMMm+DDMM (J2000 position to 0.1 min of RA, 1' of Dec)"),
    Column("discoverer", "str", "", "discoverer code and number, normalised to single spaces, e.g. 'STF 2272'"),
    Column("components", "str", "", "component letters of the pair, e.g. 'AB', 'Aa,Ab'; '' for a plain pair"),
    Column("ra_deg", "float", "deg", "right ascension of the primary, ICRS/J2000"),
    Column("dec_deg", "float", "deg", "declination of the primary, ICRS/J2000"),
    Column("mag1", "float", "mag", "magnitude of the primary (usually V)"),
    Column("mag2", "float", "mag", "magnitude of the secondary"),
    Column("sep_first_arcsec", "float", "arcsec", "separation at the first catalogued measure"),
    Column("sep_last_arcsec", "float", "arcsec", "separation at the last catalogued measure"),
    Column("pa_first_deg", "float", "deg", "position angle (north through east) at the first measure"),
    Column("pa_last_deg", "float", "deg", "position angle at the last measure"),
    Column("year_first", "float", "yr", "year of the first measure"),
    Column("year_last", "float", "yr", "year of the last measure (ORB6-only rows: last observation used by the orbit)"),
    Column("n_obs", "float", "", "number of measures in the WDS"),
    # -- carried where present ------------------------------------------------
    Column("mag1_flag", "str", "", "flag beside the primary magnitude ('>' fainter than, '<' brighter than, 'v' variable, 'k' infrared, '?' uncertain)"),
    Column("mag2_flag", "str", "", "flag beside the secondary magnitude (same codes)"),
    Column("spectral_type", "str", "", "spectral type(s) as catalogued"),
    Column("pm1_ra_masyr", "float", "mas/yr", "proper motion of the primary in RA (mu_alpha* = mu_alpha cos dec), WDS units from memory"),
    Column("pm1_dec_masyr", "float", "mas/yr", "proper motion of the primary in Dec"),
    Column("pm2_ra_masyr", "float", "mas/yr", "proper motion of the secondary in RA"),
    Column("pm2_dec_masyr", "float", "mas/yr", "proper motion of the secondary in Dec"),
    Column("dm_id", "str", "", "Durchmusterung number (BD/CD/CPD)"),
    Column("note_flags", "str", "", "WDS note codes"),
    Column("coord_precise", "bool", "", "True when ra_deg/dec_deg come from the precise position; False when taken from the WDS id (about 3 arcsec RA, 30 arcsec Dec)"),
    Column("has_orbit", "bool", "", "True when at least one usable visual orbit (grade 1-5, complete elements) is loaded for this pair"),
    Column("source", "str", "", "where the row came from: 'wds', 'orb6', 'vizier-wds', ..."),
    Column("line_no", "float", "", "line number in the source file (1-based), for error reports"),
)

#: Columns of the orbit table (ORB6).
ORBIT_COLUMNS: tuple[Column, ...] = (
    Column("wds_id", "str", "", "WDS designation"),
    Column("discoverer", "str", "", "discoverer code and number (or other name, e.g. 'alp Cen'), single-spaced"),
    Column("components", "str", "", "component letters as given in ORB6"),
    Column("reference", "str", "", "ORB6 reference code (author + year + letter), e.g. 'Hei1963a'"),
    Column("grade", "float", "", "ORB6 grade: 1 definitive ... 5 indeterminate; 8 interferometric; 9 astrometric"),
    Column("period_yr", "float", "yr", "period P (units converted: d / 365.242198781 tropical-year days, c x100, h /24 then days)"),
    Column("a_arcsec", "float", "arcsec", "semi-major axis (mas x 0.001; sign kept as catalogued)"),
    Column("incl_deg", "float", "deg", "inclination i (sign kept as catalogued)"),
    Column("node_deg", "float", "deg", "position angle of the node Omega"),
    Column("t_peri_yr", "float", "yr", "time of periastron T as a Besselian year (code d: JD - 2,400,000 converted)"),
    Column("ecc", "float", "", "eccentricity e"),
    Column("omega_deg", "float", "deg", "argument of periastron omega"),
    Column("equinox", "float", "yr", "equinox of the node, if given"),
    # -- carried --------------------------------------------------------------
    Column("ra_deg", "float", "deg", "J2000 right ascension of the system"),
    Column("dec_deg", "float", "deg", "J2000 declination of the system"),
    Column("mag1", "float", "mag", "primary magnitude"),
    Column("mag2", "float", "mag", "secondary magnitude"),
    Column("mag1_flag", "str", "", "flag(s) beside the primary magnitude"),
    Column("mag2_flag", "str", "", "flag(s) beside the secondary magnitude"),
    Column("ads", "float", "", "ADS number"),
    Column("hd", "str", "", "HD number (with any letter suffix)"),
    Column("hip", "str", "", "Hipparcos number (with any letter suffix)"),
    Column("period_unit", "str", "", "unit code of P as catalogued (y, d, c, h, m)"),
    Column("a_unit", "str", "", "unit code of a as catalogued (a, m, M, u)"),
    Column("t_peri_unit", "str", "", "unit code of T as catalogued (y, d, m, c)"),
    Column("node_flag", "str", "", "'*' ascending node identified; 'q' node flipped"),
    Column("omega_flag", "str", "", "'q' quadrant corrected"),
    Column("period_err_yr", "float", "yr", "error of P"),
    Column("a_err_arcsec", "float", "arcsec", "error of a"),
    Column("incl_err_deg", "float", "deg", "error of i"),
    Column("node_err_deg", "float", "deg", "error of Omega"),
    Column("t_peri_err_yr", "float", "yr", "error of T"),
    Column("ecc_err", "float", "", "error of e"),
    Column("omega_err_deg", "float", "deg", "error of omega"),
    Column("year_last_obs", "float", "yr", "year of the last observation used"),
    Column("notes_flag", "str", "", "'n' when ORB6 has a note for the system"),
    Column("plot_file", "str", "", "name of the USNO orbit plot file"),
    Column("complete", "bool", "", "all seven elements present and valid (0 <= e < 1, P > 0)"),
    Column("preferred", "bool", "", "the orbit to use for this pair: best (lowest) grade, then newest reference"),
    Column("line_no", "float", "", "line number in the source file (1-based)"),
)

PAIR_CONTRACT = tuple(c.name for c in PAIR_COLUMNS[:14])
ORBIT_CONTRACT = tuple(c.name for c in ORBIT_COLUMNS[:13])


def markdown() -> str:
    """The schema as a Markdown document (written to ``docs/schema.md``)."""
    out = [
        "# Table schemas",
        "",
        "Generated from `planner/schema.py` by `python -m planner.schema`; do not edit by hand.",
        "Missing catalogue values are NaN (numbers) or an empty string (text).",
        "",
    ]
    for title, cols, n in (("Pair table", PAIR_COLUMNS, 14), ("Orbit table", ORBIT_COLUMNS, 13)):
        out += [f"## {title}", "", f"The first {n} columns are part of the project's stable contract.", ""]
        out += ["| column | type | unit | meaning |", "|---|---|---|---|"]
        out += [f"| `{c.name}` | {c.dtype} | {c.unit} | {c.meaning} |" for c in cols]
        out.append("")
    return "\n".join(out)


if __name__ == "__main__":  # pragma: no cover
    print(markdown())


def plain_value(v, digits: int | None = None):
    """A table value as plain JSON: numpy scalars as Python numbers and booleans, NaN and
    infinities as None, floats rounded to ``digits`` when given; anything else unchanged.
    (The one JSON cleaner of the package.)"""
    if type(v).__module__ == "numpy" and hasattr(v, "item") and getattr(v, "dtype", None) is not None \
            and v.dtype.kind in "biuf":
        v = v.item()
    if isinstance(v, float):
        if not math.isfinite(v):
            return None
        return round(v, digits) if digits is not None else v
    return v
