"""planner.config.logbook: the observation log in SQLite.

Checked against the SQLite file format and pragmas as documented by the SQLite project
(https://www.sqlite.org/fileformat2.html: the 16-byte header string, the application id at
offset 68 and the user version at offset 60, big-endian; https://www.sqlite.org/wal.html).
The entries used here are made up for the tests (no outside values are checked).
"""

from __future__ import annotations

import hashlib
import sqlite3
import struct
import subprocess
import sys
import textwrap
from pathlib import Path

import pytest

from planner.config import logbook
from planner.config.logbook import Logbook, export_text, parse_export
from planner.errors import CorruptFileError, InputError


def entry(**kw) -> dict:
    base = dict(wds_id="18055+0230", components="AB", discoverer="STF2272", name_typed="70 Oph",
                when_utc="2026-07-01T21:30:00Z", tz="Europe/Zurich", scope="4-inch", aperture_mm=102.0,
                obstruction=0.0, site="Hilltop", lat_deg=47.1, lon_deg=8.2, elevation_m=600.0,
                seeing_arcsec=1.5, steadiness=None, power=150.0, result="clean", note="",
                rho_arcsec=6.0, theta_deg=120.0, alt_deg=40.0, airmass=1.55, seeing_used_arcsec=1.5,
                limit_arcsec=1.4, margin=6.0 / 1.4, chance=0.99, mag_limit=12.0, mag_faint=6.0,
                model_version="splitplan 0.1.0")
    base.update(kw)
    return base


def sha(p: Path) -> str:
    return hashlib.sha256(p.read_bytes()).hexdigest()


def test_new_log_is_marked_and_in_wal_mode(tmp_path):
    p = tmp_path / "log.sqlite3"
    with Logbook(p) as log:
        log.add(entry())
    head = p.read_bytes()[:100]
    assert head[:16] == b"SQLite format 3\x00"                      # sqlite.org fileformat2, offset 0
    assert struct.unpack(">I", head[68:72])[0] == logbook.APPLICATION_ID  # offset 68
    assert struct.unpack(">I", head[60:64])[0] == logbook.SCHEMA_VERSION  # offset 60
    con = sqlite3.connect(p)
    assert con.execute("PRAGMA journal_mode").fetchone()[0] == "wal"
    con.close()


def test_default_file_is_in_the_user_data_folder(_isolated_user_dirs):
    with Logbook() as log:
        assert log.path == _isolated_user_dirs / "data" / "observations.sqlite3"
        log.add(entry())
    assert (_isolated_user_dirs / "data" / "observations.sqlite3").exists()


def test_add_get_and_filters(tmp_path):
    with Logbook(tmp_path / "l.sqlite3") as log:
        a = log.add(entry())
        b = log.add(entry(wds_id="06451-1643", name_typed="Sirius", result="unseen", scope="8-inch",
                          aperture_mm=203.0, when_utc="2026-02-01T20:00:00Z"))
        c = log.add(entry(result="round", when_utc="2026-08-01T21:00:00Z"))
        assert log.get(a)["result"] == "clean"
        assert [e["id"] for e in log.entries()] == [b, a, c]        # oldest first
        assert [e["id"] for e in log.entries(wds_ids=["18055+0230"])] == [a, c]
        assert [e["id"] for e in log.entries(scope="8-inch")] == [b]
        assert [e["id"] for e in log.entries(aperture_mm=102)] == [a, c]
        assert [e["id"] for e in log.entries(result=["round", "unseen"])] == [b, c]
        assert [e["id"] for e in log.entries(since_utc="2026-07-01T00:00:00Z",
                                             until_utc="2026-08-01T00:00:00Z")] == [a]
        with pytest.raises(InputError, match="no log entry 99"):
            log.get(99)


@pytest.mark.parametrize("bad, match", [
    (dict(result="resolved"), "not one of clean, split"),
    (dict(aperture_mm=-5), "aperture_mm -5 is outside"),
    (dict(obstruction=0.95), "obstruction"),
    (dict(steadiness=11), "steadiness"),
    (dict(when_utc="2026-13-01T20:00:00Z"), "not a real date"),
    (dict(when_utc="yesterday"), "not a UTC time"),
    (dict(wds_id=""), "needs wds_id"),
    (dict(seeing_arcsec="two"), "not a number"),
    (dict(colour="red"), "unknown log field"),
    (dict(name_typed="a\x1b[31mb"), "printable"),
])
def test_bad_entries_are_refused_and_nothing_is_written(tmp_path, bad, match):
    with Logbook(tmp_path / "l.sqlite3") as log:
        with pytest.raises(InputError, match=match):
            log.add(entry(**bad))
        assert log.count() == 0


