"""``splitplan log``: the observation log from the command line.

The entries are made up for the tests; the demo log examples/brackenfold-log.json is
INVENTED (see docs/log.md).  Time-zone facts: Europe/Zurich is UTC+2 in summer (IANA
database, through zoneinfo).
"""

from __future__ import annotations

import hashlib
import json
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
SITE = ["--lat", "47.1", "--lon", "8.2", "--elevation", "600", "--tz", "Europe/Zurich"]


def add(cli, pair="STF2272", result="clean", when="2026-07-01 22:30", *extra):
    return cli("log", "add", pair, "--result", result, "--when", when, "--aperture", "102", "--seeing", "1.5",
               *SITE, *extra)


def test_add_list_edit_remove_undo(cli):
    code, out, err = add(cli, "STF2272", "clean", "2026-07-01 22:30", "--note", "steady air", "--power", "150")
    assert code == 0, err
    assert out.startswith("added entry 1: 18055+0230 STF 2272 AB, clean, 2026-07-01 22:30 CEST, 102 mm; margin ")
    assert add(cli, "STF1938", "round", "2026-07-01 22:45")[0] == 0
    code, out, err = cli("log", "list")
    assert code == 0 and "2 of 2 entries" in out and "steady air" in out
    code, out, _ = cli("log", "list", "--pair", "stf 2272", "--json")
    rows = json.loads(out)
    assert [r["id"] for r in rows] == [1] and rows[0]["power"] == 150.0 and rows[0]["when_utc"] == "2026-07-01T20:30:00Z"
    assert json.loads(cli("log", "list", "--result", "round", "--json")[1])[0]["id"] == 2
    assert json.loads(cli("log", "list", "--scope", "102 mm", "--from", "2026-07-02", "--json")[1]) == []
    code, out, err = cli("log", "edit", "2", "--result", "elongated", "--note", "gusty")
    assert code == 0, err
    assert json.loads(cli("log", "list", "--json")[1])[1]["result"] == "elongated"
    assert cli("log", "remove", "1")[0] == 0
    assert "1 of 1 entries" in cli("log", "list")[1]
    code, out, _ = cli("log", "undo")
    assert out.startswith("undone: remove entry 1")
    assert "2 of 2 entries" in cli("log", "list")[1]


@pytest.mark.parametrize("argv, match", [
    (["log", "add", "STF2272", "--result", "resolved", "--aperture", "102", *SITE], "not one of clean"),
    (["log", "add", "Nosuchstar", "--result", "clean", "--aperture", "102", *SITE], "no pair matches"),
    (["log", "add", "STF2272", "--result", "clean", *SITE], "no telescope"),
    (["log", "add", "STF2272", "--result", "clean", "--aperture", "102", *SITE, "--when", "2099-01-01 20:00"],
     "in the future"),
    (["log", "add", "STF2272", "--result", "clean", "--aperture", "102", *SITE, "--seeing", "1", "--steadiness", "5"],
     "not both"),
    (["log", "edit", "7", "--result", "clean"], "no observation log|no log entry 7"),
    (["log", "mark", "nosuch.toml", "--results", "1=clean"], "does not exist"),
])
def test_bad_input_is_one_line_exit_2_and_nothing_written(cli, argv, match):
    import re

    code, out, err = cli(*argv)
    assert code == 2
    assert len(err.strip().splitlines()) == 1 and re.search(match, err), err
    code, out, _ = cli("log", "list")
    assert "no entries" in out or code == 0 and "0 of" not in out


def test_a_damaged_log_is_one_line_exit_1_and_untouched(cli, _isolated_user_dirs):
    p = _isolated_user_dirs / "data" / "observations.sqlite3"
    p.parent.mkdir(parents=True, exist_ok=True)
    p.write_bytes(b"SQLite format 3\x00" + b"\xff" * 5000)
    digest = hashlib.sha256(p.read_bytes()).hexdigest()
    for argv in (["log", "list"], ["log", "add", "STF2272", "--result", "clean", "--aperture", "102", *SITE]):
        code, out, err = cli(*argv)
        assert code == 1
        assert len(err.strip().splitlines()) == 1 and "left untouched" in err and "backup" in err
        assert hashlib.sha256(p.read_bytes()).hexdigest() == digest
    assert sorted(x.name for x in p.parent.iterdir()) == ["observations.sqlite3"]


@pytest.mark.parametrize("fmt", ["csv", "json"])
def test_export_then_import_into_an_empty_log_is_identical(cli, tmp_path, fmt):
    for i, (pair, res) in enumerate([("STF2272", "clean"), ("STF1938", "notched"), ("STF 1998 AB", "unseen")]):
        assert add(cli, pair, res, f"2026-07-01 22:{10 + i}", "--note", f"=note {i}, \"q\"")[0] in (0, 2)
    before = json.loads(cli("log", "list", "--json")[1])
    assert len(before) >= 2
    out = tmp_path / f"log.{fmt}"
    assert cli("log", "export", str(out))[0] == 0
    other = tmp_path / "other.sqlite3"
    code, text, err = cli("log", "import", str(out), "--log-file", str(other))
    assert code == 0 and text.startswith(f"imported {len(before)} entries"), err
    after = json.loads(cli("log", "list", "--json", "--log-file", str(other))[1])
    assert after == before
    assert cli("log", "import", str(out), "--log-file", str(other))[1].startswith("imported 0 entries")


