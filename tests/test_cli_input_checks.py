"""Inputs that used to be accepted silently (or handled at the wrong moment).

Each case must give exactly one ``splitplan: error:`` line naming the value and
exit code 2, before any work is done, and must not touch the user's files.
The allowed ranges are the project's own (common practice, no source); the IAU
constellation abbreviations come from astropy's data file of the 88 IAU names.
"""

from __future__ import annotations

import pytest

NIGHT = ["night", "--lat", "52.1873", "--lon", "-2.4127", "--tz", "Europe/London", "--date", "2026-12-05",
         "--aperture", "102", "--seeing", "1.5"]
APS = ["apertures", "60", "102", "--lat", "52.1873", "--lon", "-2.4127", "--tz", "Europe/London",
       "--date", "2026-12-05"]


def one_error_line(err: str) -> str:
    lines = [ln for ln in err.splitlines() if ln.strip()]
    assert len(lines) == 1 and lines[0].startswith("splitplan: error:"), err
    assert "Traceback" not in err
    return lines[0]


@pytest.mark.parametrize("extra, words", [
    (["--minutes", "0"], ["minutes", "240"]),
    (["--sep-min", "5", "--sep-max", "1"], ["--sep-min 5", "--sep-max 1"]),
    (["--dm-max", "-1"], ["--dm-max -1", "allowed 0 to"]),
    (["--sep-min", "-1"], ["--sep-min -1", "allowed 0 to"]),
    (["--constellation", "Xyz"], ["'Xyz'", "IAU"]),
    (["--start", "23:00", "--end", "22:00"], ["--start 23:00", "--end 22:00"]),
    (["--share-margin", "-1"], ["--share-margin -1", "0.5 to 10"]),
    (["--out", "plan.docx"], [".docx", ".html"]),
])
def test_night_refuses(cli, extra, words):
    code, out, err = cli(*NIGHT, *extra)
    assert code == 2
    line = one_error_line(err)
    for w in words:
        assert w in line
    assert out == ""  # refused before any plan was computed or printed


def test_empty_time_zone_is_not_silently_utc(cli):
    code, out, err = cli("night", "--lat", "52", "--lon", "0", "--tz", "", "--aperture", "102",
                         "--date", "2026-12-05")
    assert code == 2 and "time zone" in one_error_line(err).lower()


def test_constellation_abbreviation_any_case(cli):
    code, out, err = cli(*NIGHT, "--constellation", "cyg", "--limit", "3", "--json")
    assert code == 0, err


@pytest.mark.parametrize("extra, words", [
    (["--to", "2027-02-01", "--nights", "0"], ["--nights 0", "allowed 1 to"]),
    (["--to", "2027-02-01", "--nights", "-2"], ["--nights -2", "allowed 1 to"]),
])
def test_apertures_refuses(cli, extra, words):
    code, out, err = cli(*APS, *extra)
    assert code == 2
    line = one_error_line(err)
    for w in words:
        assert w in line


def test_aperture_ranges_agree_between_commands(cli):
    # the same limits (10-10000 mm) in `apertures` as in the Telescope used by `night`
    code, _, err = cli(*APS[:1], "5000", *APS[3:])
    assert code == 0, err
    code, _, err = cli(*APS[:1], "20000", *APS[3:])
    assert code == 2 and "10 to 10000 mm" in one_error_line(err)
    code, _, err = cli("night", *NIGHT[1:-4], "--aperture", "20000")
    assert code == 2 and "10000 mm" in one_error_line(err)


@pytest.mark.parametrize("option", ["--plan", "--session"])
def test_a_users_own_file_is_never_moved(cli, tmp_path, option):
    f = tmp_path / "picture.png"
    payload = b"\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR"
    f.write_bytes(payload)
    args = ["night", option, str(f)] + (["--date", "2026-12-05"] if option == "--session" else [])
    code, out, err = cli(*args)
    assert code == 2
    line = one_error_line(err)
    assert ("session file" if option == "--session" else "plan file") in line
    assert f.read_bytes() == payload and [p.name for p in tmp_path.iterdir()] == ["picture.png"]


def test_escape_sequences_in_a_session_file_do_not_reach_the_terminal(cli, tmp_path):
    s = tmp_path / "hostile.toml"
    s.write_text('site_name = "\\u001b]0;pwned\\u0007 \\u001b[2J Field"\n'
                 '[site]\nlat_deg = 52.19\nlon_deg = -2.41\ntz = "Europe/London"\n'
                 '[[scope]]\nname = "Dob\\u001b[31m"\naperture_mm = 203\nobstruction = 0.22\n', "utf-8")
    code, out, err = cli("night", "--session", str(s), "--date", "2026-12-05", "--limit", "2")
    assert code == 0, err
    assert "\x1b" not in out and "\x07" not in out
    assert "Field" in out and "Dob" in out


def test_polar_day_header_says_there_is_no_dark_window(cli):
    code, out, err = cli("night", "--lat", "78", "--lon", "15", "--tz", "Arctic/Longyearbyen",
                         "--date", "2026-06-21", "--aperture", "100")
    assert code == 0, err
    assert "dark (nautical): none on this date" in out
    assert "- - -" not in out
    assert not any(ln.rstrip().endswith(" -") for ln in out.splitlines())


def test_pdf_text_keeps_backslashes_and_blocks_mathtext():
    # matplotlib draws text without unescaped '$' literally (its Text._preprocess_math):
    # a catalogue name "$\\a$ x\\y" must come out exactly as typed.
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from planner.report.safe import pdf_text

    fig = plt.figure()
    t = fig.text(0, 0, pdf_text("$\\a$ x\\y"))
    shown, is_math = t._preprocess_math(t.get_text())
    plt.close(fig)
    assert (shown, is_math) == ("$\\a$ x\\y", False)


def test_error_lines_stay_one_line_and_inert(cli):
    # a pair name typed (or pasted) with a newline and an escape sequence: the error is still
    # one line on stderr and carries no control character to the terminal
    code, out, err = cli("pair", "STF\n2272\x1b[2J")
    assert code == 2
    line = one_error_line(err)
    assert "\x1b" not in err and "no pair matches" in line
