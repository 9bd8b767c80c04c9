"""A user's target list and the ``splitplan catalog`` commands.

Catalogue: the bundled USNO sample (ORB6 late-2008 text file + three WDS
rows); designations used below are read from those files.  Counts are
those validated in test_catalog_lookup.py.
"""

from __future__ import annotations

import json

import pytest

from conftest import reference_file
from planner.catalogs import load_sample, read_target_list, restrict
from planner.catalogs.userlist import unmatched_warnings
from planner.errors import InputError


@pytest.fixture(scope="module")
def sample():
    return load_sample()


def test_read_list_with_header_comments_notes(tmp_path):
    p = tmp_path / "targets.csv"
    p.write_text("pair,note\n# autumn list\n18055+0230, 70 Oph -- bright\n\nSTF 2272 AB\n"
                 "\"12 Boo\",\"hours-period binary, close\"\n")
    t = read_target_list(p)
    assert t["query"].tolist() == ["18055+0230", "STF 2272 AB", "12 Boo"]
    assert t["note"].tolist() == ["70 Oph -- bright", "", "hours-period binary, close"]
    assert t["line_no"].tolist() == [3, 5, 6]


def test_read_list_without_header(tmp_path):
    p = tmp_path / "t.csv"
    p.write_text("STF2272AB\n00014+3937\n")
    assert read_target_list(p)["query"].tolist() == ["STF2272AB", "00014+3937"]


def test_restrict_keeps_order_and_reports_unknown(sample, tmp_path):
    p = tmp_path / "t.csv"
    p.write_text("12 Boo,first\nSTF2272,second\nSTF 2272 AB,duplicate\nSTF9999,unknown\n")
    cat = restrict(sample, read_target_list(p))
    assert cat.pairs["wds_id"].tolist() == ["14104+2506", "18055+0230"]
    assert cat.pairs["user_note"].tolist() == ["first", "second"]
    assert set(cat.orbits["wds_id"]) == {"14104+2506", "18055+0230"}
    warn = unmatched_warnings(cat)
    assert len(warn) == 1 and "STF9999" in warn[0] and "closest" in warn[0]


def test_restrict_nothing_matched_is_an_error(sample):
    with pytest.raises(InputError, match="no pair of the target list"):
        restrict(sample, ["XYZ 1", "QQQ 2"])


def test_bad_lists(tmp_path):
    p = tmp_path / "empty.csv"
    p.write_text("# only a comment\n\n")
    with pytest.raises(InputError, match="names no pair"):
        read_target_list(p)
    with pytest.raises(InputError, match="does not exist"):
        read_target_list(tmp_path / "none.csv")


# -- command line ------------------------------------------------------------------


def test_cli_show_sample(cli):
    code, out, err = cli("catalog", "show")
    assert code == 0, err
    assert "bundled sample" in out
    assert "pairs:     2843" in out  # 1,964 ORB6/WDS + 879 BSC5 bright pairs (test_catalog_lookup)
    assert "pairs with a usable orbit (complete, grade 1-5): 1546" in out
    # ORB6 grades (orb6_orbits.txt): 59/222/344/513/471 visual, 15 interferometric, 472 astrometric
    assert "grade 1: 59" in out and "grade 9: 472" in out


def test_cli_show_json(cli):
    code, out, err = cli("catalog", "show", "--json")
    assert code == 0
    info = json.loads(out)
    assert info["orbits"] == 2096 and info["orbits_complete"] == 2077
    assert sum(info["orbits_by_grade"].values()) == 2096


def test_cli_show_problems_summarised(cli, tmp_path):
    rows = reference_file("wds_rows_found.txt").read_text().splitlines()
    p = tmp_path / "w.txt"
    p.write_text("\n".join(rows + ["0000X+1111 junk here", "short"]) + "\n")
    code, out, err = cli("catalog", "show", "--catalog", str(p))
    assert code == 0
    assert "skipped lines: 2" in out
    assert "line 5" in out and "line 6" in out


def test_cli_errors_are_one_line(cli, tmp_path):
    code, out, err = cli("catalog", "show", "--catalog", str(tmp_path / "missing.txt"))
    assert code == 2 and err.count("\n") == 1 and err.startswith("splitplan: error:")
    (tmp_path / "bin").write_bytes(bytes(range(256)))
    code, out, err = cli("catalog", "show", "--catalog", str(tmp_path / "bin"))
    assert code == 1 and err.count("\n") == 1 and "binary" in err


@pytest.mark.filterwarnings("ignore:A test tried to use socket")
def test_cli_fetch_offline(cli):
    code, out, err = cli("catalog", "fetch")
    assert code == 1 and err.count("\n") == 1 and "cannot reach CDS VizieR" in err


def test_cli_import_then_show_vizier(cli):
    wds = reference_file("wds_rows_found.txt")
    orb = reference_file("orb6_orbits.txt")
    code, out, err = cli("catalog", "import", str(wds), "--orbits", str(orb))
    assert code == 0, err
    assert "1964 pairs, 2096 orbits" in out
    code, out, err = cli("catalog", "show", "--catalog", "vizier")
    assert code == 0 and "imported WDS file" in out
    code, out, err = cli("catalog", "import", str(wds), "--orbits", str(wds))
    assert code == 2 and "not an ORB6" in err
