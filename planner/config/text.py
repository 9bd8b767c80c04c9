"""Characters no output shows as they are (bottom layer: profile names are checked with
this before they are stored; :mod:`planner.report.safe` filters the same set on output)."""

from __future__ import annotations

import unicodedata


def hidden_characters(value: str) -> list[str]:
    """The characters of ``value`` that no output shows as they are: control
    characters (tab, CR and LF included), format characters (Unicode class Cf:
    bidi controls, zero-width marks), line/paragraph separators and lone
    surrogates."""
    return [ch for ch in value
            if unicodedata.category(ch) in ("Cc", "Cf", "Cs", "Zl", "Zp")]
