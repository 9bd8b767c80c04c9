"""The loaded catalogue: merging WDS rows with ORB6 orbits, the bundled
sample, loading by spec, and finding a pair by name.

Catalogues: the bundled USNO sample (catalogs_sample/: ORB6 late-2008 text
file and three WDS summary rows); counts are derived from the ORB6 file as
stated beside each check.  Look-up rules are the project's own (documented in
docs/catalogs.md), checked on real designations from the ORB6 file.
"""

from __future__ import annotations

import math

import pandas as pd
import pytest

from conftest import reference_file
from planner.catalogs import find_pair, load_catalog, load_sample
from planner.catalogs.catalog import Catalog, detect_kind, merge, pairs_from_orbits
from planner.catalogs.orb6 import read_orb6
from planner.catalogs.wds import parse_wds_lines
from planner.errors import InputError, UnknownPairError
from planner.schema import ORBIT_CONTRACT, PAIR_COLUMNS, PAIR_CONTRACT


@pytest.fixture(scope="module")
def sample():
    return load_sample()


def test_sample_shape_and_contract(sample):
    assert isinstance(sample, Catalog)
    assert list(sample.pairs.columns) == [c.name for c in PAIR_COLUMNS]
    assert set(PAIR_CONTRACT) <= set(sample.pairs.columns)
    assert set(ORBIT_CONTRACT) <= set(sample.orbits.columns)
    # ORB6 (orb6_orbits.txt): 2,096 orbits; 1,961 distinct (wds_id, components) pairs -- none of them
    # is one of the three WDS rows (00000+7530, 00000+4004, 00023-2943 have no ORB6 orbit) -- so
    # 1,961 + 3 = 1,964 pair rows; plus the BSC5 bright pairs (bsc5_pairs.csv, 1,037 rows built by
    # scripts/build_name_index.py) that no ORB6 pair already holds: 879 (158 share the WDS id and
    # component key of an ORB6 pair, which keeps its orbit)
    assert len(sample.orbits) == 2096
    assert sample.orbits.groupby(["wds_id", "components"]).ngroups == 1961
    assert (sample.pairs["source"] != "bsc5").sum() == 1964
    assert (sample.pairs["source"] == "bsc5").sum() == 879
    assert len(sample.pairs) == 1964 + 879
    assert sample.pairs.index.is_unique
    assert (sample.pairs["source"] == "wds").sum() == 3
    assert sample.problems == []
    assert sample.retrieved == "2008-11"


def test_orb6_rows_carry_no_invented_data(sample):
    # pairs built from ORB6 carry no catalogued separation, angle, first year or count
    o = sample.pairs[sample.pairs["source"] == "orb6"]
    for c in ("sep_first_arcsec", "sep_last_arcsec", "pa_first_deg", "pa_last_deg", "year_first", "n_obs"):
        assert o[c].isna().all(), c
    assert (o["spectral_type"] == "").all() and (o["dm_id"] == "").all()


def test_pair_from_preferred_orbit(sample):
    # 18055+0230 STF 2272AB (70 Oph) in ORB6 has one preferred orbit; its pair row takes
    # position, magnitudes and the last-observation year from that orbit
    o = sample.orbits
    pref = o[(o["wds_id"] == "18055+0230") & o["preferred"]].iloc[0]
    lab = find_pair(sample, "STF2272AB")
    r = sample.pairs.loc[lab]
    assert (r.wds_id, r.discoverer, r.components) == ("18055+0230", "STF 2272", "AB")
    assert (r.ra_deg, r.dec_deg, r.mag1, r.mag2) == (pref.ra_deg, pref.dec_deg, pref.mag1, pref.mag2)
    assert r.year_last == pref.year_last_obs or (math.isnan(r.year_last) and math.isnan(pref.year_last_obs))
    assert r.has_orbit and pref.grade <= 5 and pref.complete


def test_has_orbit_counts(sample):
    # has_orbit: a complete grade 1-5 orbit for the pair. Counted independently from the orbit table.
    o = sample.orbits
    usable = o[o["complete"] & o["grade"].between(1, 5)]
    keys = set(zip(usable["wds_id"], usable["components"]))
    expected = sum((w, c) in keys for w, c in zip(sample.pairs["wds_id"], sample.pairs["components"]))
    assert int(sample.pairs["has_orbit"].sum()) == expected == 1546


def test_merge_wds_wins_and_blank_components_mean_ab():
    # A WDS row for 18055+0230 with blank components takes the place of the ORB6 'AB' pair; the
    # ORB6 orbit then marks it has_orbit (a blank WDS label is the plain AB pair).
    orb = read_orb6(reference_file("orb6_orbits.txt"))
    sub = orb[orb["wds_id"].isin(["18055+0230", "00014+3937"])]
    # columns as in FORMATS.md A: id 1-10, discoverer 11-17, years 24-27/29-32, n 34-37,
    # angles 39-41/43-45, separations 47-51/53-57, magnitudes 59-63/65-69
    line = "18055+0230STF2272      1779 2020  900 150 120   1.0   2.0  4.20  6.10"
    assert line[23:27] == "1779" and line[52:57] == "  2.0" and line[58:63] == " 4.20"
    w = parse_wds_lines([line.encode()])
    cat = merge(w, sub, source="test")
    assert len(cat.pairs) == 2  # 18055+0230 from WDS, 00014+3937 from ORB6
    first = cat.pairs.iloc[0]
    assert (first.source, first.discoverer, first.components) == ("wds", "STF 2272", "")
    assert first.has_orbit and first.sep_last_arcsec == 2.0
    assert cat.pairs.iloc[1].source == "orb6"


