"""Names in the outputs, the checked VizieR labels, and the optional online look-up (issue 10).

Outside sources: the CDS byte-by-byte description of B/wds file wds.dat (its labels are kept in
tests/data/cds_B_wds_labels.txt, quoted from the CDS ReadMe); the IAU Catalog of Star Names
(Castor = alf Gem, Albireo = bet Cyg). SIMBAD replies are hand-built astropy tables in the shape
astroquery returns (``id`` column of identifiers; ``main_id``, ``ra``, ``dec`` in degrees), the
values being the SIMBAD identifiers and J2000 position of beta Cyg as listed in the IAU-CSN
(HR 7417, HIP 95947, HD 183912; 292.680351, +27.959692) -- no live reply could be recorded here
(the network is blocked).
"""

from __future__ import annotations

import csv
import io
import json
import re
from pathlib import Path

import numpy as np
import pytest

from conftest import DATA
from planner.catalogs import find_pairs, load_sample

DEMO = dict(site={"lat_deg": 52.1873, "lon_deg": -2.4127, "elevation_m": 95.0, "tz": "Europe/London"},
            scopes=[{"name": "102 mm", "aperture_mm": 102.0, "obstruction": 0.0}],
            date="2026-12-05", seeing_arcsec=1.5)


@pytest.fixture(scope="module")
def sample():
    return load_sample()


@pytest.fixture(scope="module")
def plan(sample):
    from planner.plan.model import NightRequest
    from planner.plan.night import plan_night

    return plan_night(NightRequest(**DEMO), sample)


# -- names in every output --------------------------------------------------------------

def test_schedule_has_names_and_constellations(plan):
    s = plan.scopes[0].schedule
    assert "name" in s.columns
    castor = s[s["wds_id"] == "07346+3153"].iloc[0]
    assert castor["name"] == "Castor" and castor["constellation"] == "Gem"
    # the bright BSC5 pair gamma And (ADS 1630): IAU name Almach
    alm = s[s["wds_id"] == "02039+4220"].iloc[0]
    assert alm["name"] == "Almach" and alm["constellation"] == "And"
    assert (s["name"] != "").sum() >= len(s) // 3


def test_text_csv_json_votable_html_carry_the_name(plan, tmp_path):
    from planner.report import exports

    text = exports.render_text(plan)
    head = next(ln for ln in text.splitlines() if ln.strip().startswith("# time"))
    assert " name " in head
    assert any("Castor" in ln and "07346+3153" in ln for ln in text.splitlines())
    exports.write_csv(plan, tmp_path / "p.csv")
    rows = list(csv.DictReader(io.StringIO((tmp_path / "p.csv").read_text(encoding="utf-8"))))
    assert {"name", "constellation"} <= set(rows[0]) and "Castor" in {r["name"] for r in rows}
    exports.write_json(plan, tmp_path / "p.json")
    recs = json.loads((tmp_path / "p.json").read_text(encoding="utf-8"))
    assert "Castor" in {r["name"] for r in recs}
    exports.write_votable(plan, tmp_path / "p.vot")
    from astropy.io.votable import parse_single_table

    t = parse_single_table(str(tmp_path / "p.vot")).to_table()
    assert "name" in t.colnames and "Castor" in set(str(v) for v in t["name"])
    exports.write_html(plan, tmp_path / "p.html")
    assert "Castor" in (tmp_path / "p.html").read_text(encoding="utf-8")


def test_pair_names_from_rows_without_catalogue_labels(sample):
    from planner.catalogs import pair_names

    lab = find_pairs(sample, "Albireo")[0]
    rows = sample.pairs.loc[[lab], ["wds_id", "discoverer", "components", "ra_deg", "dec_deg"]]
    assert pair_names(sample, rows=rows)["name"].tolist() == ["Albireo"]


# -- VizieR -------------------------------------------------------------------------------