def test_edit_remove_and_undo_walk_back(tmp_path):
    with Logbook(tmp_path / "l.sqlite3") as log:
        a = log.add(entry())
        b = log.add(entry(result="round"))
        log.edit(a, {"result": "notched", "note": "wind"})
        assert log.get(a)["result"] == "notched" and log.get(a)["modified_utc"]
        log.remove(b)
        assert log.count() == 1
        assert log.undo().startswith("remove")
        assert log.get(b)["result"] == "round"          # back, same number
        assert log.undo().startswith("edit")
        assert log.get(a)["result"] == "clean" and log.get(a)["note"] == ""
        assert log.undo().startswith("add")
        assert [e["id"] for e in log.entries()] == [a]
        assert log.undo().startswith("add")
        assert log.count() == 0
        assert log.undo() is None
        with pytest.raises(InputError, match="cannot be edited"):
            log.edit(a, {"uid": "x"})


def test_undo_of_an_import_removes_the_whole_import(tmp_path):
    with Logbook(tmp_path / "l.sqlite3") as log:
        log.add(entry())
        added, skipped = log.import_entries([entry(uid=f"{i:032x}") for i in range(5)])
        assert (added, skipped) == (5, 0)
        assert log.import_entries([entry(uid=f"{i:032x}") for i in range(5)]) == (0, 5)
        assert log.count() == 6
        log.undo()  # the second import added nothing; undoing it changes nothing
        assert log.count() == 6
        log.undo()
        assert log.count() == 1


TRICKY_NOTES = ["", "plain", "=SUM(A1:A3)", "'=still text", "''=two quotes", "-2 mag",
                "comma, \"quotes\" and\nnewline", "Ünïcödé ✓", "'lead quote", "@home", "\ttab"]


@pytest.mark.parametrize("fmt", ["csv", "json"])
def test_export_import_round_trip_is_exact(tmp_path, fmt):
    src = Logbook(tmp_path / "a.sqlite3")
    for i, note in enumerate(TRICKY_NOTES):
        src.add(entry(note=note, result=list(logbook.RESULTS)[i % 6], margin=0.1 + 0.2 * i,
                      chance=1 / 3, seeing_arcsec=None if i % 2 else 1.2, steadiness=4.5 if i % 2 else None,
                      scope=None if i % 3 == 0 else "4-inch", components=None if i == 4 else "AB",
                      lon_deg=-71.0625 - i / 7))
    src.edit(2, {"power": 233.3333333333333})
    src.remove(5)
    before = src.entries()
    text = export_text(before, fmt)
    src.close()
    dst = Logbook(tmp_path / "b.sqlite3")
    assert dst.import_entries(parse_export(text, fmt)) == (len(before), 0)
    assert dst.entries() == before          # every column, ids included, bit for bit
    dst.close()


def test_export_text_defuses_spreadsheet_formulas():
    text = export_text([dict(entry(note="=cmd|' /C calc'!A0"), id=1)], "csv")
    assert "'=cmd" in text and ",=cmd" not in text


@pytest.mark.parametrize("text, fmt, match", [
    ("{}", "json", "not a splitplan log export"),
    ("[1, 2", "json", "not a JSON log export"),
    ("a,b\n1,2\n", "csv", "first CSV line"),
])
def test_foreign_import_files_are_refused(text, fmt, match):
    with pytest.raises(InputError, match=match):
        parse_export(text, fmt)


def test_import_with_a_bad_value_names_the_entry_and_adds_nothing(tmp_path):
    rows = [entry(uid="a" * 32), entry(uid="b" * 32, result="maybe")]
    with Logbook(tmp_path / "l.sqlite3") as log:
        with pytest.raises(InputError, match="entry 2 of the import: result 'maybe'"):
            log.import_entries(rows)
        assert log.count() == 0


WRITER = textwrap.dedent("""
    import sys
    sys.path.insert(0, {tests!r})
    from test_log_storage import entry
    from planner.config.logbook import Logbook
    import time
    start = float(sys.argv[2])
    while time.time() < start:
        time.sleep(0.005)
    with Logbook(sys.argv[1]) as log:
        log.add(entry(note="process " + sys.argv[3]))
""")


