"""Plan files and session files: every input of a run, in TOML.

A *plan file* records the inputs of one ``splitplan night`` run (site,
date, telescopes, seeing, darkness, filters, catalogue, scheduling choices)
together with the package version and the catalogue source, so that a club
member can reproduce the same plan (``splitplan night --plan FILE``).  A
*session file* is the same format restricted to what a club shares: usually
the site and a list of ``[[scopes]]`` tables (the old spelling ``[[scope]]`` is read with a
deprecation note).

Reading uses :mod:`tomllib`.  Writing uses :func:`dump_toml`, a small writer
for the flat shapes these files need (scalars, lists of scalars, tables,
arrays of tables), through :func:`planner.config.storage.atomic_write_text`.
A file that fails to parse is moved aside with
:func:`planner.config.storage.quarantine` and reported; it is never
overwritten.
"""

from __future__ import annotations

import math
import tomllib
from datetime import date, datetime
from pathlib import Path

from planner.errors import CorruptFileError, InputError

FORMAT_NAME = "splitplan-plan"
FORMAT_VERSION = 1


# -- a small TOML writer -------------------------------------------------------

def _toml_string(s: str) -> str:
    out = ['"']
    for ch in s:
        code = ord(ch)
        if ch == '"':
            out.append('\\"')
        elif ch == "\\":
            out.append("\\\\")
        elif ch == "\n":
            out.append("\\n")
        elif ch == "\t":
            out.append("\\t")
        elif ch == "\r":
            out.append("\\r")
        elif code < 0x20 or code == 0x7F:
            out.append(f"\\u{code:04X}")
        else:
            out.append(ch)
    out.append('"')
    return "".join(out)


def _toml_key(k: str) -> str:
    k = str(k)
    if k and all(c.isalnum() and c.isascii() or c in "_-" for c in k):
        return k
    return _toml_string(k)


def _toml_value(v) -> str:
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, int):
        return str(v)
    if isinstance(v, float):
        if math.isnan(v):
            return "nan"
        if math.isinf(v):
            return "inf" if v > 0 else "-inf"
        return repr(v)
    if isinstance(v, str):
        return _toml_string(v)
    if isinstance(v, (datetime, date)):
        return v.isoformat()
    if isinstance(v, (list, tuple)):
        return "[" + ", ".join(_toml_value(x) for x in v) + "]"
    # numpy scalars
    try:
        import numpy as np

        if isinstance(v, np.bool_):
            return _toml_value(bool(v))
        if isinstance(v, np.integer):
            return _toml_value(int(v))
        if isinstance(v, np.floating):
            return _toml_value(float(v))
    except ImportError:  # pragma: no cover
        pass
    raise TypeError(f"cannot write {type(v).__name__} to TOML")


def _is_table_array(v) -> bool:
    return isinstance(v, (list, tuple)) and len(v) > 0 and all(isinstance(x, dict) for x in v)


def dump_toml(data: dict, header: str = "") -> str:
    """Serialise a dict to TOML text (scalars, lists, tables, arrays of tables).

    ``None`` values are left out (TOML has no null).  ``header`` lines are
    written as comments at the top.
    """
    lines: list[str] = [f"# {h}" if h else "#" for h in header.splitlines()] if header else []

    def emit(table: dict, path: list[str]):
        scalars = [(k, v) for k, v in table.items()
                   if v is not None and not isinstance(v, dict) and not _is_table_array(v)]
        for k, v in scalars:
            lines.append(f"{_toml_key(k)} = {_toml_value(v)}")
        for k, v in table.items():
            if isinstance(v, dict):
                lines.append("")
                lines.append("[" + ".".join(_toml_key(p) for p in path + [k]) + "]")
                emit(v, path + [k])
            elif _is_table_array(v):
                for item in v:
                    lines.append("")
                    lines.append("[[" + ".".join(_toml_key(p) for p in path + [k]) + "]]")
                    emit(item, path + [k])

    emit(data, [])
    return "\n".join(lines).lstrip("\n") + "\n"


