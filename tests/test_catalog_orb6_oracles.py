"""Field-by-field oracle for the ORB6 reader (issue 16 item 4); the WDS one is in
test_catalog_wds_oracles.py.

Every numeric (and text) field the readers return is compared with plain Python
slicing of the line at the *published* column positions -- not with the readers'
own column tables:

* WDS summary line: USNO, format of the WDS summary file (``wdsweb_format.txt``,
  2009-2012 table, Mason et al.), reproduced in docs/catalogs.md; columns below are
  1-based inclusive, as printed there.
* ORB6 orbit line: USNO, format of the Sixth Catalog of Orbits text version
  (``orb6format.txt``; Hartkopf, Mason & Worley 2001, AJ 122, 3472) and the column
  ruler at the top of the file itself.

Rows: the three genuine WDS summary rows kept in tests/data/usno, every orbit line of
the bundled USNO ORB6 file (catalogs_sample/orb6_orbits.txt), and hand-made WDS lines
laid out per the published format where the genuine rows lack full-width values
(separations >= 100", a negative magnitude, negative proper motions, flags, no precise
position).  The hand-made lines are format probes, not catalogue data.

Unit conversions in the oracle come from outside the project: the Besselian epoch
from ERFA ``epb`` (IAU SOFA; Lieske 1979); positions by plain arithmetic
(hours, minutes, seconds).
"""

from __future__ import annotations

import erfa
import numpy as np
import pytest

from conftest import reference_file
from planner.catalogs.orb6 import read_orb6

ORB6_FILE = reference_file("orb6_orbits.txt")


def field(line: str, first: int, last: int) -> str:
    """Columns first..last (1-based, inclusive) as printed in the format tables."""
    return line[first - 1:last]


def wide(line: str, first: int, last: int) -> str:
    """An ORB6 field that may start one column early: the published columns, plus the
    separator column before them when it is not blank (FORMATS/ruler: "wide values
    start one column early")."""
    return field(line, first - 1, last) if line[first - 2] != " " else field(line, first, last)


def num(text: str) -> float:
    """Python's own float() of a field; blank (or a lone '.') is missing."""
    t = text.strip()
    return np.nan if t in ("", ".") else float(t)


def same(got, want) -> bool:
    return (np.isnan(want) and np.isnan(got)) if isinstance(want, float) and np.isnan(want) \
        else got == pytest.approx(want, rel=1e-12, abs=1e-12)


def sexagesimal_deg(text: str) -> tuple[float, float]:
    """'hhmmss.ss+ddmmss.s' -> (RA, Dec) in degrees: 15 (h + m/60 + s/3600), +-(d + m/60 + s/3600)."""
    ra = 15.0 * (int(text[0:2]) + int(text[2:4]) / 60 + float(text[4:9]) / 3600)
    dec = int(text[10:12]) + int(text[12:14]) / 60 + float(text[14:18]) / 3600
    return ra, -dec if text[9] == "-" else dec


# -- ORB6 -------------------------------------------------------------------------

#: published ORB6 columns (orb6format.txt; widths of 10-12 and 24 from the file's ruler)
ORB6_NUMERIC = {
    "incl_deg": (126, 133), "incl_err_deg": (135, 142),
    "node_deg": (144, 151), "node_err_deg": (154, 161),
    "ecc": (188, 195), "ecc_err": (197, 204),
    "omega_deg": (206, 213), "omega_err_deg": (215, 222),
    "equinox": (224, 227), "year_last_obs": (229, 232), "grade": (234, 234),
    "ads": (46, 50),
}
#: unit codes -> factor to years / arcsec (orb6format.txt; day = 1/365.242198781 yr,
#: the Besselian (tropical) year of ERFA's epb, IAU SOFA)
P_UNIT = {"y": 1.0, "d": 1 / 365.242198781, "c": 100.0, "h": 1 / 24 / 365.242198781,
          "m": 1 / 1440 / 365.242198781}
A_UNIT = {"a": 1.0, "m": 1e-3, "M": 60.0, "u": 1e-6}


def _orb6_lines():
    return [ln for ln in ORB6_FILE.read_text().splitlines()[7:] if ln.strip()]


def _t_peri_years(value: float, unit: str) -> float:
    if unit == "d":          # truncated JD = JD - 2,400,000 (orb6format.txt)
        return erfa.epb(2400000.0, value)
    if unit == "m":          # MJD
        return erfa.epb(2400000.5, value)
    if unit == "c":
        return value * 100.0
    return value


