"""Escaping of catalogue and user text on its way into HTML, CSV and PDF.

Catalogue files and user lists are untrusted input: a discoverer name such as
``<script>`` or a CSV cell starting with ``=`` must reach the reader as text,
never as markup or a spreadsheet formula.

* HTML: :func:`html_text` (``html.escape`` with quotes) for every string.
* CSV: :func:`csv_cell` prefixes a single quote to a cell starting with
  ``=``, ``+``, ``-``, ``@``, a tab or a carriage return (the OWASP advice
  on CSV injection; common practice).  Numbers are written as numbers, so a
  negative declination stays numeric.
* PDF (matplotlib text): :func:`pdf_text` escapes ``$`` (which would start
  mathtext) and drops control characters.
* Terminal: :func:`terminal_text` drops control characters (escape sequences).
"""

from __future__ import annotations

import html

_FORMULA_PREFIXES = ("=", "+", "-", "@", "\t", "\r")


def html_text(value) -> str:
    """Text safe to place inside HTML elements and quoted attributes."""
    return html.escape("" if value is None else str(value), quote=True)


def csv_cell(value):
    """A text cell that a spreadsheet will not run as a formula."""
    if not isinstance(value, str):
        return value
    if value.startswith(_FORMULA_PREFIXES):
        return "'" + value
    return value


def terminal_text(value, one_line: bool = False) -> str:
    """Text for a terminal: control characters (e.g. ESC starting an escape
    sequence hidden in a catalogue or session file name) become spaces; newline
    and tab are kept unless ``one_line``."""
    s = "" if value is None else str(value)
    keep = "" if one_line else "\n\t"
    return "".join(ch if ch in keep or not (ch < " " or "\x7f" <= ch <= "\x9f") else " " for ch in s)


def pdf_text(value) -> str:
    """Text for matplotlib: no mathtext, no control characters."""
    s = "" if value is None else str(value)
    s = "".join(ch if ch >= " " or ch == "\n" else " " for ch in s)
    # Only "$" needs escaping: outside mathtext matplotlib draws a backslash as it is.
    return s.replace("$", r"\$")