@pytest.mark.parametrize("existing", [False, True])
def test_eight_processes_adding_at_once_keep_eight_entries(tmp_path, existing):
    import time

    p = tmp_path / "shared.sqlite3"
    if existing:
        Logbook(p).close()
    script = tmp_path / "writer.py"
    script.write_text(WRITER.format(tests=str(Path(__file__).parent)))
    start = time.time() + 3.0  # all start their transaction at the same moment
    procs = [subprocess.Popen([sys.executable, str(script), str(p), str(start), str(i)],
                              stderr=subprocess.PIPE, text=True) for i in range(8)]
    errs = [pr.communicate(timeout=120)[1] for pr in procs]
    assert [pr.returncode for pr in procs] == [0] * 8, errs
    with Logbook(p) as log:
        notes = sorted(e["note"] for e in log.entries())
    assert notes == sorted(f"process {i}" for i in range(8))


def _assert_refused_untouched(p: Path, match: str):
    digest, listing = sha(p), sorted(x.name for x in p.parent.iterdir())
    with pytest.raises(CorruptFileError, match=match) as info:
        Logbook(p)
    msg = str(info.value)
    assert "\n" not in msg and "left untouched" in msg
    assert info.value.exit_code == 1
    assert sha(p) == digest                                       # bytes unchanged
    assert sorted(x.name for x in p.parent.iterdir()) == listing  # nothing moved, nothing added


def test_a_file_that_is_not_a_database_is_reported_and_left_untouched(tmp_path):
    p = tmp_path / "observations.sqlite3"
    p.write_bytes(b"these are my notes, not a database\n" * 200)
    _assert_refused_untouched(p, "damaged or not a splitplan log")


def test_a_damaged_log_is_reported_and_left_untouched(tmp_path):
    p = tmp_path / "observations.sqlite3"
    with Logbook(p) as log:
        for i in range(300):
            log.add(entry(note="x" * 200 + str(i)))
    con = sqlite3.connect(p)  # fold the write-ahead log into the file, as a closed log is
    con.execute("PRAGMA wal_checkpoint(TRUNCATE)")
    con.close()
    raw = bytearray(p.read_bytes())
    page = struct.unpack(">H", raw[16:18])[0]  # page size, offset 16 (fileformat2)
    for k in range(3, 6):                          # scribble over three b-tree pages
        raw[k * page:k * page + 64] = b"\xa5" * 64
    p.write_bytes(bytes(raw))
    _assert_refused_untouched(p, "damaged")


def test_a_truncated_header_is_reported(tmp_path):
    p = tmp_path / "observations.sqlite3"
    with Logbook(p) as log:
        log.add(entry())
    p.write_bytes(p.read_bytes()[:50])
    _assert_refused_untouched(p, "damaged")


def test_another_programs_database_is_recognised_and_left_untouched(tmp_path):
    p = tmp_path / "observations.sqlite3"
    con = sqlite3.connect(p)
    con.execute("CREATE TABLE contacts (name TEXT)")
    con.execute("INSERT INTO contacts VALUES ('Ann')")
    con.commit()
    con.close()
    _assert_refused_untouched(p, "another program")


def test_a_log_from_a_newer_splitplan_is_left_untouched(tmp_path):
    p = tmp_path / "observations.sqlite3"
    with Logbook(p) as log:
        log.add(entry())
    con = sqlite3.connect(p)
    con.execute(f"PRAGMA user_version = {logbook.SCHEMA_VERSION + 1}")
    con.execute("PRAGMA wal_checkpoint(TRUNCATE)")
    con.close()
    _assert_refused_untouched(p, "newer splitplan")


def test_backup_is_a_complete_log_and_never_overwrites(tmp_path):
    with Logbook(tmp_path / "l.sqlite3") as log:
        for i in range(3):
            log.add(entry(note=str(i)))
        dest = log.backup(tmp_path / "copy.sqlite3")
        with pytest.raises(InputError, match="exists"):
            log.backup(dest)
        want = log.entries()
    with Logbook(dest) as copy:
        assert copy.entries() == want


def test_fits_are_kept_newest_first(tmp_path):
    with Logbook(tmp_path / "l.sqlite3") as log:
        assert log.latest_fit("") is None
        log.save_fit("", {"m50": 1.0})
        log.save_fit("102", {"m50": 1.1})
        log.save_fit("", {"m50": 1.2})
        assert log.latest_fit("")["m50"] == 1.2
        assert log.latest_fit("102")["m50"] == 1.1
        assert log.latest_fit()["m50"] == 1.2
