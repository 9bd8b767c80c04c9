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
* Every format: :func:`plain_text` turns control characters (C0 but tab and
  newline, DEL, C1), bidirectional overrides and isolates, zero-width
  characters and undecodable bytes (lone surrogates from a file name or
  argument that is not UTF-8) into a space or U+FFFD, so no output carries
  an escape sequence, text that reads backwards, or XML that is not
  well-formed.
"""

from __future__ import annotations

import html
import re

from planner.config.text import hidden_characters  # noqa: F401  (one home; re-exported)

# C0 (but tab, LF, CR), DEL, C1; bidi embeddings, overrides and isolates;
# zero-width space/joiners, word joiner, invisible operators, BOM; line and
# paragraph separators; lone surrogates.
_HIDDEN = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\x7f-\x9f\u200b-\u200f\u2028-\u202e"
                     "\u2060-\u2069\ufeff\ud800-\udfff]")


def plain_text(value, keep: str = "\n\t") -> str:
    """``value`` as text with hidden characters replaced: lone surrogates by
    U+FFFD, the others by a space (tab, newline and CR kept if in ``keep``)."""
    s = "" if value is None else str(value)
    if not _HIDDEN.search(s) and not any(c in s for c in "\t\n\r" if c not in keep):
        return s

    def sub(m):
        ch = m.group(0)
        return "\ufffd" if "\ud800" <= ch <= "\udfff" else " "

    s = _HIDDEN.sub(sub, s)
    for c in "\t\n\r":
        if c not in keep:
            s = s.replace(c, " ")
    return s

_FORMULA_PREFIXES = ("=", "+", "-", "@", "\t", "\r")


def html_text(value) -> str:
    """Text safe to place inside HTML elements and quoted attributes."""
    return html.escape(plain_text(value, keep="\n\t\r"), quote=True)


def csv_cell(value):
    """A text cell that a spreadsheet will not run as a formula."""
    if not isinstance(value, str):
        return value
    value = plain_text(value, keep="\n\t\r")
    if value.startswith(_FORMULA_PREFIXES):
        return "'" + value
    return value


def terminal_text(value, one_line: bool = False) -> str:
    """Text for a terminal: control characters (e.g. ESC starting an escape
    sequence hidden in a catalogue or session file name) become spaces; newline
    and tab are kept unless ``one_line``."""
    return plain_text(value, keep="" if one_line else "\n\t")


def pdf_text(value) -> str:
    """Text for matplotlib: no mathtext, no control characters."""
    s = plain_text(value, keep="\n")
    # Only "$" needs escaping: outside mathtext matplotlib draws a backslash as it is.
    return s.replace("$", r"\$")
