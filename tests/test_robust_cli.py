"""Bad input anywhere on the command line: one clear line, a non-zero exit, no traceback.

What is checked, for every case below (issue 7, item 1):

* the exit code: 2 for a usage error (a value out of range, an unknown name, a
  malformed option), 1 for a failure while doing the job (an unreadable or
  binary file, a path that cannot be written);
* stderr holds exactly one non-empty line, starting ``splitplan: error:``,
  never a Python traceback and never the "internal error" line that the
  entry point prints for an unexpected exception;
* that line names the bad value (or the file) and says what is allowed, checked
  with key words.

The allowed ranges quoted in the key words are the ones the package documents
(Site: latitude -90..90, longitude -180..360, minimum altitude 0..80;
Telescope: aperture 10..10000 mm, obstruction 0 <= r < 1; seeing 0..20";
minutes per target 1..240): common practice for amateur equipment, no
outside source needed, the test only checks that the message states them.

The cases run in-process (``cli`` fixture); a handful also run through a real
``python -m planner`` subprocess, where a traceback would show for real.
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest

DEMO_SITE = ["--lat", "52.1873", "--lon", "-2.4127", "--tz", "Europe/London"]
DEMO = [*DEMO_SITE, "--date", "2026-12-05", "--seeing", "1.5", "--catalog", "sample"]
NIGHT = ["night", *DEMO]
APS = ["apertures", "60", "102", *DEMO]


@pytest.fixture
def bad(tmp_path):
    """Files of the wrong kind, as a user might pass them by mistake."""
    d = tmp_path / "bad"
    d.mkdir()
    files = {
        "dir": d,
        "missing": d / "no-such-catalogue.txt",
        "empty": d / "empty.txt",
        "binary": d / "random.dat",
        "png": d / "picture.png",
        "csv": d / "table.csv",
        "text": d / "letter.txt",
        "afile": d / "afile",
    }
    files["empty"].write_bytes(b"")
    files["binary"].write_bytes(bytes(range(256)) * 8)
    # PNG signature and the start of an IHDR chunk (PNG specification, ISO/IEC 15948)
    files["png"].write_bytes(b"\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR\x00\x00\x00\x10")
    files["csv"].write_text("wds_id,name,sep\nnot an id,foo,1.2\n", "utf-8")
    files["text"].write_text("Dear observer,\nthis is not a catalogue.\n", "utf-8")
    files["afile"].write_text("a regular file; paths below it cannot be created\n", "utf-8")
    return files


def _one_error_line(code: int, err: str, expected_code: int) -> str:
    assert "Traceback" not in err, err
    lines = [ln for ln in err.splitlines() if ln.strip()]
    assert len(lines) == 1, lines
    line = lines[0]
    assert code == expected_code, (code, line)
    assert line.startswith("splitplan: error:"), line
    assert "internal error" not in line, line
    return line


# (case id, argv (with {placeholders} for the bad files), exit code, key words that must
# all appear in the error line; '{...}' in a key word is filled in too)
CASES = [
    # -- command-line parsing (click/typer level) ---------------------------------------
    ("unknown-command", ["nightly"], 2, ["nightly", "night"]),
    ("unknown-option", ["pair", "STF2272", "--bogus"], 2, ["--bogus", "pair -h"]),
    ("longitude-not-a-number", [*NIGHT[:1], "--lat", "52", "--lon", "abc", "--tz", "UTC", "--aperture", "102"],
     2, ["--lon", "'abc'", "number"]),
    ("limit-not-an-integer", [*NIGHT, "--aperture", "102", "--limit", "2.5"], 2, ["--limit", "'2.5'", "integer"]),
    ("aperture-list-not-numbers", ["apertures", "60", "abc", *DEMO], 2, ["sizes", "number"]),
    # -- telescope ---------------------------------------------------------------------------
    ("aperture-zero", [*NIGHT, "--aperture", "0"], 2, ["aperture", " 0 is out of range", "10", "10000 mm"]),
    ("aperture-negative", [*NIGHT, "--aperture", "-50"], 2, ["aperture", "-50", "10000 mm"]),
    ("aperture-absurd", [*NIGHT, "--aperture", "1e6"], 2, ["aperture", "1e+06", "10000 mm"]),
    ("aperture-nan", [*NIGHT, "--aperture", "nan"], 2, ["aperture", "nan", "10000 mm"]),
    ("obstruction-one", [*NIGHT, "--aperture", "102", "--obstruction", "1"], 2, ["obstruction", " 1 is out of range", "ratio"]),
    ("obstruction-negative", [*NIGHT, "--aperture", "102", "--obstruction", "-0.1"], 2,
     ["obstruction", "-0.1", "ratio"]),
    ("apertures-zero-in-list", ["apertures", "60", "0", "102", *DEMO], 2, ["aperture 0", "mm"]),
    ("apertures-obstruction", [*APS, "--obstruction", "1.2"], 2, ["obstruction", "1.2"]),
    ("scope-profile-aperture", ["profile", "scope", "add", "big", "--aperture", "-1"], 2, ["aperture", "-1", "mm"]),
    ("scope-profile-kind", ["profile", "scope", "add", "big", "--aperture", "100", "--kind", "spyglass"], 2,
     ["spyglass", "refractor", "newtonian"]),
    # -- site --------------------------------------------------------------------------------
    ("latitude-north", ["night", "--lat", "95", "--lon", "0", "--tz", "UTC", "--aperture", "102"], 2,
     ["latitude", "95", "-90 to 90"]),
    ("latitude-south", ["night", "--lat", "-91", "--lon", "0", "--tz", "UTC", "--aperture", "102"], 2,
     ["latitude", "-91", "-90 to 90"]),
    ("longitude-range", ["night", "--lat", "52", "--lon", "400", "--tz", "UTC", "--aperture", "102"], 2,
     ["longitude", "400", "-180"]),
    ("time-zone-unknown", ["night", "--lat", "52", "--lon", "0", "--tz", "Mars/Olympus", "--aperture", "102"], 2,
     ["Mars/Olympus", "IANA", "Europe/"]),
    ("site-profile-time-zone", ["profile", "site", "add", "home", "--lat", "50", "--lon", "0", "--tz", "Nowhere/Land"],
     2, ["Nowhere/Land", "IANA"]),
    ("site-profile-latitude", ["profile", "site", "add", "home", "--lat", "95", "--lon", "0", "--tz", "UTC"], 2,
     ["latitude", "95", "-90 to 90"]),
    ("min-altitude", [*NIGHT, "--aperture", "102", "--min-alt", "95"], 2, ["minimum altitude", "95", "0 to 80"]),
    ("elevation", [*NIGHT, "--aperture", "102", "--elevation", "-20000"], 2, ["elevation", "-20000", "9000 m"]),
    # -- dates -------------------------------------------------------------------------------
    ("night-date-feb-30", ["night", *DEMO_SITE, "--date", "2026-02-30", "--aperture", "102"], 2,
     ["2026-02-30", "YYYY-MM-DD"]),
    ("night-date-words", ["night", *DEMO_SITE, "--date", "tomorrowish", "--aperture", "102"], 2,
     ["tomorrowish", "YYYY-MM-DD"]),
    ("pair-date-feb-30", ["pair", "STF2272", "--date", "2026-02-30"], 2, ["--date", "2026-02-30", "YYYY-MM-DD"]),
    ("pair-epoch-absurd", ["pair", "STF2272", "--epoch", "1e9"], 2, ["--epoch", "-3000 to 5000"]),
    ("apertures-range-backwards", [*APS, "--to", "2026-01-01"], 2, ["--to", "2026-01-01", "before"]),
    ("apertures-range-bad-date", [*APS, "--to", "2026-02-30"], 2, ["2026-02-30", "YYYY-MM-DD"]),
    # -- air and schedule --------------------------------------------------------------------
    ("seeing-negative", [*NIGHT[:-4], "--catalog", "sample", "--aperture", "102", "--seeing", "-1"], 2,
     ["seeing", "-1", "0 to 20"]),
    ("seeing-absurd", ["night", *DEMO_SITE, "--date", "2026-12-05", "--aperture", "102", "--seeing", "100"], 2,
     ["seeing", "100", "0 to 20"]),
    ("minutes-negative", [*NIGHT, "--aperture", "102", "--minutes", "-5"], 2, ["minutes", "-5", "240"]),
    ("limit-negative", [*NIGHT, "--aperture", "102", "--limit", "-3"], 2, ["limit", "-3", "allowed 1 to"]),
    ("start-not-a-time", [*NIGHT, "--aperture", "102", "--start", "2x:00"], 2, ["2x:00", "HH:MM"]),
    # -- pair names and the year table ---------------------------------------------------
    ("pair-close-miss", ["pair", "STF2273"], 2, ["STF2273", "closest:", "STF 2272"]),
    ("pair-nonsense", ["pair", "XYZ999"], 2, ["XYZ999", "WDS id", "18055+0230"]),
    ("pair-empty", ["pair", ""], 2, ["empty pair name", "WDS id"]),
    ("years-garbage", ["pair", "STF2272", "--years", "2020:2040:x"], 2, ["2020:2040:x", "FROM:TO"]),
    ("years-not-finite", ["pair", "STF2272", "--years", "nan:2030"], 2, ["nan:2030", "FROM:TO"]),
    ("years-infinite", ["pair", "STF2272", "--years", "inf:inf"], 2, ["inf:inf", "FROM:TO"]),
    ("years-too-many-rows", ["pair", "STF2272", "--years", "1:100000:0.001"], 2, ["--years", "at most"]),
    # -- catalogue paths ----------------------------------------------------------------------
    ("catalog-missing", ["catalog", "show", "--catalog", "{missing}"], 2, ["{missing}", "not found", "sample"]),
    ("catalog-empty", ["catalog", "show", "--catalog", "{empty}"], 1, ["{empty}", "empty"]),
    ("catalog-binary", ["catalog", "show", "--catalog", "{binary}"], 1, ["{binary}", "binary", "text"]),
    ("catalog-directory", ["catalog", "show", "--catalog", "{dir}"], 2, ["{dir}", "directory"]),
    ("catalog-png", ["catalog", "show", "--catalog", "{png}"], 1, ["{png}", "binary"]),
    ("catalog-csv", ["catalog", "show", "--catalog", "{csv}"], 2, ["{csv}", "neither a WDS", "ORB6"]),
    ("catalog-letter", ["pair", "STF2272", "--catalog", "{text}"], 2, ["{text}", "neither a WDS"]),
    ("night-catalog-directory", [*NIGHT[:-2], "--aperture", "102", "--catalog", "{dir}"], 2, ["{dir}", "directory"]),
    ("catalog-unknown-home", ["catalog", "show", "--catalog", "~no_such_user_xyz/wds.txt"], 2,
     ["~no_such_user_xyz/wds.txt", "full path"]),
    ("import-png", ["catalog", "import", "{png}"], 1, ["{png}", "binary"]),
    ("orbits-without-a-file", ["catalog", "show", "--orbits", "{text}"], 2, ["orbits file", "'sample'", "--catalog"]),
    # -- outputs ------------------------------------------------------------------------------
    ("night-out-under-a-file", [*NIGHT, "--aperture", "102", "--out", "{afile}/plan.html"], 1,
     ["cannot write", "{afile}/plan.html", "{afile} is a file, not a folder"]),
    ("night-out-extension", [*NIGHT, "--aperture", "102", "--out", "{dir}/plan.docx"], 2, [".docx", ".csv", ".html"]),
    ("save-plan-under-a-file", [*NIGHT, "--aperture", "102", "--save-plan", "{afile}/p.toml"], 1,
     ["cannot write", "{afile}/p.toml"]),
    ("pair-plot-under-a-file", ["pair", "STF2272", "--plot", "{afile}/orbit.png"], 1,
     ["cannot write", "{afile}/orbit.png", "is a file, not a folder"]),
    ("pair-plot-extension", ["pair", "STF2272", "--plot", "{dir}/orbit.bmp"], 2, ["orbit.bmp", ".png", ".svg"]),
    ("apertures-out-extension", [*APS, "--out", "{dir}/table.xlsx"], 2, ["table.xlsx", ".csv", ".json"]),
    ("apertures-plot-under-a-file", [*APS, "--plot", "{afile}/counts.png"], 1, ["cannot write", "{afile}"]),
    # -- saved profiles and plan files ------------------------------------------------------
    ("plan-missing", ["night", "--plan", "{missing}"], 2, ["{missing}", "does not exist"]),
    ("plan-directory", ["night", "--plan", "{dir}"], 2, ["{dir}", "directory", ".toml"]),
    ("site-profile-unknown", ["profile", "site", "remove", "nosuch"], 2, ["nosuch", "saved: none"]),
    ("scope-profile-unknown", [*NIGHT, "--scope", "nosuch"], 2, ["nosuch", "profile scope add"]),
]


@pytest.mark.parametrize("args, code, words", [c[1:] for c in CASES], ids=[c[0] for c in CASES])
def test_bad_input_one_line(cli, bad, args, code, words, monkeypatch, tmp_path):
    monkeypatch.chdir(tmp_path)
    fill = {k: str(v) for k, v in bad.items()}
    argv = [a.format(**fill) for a in args]
    got, out, err = cli(*argv)
    line = _one_error_line(got, err, code)
    for w in words:
        assert w.format(**fill) in line, (w, line)


def test_at_least_thirty_cases():
    assert len(CASES) >= 30 and len({c[0] for c in CASES}) == len(CASES)


def test_bad_input_leaves_no_output_file_behind(cli, bad, tmp_path, monkeypatch):
    """A refused run writes nothing: no plan file, no temporary file."""
    monkeypatch.chdir(tmp_path)
    out = tmp_path / "plan.csv"
    code, _, err = cli(*NIGHT, "--aperture", "0", "--out", str(out), "--save-plan", str(tmp_path / "p.toml"))
    _one_error_line(code, err, 2)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["bad"]


def test_debug_variable_shows_the_traceback(cli, monkeypatch):
    """SPLITPLAN_DEBUG=1 lets the exception through (documented in DEVELOPERS.md)."""
    from planner.errors import InputError

    monkeypatch.setenv("SPLITPLAN_DEBUG", "1")
    with pytest.raises(InputError, match="no pair matches"):
        cli("pair", "XYZ999")


def test_unexpected_exception_is_one_internal_error_line(cli, monkeypatch):
    """A bug (here a forced ZeroDivisionError) still gives one line and exit 1."""
    import planner.plan.pair_report as pair_report

    def broken(*a, **k):
        raise ZeroDivisionError("forced for the test")

    monkeypatch.setattr(pair_report, "geometry_at", broken)
    code, out, err = cli("pair", "STF2272")
    lines = [ln for ln in err.splitlines() if ln.strip()]
    assert code == 1 and len(lines) == 1 and "Traceback" not in err
    assert "internal error" in lines[0] and "ZeroDivisionError" in lines[0] and "SPLITPLAN_DEBUG" in lines[0]


# -- real processes -----------------------------------------------------------------------

SUBPROCESS_CASES = [
    (["pair", "STF2273"], 2, ["closest:"]),
    (["night", "--lat", "95", "--lon", "0", "--tz", "UTC", "--aperture", "102"], 2, ["latitude", "95"]),
    (["night", *DEMO_SITE, "--lon", "abc", "--aperture", "102"], 2, ["--lon", "'abc'"]),
    (["catalog", "show", "--catalog", "{png}"], 1, ["binary"]),
    (["pair", "STF2272", "--plot", "{afile}/x.png"], 1, ["cannot write"]),
    (["nightly"], 2, ["night"]),
]


@pytest.mark.parametrize("args, code, words", SUBPROCESS_CASES,
                         ids=["pair", "latitude", "not-a-number", "png", "unwritable", "typo"])
def test_bad_input_in_a_real_process(bad, args, code, words):
    fill = {k: str(v) for k, v in bad.items()}
    argv = [a.format(**fill) for a in args]
    env = dict(os.environ, PYTHONWARNINGS="ignore")
    env.pop("SPLITPLAN_DEBUG", None)
    r = subprocess.run([sys.executable, "-m", "planner", *argv], capture_output=True, text=True,
                       env=env, timeout=120, cwd=str(bad["dir"]))
    line = _one_error_line(r.returncode, r.stderr, code)
    for w in words:
        assert w in line, (w, line)


def test_console_script_runs_if_installed(bad):
    """The installed ``splitplan`` script uses the same entry point."""
    exe = Path(sys.executable).with_name("splitplan")
    if not exe.exists():
        pytest.skip("no splitplan console script beside this Python")
    r = subprocess.run([str(exe), "pair", "XYZ999"], capture_output=True, text=True, timeout=120,
                       cwd=str(bad["dir"]))
    line = _one_error_line(r.returncode, r.stderr, 2)
    assert "XYZ999" in line


# -- arbitrary files as a catalogue, through the whole command ------------------------------

from hypothesis import HealthCheck, given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402

_WDS_LIKE = st.sampled_from([
    b"00000+0000STF   1AB      1900 2000   10  90  90   1.0   1.0  5.00  6.00 G0   +000-000 +000-000 "
    b"+00 0000  N 000000.00+000000.0\n",
    b"18055+0230STF2272AB",
    b"   \t\r\n",
    b"\xef\xbb\xbf",  # a UTF-8 byte-order mark
])


@settings(max_examples=120, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(content=st.one_of(st.binary(max_size=2000),
                         st.lists(st.one_of(_WDS_LIKE, st.binary(max_size=140)), max_size=30).map(b"".join)))
def test_any_file_as_catalogue_never_crashes(cli, tmp_path_factory, content):
    """Whatever bytes the file holds, 'catalog show' either reads it (exit 0, skipped lines
    listed) or refuses it in one line (exit 1 or 2); never a traceback or an internal error."""
    p = tmp_path_factory.mktemp("fuzz") / "catalogue.txt"
    p.write_bytes(content)
    code, out, err = cli("catalog", "show", "--catalog", str(p))
    assert "Traceback" not in err and "internal error" not in err, err
    if code == 0:
        assert "pairs:" in out
    else:
        _one_error_line(code, err, code)
        assert code in (1, 2)
