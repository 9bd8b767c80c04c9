"""Field-by-field oracle for the WDS reader (issue 16 item 4); the ORB6 one is in
test_catalog_orb6_oracles.py.

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
from ERFA ``epb`` (IAU SOFA; Lieske 1979), sexagesimal positions from astropy
``Angle``.
"""

from __future__ import annotations

import re

import numpy as np
import pytest
from astropy.coordinates import Angle

from conftest import reference_file
from planner.catalogs.wds import parse_wds_lines, read_wds

WDS_FILE = reference_file("wds_rows_found.txt")


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
    """'hhmmss.ss+ddmmss.s' -> (RA, Dec) in degrees by astropy Angle."""
    ra = Angle(f"{text[0:2]}h{text[2:4]}m{text[4:9]}s").deg
    dec = Angle(f"{text[9]}{text[10:12]}d{text[12:14]}m{text[14:18]}s").deg
    return ra, dec


# -- WDS --------------------------------------------------------------------------

#: numeric fields of the WDS summary line, published columns (wdsweb_format.txt)
WDS_NUMERIC = {
    "year_first": (24, 27), "year_last": (29, 32), "n_obs": (34, 37),
    "pa_first_deg": (39, 41), "pa_last_deg": (43, 45),
    "sep_first_arcsec": (47, 51), "sep_last_arcsec": (53, 57),
    "pm1_ra_masyr": (81, 84), "pm1_dec_masyr": (85, 88),
    "pm2_ra_masyr": (90, 93), "pm2_dec_masyr": (94, 97),
}


def wds_line(**fields) -> str:
    """A WDS summary line built column by column from the published table."""
    buf = [" "] * 130
    for (first, _last), text in fields.values():
        buf[first - 1:first - 1 + len(text)] = list(text)
    return "".join(buf)


# Hand-made lines in the published layout, every field at full width.
HAND_WDS = [
    wds_line(id=((1, 10), "06451-1643"), disc=((11, 17), "AGC   1"), comp=((18, 22), "AB"),
             y1=((24, 27), "1862"), y2=((29, 32), "2024"), n=((34, 37), "9999"),
             pa1=((39, 41), "359"), pa2=((43, 45), "  0"),
             s1=((47, 51), "123.4"), s2=((53, 57), "100.0"),
             m1=((59, 63), "-1.46"), m2=((65, 69), "12.34"),
             sp=((71, 79), "A0mA1Va  "), pm1=((81, 88), "-546-1223"[:8]),
             pm2=((90, 97), "-999-999"), dm=((99, 106), "-16 1591"), notes=((108, 111), "CNOV"),
             pos=((113, 130), "064508.92-164258.0")),
    # separations of 4 and 5 significant digits, magnitude flags in and after the field,
    # no precise position (the position then comes from the WDS id)
    wds_line(id=((1, 10), "23599-0005"), disc=((11, 17), "STF3062"), comp=((18, 22), "Aa,Ab"),
             y1=((24, 27), "1782"), y2=((29, 32), "2023"), n=((34, 37), "  12"),
             pa1=((39, 41), " 90"), pa2=((43, 45), "271"),
             s1=((47, 51), "999.9"), s2=((53, 57), "1234."),
             m1=((59, 64), "10.27V"), m2=((65, 70), " 9.9 K"),
             pm1=((81, 88), "+012+034"), pm2=((90, 97), "    -001")),
]

