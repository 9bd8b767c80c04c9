"""Hardening: special files, size caps, concurrent writers, overwrites, far dates,
hidden characters, file shapes.

Each case is one the tool used to get wrong: a hang on a FIFO or /dev/zero, lost
profiles with several processes writing at once, a silently replaced report, a date
overflowing nanosecond time stamps, escape sequences or malformed XML in an output, an
"internal error" from a wrongly shaped file.  Every case must end in one clear line
(or the right result) -- see the table in docs/robustness.md.
"""

from __future__ import annotations

import os
import re
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

from planner.errors import InputError, PlannerError

HIDDEN = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\x7f-\x9f\u200b-\u200f\u2028-\u202e\u2060-\u2069\ufeff"
                    "\ud800-\udfff]")

# Strings an attacker (or a broken editor) could put into a name: an OSC sequence that
# retitles the terminal, a colour escape, DEL, a C1 CSI, a right-to-left override, a
# zero-width space, a NUL, a line separator.
HOSTILE = ["\x1b]0;pwned\x07", "\x1b[31mred", "del\x7f", "c1\x9b31m", "abc\u202edcba",
           "zero\u200bwidth", "nul\x00", "line\u2028sep"]


def _run(*argv, timeout=120, cwd=None, env_extra=None):
    """``python -m planner ARGV`` in a real process (a hang shows as a timeout)."""
    env = dict(os.environ, PYTHONWARNINGS="ignore")
    env.pop("SPLITPLAN_DEBUG", None)
    env.update(env_extra or {})
    return subprocess.run([sys.executable, "-m", "planner", *argv], capture_output=True, text=True,
                          env=env, timeout=timeout, cwd=cwd)


def _one_line(r, code: int) -> str:
    assert "Traceback" not in r.stderr, r.stderr
    lines = [ln for ln in r.stderr.splitlines() if ln.strip()]
    assert len(lines) == 1, lines
    assert r.returncode == code, (r.returncode, lines)
    assert "internal error" not in lines[0], lines[0]
    return lines[0]


# -- 1. special files and size caps -----------------------------------------------------


@pytest.fixture
def fifo(tmp_path):
    if not hasattr(os, "mkfifo"):
        pytest.skip("no named pipes on this platform")
    p = tmp_path / "pipe.txt"
    os.mkfifo(p)
    return p


SPECIAL_CASES = [
    ("catalog", ["catalog", "show", "--catalog", "{f}"]),
    ("orbits", ["catalog", "show", "--catalog", "{wds}", "--orbits", "{f}"]),
    ("import", ["catalog", "import", "{f}"]),
    ("plan", ["night", "--plan", "{f}"]),
    ("session", ["night", "--session", "{f}", "--date", "2026-12-05"]),
    ("targets", ["night", "--lat", "52", "--lon", "0", "--tz", "UTC", "--aperture", "102",
                 "--date", "2026-12-05", "--targets", "{f}"]),
    ("horizon", ["profile", "site", "add", "h", "--lat", "52", "--lon", "0", "--tz", "UTC",
                 "--horizon", "{f}"]),
    ("pair", ["pair", "STF2272", "--catalog", "{f}"]),
]


@pytest.mark.parametrize("case, argv", SPECIAL_CASES, ids=[c[0] for c in SPECIAL_CASES])
def test_a_fifo_is_refused_without_blocking(fifo, tmp_path, case, argv):
    wds = Path(__file__).resolve().parents[1] / "catalogs_sample" / "wds_summary_rows.txt"
    args = [a.format(f=fifo, wds=wds) for a in argv]
    # Before the fix, opening the FIFO blocked forever: the timeout turns that into a failure.
    r = _run(*args, timeout=120, cwd=str(tmp_path))
    line = _one_line(r, 2)
    assert "pipe" in line or "not a file" in line or "regular file" in line, line


