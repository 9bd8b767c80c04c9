"""A user's own list of pairs, to restrict a plan to them.

The list is a CSV text file: one pair per row, a WDS id (``18055+0230``) or a
designation (``STF2272AB``, ``STF 2272 AB``, ``alp Cen``) in the first column
and an optional note in the second.  A header row is optional (recognised
when its first cell is one of ``query``, ``pair``, ``target``, ``name``,
``wds``, ``designation``); ``#`` starts a comment line; blank lines are skipped.
"""

from __future__ import annotations

import csv
import io
from dataclasses import replace

import pandas as pd

from planner.errors import InputError, UnknownPairError

_HEADER_WORDS = {"query", "pair", "target", "name", "wds", "wds_id", "designation", "id"}


def read_target_list(path) -> pd.DataFrame:
    """Read a target list; returns a DataFrame with columns ``query`` and ``note``
    (plus ``line_no``, 1-based, for messages)."""
    from planner.catalogs import _fixed as fx

    p, data = fx.read_bytes(path, "target list", kind="target list")
    try:
        text = data.decode("utf-8-sig")
    except UnicodeDecodeError:
        raise InputError(f"target list {str(p)!r} is not UTF-8 text") from None
    rows, notes, nums = [], [], []
    reader = csv.reader(io.StringIO(text), skipinitialspace=True)
    first = True
    try:
        parsed = [(reader.line_num, row) for row in reader]
    except csv.Error as exc:  # e.g. a cell over the csv module's 128 KB field limit
        raise InputError(f"target list {str(p)!r} line {reader.line_num}: not a readable CSV row "
                         f"({exc}); give one pair name per line") from None
    for ln, row in parsed:
        cells = [c.strip() for c in row]
        if not cells or not any(cells) or cells[0].startswith("#"):
            continue
        if first:
            first = False
            if cells[0].lower() in _HEADER_WORDS:
                continue
        rows.append(cells[0])
        notes.append(",".join(c for c in cells[1:] if c) if len(cells) > 1 else "")
        nums.append(ln)
    if not rows:
        raise InputError(f"target list {str(p)!r} names no pair; give one WDS id or "
                         "designation per line, e.g. 18055+0230 or STF2272AB")
    return pd.DataFrame({"query": pd.Series(rows, dtype=str), "note": pd.Series(notes, dtype=str),
                         "line_no": nums})


def restrict(catalog, targets):
    """The catalogue restricted to the pairs named in ``targets`` (a DataFrame
    from :func:`read_target_list`, or a list of names).

    Returns a new :class:`~planner.catalogs.catalog.Catalog` whose pairs keep
    the list order (duplicates dropped) and carry the user's note in a
    ``user_note`` column; orbits are cut to the same systems.  Names that match
    nothing are listed, with suggestions, in ``catalog.pairs.attrs["unmatched"]``
    (a warning list); only when nothing matches is it an error.
    """
    from planner.catalogs.catalog import find_pair

    if not isinstance(targets, pd.DataFrame):
        targets = pd.DataFrame({"query": list(targets), "note": [""] * len(list(targets))})
    labels, notes, unmatched = [], [], []
    for q, note in zip(targets["query"].tolist(), targets["note"].tolist()):
        try:
            lab = find_pair(catalog, q)
        except UnknownPairError as exc:
            unmatched.append((q, exc.suggestions))
            continue
        if lab not in labels:
            labels.append(lab)
            notes.append(note)
    if not labels:
        shown = "; ".join(f"{q!r}" + (f" (closest: {', '.join(s[:3])})" if s else "")
                          for q, s in unmatched[:5])
        raise InputError(f"no pair of the target list is in the catalogue: {shown}")
    pairs = catalog.pairs.loc[labels].copy()
    pairs["user_note"] = pd.Series(notes, index=pairs.index, dtype=str)
    keys = set(pairs["wds_id"].tolist())
    orbits = catalog.orbits[catalog.orbits["wds_id"].isin(keys)].copy()
    pairs.attrs["unmatched"] = unmatched
    return replace(catalog, pairs=pairs, orbits=orbits,
                   source=f"{catalog.source} (restricted to a target list of {len(targets)})")


def unmatched_warnings(catalog) -> list[str]:
    """One warning line per unmatched target of a restricted catalogue."""
    out = []
    for q, sugg in catalog.pairs.attrs.get("unmatched", []):
        line = f"target {q!r} is not in the catalogue"
        if sugg:
            line += "; closest: " + ", ".join(sugg[:3])
        out.append(line)
    return out