#: the same hand-made lines' fields, typed by hand from the strings above (not sliced)
HAND_WDS_EXPECTED = [
    {"sep_first_arcsec": 123.4, "sep_last_arcsec": 100.0, "mag1": -1.46, "mag2": 12.34,
     "pa_first_deg": 359.0, "pa_last_deg": 0.0, "n_obs": 9999.0, "year_first": 1862.0,
     "year_last": 2024.0, "pm1_ra_masyr": -546.0, "pm1_dec_masyr": -122.0,
     "pm2_ra_masyr": -999.0, "pm2_dec_masyr": -999.0, "mag1_flag": "", "mag2_flag": "",
     "components": "AB", "discoverer": "AGC 1", "note_flags": "CNOV", "dm_id": "-16 1591",
     "ra_deg": 15 * (6 + 45 / 60 + 8.92 / 3600), "dec_deg": -(16 + 42 / 60 + 58.0 / 3600),
     "coord_precise": True},
    {"sep_first_arcsec": 999.9, "sep_last_arcsec": 1234.0, "mag1": 10.27, "mag2": 9.9,
     "mag1_flag": "V", "mag2_flag": "K", "pa_first_deg": 90.0, "pa_last_deg": 271.0,
     "n_obs": 12.0, "pm1_ra_masyr": 12.0, "pm1_dec_masyr": 34.0,
     "pm2_ra_masyr": np.nan, "pm2_dec_masyr": -1.0, "components": "Aa,Ab",
     "discoverer": "STF 3062",
     # WDS id HHMMm-DDMM: RA 23h 59.9m, Dec -0 deg 05' (FORMATS: id to 0.1 min / 1')
     "ra_deg": 15 * (23 + 59.9 / 60), "dec_deg": -(5 / 60), "coord_precise": False},
]


def _wds_rows():
    return [ln for ln in WDS_FILE.read_text().splitlines() if ln and not ln.startswith("#")]


def _check_wds_row(row, line: str):
    for key, (a, b) in WDS_NUMERIC.items():
        assert same(row[key], num(field(line, a, b))), (key, field(line, a, b), row[key])
    # magnitudes F5.2 in 59-63 and 65-69; letters (flags) stripped from the number
    for key, (a, b) in {"mag1": (59, 63), "mag2": (65, 69)}.items():
        text = re.sub(r"[^0-9.+\- ]", " ", field(line, a, b))
        assert same(row[key], num(text)), (key, row[key])
    assert row["wds_id"] == field(line, 1, 10)
    assert row["discoverer"] == re.sub(r"^([A-Za-z]+) *(\d+)$", r"\1 \2",
                                       field(line, 11, 17).strip())
    assert row["components"] == field(line, 18, 22).replace(" ", "")
    assert row["spectral_type"] == field(line, 71, 79).strip()
    assert row["dm_id"] == field(line, 99, 106).strip()
    assert row["note_flags"] == field(line, 108, 111).replace(" ", "")
    pos = field(line, 113, 130)
    if pos.strip():
        ra, dec = sexagesimal_deg(pos)
        assert row["ra_deg"] == pytest.approx(ra, abs=1e-9)
        assert row["dec_deg"] == pytest.approx(dec, abs=1e-9)
        assert bool(row["coord_precise"])


def test_wds_genuine_rows_every_field_equals_plain_slicing():
    # the three genuine USNO WDS rows; oracle: published columns + float()/astropy Angle
    lines = _wds_rows()
    df = read_wds(WDS_FILE)
    assert len(df) == len(lines) == 3
    for (_, row), line in zip(df.iterrows(), lines):
        _check_wds_row(row, line)
    # spot values read off the genuine rows by eye (USNO WDS, as quoted in the file)
    first = df.iloc[0]
    assert (first["sep_first_arcsec"], first["sep_last_arcsec"]) == (0.8, 0.6)
    assert (first["pm1_ra_masyr"], first["pm1_dec_masyr"]) == (34.0, 5.0)
    assert df.iloc[1]["pm1_dec_masyr"] == -4.0 and df.iloc[1]["pm2_ra_masyr"] == -11.0
    assert df.iloc[2]["dec_deg"] == pytest.approx(-(29 + 43 / 60 + 13.6 / 3600), abs=1e-9)


@pytest.mark.parametrize("k", range(len(HAND_WDS)))
def test_wds_full_width_fields_by_slicing_and_by_hand(k):
    # hand-made lines in the published layout (wdsweb_format.txt): separations >= 100",
    # negative magnitude and proper motions, magnitude flags, n_obs 9999
    line = HAND_WDS[k]
    assert len(line) == 130
    df = parse_wds_lines([line.encode()])
    assert len(df) == 1, df.attrs["problems"]
    row = df.iloc[0]
    _check_wds_row(row, line)
    for key, want in HAND_WDS_EXPECTED[k].items():
        if isinstance(want, str) or isinstance(want, bool):
            assert row[key] == want, key
        else:
            assert same(row[key], want), (key, row[key], want)


