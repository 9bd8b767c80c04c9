"""Exports and charts of a night plan: text, CSV, JSON, VOTable, HTML, PDF.

:func:`write_report` picks the format from the file extension.  Heavy
libraries (pandas, matplotlib, astropy) are imported only when a report is
written.
"""

from __future__ import annotations

FORMATS = {".csv": "csv", ".json": "json", ".xml": "votable", ".vot": "votable",
           ".html": "html", ".htm": "html", ".pdf": "pdf", ".txt": "text"}


def write_report(plan, path, force: bool = False) -> str:
    """Write ``plan`` to ``path`` in the format of its extension; returns the format name.

    An existing file is replaced only if splitplan wrote it, or with ``force``
    (never a read-only one); see :func:`planner.config.storage.check_output`."""
    from pathlib import Path

    from planner.errors import InputError

    ext = Path(path).suffix.lower()
    fmt = FORMATS.get(ext)
    if fmt is None:
        raise InputError(f"output file {str(path)!r}: unknown extension {ext or '(none)'!r}; "
                         f"use one of {', '.join(sorted(FORMATS))}")
    from planner.report import exports

    getattr(exports, f"write_{fmt}")(plan, path, force=force)
    return fmt


__all__ = ["write_report", "FORMATS"]
