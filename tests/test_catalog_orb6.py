"""Validation of the ORB6 reader against the USNO ORB6 orbits text file.

Catalogue: Sixth Catalog of Orbits of Visual Binary Stars (USNO; Hartkopf,
Mason & Worley 2001), text version, late-2008 snapshot bundled in
catalogs_sample/orb6_orbits.txt.  Expected values are read by eye from the
lines of that file (quoted beside each check with the line number) or counted
from it (docs/catalogs.md).  Unit conversions are checked against the ORB6
format's unit flags (Hartkopf, Mason & Worley 2001; docs/catalogs.md); the
Besselian-year formula is Lieske (1979), A&A 73, 282 (docs/methods.md section 7).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from conftest import reference_file
from planner.catalogs.orb6 import parse_orb6_lines, read_orb6
from planner.utc import TROPICAL_YEAR_D
from planner.utc import besselian_year_from_jd
from planner.errors import CatalogError, InputError

TROP = 365.242198781  # tropical year in days (FORMATS.md section B; from memory: 365.2421988)


def bessel(jd):
    # Lieske (1979): B = 1900.0 + (JD - 2415020.31352) / 365.242198781
    return 1900.0 + (jd - 2415020.31352) / TROP


@pytest.fixture(scope="module")
def orb():
    return read_orb6(reference_file("orb6_orbits.txt"))


def row(orb, line_no):
    r = orb[orb["line_no"] == line_no]
    assert len(r) == 1, f"no orbit from line {line_no}"
    return r.iloc[0]


def test_counts(orb):
    # USNO ORB6 (orb6_orbits.txt): 2,096 orbit lines of 1,897 systems, 2,077 with all seven
    # elements (reference/README.md); 7 header lines, none reported as a problem.
    assert len(orb) == 2096
    assert orb["wds_id"].nunique() == 1897
    assert int(orb["complete"].sum()) == 2077
    assert orb.attrs["problems"] == []
    # the complete orbits split 1,595 visual grade 1-5 / 469 grade 9 / 13 grade 8 (README.md)
    c = orb[orb["complete"]]
    assert int(c["grade"].between(1, 5).sum()) == 1595
    assert int((c["grade"] == 9).sum()) == 469
    assert int((c["grade"] == 8).sum()) == 13


def test_unit_code_tallies(orb):
    # FORMATS.md B, fields 9/11/17: P codes y 1623, d 457, c 8, h 1, none 7;
    # a codes a 1630, m 460; T codes y 1629, d 458 (counted in the USNO file).
    assert orb["period_unit"].value_counts().to_dict() == {"y": 1623, "d": 457, "c": 8, "h": 1, "": 7}
    a = orb["a_unit"].value_counts().to_dict()
    assert a["a"] == 1630 and a["m"] == 460
    t = orb["t_peri_unit"].value_counts().to_dict()
    assert t["y"] == 1629 and t["d"] == 458
    # FORMATS.md B field 15: 24 nodes flagged '*', none 'q'; field 23: equinox blank in 863 rows;
    # field 24: last observation blank in 389 rows
    assert int((orb["node_flag"] == "*").sum()) == 24
    assert int(orb["equinox"].isna().sum()) == 863
    assert int(orb["year_last_obs"].isna().sum()) == 389


def test_first_line_hip1997d_days_and_mas(orb):
    # ORB6 line 8: "000000.91-192955.8 00000-1930 LTT 9831 ... 224690 2 9.0 . 499.7989 d 18.8466
    #  14.31 m 2.81 118.06 5.05 77.28 5.20 48397.3164 d 10.1805 0.0000 . 0.00 . 1991 9 n HIP1997d"
    r = row(orb, 8)
    assert r.wds_id == "00000-1930" and r.discoverer == "LTT 9831" and r.components == ""
    assert r.reference == "HIP1997d" and r.grade == 9 and r.notes_flag == "n"
    assert r.hd == "224690" and r.hip == "2" and math.isnan(r.ads)
    assert r.mag1 == 9.0 and math.isnan(r.mag2)
    assert r.period_yr == pytest.approx(499.7989 / TROP, rel=1e-12)  # d / tropical year
    assert r.period_err_yr == pytest.approx(18.8466 / TROP, rel=1e-12)
    assert r.a_arcsec == pytest.approx(0.01431, rel=1e-12)  # mas x 0.001
    assert r.a_err_arcsec == pytest.approx(0.00281, rel=1e-12)
    assert (r.incl_deg, r.incl_err_deg, r.node_deg, r.node_err_deg) == (118.06, 5.05, 77.28, 5.20)
    assert r.t_peri_yr == pytest.approx(bessel(2448397.3164), abs=1e-9)  # d = JD - 2,400,000
    assert r.t_peri_err_yr == pytest.approx(10.1805 / TROP, rel=1e-12)
    assert r.ecc == 0.0 and math.isnan(r.ecc_err) and r.omega_deg == 0.0
    assert math.isnan(r.equinox) and r.year_last_obs == 1991
    assert r.plot_file == "wds00000-1930p.png" and r.complete


def test_third_line_position_and_years(orb):
    # ORB6 line 10: "000123.69+393638.9 00014+3937 HLD  60  17178 224873 110 9.09 9.77 227. y . 0.85 a .
    #  128.8 . 144.9 . 1902.5 y . 0.66 . 145.5 . 2000 1961 4 n Hei1963a wds00014+3937a.png"
    r = row(orb, 10)
    assert r.discoverer == "HLD 60" and r.ads == 17178 and r.hd == "224873" and r.hip == "110"
    assert r.ra_deg == pytest.approx((0 + 1 / 60 + 23.69 / 3600) * 15, abs=1e-12)
    assert r.dec_deg == pytest.approx(39 + 36 / 60 + 38.9 / 3600, abs=1e-12)
    assert (r.period_yr, r.a_arcsec, r.incl_deg, r.node_deg) == (227.0, 0.85, 128.8, 144.9)
    assert (r.t_peri_yr, r.ecc, r.omega_deg, r.equinox, r.year_last_obs) == (1902.5, 0.66, 145.5, 2000, 1961)
    assert r.grade == 4 and r.reference == "Hei1963a" and r.complete


def test_designation_split(orb):
    # ORB6 line 11 "BU  733AB" -> BU 733 + AB; line 30 "SKW   1Aa,Ab"; line 828 "del Vel Aa,Ab";
    # line 1162 "M Cen" (a name, no components)
    r = row(orb, 11)
    assert (r.discoverer, r.components, r.period_yr, r.grade, r.reference) == ("BU 733", "AB", 26.28, 2, "Sod1999")
    assert math.isnan(r.year_last_obs)  # column 229-232 blank on this line
    assert (row(orb, 30).discoverer, row(orb, 30).components) == ("SKW 1", "Aa,Ab")
    assert (row(orb, 828).discoverer, row(orb, 828).components) == ("del Vel", "Aa,Ab")
    assert (row(orb, 1162).discoverer, row(orb, 1162).components) == ("M Cen", "")


def test_period_in_hours_12_boo(orb):
    # ORB6 line 1189, 12 Boo (Bod2005a): "230.509181h 0.000182 3.451 m 0.018 107.990 ...
    #  51237.7729 d 0.0051 0.19233 0.00086 286.67 0.19 2000 2004 8"
    r = row(orb, 1189)
    assert r.discoverer == "12 Boo" and r.reference == "Bod2005a" and r.period_unit == "h"
    assert r.period_yr == pytest.approx(230.509181 / 24 / TROP, rel=1e-12)  # hours -> days -> years
    assert r.period_err_yr == pytest.approx(0.000182 / 24 / TROP, rel=1e-9)
    assert r.a_arcsec == pytest.approx(0.003451, rel=1e-12)
    assert r.t_peri_yr == pytest.approx(bessel(2451237.7729), abs=1e-9)
    assert r.ecc == 0.19233 and r.grade == 8 and r.complete


def test_negative_semimajor_axis_kept(orb):
    # ORB6 line 239, 02130+0851 HIP1997d: "-4.52 m" -- kept as catalogued (README.md caveat)
    r = row(orb, 239)
    assert r.wds_id == "02130+0851" and r.reference == "HIP1997d"
    assert r.a_arcsec == pytest.approx(-0.00452, rel=1e-12)
    assert r.t_peri_yr == pytest.approx(bessel(2434985.5), abs=1e-9)
    assert r.complete  # all seven present, e = 0 valid


def test_negative_inclination_kept(orb):
    # ORB6 line 1521, 17457-2900 GHE 46AC, Ghe2003: i = -47.3 (error 2.5), kept as catalogued
    r = row(orb, 1521)
    assert (r.discoverer, r.components, r.reference) == ("GHE 46", "AC", "Ghe2003")
    assert r.incl_deg == -47.3 and r.incl_err_deg == 2.5 and r.complete


@pytest.mark.parametrize("line_no, wds_id, ref, t_d", [
    (184, "01374+2510", "Bod2006", 451786.408),   # starts in column 162, one column early
    (1213, "14191-1322", "Zha2007", 453070.30),
])
def test_odd_t0_days_read_literally(orb, line_no, wds_id, ref, t_d):
    # ORB6 lines 184 and 1213: T0 with code 'd' that looks like JD - 2,000,000; read literally as
    # JD - 2,400,000 as the catalogue's own ephemeris does (reference/README.md)
    r = row(orb, line_no)
    assert (r.wds_id, r.reference, r.t_peri_unit) == (wds_id, ref, "d")
    assert r.t_peri_yr == pytest.approx(bessel(2400000 + t_d), abs=1e-9)
    assert r.t_peri_yr > 3000  # the literal reading puts periastron in the 31st century


def test_period_in_centuries(orb):
    # ORB6 line 20, 00057+4549 STT 547AF, Kiy2001: "830.37 c ... 205.1 a ... 26357. y"
    r = row(orb, 20)
    assert (r.discoverer, r.components, r.period_unit) == ("STT 547", "AF", "c")
    assert r.period_yr == pytest.approx(83037.0, rel=1e-12)  # centuries x 100
    assert r.a_arcsec == 205.1 and r.t_peri_yr == 26357.0 and r.complete


def test_incomplete_rows(orb):
    # ORB6 line 75, 00360+2959 STF 42AB, Hop1967: P '.', and "16.36" in the eccentricity columns
    # (it starts in column 187; README.md quotes 6.36, reading only columns 188-195)
    r = row(orb, 75)
    assert math.isnan(r.period_yr) and r.ecc == 16.36 and not r.complete
    # line 828, del Vel (Kel2007): T0 is '.', so incomplete although the other six are present
    r = row(orb, 828)
    assert math.isnan(r.t_peri_yr) and r.period_yr == pytest.approx(45.150 / TROP) and not r.complete


def test_magnitude_flags(orb):
    # ORB6 line 413 "<13.2  >15.4": leading flags in columns 66 and 73;
    # line 529 "7.31v?  ." : 'v?' after the primary spills into column 73;
    # line 1475 "10.83 111.13": a stray digit in column 73, secondary 11.13;
    # line 1252 "10.02k 10.43k": trailing flags in columns 72 and 79
    r = row(orb, 413)
    assert (r.mag1, r.mag1_flag, r.mag2, r.mag2_flag) == (13.2, "<", 15.4, ">")
    r = row(orb, 529)
    assert (r.mag1, r.mag1_flag, r.mag2_flag) == (7.31, "v?", "") and math.isnan(r.mag2)
    r = row(orb, 1475)
    assert (r.mag1, r.mag2, r.mag2_flag) == (10.83, 11.13, "")
    r = row(orb, 1252)
    assert (r.mag1_flag, r.mag2_flag) == ("k", "k")


def test_error_fields_one_column_early(orb):
    # ORB6 line 158 (Gln2006): " 2656.      d1349.  " and " 49713.      d1304. " -- the errors of
    # P and T0 start in columns 94 and 176, right after the unit code, one column early
    r = row(orb, 158)
    assert r.reference == "Gln2006"
    assert r.period_yr == pytest.approx(2656.0 / TROP) and r.period_err_yr == pytest.approx(1349.0 / TROP)
    assert r.t_peri_yr == pytest.approx(bessel(2449713.0), abs=1e-9)
    assert r.t_peri_err_yr == pytest.approx(1304.0 / TROP)
    # ORB6 line 1386, GNT 1: "1217.536 y 81.521 2.92750a 0.03447 80.750 0.072 ... 1273.670 y 64.033"
    r = row(orb, 1386)
    assert r.period_err_yr == 81.521 and r.a_arcsec == 2.9275 and r.a_err_arcsec == 0.03447
    assert r.t_peri_err_yr == 64.033


def test_preferred_one_per_pair(orb):
    # contract: exactly one preferred orbit per (wds_id, components)
    n = orb.groupby(["wds_id", "components"])["preferred"].sum()
    assert (n == 1).all()
    # 00321+6715: two orbits from Doc2008d of different pairs (MCY 1Aa,Ab grade 2, VYS 2AB grade 5),
    # each preferred for its own pair (ORB6 lines 69-70)
    assert row(orb, 69).preferred and row(orb, 70).preferred


def orb6_line(**cols) -> bytes:
    """A 264-column line with text placed at 1-based columns: orb6_line(c20="00000+0000", ...)."""
    buf = [" "] * 264
    for key, text in cols.items():
        start = int(key[1:]) - 1
        buf[start:start + len(text)] = list(text)
    return "".join(buf).encode()


def valid_line(grade="2", ref="Aaa2000a"):
    # columns as in FORMATS.md section B (field: first column)
    return orb6_line(c1="000000.00+000000.0", c20="00000+0000", c31="STF   1AB", c67=" 6.00",
                     c74=" 7.00", c82="    100.0", c93="y", c106="    1.000", c115="a",
                     c126="    50.0", c144="    60.0", c163="     1950.0", c175="y",
                     c188="   0.500", c206="    70.0", c224="2000", c229="2000", c234=grade,
                     c238=ref)


def test_preferred_rule_grade_then_year():
    # Hand-made lines in the ORB6 layout, one pair, three orbits: grade 3 (Aaa1990a),
    # grade 2 (Bbb1980a), grade 2 (Ccc2001a) -> the newest grade-2 orbit is preferred.
    lines = [valid_line(g, ref) for g, ref in (("3", "Aaa1990a"), ("2", "Bbb1980a"), ("2", "Ccc2001a"))]
    df = parse_orb6_lines(lines)
    assert df["reference"].tolist() == ["Aaa1990a", "Bbb1980a", "Ccc2001a"]
    assert df["grade"].tolist() == [3, 2, 2]
    assert df["preferred"].tolist() == [False, False, True]
    assert df["complete"].all() and (df["period_yr"] == 100.0).all()
    assert (df["discoverer"] == "STF 1").all() and (df["components"] == "AB").all()
    # a complete grade-9 orbit beats an incomplete grade-1 one (e >= 1 makes it incomplete)
    inc = bytearray(valid_line("1", "Ddd2005a"))
    inc[187:195] = b"   1.500"
    df = parse_orb6_lines([valid_line("9", "Eee1990a"), bytes(inc)])
    assert df["complete"].tolist() == [True, False]
    assert df["preferred"].tolist() == [True, False]


def test_besselian_formula():
    # Lieske (1979): B1900.0 = JD 2415020.31352, B1950.0 = JD 2433282.4235
    assert besselian_year_from_jd(2415020.31352) == pytest.approx(1900.0, abs=1e-12)
    assert besselian_year_from_jd(2433282.4235) == pytest.approx(1950.0, abs=1e-6)
    assert TROPICAL_YEAR_D == TROP


def test_reader_agrees_with_plain_slicing():
    # Independent check: every numeric field of every orbit line parsed with Python's float()
    # on the column slices (FORMATS.md B, widened as in orb6.py) gives the same values.
    path = reference_file("orb6_orbits.txt")
    lines = path.read_text().splitlines()
    df = read_orb6(path)
    fields = {"incl_deg": (125, 133), "node_deg": (143, 151), "ecc": (187, 195),
              "omega_deg": (205, 213), "equinox": (223, 227), "year_last_obs": (228, 232),
              "grade": (233, 235), "mag1": (67, 71), "mag2": (74, 78)}
    for name, (a, b) in fields.items():
        ref = []
        for ln in df["line_no"].astype(int):
            s = lines[ln - 1][a - 1:b].strip()
            ref.append(float(s) if s not in ("", ".") else np.nan)
        np.testing.assert_array_equal(df[name].to_numpy(), np.array(ref), err_msg=name)


# -- damaged input ---------------------------------------------------------------


def test_malformed_and_truncated_lines_reported(tmp_path):
    # Lines 8.. of the USNO file with damage: a bad WDS id, letters in the period, a line cut
    # before the grade, a non-ASCII byte; the rest still load.
    src = reference_file("orb6_orbits.txt").read_bytes().split(b"\n")
    good = src[:20]
    bad_id = src[20][:19] + b"0000X+1234" + src[20][29:]
    bad_num = src[21][:81] + b"abc.def    " + src[21][92:]
    short = src[22][:150]
    nonascii = src[23][:40] + b"\xe9" + src[23][41:]
    p = tmp_path / "orb6.txt"
    p.write_bytes(b"\n".join(good + [bad_id, bad_num, short, nonascii] + src[24:40]) + b"\n")
    df = read_orb6(p)
    probs = dict(df.attrs["problems"])
    assert sorted(probs) == [21, 22, 23, 24]
    assert "WDS id" in probs[21]
    assert "81-92" in probs[22]
    assert "truncated" in probs[23]
    assert "non-ASCII" in probs[24]
    assert len(df) == (20 - 7) + 16


def test_empty_binary_missing_directory_wrongkind(tmp_path):
    (tmp_path / "empty.txt").write_bytes(b"")
    with pytest.raises(CatalogError, match="empty"):
        read_orb6(tmp_path / "empty.txt")
    (tmp_path / "blank.txt").write_bytes(b"\n   \n")
    with pytest.raises(CatalogError, match="empty"):
        read_orb6(tmp_path / "blank.txt")
    (tmp_path / "bin.dat").write_bytes(bytes(range(256)) * 10)
    with pytest.raises(CatalogError, match="binary"):
        read_orb6(tmp_path / "bin.dat")
    with pytest.raises(InputError, match="does not exist"):
        read_orb6(tmp_path / "nope.txt")
    with pytest.raises(InputError, match="directory"):
        read_orb6(tmp_path)
    # a WDS summary file given as ORB6: nothing parses -> one clear error
    with pytest.raises(CatalogError, match="no ORB6 orbit lines"):
        read_orb6(reference_file("wds_rows_found.txt"))