def test_wds_separation_columns_do_not_overlap_neighbours():
    # a change of one column in either separation field moves digits of the neighbouring
    # fields in (published layout: blank separators at 46, 52 and 58)
    line = wds_line(id=((1, 10), "12000+1000"), disc=((11, 17), "STF1234"),
                    pa2=((43, 45), "999"), s1=((47, 51), "111.1"), s2=((53, 57), "222.2"),
                    m1=((59, 63), "33.33"))
    row = parse_wds_lines([line.encode()]).iloc[0]
    assert (row["sep_first_arcsec"], row["sep_last_arcsec"], row["mag1"]) == (111.1, 222.2, 33.33)


@pytest.mark.parametrize("col", [23, 28, 33, 38, 42, 46, 52, 58, 80, 89, 98, 107, 112])
def test_wds_separator_columns_are_not_part_of_any_number(col):
    # published layout: single blank separators at 23, 28, 33, 38, 42, 46, 52, 58, 80, 89, 98,
    # 107 and 112 (FORMATS A / wdsweb_format.txt).  They belong to no field, so a digit typed into one
    # of them is ignored: the line is still read, with the same numbers.
    line = _wds_rows()[1]
    assert line[col - 1] == " "
    probe = line[:col - 1] + "7" + line[col:]
    base = parse_wds_lines([line[:130].encode()]).iloc[0]
    df = parse_wds_lines([line[:130].encode(), probe[:130].encode()])
    got = df[df["line_no"] == 2]
    assert len(got) == 1, df.attrs["problems"]
    row = got.iloc[0]
    for key in [*WDS_NUMERIC, "mag1", "mag2"]:
        assert same(row[key], base[key]), (col, key)
    for key in ("wds_id", "discoverer", "components", "spectral_type", "dm_id", "note_flags"):
        assert row[key] == base[key], (col, key)


def test_wds_text_after_column_130_is_ignored():
    # the WDS summary line is 130 columns (wdsweb_format.txt); the genuine rows carry a
    # constellation after it.  Whatever follows column 130 -- even a byte that is not ASCII
    # -- does not stop the line from being read, nor change it.
    line = _wds_rows()[0][:130].encode()
    df = parse_wds_lines([line + b" Cep", line + b"\xe9\x01 junk", line])
    assert list(df["line_no"]) == [1.0, 2.0, 3.0], df.attrs["problems"]
    for key in WDS_NUMERIC:
        assert len({*df[key].astype(str)}) == 1, key


def test_wds_line_holding_only_id_and_discoverer():
    # id (1-10) and discoverer (11-17) are the minimum the reader documents: a 17-column line
    # is read (every other field missing), a 16-column one is refused with its reason
    full = _wds_rows()[0]
    df = parse_wds_lines([full[:17].encode(), full[:16].encode()])
    assert list(df["line_no"]) == [1.0]
    assert df.iloc[0]["wds_id"] == full[:10] and np.isnan(df.iloc[0]["sep_last_arcsec"])
    assert df.attrs["problems"] == [(2, "line too short to hold the WDS id and discoverer (17 columns)")]


def test_wds_blank_lines_of_any_length_up_to_130_are_skipped_silently():
    # documented in planner/catalogs/wds.py: blank lines are skipped (not reported); a full
    # 130-column blank line is still a blank line
    line = _wds_rows()[0][:130].encode()
    df = parse_wds_lines([line, b"", b" " * 17, b" " * 130, line])
    assert list(df["line_no"]) == [1.0, 5.0] and df.attrs["problems"] == []


def test_wds_component_and_note_codes_lose_inner_blanks():
    # components (18-22) and note codes (108-111) are codes, read without blanks
    # (planner/catalogs/wds.py docstring); spectral type and DM number keep single blanks
    line = wds_line(id=((1, 10), "12000+1000"), disc=((11, 17), "STF1234"),
                    comp=((18, 22), "A  BC"), sp=((71, 79), "G8 III  "), dm=((99, 106), "+10 2345"),
                    notes=((108, 111), "N  X"))
    row = parse_wds_lines([line.encode()]).iloc[0]
    assert (row["components"], row["note_flags"]) == ("ABC", "NX")
    assert (row["spectral_type"], row["dm_id"]) == ("G8 III", "+10 2345")