def test_orb6_every_field_of_every_line_equals_plain_slicing():
    lines = _orb6_lines()
    df = read_orb6(ORB6_FILE)
    assert len(df) == len(lines) == 2096 and not df.attrs["problems"]
    by_line = {int(r["line_no"]): r for r in df.to_dict("records")}
    first_line_no = ORB6_FILE.read_text().splitlines().index(lines[0]) + 1
    checked = 0
    for i, line in enumerate(lines):
        row = by_line[first_line_no + i]
        for key, (a, b) in ORB6_NUMERIC.items():
            assert same(row[key], num(wide(line, a, b))), (i, key, wide(line, a, b), row[key])
        for key, (a, b) in {"mag1": (67, 71), "mag2": (74, 78)}.items():   # flags outside
            assert same(row[key], num(field(line, a, b))), (i, key, field(line, a, b))
        pu, au, tu = field(line, 93, 93).strip(), field(line, 115, 115).strip(), \
            field(line, 175, 175).strip()
        assert (row["period_unit"], row["a_unit"], row["t_peri_unit"]) == (pu, au, tu)
        # published columns; a value may start one column early (ruler, see wide())
        assert same(row["period_yr"], num(wide(line, 82, 92)) * P_UNIT.get(pu, 1.0)), (i, "P")
        assert same(row["period_err_yr"], num(wide(line, 95, 104)) * P_UNIT.get(pu, 1.0))
        assert same(row["a_arcsec"], num(wide(line, 106, 114)) * A_UNIT.get(au, 1.0)), (i, "a")
        assert same(row["a_err_arcsec"], num(wide(line, 117, 124)) * A_UNIT.get(au, 1.0))
        t = num(wide(line, 163, 174))
        want_t = _t_peri_years(t, tu)
        assert (np.isnan(want_t) and np.isnan(row["t_peri_yr"])) or \
            row["t_peri_yr"] == pytest.approx(want_t, abs=1e-9), (i, "T")
        t_err = num(wide(line, 177, 186))
        t_err_factor = {"d": 1 / 365.242198781, "m": 1 / 365.242198781, "c": 100.0}.get(tu, 1.0)
        assert same(row["t_peri_err_yr"], t_err * t_err_factor), (i, "T err")
        ra, dec = sexagesimal_deg(field(line, 1, 18))
        assert row["ra_deg"] == pytest.approx(ra, abs=1e-9) and \
            row["dec_deg"] == pytest.approx(dec, abs=1e-9), i
        assert row["wds_id"] == field(line, 20, 29)
        assert row["hd"] == field(line, 52, 58).strip() and row["hip"] == field(line, 59, 65).strip()
        assert row["node_flag"] == field(line, 152, 152).strip()
        assert row["omega_flag"] == field(line, 214, 214).strip()
        assert row["notes_flag"] == field(line, 236, 236).strip()
        assert row["reference"] == field(line, 238, 245).strip()
        assert row["plot_file"] == field(line, 247, 264).strip()
        # magnitude flags: leading column 66 / 73, trailing 72 / 79 (orb6format.txt)
        assert set(row["mag1_flag"]) <= set(field(line, 66, 66) + field(line, 72, 73)) - {" "}
        assert set(row["mag2_flag"]) <= set(field(line, 73, 73) + field(line, 79, 79)) - {" "}
        checked += 1
    assert checked == 2096


def test_orb6_full_width_and_special_values_present_in_the_file():
    # the genuine file holds the hard cases; each is asserted so that the oracle above
    # really exercised them (USNO ORB6 sample, values read off the lines)
    df = read_orb6(ORB6_FILE)
    assert (df["incl_deg"] < 0).sum() >= 1            # one negative inclination (Ghe2003)
    assert (df["a_arcsec"] < 0).sum() >= 1            # HIP1997d, 02130+0851
    assert set(df["period_unit"]) >= {"y", "d", "c", "h"}
    assert set(df["a_unit"]) >= {"a", "m"} and set(df["t_peri_unit"]) >= {"y", "d"}
    assert (df["node_flag"] == "*").sum() == 24       # FORMATS: 24 ascending-node flags
    assert df["equinox"].isna().sum() == 863          # FORMATS: equinox blank in 863 rows
    assert df["year_last_obs"].isna().sum() == 389    # FORMATS: last obs. blank in 389 rows
    assert (df["mag1_flag"] != "").sum() > 0 and (df["mag2_flag"] != "").sum() > 0
    # the first orbit line, read by eye: 000000.91-192955.8 00000-1930 LTT 9831, P = 499.7989 d,
    # a = 14.31 mas, T = 48397.3164 (JD - 2,400,000), grade 9
    r = df.iloc[0]
    assert r["period_yr"] == pytest.approx(499.7989 / 365.242198781, rel=1e-12)
    assert r["a_arcsec"] == pytest.approx(0.01431, rel=1e-12)
    assert r["t_peri_yr"] == pytest.approx(erfa.epb(2400000.0, 48397.3164), abs=1e-9)
    assert r["grade"] == 9 and r["hd"] == "224690" and r["hip"] == "2"