def test_backup_is_a_complete_log(cli, tmp_path):
    add(cli)
    dest = tmp_path / "copy.sqlite3"
    code, out, err = cli("log", "backup", str(dest))
    assert code == 0 and "1 entries" in out
    assert json.loads(cli("log", "list", "--json", "--log-file", str(dest))[1]) == \
        json.loads(cli("log", "list", "--json")[1])
    assert cli("log", "backup", str(dest))[0] == 2          # never over an existing file


def test_mark_walks_the_slots_of_a_saved_plan(cli, tmp_path):
    plan = tmp_path / "night.plan.toml"
    code, out, err = cli("night", *SITE, "--aperture", "102", "--date", "2026-07-01", "--seeing", "1.5",
                         "--limit", "4", "--save-plan", str(plan))
    assert code == 0, err
    code, out, err = cli("log", "mark", str(plan), "--results", "1=clean,3=r,4=unseen")
    assert code == 0, err
    assert out.strip().endswith("3 entries added from 4 slots")
    rows = json.loads(cli("log", "list", "--json")[1])
    assert [r["result"] for r in rows] == ["clean", "round", "unseen"]
    assert all(r["aperture_mm"] == 102.0 and r["seeing_used_arcsec"] == 1.5 for r in rows)
    code, out, err = cli("log", "mark", str(plan), "--results", "9=clean")
    assert code == 2 and "no slot 9" in err
    code, out, err = cli("log", "mark", str(plan))       # no terminal in the tests
    assert code == 2 and "--results" in err


def test_fit_on_the_invented_demo_log(cli, tmp_path):
    demo = ROOT / "examples" / "brackenfold-log.json"
    code, out, err = cli("log", "import", str(demo))
    assert code == 0, err
    png = tmp_path / "curve.png"
    code, out, err = cli("log", "fit", "--plot", str(png))
    assert code == 0, err
    assert "Your 50 % point is" in out and "== Loan 102 mm refractor" in out and "== all scopes" in out
    assert "chance band" in out
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    fits = json.loads(cli("log", "fit", "--scope", "Club 8-inch Dobsonian", "--json")[1])
    assert len(fits) == 1 and 1.0 < fits[0]["m50"] < 1.6
    # a plan with the calibration says so, and its limits are the fitted multiple of the published ones
    base = ["night", "--lat", "52.1873", "--lon", "-2.4127", "--tz", "Europe/London", "--date", "2026-12-05",
            "--scope", "x", "--seeing", "1.8", "--json"]
    code, out, err = cli("profile", "scope", "add", "Club 8-inch Dobsonian", "--aperture", "203", "--obstruction", "0.22")
    base[base.index("x")] = "Club 8-inch Dobsonian"
    plain = json.loads(cli(*base)[1])
    code, out, err = cli(*base, "--calibration", "mine")
    assert code == 0, err
    mine = json.loads(out)
    assert plain and mine
    code, out, _ = cli(*base[:-1], "--calibration", "mine")
    assert "your calibration" in out and "50 % point" in out


def test_fit_with_an_empty_log(cli):
    code, out, err = cli("log", "fit")
    assert code == 2 and ("no observation log" in err or "empty" in err)


def test_pair_shows_the_last_attempts(cli):
    add(cli, "STF2272", "round", "2026-06-01 23:30")
    add(cli, "STF2272", "clean", "2026-07-01 22:30", "--note", "at last")
    add(cli, "STF1938", "notched", "2026-07-01 22:40")
    code, out, err = cli("pair", "STF2272")
    assert code == 0, err
    lines = out.splitlines()
    k = next(i for i, line in enumerate(lines) if line.startswith("your log"))
    assert lines[k].startswith("your log    2026-07-01 22:30 CEST: clean with 102 mm, margin ") and "(at last)" in lines[k]
    assert "2026-06-01 23:30 CEST: round" in lines[k + 1]
    assert not any("notched" in line for line in lines)
    rep = json.loads(cli("pair", "STF2272", "--json")[1])
    assert [e["result"] for e in rep["log"]] == ["clean", "round"]
    code, out, err = cli("pair", "STF2272", "--date", "2026-07-01", "--aperture", "102", *SITE, "--seeing", "1.5",
                         "--calibration", "mine")
    assert code == 2 and "log fit" in err
    assert cli("log", "fit")[0] == 0
    code, out, err = cli("pair", "STF2272", "--date", "2026-07-01", "--aperture", "102", *SITE, "--seeing", "1.5",
                         "--calibration", "mine")
    assert code == 0, err
    assert "chance      calibration: yours (the 102 mm)" in out
