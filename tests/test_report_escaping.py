"""Escaping of catalogue and user text into HTML, CSV and PDF (matplotlib).

Against: the HTML5 rules (html.escape makes <, >, &, quotes inert), the
OWASP CSV-injection advice (cells starting with = + - @ tab CR are prefixed
with a quote; common practice), matplotlib's mathtext trigger ($).
"""

from __future__ import annotations

import csv
import io

import pytest

from planner.report.safe import csv_cell, html_text, pdf_text

HOSTILE = ["<script>alert('x')</script>", "=cmd|' /C calc'!A0", "+SUM(A1)", "-2+3", "@import",
           "\tTAB", "\rCR", 'a"b', "x & y", "$\\alpha$"]


@pytest.mark.parametrize("s", HOSTILE)
def test_html_text_is_inert(s):
    out = html_text(s)
    assert "<" not in out and ">" not in out and '"' not in out and "'" not in out
    import html as _h

    assert _h.unescape(out) == s  # nothing lost


@pytest.mark.parametrize("s", HOSTILE)
def test_csv_cells_never_start_a_formula(s):
    cell = csv_cell(s)
    buf = io.StringIO()
    csv.writer(buf).writerow([cell])
    back = next(csv.reader(io.StringIO(buf.getvalue())))[0]
    assert not back.startswith(("=", "+", "-", "@", "\t", "\r"))
    assert back.endswith(s[1:])


def test_csv_numbers_stay_numbers():
    assert csv_cell(-12.5) == -12.5


def test_pdf_text_has_no_mathtext_or_control_chars():
    out = pdf_text("$x$ \x00 \x07 ok")
    assert "$" not in out.replace(r"\$", "") and "\x00" not in out and "\x07" not in out
