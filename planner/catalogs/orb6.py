"""Reader for the text version of the USNO Sixth Catalog of Orbits of Visual
Binary Stars (ORB6; Hartkopf, Mason & Worley 2001, AJ 122, 3472).

Layout: the Sixth Orbit Catalog format (Hartkopf, Mason & Worley 2001, AJ 122, 3472; column layout in docs/catalogs.md) (USNO
``orb6format.txt`` plus the ruler lines of the file).  Every field is read by
column range; the ranges are one or two columns wider than the published
ones where the data show values starting early (errors of P, a, T; the two
T0 values near 450,000), and the gap columns are blank in every line.

Unit codes are converted to the units of the orbit table
(:data:`planner.schema.ORBIT_COLUMNS`):

* P: ``y`` years, ``d`` days / 365.242198781, ``c`` centuries x 100,
  ``h`` hours / 24 / 365.242198781, ``m`` minutes / 1440 / 365.242198781;
* a: ``a`` arcsec, ``m`` mas x 0.001, ``M`` arcmin x 60, ``u`` uas x 1e-6;
* T0: ``y`` Besselian year as given; ``d`` = JD - 2,400,000 and ``m`` =
  MJD = JD - 2,400,000.5, both converted to a Besselian year
  B = 1900.0 + (JD - 2415020.31352) / 365.242198781 (Lieske 1979, the
  Besselian epoch in the time scale of the catalogue's own ephemeris);
  ``c`` centuries x 100.

The same factors convert the error columns.  Values are kept as catalogued:
a negative ``a`` (HIP1997d, 02130+0851), a negative ``i`` (Ghe2003), and the
two ``d`` T0 values 451786.408 (Bod2006, 01374+2510) and 453070.30
(Zha2007, 14191-1322) that look like JD - 2,000,000 are read literally as
JD - 2,400,000, as the catalogue's own ephemeris does.

``complete`` is True when P, a, i, Omega, T, e and omega are all present,
P > 0 and 0 <= e < 1.  ``preferred`` marks exactly one orbit per (wds_id,
components): complete before incomplete, then the lowest grade (1-5, then 8,
then 9), then the newest reference year, then the later line.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from planner.catalogs import _fixed as fx
from planner.errors import CatalogError
from planner.schema import ORBIT_COLUMNS
from planner.utc import TROPICAL_YEAR_D, besselian_year_from_jd

WIDTH = 264
MIN_LENGTH = 234  # a line must at least reach the grade column

PERIOD_FACTORS = {"y": 1.0, "d": 1.0 / TROPICAL_YEAR_D, "c": 100.0,
                  "h": 1.0 / 24.0 / TROPICAL_YEAR_D, "m": 1.0 / 1440.0 / TROPICAL_YEAR_D}
AXIS_FACTORS = {"a": 1.0, "m": 1e-3, "M": 60.0, "u": 1e-6}

# (name, first col, last col) of the numeric fields; 1-based inclusive,
# widened where the data show values starting a column early.
_NUMERIC = {
    "period": (81, 92), "period_err": (94, 104),
    "a": (105, 114), "a_err": (116, 124),
    "incl": (125, 133), "incl_err": (134, 142),
    "node": (143, 151), "node_err": (153, 161),
    "t_peri": (162, 174), "t_peri_err": (176, 186),
    "ecc": (187, 195), "ecc_err": (196, 204),
    "omega": (205, 213), "omega_err": (215, 222),
    "equinox": (223, 227), "year_last_obs": (228, 232),
    "grade": (233, 235), "ads": (46, 50),
}


def _is_header(arr: np.ndarray, lines: list[bytes]) -> np.ndarray:
    """Recognised header lines of the USNO file: title, column ruler, field labels."""
    n = arr.shape[0]
    out = np.zeros(n, bool)
    nonsp = arr != fx.SPACE
    ruler = (fx.is_digit(arr) | ~nonsp).all(axis=1) & nonsp.any(axis=1) & (
        nonsp.sum(axis=1) > 60)
    out |= ruler
    # the few text header lines: checked one by one (there are at most a handful)
    cand = np.flatnonzero(~fx.wds_id_ok(fx.col(arr, 20, 29)) & ~ruler)
    for i in cand[:50]:
        s = lines[i]
        if s.startswith(b"RA,Dec") or b"Catalog of Orbits" in s:
            out[i] = True
    return out


def _ref_year(ref: pd.Series) -> np.ndarray:
    return pd.to_numeric(ref.str.extract(r"(\d{4})", expand=False), errors="coerce").to_numpy(float)


_COMP_UPPER = r"[A-Z][a-z]?\d?(?:[,\-]?(?:[A-Z][a-z]?\d?|\d))*\??"
_COMP_ANY = r"(?:[A-Z][a-z]?\d?|[a-z])(?:[,\-]?(?:[A-Z][a-z]?\d?|[a-z]|\d))*\??"


def split_designation(names: pd.Series, c37: np.ndarray, c38: np.ndarray, rest: pd.Series):
    """Split an ORB6 'DD' field (columns 31-44) into discoverer and components.

    ``c37``/``c38`` are the raw bytes of columns 37 and 38 (the WDS
    discoverer/components boundary), ``rest`` the text of columns 38-44.
    Rule 1: ``rest`` is a component label (``AB``, ``Aa,Ab``, ``AB-C``,
    ``Bc,P``, ``Aa1,2``, ``A?``; a lone lower-case letter such as ``p`` only
    right after a digit) and does not continue a word (a letter in column 37
    followed by a lower-case letter in 38, as in ``V376 Per``).  Rule 2: a
    label glued to a digit at the end of the name (``Gl 820A``, ``GJ 699Aa1,P``).
    Otherwise the whole name is the discoverer (``alp Cen``, ``BD+57 1581``,
    ``gam UMa``).  Rule 3: a label with a comma or hyphen after a blank at the
    end of a long name (``V819 Her Ba,Bb``).  Code and number are single-spaced (``STF1606`` -> ``STF 1606``)."""
    letter37 = fx.is_letter(c37)
    lower38 = (c38 >= 97) & (c38 <= 122)
    digit37 = fx.is_digit(c37)
    continues = letter37 & lower38
    r1_upper = rest.str.fullmatch(_COMP_UPPER).fillna(False).to_numpy(bool)
    r1_any = rest.str.fullmatch(_COMP_ANY).fillna(False).to_numpy(bool)
    rule1 = ~continues & (r1_upper | (r1_any & digit37))
    raw = names
    names = raw.str.strip().str.replace(r"\s+", " ", regex=True)
    m = names.str.extract(rf"^(.*\d)({_COMP_UPPER})$")
    rule2 = ~rule1 & m[0].notna().to_numpy(bool)
    # rule 3: a label with a separator after a blank at the end of a long name
    m3 = names.str.extract(r"^(.*\S) ([A-Z][a-z]?\d?(?:[,\-][A-Z][a-z]?\d?)+)$")
    rule3 = ~rule1 & ~rule2 & m3[0].notna().to_numpy(bool)
    m.loc[rule3, 0] = m3.loc[rule3, 0]
    m.loc[rule3, 1] = m3.loc[rule3, 1]
    rule2 = rule2 | rule3
    head = raw.str.slice(0, 7).str.strip().str.replace(r"\s+", " ", regex=True)
    disc = np.where(rule1, head.to_numpy(str), np.where(rule2, m[0].fillna("").to_numpy(str),
                                                          names.to_numpy(str)))
    comp = np.where(rule1, rest.to_numpy(str), np.where(rule2, m[1].fillna("").to_numpy(str), ""))
    disc = pd.Series(disc).str.replace(r"^([A-Za-z]{1,4}) ?(\d+)$", r"\1 \2", regex=True)
    return disc.astype(str), pd.Series(comp).astype(str)


def read_orb6(path) -> pd.DataFrame:
    """Read a USNO ORB6 orbits text file into the orbit table.

    Returns one row per orbit line with the columns of
    :data:`planner.schema.ORBIT_COLUMNS`.  Malformed lines are skipped and
    listed in ``df.attrs["problems"]`` as ``(line_no, reason)``; a file in
    which no line parses raises :class:`planner.errors.CatalogError`.
    Source: Hartkopf, Mason & Worley (2001), USNO ORB6 format description.
    """
    p, data = fx.read_bytes(path, "ORB6")
    lines = fx.split_lines(data)
    return parse_orb6_lines(lines, name=str(p))


def parse_orb6_lines(lines: list[bytes], name: str = "<lines>") -> pd.DataFrame:
    """Parse ORB6 orbit lines (bytes, without line ends); see :func:`read_orb6`."""
    n_all = len(lines)
    lengths = np.fromiter(map(len, lines), dtype=np.int64, count=n_all)
    arr = fx.to_array(lines, WIDTH, lengths)
    line_no = np.arange(1, n_all + 1)
    blank = (arr == fx.SPACE).all(axis=1) & (lengths <= WIDTH) if n_all else np.zeros(0, bool)
    comment = arr[:, 0] == ord("#") if n_all else np.zeros(0, bool)
    header = _is_header(arr, lines) if n_all else np.zeros(0, bool)
    skip = blank | comment | header

    reason = np.full(n_all, "", dtype=object)

    def flag(mask, text):
        sel = mask & (reason == "") & ~skip
        reason[sel] = text

    flag(fx.bad_bytes(arr), "non-ASCII or control character")
    flag(lengths < MIN_LENGTH,
         f"truncated line: an orbit line reaches the grade at column {MIN_LENGTH}")
    flag(~fx.wds_id_ok(fx.col(arr, 20, 29)), "WDS id in columns 20-29 is not HHMMm+DDMM")
    ra, dec, pos_blank, pos_bad = fx.sexagesimal(fx.col(arr, 1, 18))
    flag(pos_bad | pos_blank, "position in columns 1-18 is not hhmmss.ss+ddmmss.s")

    nums = {}
    for key, (a, b) in _NUMERIC.items():
        v, miss, bad = fx.parse_number(fx.col(arr, a, b))
        nums[key] = v
        flag(bad, f"non-numeric text in columns {a}-{b} ({key.replace('_', ' ')})")

    # magnitudes with leading and trailing flags: mag1 66 | 67-71 | 72(+73 '?'),
    # mag2 73 | 74-78 | 79
    m1, _, b1 = fx.parse_number(fx.col(arr, 67, 71))
    m2, _, b2 = fx.parse_number(fx.col(arr, 74, 78))
    flag(b1, "non-numeric text in columns 67-71 (primary magnitude)")
    flag(b2, "non-numeric text in columns 74-78 (secondary magnitude)")
    c66, c72, c73, c79 = arr[:, 65], arr[:, 71], arr[:, 72], arr[:, 78]
    q_after_v = (c73 == ord("?")) & (c72 != fx.SPACE)  # 'v?' spills into col 73
    lead2 = (c73 != fx.SPACE) & ~q_after_v & ~fx.is_digit(c73)  # a stray digit is dropped
    f1 = np.stack([c66, c72, np.where(q_after_v, c73, fx.SPACE)], axis=1)
    f2 = np.stack([np.where(lead2, c73, fx.SPACE), c79], axis=1)
    mag1_flag = fx.flag_chars(f1, f1 != fx.SPACE)
    mag2_flag = fx.flag_chars(f2, f2 != fx.SPACE)

    bad_mask = reason != ""
    keep = ~skip & ~bad_mask
    problems = [(int(line_no[i]), str(reason[i])) for i in np.flatnonzero(bad_mask)]
    if not keep.any():
        first = f"; first problem: line {problems[0][0]}: {problems[0][1]}" if problems else ""
        raise CatalogError(f"no ORB6 orbit lines found in {name!r} (is it an ORB6 orbits text file?){first}")

    k = keep
    A = arr[k]

    def txt(a, b, split=False):
        return fx.to_text(fx.col(A, a, b), split_code_number=split)

    p_unit = txt(93, 93)
    a_unit = txt(115, 115)
    t_unit = txt(175, 175)
    pf = pd.Series(p_unit).map(PERIOD_FACTORS).to_numpy(float)
    af = pd.Series(a_unit).map(AXIS_FACTORS).to_numpy(float)
    # a value without a unit code: read as years / arcsec / Besselian year (none occur)
    pf = np.where(p_unit == "", 1.0, pf)
    af = np.where(a_unit == "", 1.0, af)

    t_raw, t_err_raw = nums["t_peri"][k], nums["t_peri_err"][k]
    t_yr = np.select(
        [t_unit == "d", t_unit == "m", t_unit == "c", t_unit == "y", t_unit == ""],
        [besselian_year_from_jd(t_raw + 2400000.0), besselian_year_from_jd(t_raw + 2400000.5),
         t_raw * 100.0, t_raw, t_raw],
        default=np.nan,
    )
    t_ef = np.select([t_unit == "d", t_unit == "m", t_unit == "c"],
                     [1.0 / TROPICAL_YEAR_D, 1.0 / TROPICAL_YEAR_D, 100.0], default=1.0)

    raw_names = fx.col(A, 31, 44)
    disc, comp = split_designation(pd.Series(np.ascontiguousarray(raw_names).view("S14").ravel()
                                             .astype("U14")).str.rstrip(),
                                   raw_names[:, 6], raw_names[:, 7], pd.Series(txt(38, 44)))
    comp = comp.str.replace(" ", "", regex=False)

    df = pd.DataFrame({
        "wds_id": txt(20, 29),
        "discoverer": disc.to_numpy(),
        "components": comp.to_numpy(),
        "reference": txt(238, 245),
        "grade": nums["grade"][k],
        "period_yr": nums["period"][k] * pf,
        "a_arcsec": nums["a"][k] * af,
        "incl_deg": nums["incl"][k],
        "node_deg": nums["node"][k],
        "t_peri_yr": t_yr,
        "ecc": nums["ecc"][k],
        "omega_deg": nums["omega"][k],
        "equinox": nums["equinox"][k],
        "ra_deg": ra[k],
        "dec_deg": dec[k],
        "mag1": m1[k],
        "mag2": m2[k],
        "mag1_flag": mag1_flag[k],
        "mag2_flag": mag2_flag[k],
        "ads": nums["ads"][k],
        "hd": txt(52, 58),
        "hip": txt(59, 65),
        "period_unit": p_unit,
        "a_unit": a_unit,
        "t_peri_unit": t_unit,
        "node_flag": txt(152, 152),
        "omega_flag": txt(214, 214),
        "period_err_yr": nums["period_err"][k] * pf,
        "a_err_arcsec": nums["a_err"][k] * af,
        "incl_err_deg": nums["incl_err"][k],
        "node_err_deg": nums["node_err"][k],
        "t_peri_err_yr": t_err_raw * t_ef,
        "ecc_err": nums["ecc_err"][k],
        "omega_err_deg": nums["omega_err"][k],
        "year_last_obs": nums["year_last_obs"][k],
        "notes_flag": txt(236, 236),
        "plot_file": txt(247, 264),
    })
    for c in ("wds_id", "discoverer", "components", "reference", "mag1_flag", "mag2_flag", "hd",
              "hip", "period_unit", "a_unit", "t_peri_unit", "node_flag", "omega_flag",
              "notes_flag", "plot_file"):
        df[c] = df[c].astype(str)
    elems = df[["period_yr", "a_arcsec", "incl_deg", "node_deg", "t_peri_yr", "ecc", "omega_deg"]]
    df["complete"] = (elems.notna().all(axis=1) & (df["period_yr"] > 0) & (df["ecc"] >= 0)
                      & (df["ecc"] < 1)).astype(bool)
    df["line_no"] = line_no[k].astype(float)
    df["preferred"] = mark_preferred(df)
    df = df[[c.name for c in ORBIT_COLUMNS]]
    df.attrs["problems"] = problems
    df.attrs["source_file"] = name
    return df


def mark_preferred(df: pd.DataFrame) -> np.ndarray:
    """True on exactly one orbit per (wds_id, components): complete before
    incomplete; grade 1-5 (lowest first), then 8, then 9; then the newest
    reference year; then the later line."""
    if len(df) == 0:
        return np.zeros(0, bool)
    key = pd.DataFrame({
        "w": df["wds_id"].to_numpy(), "c": df["components"].to_numpy(),
        "inc": (~df["complete"].to_numpy(bool)).astype(int),
        "g": np.nan_to_num(df["grade"].to_numpy(float), nan=99.0),
        "y": -np.nan_to_num(_ref_year(df["reference"]), nan=0.0),
        "l": -df["line_no"].to_numpy(float),
        "pos": np.arange(len(df)),
    })
    key = key.sort_values(["w", "c", "inc", "g", "y", "l"], kind="stable")
    first = ~key.duplicated(["w", "c"], keep="first")
    out = np.zeros(len(df), bool)
    out[key["pos"].to_numpy()[first.to_numpy()]] = True
    return out