def test_pairs_from_orbits_schema():
    orb = read_orb6(reference_file("orb6_orbits.txt"))
    p = pairs_from_orbits(orb)
    assert list(p.columns) == [c.name for c in PAIR_COLUMNS]
    assert len(p) == int(orb["preferred"].sum()) == 1961
    assert p["coord_precise"].all() and (p["source"] == "orb6").all()


@pytest.mark.parametrize("query, wds_id, comp", [
    ("18055+0230", "18055+0230", "AB"),   # WDS id
    ("STF2272AB", "18055+0230", "AB"),    # designation, no blanks
    ("STF 2272 AB", "18055+0230", "AB"),  # with blanks
    ("STF2272", "18055+0230", "AB"),      # no components
    ("stf2272", "18055+0230", "AB"),      # lower case
    ("12 Boo", "14104+2506", ""),         # an ORB6 name
    ("12boo", "14104+2506", ""),
    ("del Vel", "08447-5443", "Aa,Ab"),   # name with components in ORB6
    ("00000+7530", "00000+7530", ""),     # a WDS row of the sample
    ("ES 2543", "00000+4004", "AB"),
])
def test_find_pair(sample, query, wds_id, comp):
    r = sample.pairs.loc[find_pair(sample, query)]
    assert (r.wds_id, r.components) == (wds_id, comp)


def test_find_pair_several_components_prefers_usable_orbit_then_ab(sample):
    # 00321+6715 has two ORB6 pairs (MCY 1Aa,Ab grade 2 and VYS 2AB grade 5, ORB6 lines 69-70): by
    # WDS id alone both have usable orbits -> the AB pair is taken
    r = sample.pairs.loc[find_pair(sample, "00321+6715")]
    assert r.components == "AB"
    r = sample.pairs.loc[find_pair(sample, "00321+6715 Aa,Ab")]
    assert r.discoverer == "MCY 1"


def test_unknown_pair_suggests(sample):
    with pytest.raises(UnknownPairError) as exc:
        find_pair(sample, "STF2273")
    assert any(s.startswith("STF 2272") for s in exc.value.suggestions)
    assert "\n" not in str(exc.value)
    with pytest.raises(UnknownPairError) as exc:
        find_pair(sample, "18055+0231")
    assert "18055+0230" in exc.value.suggestions
    with pytest.raises(InputError):
        find_pair(sample, "   ")


def test_load_catalog_specs(tmp_path):
    assert load_catalog("sample").source.startswith("bundled sample")
    # an ORB6 file by path: the kind is detected from the content
    orb6 = reference_file("orb6_orbits.txt")
    assert detect_kind(orb6) == "orb6"
    cat = load_catalog(str(orb6))
    assert len(cat.pairs) == 1961 and len(cat.orbits) == 2096
    # a WDS file with an ORB6 file of orbits
    wds = reference_file("wds_rows_found.txt")
    assert detect_kind(wds) == "wds"
    cat = load_catalog(str(wds), orbits=str(orb6))
    assert len(cat.pairs) == 1964
    cat = load_catalog(str(wds))
    assert len(cat.pairs) == 3 and len(cat.orbits) == 0 and not cat.pairs["has_orbit"].any()
    with pytest.raises(InputError, match="not found"):
        load_catalog(str(tmp_path / "none.txt"))
    (tmp_path / "other.txt").write_text("hello world\nnot a catalogue\n")
    with pytest.raises(InputError, match="neither a WDS"):
        load_catalog(str(tmp_path / "other.txt"))


def test_vizier_without_snapshot_falls_back_to_sample(capsys):
    cat = load_catalog("vizier")
    err = capsys.readouterr().err
    assert cat.source.startswith("bundled sample")
    assert "no VizieR snapshot" in err and "bundled sample" in err


def test_sample_found_through_package_resources(tmp_path):
    # The sample is read via importlib.resources from planner.catalogs_sample (not a repo path).
    # Checked in a fresh interpreter started outside the checkout, so that it sees the
    # *installed* package (in the test run itself the source tree may shadow it).
    import subprocess
    import sys

    code = ("import hashlib, importlib.resources as r, planner; "
            "root = r.files('planner.catalogs_sample'); "
            "print(hashlib.sha256((root / 'orb6_orbits.txt').read_bytes()).hexdigest(), "
            "(root / 'wds_summary_rows.txt').is_file())")
    res = subprocess.run([sys.executable, "-P", "-c", code], cwd=tmp_path, capture_output=True, text=True)
    if "No module named 'planner'" in res.stderr:
        pytest.skip("splitplan is not installed in this interpreter (source-tree run)")
    assert res.returncode == 0, res.stderr
    import hashlib

    digest, wds_ok = res.stdout.split()
    assert wds_ok == "True"
    assert digest == hashlib.sha256(reference_file("orb6_orbits.txt").read_bytes()).hexdigest()


def test_catalog_pairs_types(sample):
    p = sample.pairs
    for c in PAIR_COLUMNS:
        if c.dtype == "float":
            assert pd.api.types.is_float_dtype(p[c.name]), c.name
        elif c.dtype == "bool":
            assert pd.api.types.is_bool_dtype(p[c.name]), c.name
        else:
            assert pd.api.types.is_string_dtype(p[c.name]), c.name
