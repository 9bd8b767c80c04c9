"""Hostile catalogue text, end to end through the command line (issue 7, item 5).

``tests/test_report_escaping.py`` checks the escaping functions and
``tests/test_report_exports.py`` plants a script tag and an ``=`` formula in
the library's plan.  This file closes the remaining gaps by going through the
command line with a catalogue *file*, as a user would get one: a WDS summary
file (USNO layout of FORMATS.md A, built from a real row of the bundled
sample) whose discoverer fields are spreadsheet formulas with each prefix
(``=``, ``+``, ``-``, ``@``), an HTML tag, a matplotlib mathtext string
(``$\\a$``, which makes matplotlib fail when not escaped), SQL-ish quotes, and a
tab (a control character, which the reader must reject with its line number).

References: OWASP "CSV Injection" (cells starting = + - @ tab CR are quoted;
common practice), the HTML5 parsing rules (Python's ``html.parser`` as the
reader), the PDF file structure (header and ``%%EOF`` trailer), matplotlib's
mathtext trigger ``$``.
"""

from __future__ import annotations

import csv
import html.parser
import json

import pytest

from conftest import reference_file

NAMES = ["=1+2", "+SUM(1)", "-2+3", "@cmd", "<i>x", "$\\a$", "'\";--"]
FORMULA = ("=", "+", "-", "@", "\t", "\r")
ARGS = ["--lat", "52.1873", "--lon", "-2.4127", "--tz", "Europe/London", "--date", "2026-12-05",
        "--seeing", "1.5", "--aperture", "102"]


def _put(s: str, first: int, last: int, text: str) -> str:
    w = last - first + 1
    return s[: first - 1] + text.ljust(w)[:w] + s[last:]


@pytest.fixture
def hostile(tmp_path):
    """Seven pairs at Dec +50, RA 2h-5h (high in a December evening at 52 N), 5" apart, mags 6.0 and
    6.5, each with a hostile discoverer field; an eighth line with a tab in that field."""
    row = reference_file("wds_summary_rows.txt").read_bytes().split(b"\n")[0].decode("ascii").ljust(130)
    lines = []
    for k, name in enumerate(NAMES + ["\tTAB"]):
        hh, mm = 2 + k // 2, 30 * (k % 2)
        s = _put(row, 1, 10, f"{hh:02d}{mm:02d}0+5000")
        s = _put(s, 11, 17, name)
        s = _put(s, 18, 22, "=AB")
        for a, b, v in ((24, 27, "1900"), (29, 32, "2020"), (34, 37, "10"), (39, 41, "100"), (43, 45, "101"),
                        (47, 51, "  5.0"), (53, 57, "  5.0"), (59, 63, " 6.00"), (65, 69, " 6.50")):
            s = _put(s, a, b, v.rjust(b - a + 1))
        s = _put(s, 113, 130, f"{hh:02d}{mm:02d}00.00+500000.0")
        lines.append(s)
    p = tmp_path / "hostile_wds.txt"
    p.write_text("\n".join(lines) + "\n", "ascii")
    return p


def test_reader_keeps_the_text_and_rejects_the_control_character(cli, hostile):
    code, out, err = cli("catalog", "show", "--catalog", str(hostile), "--json")
    assert code == 0, err
    info = json.loads(out)
    assert info["pairs"] == len(NAMES) and info["problems"] == 1
    assert "(line 8)" in info["problem_lines"][0] and "control character" in info["problem_lines"][0]


def test_json_keeps_the_text_as_data(cli, hostile):
    code, out, err = cli("night", *ARGS, "--catalog", str(hostile), "--json")
    assert code == 0, err
    assert sorted(r["discoverer"] for r in json.loads(out)) == sorted(NAMES)


def test_csv_has_no_live_formula(cli, hostile, tmp_path):
    out = tmp_path / "plan.csv"
    code, _, err = cli("night", *ARGS, "--catalog", str(hostile), "--out", str(out))
    assert code == 0, err
    with out.open(newline="", encoding="utf-8") as fh:
        rows = list(csv.DictReader(fh))
    assert len(rows) == len(NAMES)
    for r in rows:
        d = r["discoverer"]
        name = d[1:] if d.startswith("'") and d[1:] in NAMES else d
        assert name in NAMES
        assert (d == "'" + name) == name.startswith(FORMULA)  # quoted exactly when it is a formula
        assert r["components"] == "'=AB"
        for key, cell in r.items():
            try:
                float(cell)
                continue  # a number (e.g. a negative declination) stays a number
            except ValueError:
                pass
            assert not cell.startswith(FORMULA), (key, cell)


def test_apertures_csv_has_no_live_formula(cli, hostile, tmp_path):
    out = tmp_path / "apertures.csv"
    code, _, err = cli("apertures", "60", "102", "203", *ARGS[:-2], "--catalog", str(hostile), "--out", str(out))
    assert code == 0, err
    with out.open(newline="", encoding="utf-8") as fh:
        cells = [c for row in csv.reader(fh) for c in row]
    assert any("=1+2" in c for c in cells)
    assert not [c for c in cells if c.startswith(FORMULA) and not _is_number(c)]


def _is_number(c: str) -> bool:
    try:
        float(c)
        return True
    except ValueError:
        return False


class _Page(html.parser.HTMLParser):
    def __init__(self):
        super().__init__()
        self.tags: list[str] = []
        self.text: list[str] = []

    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)

    def handle_data(self, data):
        self.text.append(data)


def test_html_shows_the_text_not_markup(cli, hostile, tmp_path):
    out = tmp_path / "plan.html"
    code, _, err = cli("night", *ARGS, "--catalog", str(hostile), "--out", str(out))
    assert code == 0, err
    page = _Page()
    page.feed(out.read_text("utf-8"))
    assert "i" not in page.tags and "script" not in page.tags
    text = "".join(page.text)
    for name in NAMES:
        assert name in text, name


def test_pdf_and_orbit_plot_survive_mathtext(cli, hostile, tmp_path):
    out = tmp_path / "plan.pdf"
    code, _, err = cli("night", *ARGS, "--catalog", str(hostile), "--out", str(out))
    assert code == 0, err
    data = out.read_bytes()
    assert data.startswith(b"%PDF-") and data.rstrip().endswith(b"%%EOF")
    for ext, magic in ((".png", b"\x89PNG"), (".svg", b"<?xml")):
        plot = tmp_path / f"orbit{ext}"
        code, _, err = cli("pair", "04300+5000", "--catalog", str(hostile), "--plot", str(plot))
        assert code == 0, err
        assert plot.read_bytes().startswith(magic)