def _with(line: str, col: int, text: str) -> str:
    return line[:col - 1] + text + line[col - 1 + len(text):]


@pytest.mark.parametrize("p_unit", ["y", "d", "c", "h", "m"])
@pytest.mark.parametrize("a_unit", ["a", "m", "M", "u"])
def test_orb6_every_unit_code(p_unit, a_unit):
    # orb6format.txt unit codes: P in m(inutes) h(ours) d(ays) y(ears) c(enturies) (col 93);
    # a in a(rcsec) m(as) M (arcmin) u(as) (col 115); T0 in y, d (JD - 2,400,000), m (MJD),
    # c (col 175).  Codes absent from the sample are put on a genuine line here.
    line = _orb6_lines()[1]                  # 00003-4417 I 1477: P 384.1 y, a 1.023 a, T 2008.2 y
    assert field(line, 93, 93) == "y" and field(line, 115, 115) == "a"
    t_unit = {"y": "y", "d": "d", "c": "c", "h": "m", "m": "y"}[p_unit]
    probe = _with(_with(_with(line, 93, p_unit), 115, a_unit), 175, t_unit)
    from planner.catalogs.orb6 import parse_orb6_lines

    row = parse_orb6_lines([probe.encode()]).iloc[0]
    assert row["period_yr"] == pytest.approx(384.1 * P_UNIT[p_unit], rel=1e-12)
    assert row["a_arcsec"] == pytest.approx(1.023 * A_UNIT[a_unit], rel=1e-12)
    assert row["t_peri_yr"] == pytest.approx(_t_peri_years(2008.2, t_unit), abs=1e-9)


def test_orb6_text_after_column_264_is_ignored():
    # an orbit line is 264 columns (FORMATS B); whatever follows is not part of it
    from planner.catalogs.orb6 import parse_orb6_lines

    line = _orb6_lines()[1].ljust(264)[:264].encode()
    df = parse_orb6_lines([line + b"\xe9 extra", line])
    assert list(df["line_no"]) == [1.0, 2.0], df.attrs["problems"]
    assert df["a_arcsec"].iloc[0] == df["a_arcsec"].iloc[1] == 1.023


def test_orb6_wide_semi_major_axis_starting_one_column_early():
    # the reader reads a from column 105 (one early, as the data show for the error columns);
    # a 10-character value there is read whole
    from planner.catalogs.orb6 import parse_orb6_lines

    line = _with(_orb6_lines()[1], 105, "1234.56789")
    assert parse_orb6_lines([line.encode()]).iloc[0]["a_arcsec"] == 1234.56789


@pytest.mark.parametrize("key, first, last", [
    ("period_yr", 82, 92), ("period_err_yr", 95, 104), ("a_arcsec", 106, 114),
    ("a_err_arcsec", 117, 124), ("incl_deg", 126, 133), ("incl_err_deg", 135, 142),
    ("node_deg", 144, 151), ("node_err_deg", 154, 161), ("t_peri_yr", 163, 174),
    ("t_peri_err_yr", 177, 186), ("ecc", 188, 195), ("ecc_err", 197, 204),
    ("omega_deg", 206, 213), ("equinox", 224, 227), ("year_last_obs", 229, 232)])
def test_orb6_value_starting_one_column_early_is_read_whole(key, first, last):
    # published columns (orb6format.txt / the file's ruler); the reader documents that values
    # may start one column early, as wide values in the data do ("wide values start at col 94 /
    # 176", FORMATS B).  A value filling first-1 .. last is read whole, not cut.
    from planner.catalogs.orb6 import parse_orb6_lines

    line = _orb6_lines()[1]                      # units y / a / y: no conversion
    assert line[first - 2] == " "
    digits = "1" * (last - first + 2)
    row = parse_orb6_lines([_with(line, first - 1, digits).encode()]).iloc[0]
    assert row[key] == float(digits), (key, row[key])
