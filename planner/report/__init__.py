"""Exports and charts of a night plan: text, CSV, JSON, VOTable, HTML, PDF.

:func:`write_report` picks the format from the file extension.  Heavy
libraries (pandas, matplotlib, astropy) are imported only when a report is
written.
"""

from __future__ import annotations

FORMATS = {".csv": "csv", ".json": "json", ".xml": "votable", ".vot": "votable",
           ".html": "html", ".htm": "html", ".pdf": "pdf", ".txt": "text"}


def write_report(plan, path) -> str:
    """Write ``plan`` to ``path`` in the format of its extension; returns the format name."""
    from pathlib import Path

    from planner.errors import InputError

    ext = Path(path).suffix.lower()
    fmt = FORMATS.get(ext)
    if fmt is None:
        raise InputError(f"output file {str(path)!r}: unknown extension {ext or '(none)'!r}; "
                         f"use one of {', '.join(sorted(FORMATS))}")
    from planner.report import exports

    getattr(exports, f"write_{fmt}")(plan, path)
    return fmt


#: formats that can go to standard output (``--out -``)
STREAM_FORMATS = ("csv", "json", "votable")


def report_text(plan, fmt: str) -> str:
    """The plan in a machine format (csv, json, votable) as text, e.g. for standard output."""
    from planner.errors import InputError

    if fmt not in STREAM_FORMATS:
        raise InputError(f"format {fmt!r}: use one of {', '.join(STREAM_FORMATS)}")
    from planner.report import exports

    if fmt == "csv":
        return exports.csv_text(plan)
    if fmt == "json":
        return exports.plan_json(plan) + "\n"
    return exports.votable_bytes(plan).decode("utf-8")  # astropy writes UTF-8 XML


__all__ = ["write_report", "report_text", "FORMATS", "STREAM_FORMATS"]
