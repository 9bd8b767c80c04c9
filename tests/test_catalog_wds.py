"""Validation of the WDS summary reader.

Catalogue: Washington Double Star Catalog (USNO), summary-line layout as in
docs/catalogs.md.  The three genuine rows are in
tests/data/usno/wds_rows_found.txt (a '#' comment line first, and a
constellation abbreviation added after column 130 by the quoting file); every
expected value below is read by eye from those lines.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from conftest import reference_file
from planner.catalogs.wds import parse_wds_lines, read_wds
from planner.errors import CatalogError, InputError

ROW1 = "00000+7530A  1248      1904 1982    5 246 235   0.8   0.6 10.27 11.5  A7IV      +034+005          +74 1056      000006.64+752859.8"
ROW2 = "00000+4004ES 2543AB    1931 2015    6 252 253   4.8   4.4 12.1  13.1            +008-004 -011-002               000003.66+400519.4"
ROW3 = "00023-2943B   631      1925 1927    3 306 330   2.0   3.0  5.00 13.   B4III     +019+016          -3019790 NX   000219.91-294313.6"


@pytest.fixture(scope="module")
def wds():
    return read_wds(reference_file("wds_rows_found.txt"))


def wds_line(**cols) -> str:
    """A 130-column WDS line with text placed at 1-based columns (c1=..., c59=...)."""
    buf = [" "] * 130
    for key, text in cols.items():
        start = int(key[1:]) - 1
        buf[start:start + len(text)] = list(text)
    return "".join(buf)


def test_three_rows_and_comment(wds):
    # wds_rows_found.txt: line 1 is a '#' comment, lines 2-4 the three WDS rows; the text after
    # column 130 (" Cep", " And") is ignored
    assert len(wds) == 3
    assert wds["line_no"].tolist() == [2, 3, 4]
    assert wds.attrs["problems"] == []
    assert (wds["source"] == "wds").all()


def test_row1_all_fields(wds):
    # WDS row 1: "00000+7530A  1248      1904 1982    5 246 235   0.8   0.6 10.27 11.5  A7IV
    #  +034+005          +74 1056      000006.64+752859.8"
    r = wds.iloc[0]
    assert (r.wds_id, r.discoverer, r.components) == ("00000+7530", "A 1248", "")
    assert (r.year_first, r.year_last, r.n_obs) == (1904, 1982, 5)
    assert (r.pa_first_deg, r.pa_last_deg, r.sep_first_arcsec, r.sep_last_arcsec) == (246, 235, 0.8, 0.6)
    assert (r.mag1, r.mag2, r.mag1_flag, r.mag2_flag) == (10.27, 11.5, "", "")  # "11.5 " blank 5th column
    assert r.spectral_type == "A7IV"
    assert (r.pm1_ra_masyr, r.pm1_dec_masyr) == (34, 5)
    assert math.isnan(r.pm2_ra_masyr) and math.isnan(r.pm2_dec_masyr)
    assert r.dm_id == "+74 1056" and r.note_flags == ""
    # precise position 00h00m06.64s +75d28'59.8"
    assert r.ra_deg == pytest.approx(6.64 / 3600 * 15, abs=1e-12)
    assert r.dec_deg == pytest.approx(75 + 28 / 60 + 59.8 / 3600, abs=1e-12)
    assert r.coord_precise and not r.has_orbit


def test_row2_four_proper_motions_no_spectrum(wds):
    # WDS row 2: "00000+4004ES 2543AB ... 12.1  13.1            +008-004 -011-002               000003.66+400519.4"
    r = wds.iloc[1]
    assert (r.discoverer, r.components) == ("ES 2543", "AB")
    assert (r.year_first, r.year_last, r.n_obs, r.pa_first_deg, r.pa_last_deg) == (1931, 2015, 6, 252, 253)
    assert (r.sep_first_arcsec, r.sep_last_arcsec, r.mag1, r.mag2) == (4.8, 4.4, 12.1, 13.1)
    assert r.spectral_type == ""
    assert (r.pm1_ra_masyr, r.pm1_dec_masyr, r.pm2_ra_masyr, r.pm2_dec_masyr) == (8, -4, -11, -2)
    assert r.dm_id == "" and r.note_flags == ""
    assert r.dec_deg == pytest.approx(40 + 5 / 60 + 19.4 / 3600, abs=1e-12)


def test_row3_notes_and_dm(wds):
    # WDS row 3: "00023-2943B   631 ... 5.00 13.   B4III     +019+016          -3019790 NX   000219.91-294313.6"
    r = wds.iloc[2]
    assert (r.wds_id, r.discoverer, r.components) == ("00023-2943", "B 631", "")
    assert (r.mag1, r.mag2) == (5.0, 13.0)  # "13.  " -- trailing point, no decimals
    assert r.spectral_type == "B4III" and r.dm_id == "-3019790" and r.note_flags == "NX"
    assert (r.pm1_ra_masyr, r.pm1_dec_masyr) == (19, 16)
    assert r.ra_deg == pytest.approx((2 / 60 + 19.91 / 3600) * 15, abs=1e-12)
    assert r.dec_deg == pytest.approx(-(29 + 43 / 60 + 13.6 / 3600), abs=1e-12)


def test_text_after_column_130_ignored():
    # The same rows with and without their trailing " Cep"/" And" give identical tables.
    with_tail = read_wds(reference_file("wds_rows_found.txt"))
    plain = parse_wds_lines([ROW1.encode(), ROW2.encode(), ROW3.encode()])
    cols = [c for c in plain.columns if c != "line_no"]
    assert with_tail[cols].reset_index(drop=True).equals(plain[cols].reset_index(drop=True))


def test_fallback_position_from_the_wds_id():
    # Blank columns 113-130: position from the id 00023-2943 -> RA 00h02.3m, Dec -29d43'
    # (FORMATS.md A, cols 1-10), flagged coord_precise False
    df = parse_wds_lines([ROW3[:112].encode()])
    r = df.iloc[0]
    assert not r.coord_precise
    assert r.ra_deg == pytest.approx(2.3 / 60 * 15, abs=1e-12)
    assert r.dec_deg == pytest.approx(-(29 + 43 / 60), abs=1e-12)
    assert r.note_flags == "NX"  # everything before column 113 still read


def test_magnitude_flags():
    # A letter inside or just after a magnitude field is a flag (FORMATS.md A, practical advice)
    ln = wds_line(c1="12345+6712", c11="STF  12", c59="10.2K", c65=" 9.8 ", c70="V")
    r = parse_wds_lines([ln.encode()]).iloc[0]
    assert (r.mag1, r.mag1_flag, r.mag2, r.mag2_flag) == (10.2, "K", 9.8, "V")


def test_discoverer_normalised():
    # "STF2272" (code and number touching) -> "STF 2272"; "BU  733" -> "BU 733"
    lines = [wds_line(c1="18055+0230", c11="STF2272", c18="AB"), wds_line(c1="00022+2705", c11="BU  733")]
    df = parse_wds_lines([s.encode() for s in lines])
    assert df["discoverer"].tolist() == ["STF 2272", "BU 733"]
    assert df["components"].tolist() == ["AB", ""]


def test_malformed_and_truncated_lines(tmp_path):
    # line 1 good, 2 bad id, 3 letters in the year, 4 cut after 12 columns, 5 good,
    # 6 blank (skipped, not a problem), 7 inner blank in a separation, 8 damaged precise position,
    # 9 a control character, 10 good but short (60 columns: fields after 60 are blank)
    lines = [ROW1, "0000X+7530" + ROW1[10:], ROW1[:23] + "19a4" + ROW1[27:], ROW1[:12], ROW2, "",
             ROW1[:46] + " 0 8 " + ROW1[51:], ROW1[:112] + "0000xx.64+752859.8",
             ROW1[:30] + "\x07" + ROW1[31:], ROW3[:60]]
    p = tmp_path / "wds.txt"
    p.write_text("\n".join(lines) + "\n")
    df = read_wds(p)
    probs = dict(df.attrs["problems"])
    assert sorted(probs) == [2, 3, 4, 7, 8, 9]
    assert "WDS id" in probs[2]
    assert "24-27" in probs[3]
    assert "too short" in probs[4]
    assert "47-51" in probs[7]
    assert "113-130" in probs[8]
    assert "control" in probs[9]
    assert df["line_no"].tolist() == [1, 5, 10]
    last = df.iloc[2]
    assert last.mag1 == 5.0 and math.isnan(last.mag2) and not last.coord_precise


def test_crlf_line_ends(tmp_path):
    p = tmp_path / "crlf.txt"
    p.write_bytes(("\r\n".join([ROW1, ROW2, ROW3]) + "\r\n").encode())
    df = read_wds(p)
    assert len(df) == 3 and df.attrs["problems"] == []
    assert df.iloc[2].note_flags == "NX"


def test_bad_files(tmp_path):
    (tmp_path / "empty.txt").write_bytes(b"")
    with pytest.raises(CatalogError, match="empty"):
        read_wds(tmp_path / "empty.txt")
    (tmp_path / "bin.dat").write_bytes(b"\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR" + bytes(200))
    with pytest.raises(CatalogError, match="binary"):
        read_wds(tmp_path / "bin.dat")
    with pytest.raises(InputError, match="does not exist"):
        read_wds(tmp_path / "missing.txt")
    with pytest.raises(InputError, match="directory"):
        read_wds(tmp_path)
    # an ORB6 orbits file given as WDS: no line has a WDS id in columns 1-10
    with pytest.raises(CatalogError, match="no WDS summary lines") as exc:
        read_wds(reference_file("orb6_orbits.txt"))
    assert "\n" not in str(exc.value)


def test_cached_reload_is_identical(tmp_path):
    # The catalogue cache returns the same tables, and a changed file is parsed again.
    import pandas as pd

    from planner.catalogs.catalog import load_files

    p = tmp_path / "w.txt"
    p.write_text("\n".join([ROW1, ROW2]) + "\n")
    a = load_files(p)
    b = load_files(p)
    pd.testing.assert_frame_equal(a.pairs, b.pairs)
    pd.testing.assert_frame_equal(a.orbits, b.orbits)
    assert b.problems == [] and b.source == a.source
    p.write_text("\n".join([ROW1, ROW2, ROW3, "junk"]) + "\n")
    c = load_files(p)
    assert len(c.pairs) == 3
    assert c.problems == [(str(p), 4, "line too short to hold the WDS id and discoverer (17 columns)")]


def test_corrupt_cache_quarantined(tmp_path, capsys):
    from planner.catalogs import cache
    from planner.catalogs.catalog import load_files
    from planner.config.storage import user_dir

    p = tmp_path / "w.txt"
    p.write_text(ROW1 + "\n")
    load_files(p)
    entry = next((user_dir("cache") / "catalogs").glob("files-*" + cache.SUFFIX))
    raw = bytearray(entry.read_bytes())
    raw[-10] ^= 0xFF  # flip a byte of the payload: the checksum no longer matches
    entry.write_bytes(bytes(raw))
    capsys.readouterr()
    cat = load_files(p)
    err = capsys.readouterr().err
    assert len(cat.pairs) == 1
    assert err.count("\n") == 1 and "damaged" in err and "rebuilding" in err
    assert list((user_dir("cache") / "catalogs").glob("files-*.corrupt-*"))
    load_files(p)
    assert capsys.readouterr().err == ""  # rebuilt, then used quietly


def test_wide_random_rows_agree_with_plain_slicing():
    # Independent check of the vectorised number parser: 2,000 generated rows, every numeric
    # field compared with Python's float() on the same column slice (FORMATS.md A columns).
    rng = np.random.default_rng(7)
    rows = []
    for i in range(2000):
        rows.append(wds_line(
            c1=f"{rng.integers(0, 24):02d}{rng.integers(0, 60):02d}{rng.integers(0, 10)}"
               f"{'+-'[i % 2]}{rng.integers(0, 90):02d}{rng.integers(0, 60):02d}",
            c11="STF  12", c24=f"{rng.integers(1780, 2025):4d}", c29=f"{rng.integers(1780, 2025):4d}",
            c34=f"{rng.integers(1, 9999):4d}", c39=f"{rng.integers(0, 360):3d}",
            c47=f"{rng.uniform(0, 999):5.1f}", c59=f"{rng.uniform(-1.5, 20):5.2f}",
            c81=f"{rng.integers(-999, 999):+04d}"))
    df = parse_wds_lines([r.encode() for r in rows])
    assert len(df) == 2000
    for name, (a, b) in {"year_first": (24, 27), "year_last": (29, 32), "n_obs": (34, 37),
                         "pa_first_deg": (39, 41), "sep_first_arcsec": (47, 51), "mag1": (59, 63),
                         "pm1_ra_masyr": (81, 84)}.items():
        ref = np.array([float(r[a - 1:b]) for r in rows])
        np.testing.assert_array_equal(df[name].to_numpy(), ref, err_msg=name)