def read_toml(path: str | Path, what: str = "file", keep_aside: bool = True) -> dict:
    """Read a TOML file; a damaged one is reported (and, for the planner's own
    saved files, ``keep_aside``, moved aside so it is never overwritten).

    Raises :class:`~planner.errors.InputError` when the file is missing or a
    directory, :class:`~planner.errors.CorruptFileError` when it does not parse.
    Files the user hands in (plan and session files) are never moved.
    """
    from planner.config.storage import quarantine

    p = Path(path)
    if not p.exists():
        raise InputError(f"{what} {p} does not exist")
    if p.is_dir():
        raise InputError(f"{what} {p} is a directory; give a .toml file")
    try:
        raw = p.read_bytes()
    except OSError as exc:
        raise InputError(f"cannot read {what} {p}: {exc.strerror}") from None
    try:
        return tomllib.loads(raw.decode("utf-8"))
    except (tomllib.TOMLDecodeError, UnicodeDecodeError) as exc:
        reason = str(exc).splitlines()[0] if str(exc) else type(exc).__name__
        if not keep_aside:
            if raw.startswith(PLAN_MARK):
                raise CorruptFileError(f"{what} {p} is damaged ({reason}); it was left as it is") from None
            raise InputError(f"{what} {p} is not a readable TOML file ({reason})") from None
        moved = quarantine(p)
        raise CorruptFileError(f"{what} {p} is damaged ({reason}); it was moved aside to {moved.name} "
                               "and left untouched") from None


#: first bytes of every plan file this tool writes
PLAN_MARK = b"# splitplan plan file"


def write_plan_file(path: str | Path, inputs: dict, version: str, catalog_source: str) -> Path:
    """Write a plan file (atomic).  ``inputs`` is the dict of a run's inputs.

    An existing file at ``path`` is replaced only if it is a plan file of this
    tool; a damaged one of ours is first moved aside (kept, never silently
    overwritten); any other file is refused, so ``--save-plan`` cannot destroy
    an unrelated file by a typo."""
    import sys

    from planner.config.storage import atomic_write_text, quarantine

    p = Path(path)
    if p.is_dir():
        raise InputError(f"--save-plan {p} is a directory; give a file name ending in .toml")
    if p.exists():
        try:
            head = p.read_bytes()[: len(PLAN_MARK)]
        except OSError as exc:
            raise InputError(f"cannot read {p} to check it before replacing it: {exc.strerror}") from None
        if head != PLAN_MARK:
            raise InputError(f"{p} exists and is not a splitplan plan file; choose another name")
        try:
            read_plan_file(p)
        except CorruptFileError:
            moved = quarantine(p)
            print(f"splitplan: warning: the damaged plan file {p} was moved aside to {moved.name}",
                  file=sys.stderr)

    created = datetime.now().astimezone().replace(microsecond=0).isoformat()
    doc = {"format": FORMAT_NAME, "format_version": FORMAT_VERSION,
           "splitplan_version": version, "created": created,
           "catalog_source": catalog_source}
    doc.update(inputs)
    header = ("splitplan plan file: every input of one night plan.\n"
              "Reproduce it with:  splitplan night --plan THIS_FILE")
    return atomic_write_text(path, dump_toml(doc, header=header))


def read_plan_file(path: str | Path, what: str = "plan file") -> dict:
    """Read a plan or session file and check its format marker (when present).
    The file is the user's own: a damaged one is reported, never moved."""
    data = read_toml(path, what=what, keep_aside=False)
    fmt = data.get("format")
    if fmt is not None and fmt != FORMAT_NAME:
        raise InputError(f"{what} {path}: format {fmt!r} is not {FORMAT_NAME!r}")
    fv = data.get("format_version", FORMAT_VERSION)
    if not isinstance(fv, int) or fv > FORMAT_VERSION:
        raise InputError(f"{what} {path}: format_version {fv!r} is newer than this splitplan "
                         f"understands ({FORMAT_VERSION}); upgrade splitplan")
    if "scope" in data:
        # one spelling for plan and session files: [[scopes]]; the old [[scope]] is still read
        import sys

        old = data.pop("scope")
        if not isinstance(old, list):
            raise InputError(f"{what} {path}: [[scopes]] must be a list of tables")
        data["scopes"] = list(data.get("scopes", [])) + old
        print(f"splitplan: note: {what} {path}: [[scope]] is the old spelling and will not be read in a "
              "future version; write [[scopes]]", file=sys.stderr)
    return data
