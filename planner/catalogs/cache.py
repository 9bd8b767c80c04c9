"""A cache of parsed catalogue files, so a second load skips the parsing.

Any catalogue file read through :func:`cached_read` is stored, once parsed,
as one file in ``user_dir('cache')/catalogs``, named after a hash of the
reader kind and the file's resolved path.  The file is a one-line JSON
header followed by a pickled ``(DataFrame, attrs)`` payload.  The header
holds a format version, the reader kind, the source path, its size and
modification time (ns), the payload length and its CRC-32.  A cache entry is
used only when every one of those matches; a stale entry is rebuilt quietly,
a damaged one is moved aside with :func:`planner.config.storage.quarantine`
and rebuilt with a one-line warning on stderr.  Writes are atomic.

Pickle is only ever read from the user's own cache directory, written by
this module; the header check runs before any unpickling.
"""

from __future__ import annotations

import hashlib
import json
import os
import pickle
import sys
import zlib
from pathlib import Path

from planner.config.storage import atomic_write_bytes, quarantine, user_dir

FORMAT = "splitplan-catalog-cache"
VERSION = 1


def _entry(path: Path, kind: str) -> Path:
    h = hashlib.sha256(f"{kind}\0{path}".encode("utf-8", "surrogateescape")).hexdigest()[:20]
    return user_dir("cache") / "catalogs" / f"{kind}-{h}.pkl"


def _stat_key(path: Path) -> tuple[int, int]:
    st = path.stat()
    return st.st_size, st.st_mtime_ns


def load_cached(path, kind: str):
    """The cached parse of ``path`` by reader ``kind``, or None (missing, stale or damaged)."""
    path = Path(path).resolve()
    entry = _entry(path, kind)
    try:
        raw = entry.read_bytes()
    except OSError:
        return None
    try:
        size, mtime = _stat_key(path)
    except OSError:
        return None
    try:
        nl = raw.index(b"\n")
        head = json.loads(raw[:nl])
        if head.get("format") != FORMAT:
            raise ValueError("not a catalogue cache file")
        if head.get("version") != VERSION or head.get("kind") != kind:
            return None  # another version of the program: rebuild quietly
        if head.get("path") != str(path) or head.get("size") != size or head.get("mtime_ns") != mtime:
            return None  # the source changed: stale, rebuild
        payload = memoryview(raw)[nl + 1:]
        if len(payload) != head["length"] or zlib.crc32(payload) != head["crc32"]:
            raise ValueError("checksum mismatch")
        df, attrs = pickle.loads(payload)
        df.attrs.update(attrs)
        return df
    except Exception as exc:  # damaged entry: keep it aside, rebuild
        try:
            moved = quarantine(entry)
            where = f"moved to {moved.name}"
        except OSError:
            where = "could not be moved aside"
        print(f"splitplan: warning: catalogue cache {entry.name} is damaged ({exc}); "
              f"{where}, rebuilding", file=sys.stderr)
        return None


def store(path, kind: str, df) -> Path | None:
    """Store the parse ``df`` of ``path``; a failure to write is only warned about."""
    path = Path(path).resolve()
    try:
        size, mtime = _stat_key(path)
    except OSError:
        return None
    payload = pickle.dumps((df, dict(df.attrs)), protocol=5)
    head = {"format": FORMAT, "version": VERSION, "kind": kind, "path": str(path),
            "size": size, "mtime_ns": mtime, "length": len(payload),
            "crc32": zlib.crc32(payload)}
    data = json.dumps(head).encode() + b"\n" + payload
    try:
        return atomic_write_bytes(_entry(path, kind), data)
    except Exception as exc:  # the cache is an optimisation: never fail the load
        print(f"splitplan: warning: cannot write the catalogue cache ({exc})", file=sys.stderr)
        return None


def cached_read(path, kind: str, reader, use_cache: bool = True):
    """``reader(path)`` through the cache (``kind`` names the reader, e.g. 'wds', 'orb6')."""
    if use_cache and not os.environ.get("SPLITPLAN_NO_CACHE"):
        df = load_cached(path, kind)
        if df is not None:
            return df
        df = reader(path)
        store(path, kind, df)
        return df
    return reader(path)