def test_dev_zero_is_refused_at_once(tmp_path):
    if not Path("/dev/zero").exists():
        pytest.skip("no /dev/zero")
    # Before the fix this read /dev/zero into memory (about 1 GB/s) until killed.
    r = _run("catalog", "show", "--catalog", "/dev/zero", timeout=120, cwd=str(tmp_path))
    line = _one_line(r, 2)
    assert "/dev/zero" in line and "device" in line


def test_read_user_file_checks_the_type_before_opening(fifo):
    from planner.config.storage import read_user_file

    with pytest.raises(InputError, match="named pipe"):
        read_user_file(fifo, "plan file", "toml")


def test_oversized_catalogue_is_refused_without_reading_it(tmp_path, cli):
    from planner.config.storage import MAX_BYTES

    big = tmp_path / "huge-wds.txt"
    with open(big, "wb") as fh:  # a sparse file: no disk space used
        fh.truncate(MAX_BYTES["catalogue"] + 1)
    code, out, err = cli("catalog", "show", "--catalog", str(big))
    assert code == 2
    assert "limit" in err and "512 MB" in err and len(err.strip().splitlines()) == 1


def test_oversized_toml_is_refused(tmp_path):
    from planner.config.planfile import read_plan_file
    from planner.config.storage import MAX_BYTES

    p = tmp_path / "plan.toml"
    p.write_bytes(b"# padding\n" * (MAX_BYTES["toml"] // 10 + 1))
    with pytest.raises(InputError, match="limit for a toml file is 4 MB"):
        read_plan_file(p)


def test_a_file_growing_past_the_cap_is_refused(tmp_path, monkeypatch):
    """The cap holds on the bytes read, not only on the size seen by stat."""
    from planner.config import storage

    p = tmp_path / "h.txt"
    p.write_bytes(b"0 10\n" * 500)  # 2500 bytes
    monkeypatch.setitem(storage.MAX_BYTES, "horizon", 1000)
    real_stat = os.stat

    def small_stat(path, *a, **k):  # stat says small; the file is bigger when read
        st = real_stat(path, *a, **k)
        if str(path) == str(p):
            return os.stat_result((st.st_mode, st.st_ino, st.st_dev, st.st_nlink, st.st_uid,
                                   st.st_gid, 10, st.st_atime, st.st_mtime, st.st_ctime))
        return st

    monkeypatch.setattr(storage.os, "stat", small_stat)
    with pytest.raises(InputError, match="larger than the limit"):
        storage.read_user_file(p, "horizon file", "horizon")


def test_utf8_bom_does_not_cost_the_first_line(tmp_path):
    from planner.config.planfile import read_toml
    from planner.sky.site import Horizon

    h = tmp_path / "h.txt"
    h.write_bytes(b"\xef\xbb\xbf" + b"0 12\n180 5\n")
    assert Horizon.read(h).alt_deg[0] == 12.0
    t = tmp_path / "s.toml"
    t.write_bytes(b"\xef\xbb\xbf" + b'site_name = "x"\n')
    assert read_toml(t, keep_aside=False) == {"site_name": "x"}


# -- 2. concurrent writers ----------------------------------------------------------------


def test_eight_concurrent_profile_adds_keep_eight(tmp_path):
    """Eight real processes add a site each at the same moment; before the lock, 3-5 of 8
    survived (each read the file, added its entry and wrote back over the others)."""
    env = dict(os.environ, PYTHONWARNINGS="ignore")
    procs = [subprocess.Popen([sys.executable, "-m", "planner", "profile", "site", "add", f"s{i}",
                               "--lat", str(i), "--lon", str(i), "--tz", "UTC"],
                              stdout=subprocess.PIPE, stderr=subprocess.PIPE, env=env, cwd=str(tmp_path))
             for i in range(1, 9)]
    for p in procs:
        out, err = p.communicate(timeout=300)
        assert p.returncode == 0, err
    from planner.config import profiles

    assert sorted(profiles.list_profiles("site")) == sorted(f"s{i}" for i in range(1, 9))


def test_lock_serialises_read_modify_write(tmp_path):
    """Library level: threads incrementing a counter file under the lock lose no update."""
    import threading

    from planner.config.storage import atomic_write_text, locked

    store = tmp_path / "counter.txt"
    atomic_write_text(store, "0")

    def bump():
        for _ in range(20):
            with locked(store):
                n = int(store.read_text())
                atomic_write_text(store, str(n + 1))

    threads = [threading.Thread(target=bump) for _ in range(4)]
    for t in threads:
        t.start()
    for t in threads:
        t.join()
    assert store.read_text() == "80"


# -- 3. overwrites ------------------------------------------------------------------------


def test_reports_never_replace_a_file_splitplan_did_not_write(tmp_path):
    from planner.config.storage import write_output

    precious = tmp_path / "precious.csv"
    precious.write_text("thesis\n")
    with pytest.raises(InputError, match="not written by splitplan.*--force"):
        write_output(precious, b"a,b\n")
    assert precious.read_text() == "thesis\n"
    ours = tmp_path / "plan.csv"
    write_output(ours, b"a,b\n")
    write_output(ours, b"a,b\n1,2\n")  # ours: replaced without asking
    assert ours.read_bytes() == b"a,b\n1,2\n"
    ours.write_text("edited by hand\n")  # changed since: now the user's
    with pytest.raises(InputError, match="--force"):
        write_output(ours, b"x\n")
    write_output(precious, b"a,b\n", force=True)
    assert precious.read_bytes() == b"a,b\n"


def test_read_only_file_is_never_replaced_even_with_force(tmp_path):
    from planner.config.storage import write_output

    p = tmp_path / "ro.html"
    p.write_text("mine")
    p.chmod(0o444)
    try:
        for force in (False, True):
            with pytest.raises(InputError, match="read-only"):
                write_output(p, b"<html></html>", force=force)
        assert p.read_text() == "mine"
    finally:
        p.chmod(0o644)


def test_missing_folder_is_not_created_for_a_report(tmp_path):
    from planner.config.storage import write_output

    target = tmp_path / "no" / "such" / "plan.csv"
    with pytest.raises(PlannerError, match="does not exist; create it first"):
        write_output(target, b"x")
    assert not (tmp_path / "no").exists()


def test_tilde_is_expanded_in_output_paths(tmp_path, monkeypatch):
    from planner.config.storage import write_output

    monkeypatch.setenv("HOME", str(tmp_path))
    written = write_output("~/plan.txt", b"hello\n")
    assert written == tmp_path / "plan.txt" and written.read_bytes() == b"hello\n"
    assert not Path("~").exists()


def test_special_output_targets_are_refused(tmp_path, fifo):
    from planner.config.storage import check_output

    with pytest.raises(InputError, match="named pipe"):
        check_output(fifo)
    with pytest.raises(InputError, match="directory"):
        check_output(tmp_path)


def test_save_plan_refuses_a_read_only_plan_file(tmp_path):
    from planner.config.planfile import write_plan_file

    p = tmp_path / "plan.toml"
    write_plan_file(p, {"site": {"lat_deg": 1.0}}, "0", "test")
    p.chmod(0o444)
    try:
        with pytest.raises(InputError, match="read-only"):
            write_plan_file(p, {"site": {"lat_deg": 2.0}}, "0", "test")
    finally:
        p.chmod(0o644)


# -- 4. dates -----------------------------------------------------------------------------


@pytest.mark.parametrize("jd", [0.0, 625307.0, 1000000.25, 1721424.5, 1721425.5, 2299160.5,
                                2415020.31352, 2451545.0, 2460000.7, 3547000.0])
def test_calendar_date_matches_erfa(jd):
    """Reference: SOFA/ERFA jd2cal (proleptic Gregorian, astronomical year numbering)."""
    import erfa

    from planner.motion.epochs import calendar_date_from_jd

    y, m, d, _ = erfa.jd2cal(jd, 0.0)
    sign = "-" if y < 0 else ""
    assert calendar_date_from_jd(jd) == f"{sign}{abs(int(y)):04d}-{int(m):02d}-{int(d):02d}"


@pytest.mark.parametrize("text", ["1600-01-01", "0001-01-01", "1677-09-21", "2262-04-12", "4999-12-31"])
def test_far_dates_do_not_overflow(text):
    """Before the fix 1600-01-01 went through datetime64[ns] and came back as 2184."""
    import datetime as dt

    import erfa

    from planner.motion.epochs import jd_from_datetime64, to_epoch_yr

    y, m, d = (int(x) for x in text.split("-"))
    jd0, jd1 = erfa.cal2jd(y, m, d)  # reference: SOFA/ERFA cal2jd
    assert float(jd_from_datetime64(np.datetime64(text))) == pytest.approx(jd0 + jd1, abs=1e-9)
    assert to_epoch_yr(dt.date(y, m, d)) == pytest.approx(float(erfa.epb(jd0, jd1)), abs=1e-9)
    assert to_epoch_yr(dt.datetime(y, m, d)) == pytest.approx(float(erfa.epb(jd0, jd1)), abs=1e-9)


def test_epoch_range_is_one_line():
    from planner.motion.epochs import EPOCH_MAX_YR, EPOCH_MIN_YR, check_epoch_yr

    assert check_epoch_yr(1.0) == 1.0
    for bad in (EPOCH_MIN_YR - 1, EPOCH_MAX_YR + 1, float("nan"), float("inf")):
        with pytest.raises(InputError, match="-3000 to 5000"):
            check_epoch_yr(bad, "--epoch")


# -- 5. hidden characters -----------------------------------------------------------------


@pytest.mark.parametrize("s", HOSTILE)
def test_plain_text_removes_every_hidden_character(s):
    from planner.report.safe import csv_cell, html_text, pdf_text, plain_text, terminal_text

    for out in (plain_text(s), terminal_text(s, one_line=True), html_text(s), pdf_text(s),
                csv_cell(s)):
        assert not HIDDEN.search(out), repr(out)


def test_lone_surrogate_becomes_replacement_character():
    from planner.report.safe import plain_text

    assert plain_text("a\udcffb") == "a\ufffdb"
    plain_text("a\udcffb").encode("utf-8")  # writable as UTF-8


@pytest.mark.parametrize("s", HOSTILE + ["tab\there", "bad\udcffbyte"])
def test_profile_names_refuse_hidden_characters(s):
    from planner.config import profiles

    with pytest.raises(InputError, match="invisible or control|printable"):
        profiles.add("site", s, {"lat_deg": 1.0, "lon_deg": 1.0, "tz": "UTC"})
    assert profiles.list_profiles("site") == {}


@pytest.fixture(scope="module")
def hostile_plan(tmp_path_factory):
    old = os.environ.get("SPLITPLAN_HOME")
    os.environ["SPLITPLAN_HOME"] = str(tmp_path_factory.mktemp("home"))
    try:
        import dataclasses

        from planner.catalogs import load_catalog
        from planner.plan.model import NightRequest
        from planner.plan.night import plan_night

        cat = load_catalog("sample")
        pairs = cat.pairs.copy()
        n = len(pairs)
        pairs["discoverer"] = [pairs["discoverer"].iloc[i] + HOSTILE[i % len(HOSTILE)] for i in range(n)]
        cat = dataclasses.replace(cat, pairs=pairs, source=cat.source + " \x1b]0;title\x07")
        req = NightRequest(site={"lat_deg": 52.1873, "lon_deg": -2.4127, "elevation_m": 95.0,
                                 "tz": "Europe/London"},
                           scopes=[{"name": "club\x1b[2J\u202e scope", "aperture_mm": 102.0}],
                           site_name="Field\x9b\x07\u200b", date="2026-12-05", seeing_arcsec=1.5,
                           limit=8, challenges=True)
        yield plan_night(req, catalog=cat)
    finally:
        if old is None:
            os.environ.pop("SPLITPLAN_HOME", None)
        else:
            os.environ["SPLITPLAN_HOME"] = old


@pytest.mark.parametrize("ext", [".csv", ".json", ".xml", ".html", ".txt"])
def test_hostile_names_through_every_text_format(hostile_plan, tmp_path, ext):
    from planner.report import write_report

    assert HIDDEN.search("".join(hostile_plan.schedule["discoverer"]))  # they reached the plan
    p = tmp_path / f"plan{ext}"
    write_report(hostile_plan, p)
    text = p.read_bytes().decode("utf-8")
    assert not HIDDEN.search(text), repr(HIDDEN.search(text))
    if ext == ".xml":
        import xml.etree.ElementTree as ET

        from astropy.io.votable import parse

        ET.parse(p)  # well-formed XML (raised ParseError before the fix)
        parse(str(p))


def test_hostile_names_in_the_pdf(hostile_plan, tmp_path):
    from planner.report import write_report

    p = tmp_path / "plan.pdf"
    write_report(hostile_plan, p)
    assert p.read_bytes().startswith(b"%PDF")


# -- 6. wrongly shaped files ---------------------------------------------------------------


@pytest.fixture
def base_plan(tmp_path):
    from planner import __version__
    from planner.config.planfile import write_plan_file

    p = tmp_path / "base.toml"
    write_plan_file(p, {"site": {"lat_deg": 52.0, "lon_deg": 0.0, "elevation_m": 0.0, "tz": "UTC"},
                        "scopes": [{"name": "a", "aperture_mm": 102.0, "obstruction": 0.0}],
                        "date": "2026-12-05", "minutes": 10.0, "challenges": False}, __version__, "test")
    return p.read_text()


@pytest.mark.parametrize("old, new, words", [
    ("minutes = 10.0", 'minutes = "ten"', ["minutes", "'ten'", "number"]),
    ("[[scopes]]", "[scopes]", ["scopes", "[[scopes]]"]),
    ('[site]\nlat_deg = 52.0\nlon_deg = 0.0\nelevation_m = 0.0\ntz = "UTC"\n', 'site = "home"\n',
     ["site", "'home'", "[site] table"]),
    ("challenges = false", 'challenges = "yes"', ["challenges", "true or false"]),
    ('date = "2026-12-05"', 'date = ["2026-12-05"]', ["date", "text"]),
], ids=["minutes-text", "scopes-table", "site-text", "challenges-text", "date-list"])
def test_wrongly_shaped_plan_file_is_one_line(cli, tmp_path, base_plan, old, new, words):
    assert old in base_plan
    p = tmp_path / "plan.toml"
    p.write_text(base_plan.replace(old, new))
    code, out, err = cli("night", "--plan", str(p))
    lines = [ln for ln in err.splitlines() if ln.strip()]
    assert code == 2 and len(lines) == 1 and "internal error" not in lines[0], err
    for w in words:
        assert w in lines[0], (w, lines[0])


def test_toml_date_literal_in_a_plan_file_is_accepted(tmp_path, base_plan):
    from planner.config.planfile import read_plan_file
    from planner.plan.model import NightRequest

    p = tmp_path / "plan.toml"
    p.write_text(base_plan.replace('date = "2026-12-05"', "date = 2026-12-05"))
    assert NightRequest.from_dict(read_plan_file(p)).date == "2026-12-05"


@pytest.mark.parametrize("body", ["a = " + "[" * 50000 + "]" * 50000,
                                  "a = " + "{x=" * 5000 + "1" + "}" * 5000], ids=["arrays", "tables"])
def test_deeply_nested_toml_is_one_line(cli, tmp_path, body):
    p = tmp_path / "deep.toml"
    p.write_text(body + "\n")
    for opt in ("--plan", "--session"):
        code, out, err = cli("night", opt, str(p), "--date", "2026-12-05") if opt == "--session" \
            else cli("night", opt, str(p))
        assert code == 2 and "nested too deeply" in err and "internal" not in err, err
    assert p.read_text() == body + "\n"  # the user's file is left as it is


def test_target_list_cell_over_128kb_is_one_line(cli, tmp_path):
    p = tmp_path / "targets.csv"
    p.write_text("STF2272," + "x" * 200_000 + "\n")
    code, out, err = cli("night", "--lat", "52", "--lon", "0", "--tz", "UTC", "--aperture", "102",
                         "--date", "2026-12-05", "--targets", str(p))
    assert code == 2 and "line 1" in err and "internal" not in err, err


def test_profile_name_with_invalid_utf8_is_one_line(tmp_path):
    """A name typed in a non-UTF-8 locale arrives as lone surrogates (PEP 383)."""
    if sys.platform == "win32":
        pytest.skip("command lines are Unicode on Windows")
    env = dict(os.environ, PYTHONWARNINGS="ignore")
    r = subprocess.run([sys.executable.encode(), b"-m", b"planner", b"profile", b"site", b"add", b"caf\xe9",
                        b"--lat", b"1", b"--lon", b"1", b"--tz", b"UTC"], capture_output=True, env=env,
                       timeout=120, cwd=str(tmp_path))
    err = r.stderr.decode("utf-8", "replace")
    lines = [ln for ln in err.splitlines() if ln.strip()]
    assert r.returncode == 2 and len(lines) == 1 and "internal" not in err, err
    assert "invisible or control" in lines[0]


# -- through the command line ------------------------------------------------------------

NIGHT = ["night", "--lat", "52.1873", "--lon", "-2.4127", "--tz", "Europe/London", "--date", "2026-12-05",
         "--aperture", "102", "--seeing", "1.5", "--limit", "3"]


def test_out_never_replaces_a_users_file_without_force(cli, tmp_path):
    precious = tmp_path / "precious.csv"
    precious.write_text("thesis\n")
    code, out, err = cli(*NIGHT, "--out", str(precious))
    assert code == 2 and "--force" in err and out == ""  # refused before any work
    assert precious.read_text() == "thesis\n"
    code, out, err = cli(*NIGHT, "--out", str(precious), "--force")
    assert code == 0 and precious.read_text().startswith("section,")
    code, out, err = cli(*NIGHT, "--out", str(precious))  # now ours: replaced without asking
    assert code == 0, err


@pytest.mark.parametrize("argv, name", [
    (["pair", "STF2272", "--plot", "{f}"], "orbit.png"),
    (["apertures", "60", "102", "--lat", "52", "--lon", "0", "--tz", "UTC", "--date", "2026-12-05",
      "--plot", "{f}"], "counts.png"),
    (["apertures", "60", "102", "--lat", "52", "--lon", "0", "--tz", "UTC", "--date", "2026-12-05",
      "--out", "{f}"], "table.csv"),
])
def test_plot_and_table_never_replace_a_users_file(cli, tmp_path, argv, name):
    f = tmp_path / name
    f.write_bytes(b"my own picture")
    code, out, err = cli(*[a.format(f=f) for a in argv])
    assert code == 2 and "--force" in err, err
    assert f.read_bytes() == b"my own picture"
    code, out, err = cli(*[a.format(f=f) for a in argv], "--force")
    assert code == 0 and f.read_bytes() != b"my own picture", err


def test_pair_far_dates_through_the_command_line(cli):
    code, out, err = cli("pair", "STF2272", "--date", "1600-01-01")
    assert code == 0 and "date        1600-01-01" in out, (out, err)  # printed 2184-07-20 before
    code, out, err = cli("pair", "STF2272", "--epoch", "1")
    assert code == 0 and "epoch 1.000" in out, err  # OverflowError before
    for args in (["--epoch", "6000"], ["--date", "9999-01-01"], ["--years=-4000:-3990"]):
        code, out, err = cli("pair", "STF2272", *args)
        assert code == 2 and "-3000 to 5000" in err and "internal" not in err, err


def test_utf8_bom_does_not_cost_the_first_catalogue_row(cli, tmp_path):
    src = Path(__file__).resolve().parents[1] / "catalogs_sample" / "wds_summary_rows.txt"
    plain = tmp_path / "plain.txt"
    plain.write_bytes(src.read_bytes())
    bom = tmp_path / "bom.txt"
    bom.write_bytes(b"\xef\xbb\xbf" + src.read_bytes())
    _, a, _ = cli("catalog", "show", "--catalog", str(plain), "--json")
    code, b, err = cli("catalog", "show", "--catalog", str(bom), "--json")
    import json

    assert code == 0 and json.loads(b)["pairs"] == json.loads(a)["pairs"] and json.loads(b)["problems"] == 0


def test_skipped_catalogue_lines_are_mentioned_by_night_and_pair(cli, tmp_path):
    src = Path(__file__).resolve().parents[1] / "catalogs_sample" / "wds_summary_rows.txt"
    f = tmp_path / "wds.txt"
    f.write_bytes(src.read_bytes() + b"18055+0230 this line is not a WDS summary row at all\n")
    for argv in (["pair", "00000+4004", "--catalog", str(f)],
                 ["night", "--catalog", str(f), *NIGHT[1:]]):
        code, out, err = cli(*argv)
        assert code == 0, err
        assert "1 catalogue line(s) could not be read" in err and "catalog show" in err, err


def test_profile_list_shows_no_escape_sequence_from_a_hand_edited_file(cli):
    from planner.config.profiles import profile_path

    path = profile_path("site")
    path.write_text('[site."evil\\u001b]0;pwned\\u0007\\u202e"]\nlat_deg = 1.0\nlon_deg = 1.0\ntz = "UTC"\n')
    for argv in (["profile", "site", "list"], ["profile", "site", "list", "--json"]):
        code, out, err = cli(*argv)
        assert code == 0 and "evil" in out and not HIDDEN.search(out), repr(out)


def test_votable_cells_are_plain_numbers(hostile_plan, tmp_path):
    """astropy 6.1.0 under numpy 2 wrote 'np.float64(1.5)' into cells (hence astropy>=6.1.1)."""
    from planner.report import write_report

    p = tmp_path / "plan.vot"
    write_report(hostile_plan, p)
    assert "np.float" not in p.read_text("utf-8")


def test_ctrl_c_says_interrupted_and_exits_130(tmp_path):
    import signal
    import time

    if sys.platform == "win32":
        pytest.skip("SIGINT to a child process is POSIX")
    env = dict(os.environ, PYTHONWARNINGS="ignore")
    proc = subprocess.Popen([sys.executable, "-m", "planner", "apertures", "60", "80", "102", "127", "152",
                             "--lat", "52", "--lon", "0", "--tz", "UTC", "--from", "2026-01-01",
                             "--to", "2026-12-31", "--nights", "40"],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True, env=env,
                            cwd=str(tmp_path))
    time.sleep(3.0)  # well inside the work (imports and a year of nights)
    proc.send_signal(signal.SIGINT)
    out, err = proc.communicate(timeout=120)
    assert proc.returncode == 130, (proc.returncode, err)
    lines = [ln for ln in err.splitlines() if ln.strip()]
    assert lines[-1] == "splitplan: interrupted" and "Traceback" not in err, err


def test_library_warnings_do_not_leak(tmp_path):
    """astropy warns when XDG_CONFIG_HOME names a missing folder; the tool stays quiet."""
    env = {"XDG_CONFIG_HOME": str(tmp_path / "missing"), "XDG_CACHE_HOME": str(tmp_path / "missing2")}
    r = _run(*NIGHT, timeout=300, cwd=str(tmp_path), env_extra=dict(env, PYTHONWARNINGS=""))
    assert r.returncode == 0, r.stderr
    assert "Warning" not in r.stderr and "warnings.warn" not in r.stderr, r.stderr