def test_wds_labels_are_the_cds_labels():
    from planner.catalogs import vizier

    cds = [ln.split()[0] for ln in (DATA / "cds_B_wds_labels.txt").read_text(encoding="utf-8").splitlines()
           if ln.strip() and not ln.startswith("#")]
    assert tuple(cds) == vizier.CDS_WDS_LABELS
    used = {lab for labs in vizier.WDS_LABELS.values() for lab in labs}
    assert used <= set(cds) | set(vizier.VIZIER_POSITION_LABELS), used - set(cds)
    # and the recorded reply carries them
    from astropy.io.votable import parse_single_table

    t = parse_single_table(str(DATA / "vizier_wds_reply.vot")).to_table()
    assert {lab for labs in vizier.WDS_LABELS.values() for lab in labs[:1]} - {"n_RAh"} <= set(t.colnames)


def test_download_uses_no_private_astroquery_method():
    # before issue 10 the download called Vizier._request and Vizier._server_to_url
    from planner.catalogs import vizier

    src = Path(vizier.__file__).read_text(encoding="utf-8")
    assert not re.search(r"\bviz\._", src)
    assert "get_catalogs_async(" in src


def test_progress_line_only_on_a_terminal():
    from planner.catalogs.vizier import _Progress

    class Tty(io.StringIO):
        def isatty(self):
            return True

    out = Tty()
    with _Progress(1, 2, "B/wds", stream=out):
        import time

        time.sleep(0.7)
    text = out.getvalue()
    assert "[" in text and "1/2" in text and "B/wds" in text and text.endswith("\n") and "done" in text
    quiet = io.StringIO()
    with _Progress(1, 2, "B/wds", stream=quiet):
        pass
    assert quiet.getvalue() == ""


def test_wds_dm_kept_and_position_from_id_flagged():
    from astropy.table import Table

    from planner.catalogs.vizier import wds_from_table

    # fields of two of the genuine WDS lines of the sample (catalogs_sample/wds_summary_rows.txt:
    # 00000+7530 A 1248, DM '+74 1056', 000006.64+752859.8; 00023-2943 B 631, DM '-3019790'),
    # the second marked n_RAh = '!' (CDS: position derived from the WDS name) for the test
    t = Table({"WDS": ["00000+7530", "00023-2943"], "Disc": ["A 1248", "B 631"], "Comp": ["", ""],
               "DM": ["+74 1056", "-3019790"], "n_RAh": ["", "!"],
               "RAJ2000": [0.0276667, 0.5829583], "DEJ2000": [75.4832778, -29.7204444]})
    df = wds_from_table(t)
    assert df["dm_id"].tolist() == ["+74 1056", "-3019790"]
    assert df["coord_precise"].tolist() == [True, False]


def test_wds_dm_numbers_join_without_the_catalogue_prefix():
    # The WDS summary line writes the DM without BD/CD/CPD ('+74 1056', '-3019790' in the three
    # genuine rows of catalogs_sample/wds_summary_rows.txt); BSC5 writes 'BD+27 3410'
    from planner.catalogs.names import dm_zone_key

    assert dm_zone_key("+74 1056") == dm_zone_key("BD+74 1056") == "+74:1056"
    assert dm_zone_key("-3019790") == dm_zone_key("CD-30 19790") == "-30:19790"
    assert dm_zone_key("BD +27°3410") == "+27:3410" and dm_zone_key("STF 2272") == ""


# -- the command line -------------------------------------------------------------------

def test_pair_by_name_shows_the_name_and_the_other_pairs(cli):
    code, out, err = cli("pair", "eps Lyr")
    assert code == 0, err
    first = out.splitlines()[0]
    assert "18443+3940" in first and "Lyr" in first
    assert "also named so:" in out and "STF 2382 AB" in out + first
    code, out, err = cli("pair", "Albireo")
    assert code == 0 and "Albireo (Cyg)" in out.splitlines()[0]


def test_pair_known_star_without_pair_and_typo(cli):
    code, out, err = cli("pair", "Arcturus")
    assert code == 2 and "HR 5340" in err and "catalog fetch" in err and len(err.strip().splitlines()) == 1
    code, out, err = cli("pair", "Albiero")
    assert code == 2 and "Albireo" in err


def test_catalog_resolve(cli):
    code, out, err = cli("catalog", "resolve", "70 Ophiuchi")
    assert code == 0, err
    assert "HR 6752" in out and "HD 165341" in out and "18055+0230  STF 2272 AB" in out
    code, out, err = cli("catalog", "resolve", "Albireo", "--json")
    d = json.loads(out)
    assert d["stars"][0]["hip"] == 95947 and d["pairs"][0]["wds_id"] == "19307+2758"


# -- the optional online look-up (SIMBAD replies as astroquery returns them) ----------------

def _simbad_tables(found=True):
    from astropy.table import Table

    if not found:
        return Table({"id": []}), Table({"main_id": [], "ra": [], "dec": []})
    # bet Cyg in SIMBAD: identifiers include HD/HIP/HR/WDS ones; position as in the IAU-CSN
    ids = Table({"id": ["* bet01 Cyg", "HD 183912", "HIP 95947", "HR 7417", "WDS J19307+2758A"]})
    obj = Table({"main_id": ["* bet01 Cyg"], "ra": [292.680351], "dec": [27.959692]})
    return ids, obj


@pytest.fixture
def simbad(monkeypatch):
    from astroquery.simbad import Simbad

    calls = []

    def ids(name, **kw):
        calls.append(name)
        return _simbad_tables(name != "nothing at all")[0]

    def obj(name, **kw):
        return _simbad_tables(name != "nothing at all")[1]

    monkeypatch.setattr(Simbad, "query_objectids", ids)
    monkeypatch.setattr(Simbad, "query_object", obj)
    return calls


def test_online_only_when_asked_and_only_when_offline_has_no_answer(sample, simbad):
    from planner.catalogs import describe_name

    d = describe_name(sample, "Albireo", online=True)  # the offline index knows it
    assert simbad == [] and d["source"] == "offline index"
    d = describe_name(sample, "Alberio", online=False)
    assert simbad == [] and d["pairs"] == []


def test_online_answer_joined_and_cached(sample, simbad):
    from planner.catalogs import describe_name
    from planner.catalogs import online

    d = describe_name(sample, "the swan's beak", online=True)
    assert simbad == ["the swan's beak"]
    assert {sample.pairs.at[lab, "wds_id"] for lab in d["pairs"]} == {"19307+2758"}
    assert online.cache_path().exists()
    d2 = describe_name(sample, "The Swan's Beak", online=True)  # same name folded: from the cache
    assert simbad == ["the swan's beak"] and "cached" in d2["source"]
    d3 = describe_name(sample, "nothing at all", online=True)
    assert d3["pairs"] == [] and "not known" in d3["message"]


def test_online_without_network_is_one_line(cli):
    code, out, err = cli("catalog", "resolve", "no such star anywhere", "--online")
    assert code == 1 and "CDS SIMBAD" in err and len(err.strip().splitlines()) == 1


def test_constellation_filter_accepts_latin_names(sample, cli):
    from planner.plan.model import NightRequest
    from planner.plan.night import plan_night

    by = {}
    for form in ("Cyg", "cygni", "Cygnus"):
        p = plan_night(NightRequest(**DEMO, filters={"constellations": [form]}, limit=5), sample)
        by[form] = p.scopes[0].schedule["wds_id"].tolist()
    assert by["Cyg"] and by["Cyg"] == by["cygni"] == by["Cygnus"]
    code, out, err = cli("night", "--lat", "52.1873", "--lon", "-2.4127", "--tz", "Europe/London",
                         "--date", "2026-12-05", "--aperture", "102", "--constellation", "Cygnusx")
    assert code == 2 and "Cygnusx" in err


def test_pair_without_catalogued_angle_prints_and_plots(cli, tmp_path):
    # eps Boo from BSC5: 2.8" with no position angle; the report said 'internal error' before
    code, out, err = cli("pair", "eps Boo", "--plot", str(tmp_path / "e.png"))
    assert code == 0, err
    assert "Izar (Boo)" in out and "pos. angle  not catalogued" in out and (tmp_path / "e.png").exists()
