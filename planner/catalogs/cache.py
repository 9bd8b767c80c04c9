"""A cache of loaded catalogues (after the WDS + ORB6 merge), columnar and unable to run code.

:func:`cached_catalog` stores a :class:`~planner.catalogs.catalog.Catalog` as
one file in ``user_dir('cache')/catalogs``, named after a hash of the loader
key and its source files:

* line 1: a JSON header -- format name and version, the program version
  (``importlib.metadata``), every source file's resolved path, size and
  modification time (ns), the catalogue's ``source``, ``retrieved`` and
  ``problems``, and per table and column its name, kind and the place,
  dtype and shape of its arrays in the payload, the payload length and its
  Adler-32 checksum;
* then the payload: the raw bytes of the arrays, one after another.

Numbers and booleans are stored as they are, one 2-D block per dtype; text
columns as categorical codes (int32, -1 for missing) plus their distinct
values as one UTF-8 blob, so a text column costs four bytes a row.  Arrays
are rebuilt with ``numpy.frombuffer`` from a short list of plain dtypes (no
object arrays, no pickle): nothing in a cache file can execute code.  The
file is read in one go rather than memory-mapped: every column is used on
every run and the checksum reads every byte anyway.  Columns are whatever the tables hold, so new
columns need no change here; a column that :mod:`planner.schema` knows must
come back with its schema type.

A hit needs the format, program version, source paths, sizes and mtimes to
match (the sources are not read again) and the payload's checksum to match.  A
stale entry is rebuilt quietly; a damaged or forged one (bad header, wrong
length, checksum, dtypes or codes) is moved aside with
:func:`planner.config.storage.quarantine` and rebuilt with a one-line warning
on stderr.  A cache that cannot be written or read is a warning, never an
error.  Writes are atomic.
"""

from __future__ import annotations

import hashlib
import json
import os
import re
import sys
import zlib
from importlib import metadata
from pathlib import Path

import numpy as np
import pandas as pd

from planner.config.storage import atomic_write_bytes, quarantine, user_dir
from planner.errors import PlannerError
from planner.schema import ORBIT_COLUMNS, PAIR_COLUMNS

FORMAT = "splitplan-catalog-columns"
VERSION = 2
SUFFIX = ".cols"

#: the array dtypes a cache file may declare (plain numbers, booleans, fixed-width text)
_ARRAY_DTYPE = re.compile(r"^(<f8|<f4|<i8|<i4|<i2|\|i1|\|b1|\|u1)$")
#: the pandas dtypes a column may be restored to
_NUMBER_DTYPES = {"float64", "float32", "int64", "int32", "bool"}
_TEXT_DTYPES = {"str", "object", "string"}
_SCHEMA_KIND = {t.name: t.dtype for t in (*PAIR_COLUMNS, *ORBIT_COLUMNS)}
_TABLES = ("pairs", "orbits")


class _Damaged(ValueError):
    pass


def program_version() -> str:
    """The installed splitplan version (package metadata; the source tree's when not installed)."""
    try:
        return metadata.version("splitplan")
    except metadata.PackageNotFoundError:
        from planner import __version__

        return __version__


def _entry(key: str, sources) -> Path:
    ident = "\0".join([key, *(str(p) for p in sources)])
    h = hashlib.sha256(ident.encode("utf-8", "surrogateescape")).hexdigest()[:20]
    return user_dir("cache") / "catalogs" / f"{key}-{h}{SUFFIX}"


def _stats(sources) -> list:
    out = []
    for p in sources:
        st = Path(p).stat()
        out.append([str(p), st.st_size, st.st_mtime_ns])
    return out


# -- encoding -------------------------------------------------------------------------

_SEP = "\x00"  # separates the distinct values of a text column in its UTF-8 blob


def _encode_table(df: pd.DataFrame, chunks: list, offset: int) -> tuple[dict, int]:
    """Description of ``df`` and the new payload offset; array bytes appended to ``chunks``.

    Numeric and boolean columns go in one 2-D block per dtype (read back without
    stacking); a text column is int32 codes plus its distinct values as one UTF-8
    blob separated by NUL."""

    def put(arr: np.ndarray) -> dict:
        nonlocal offset
        arr = np.ascontiguousarray(arr)
        chunks.append(arr.tobytes())
        d = {"offset": offset, "dtype": arr.dtype.str, "shape": list(arr.shape)}
        offset += arr.nbytes
        return d

    blocks: dict[str, list] = {}
    texts = []
    for name in df.columns:
        s = df[name]
        if s.dtype.kind in "fiub":
            blocks.setdefault(str(s.dtype), []).append(str(name))
        else:
            codes, cats = pd.factorize(s, use_na_sentinel=True)
            values = [str(v) for v in cats]
            if any(_SEP in v for v in values):
                raise ValueError(f"column {name} holds a NUL character")
            blob = np.frombuffer(_SEP.join(values).encode("utf-8"), dtype="|u1")
            texts.append({"name": str(name), "dtype": str(s.dtype), "n_values": len(values),
                          "codes": put(codes.astype(np.int32)), "values": put(blob)})
    nums = [{"dtype": dt, "names": names, "data": put(np.stack([df[n].to_numpy() for n in names]))}
            for dt, names in blocks.items()]
    index = None
    if not (isinstance(df.index, pd.RangeIndex) and df.index.start == 0 and df.index.step == 1):
        index = put(df.index.to_numpy(np.int64))
    return {"rows": len(df), "order": [str(c) for c in df.columns], "numbers": nums, "texts": texts,
            "index": index}, offset


def _write(entry: Path, head: dict, catalog) -> None:
    chunks: list[bytes] = []
    offset = 0
    tables = {}
    for t in _TABLES:
        tables[t], offset = _encode_table(getattr(catalog, t), chunks, offset)
    payload = b"".join(chunks)
    head = dict(head, tables=tables, length=len(payload), adler32=zlib.adler32(payload),
                catalog={"source": catalog.source, "retrieved": catalog.retrieved,
                         "problems": [list(p) for p in catalog.problems]})
    atomic_write_bytes(entry, json.dumps(head).encode() + b"\n" + payload)


# -- decoding -------------------------------------------------------------------------

def _array(payload: memoryview, d: dict, shape: tuple) -> np.ndarray:
    """The array ``d`` describes, which must have ``shape`` (None: any length)."""
    dtype = d.get("dtype")
    if not isinstance(dtype, str) or not _ARRAY_DTYPE.match(dtype):
        raise _Damaged(f"dtype {dtype!r} is not allowed")
    dt = np.dtype(dtype)
    got = d.get("shape")
    if not (isinstance(got, list) and len(got) == len(shape) and all(isinstance(x, int) and x >= 0 for x in got)
            and all(w is None or w == g for w, g in zip(shape, got))):
        raise _Damaged(f"array shape {got!r}, expected {list(shape)!r}")
    off = d.get("offset")
    n = int(np.prod(got))
    if not isinstance(off, int) or off < 0 or off + n * dt.itemsize > len(payload):
        raise _Damaged("array outside the payload")
    return np.frombuffer(payload, dtype=dt, count=n, offset=off).reshape(got)


def _text(payload: memoryview, c: dict, rows: int):
    codes = _array(payload, c.get("codes") or {}, (rows,))
    blob = _array(payload, c.get("values") or {}, (None,))
    n = c.get("n_values")
    if codes.dtype.kind != "i" or blob.dtype != np.uint8 or not isinstance(n, int):
        raise _Damaged(f"text column {c.get('name')!r} has codes {codes.dtype} and values {blob.dtype}")
    try:
        values = blob.tobytes().decode("utf-8").split(_SEP) if n else []
    except UnicodeDecodeError:
        raise _Damaged(f"text column {c.get('name')!r} is not UTF-8") from None
    if len(values) != n or (len(codes) and (codes.min() < -1 or codes.max() >= n)):
        raise _Damaged(f"text column {c.get('name')!r} has codes outside its values")
    obj = np.empty(n + 1, dtype=object)
    obj[:n] = values
    obj[n] = np.nan
    return obj.take(np.where(codes < 0, n, codes))


def _decode_table(payload: memoryview, t: dict) -> pd.DataFrame:
    rows, order = t.get("rows"), t.get("order")
    if not isinstance(rows, int) or rows < 0 or not isinstance(order, list):
        raise _Damaged("bad table description")
    parts = []
    for b in t.get("numbers", []):
        names, dtype = b.get("names"), b.get("dtype")
        if not isinstance(names, list) or dtype not in _NUMBER_DTYPES:
            raise _Damaged(f"number block of dtype {dtype!r}")
        arr = _array(payload, b.get("data") or {}, (len(names), rows))
        kind = arr.dtype.kind
        if np.dtype(dtype).kind != kind:
            raise _Damaged(f"number block of dtype {dtype!r} holds {arr.dtype} data")
        for name in names:
            want = _SCHEMA_KIND.get(name)
            if kind not in "fiub" or (want == "float" and kind != "f") or (want == "bool" and kind != "b") \
                    or want == "str":
                raise _Damaged(f"column {name} holds {arr.dtype} data")
        parts.append(pd.DataFrame(arr.T.astype(dtype), columns=names, copy=False))
    text = {}
    for c in t.get("texts", []):
        name, dtype = c.get("name"), c.get("dtype")
        if dtype not in _TEXT_DTYPES or _SCHEMA_KIND.get(name) in ("float", "bool"):
            raise _Damaged(f"column {name!r} holds text")
        obj = _text(payload, c, rows)
        text[name] = pd.array(obj, dtype=dtype) if dtype != "object" else obj
    parts.append(pd.DataFrame(text, index=pd.RangeIndex(rows)))
    df = pd.concat(parts, axis=1) if len(parts) > 1 else parts[0]
    if sorted(map(str, df.columns)) != sorted(order):
        raise _Damaged("columns differ from the table's")
    df = df[order]
    if t.get("index") is not None:
        index = _array(payload, t["index"], (rows,))
        if index.dtype.kind != "i":
            raise _Damaged("bad index")
        df.index = pd.Index(index.copy())
    return df


def _read(entry: Path, key: str, stats: list):
    """The cached catalogue, None when missing or stale; raises _Damaged when damaged."""
    from planner.catalogs.catalog import Catalog

    try:
        raw = entry.read_bytes()
    except FileNotFoundError:
        return None
    except OSError as exc:
        raise _Damaged(exc.strerror or str(exc)) from None
    nl = raw.find(b"\n")
    if nl < 0:
        raise _Damaged("no header")
    try:
        head = json.loads(raw[:nl])
    except (ValueError, UnicodeDecodeError):
        raise _Damaged("unreadable header") from None
    if not isinstance(head, dict) or head.get("format") != FORMAT:
        raise _Damaged("not a catalogue cache file")
    if head.get("version") != VERSION or head.get("program") != program_version() or head.get("key") != key:
        return None  # another version of the program: rebuild quietly
    if head.get("sources") != stats:
        return None  # a source changed: stale, rebuild
    payload = memoryview(raw)[nl + 1:]
    if len(payload) != head.get("length") or zlib.adler32(payload) != head.get("adler32"):
        raise _Damaged("checksum mismatch")
    tables = head.get("tables")
    meta = head.get("catalog")
    if not isinstance(tables, dict) or not isinstance(meta, dict):
        raise _Damaged("no tables")
    pairs = _decode_table(payload, tables.get("pairs") or {})
    orbits = _decode_table(payload, tables.get("orbits") or {})
    problems = meta.get("problems", [])
    if not isinstance(problems, list) or not all(isinstance(p, list) and len(p) == 3 for p in problems):
        raise _Damaged("bad problem list")
    return Catalog(pairs=pairs, orbits=orbits, source=str(meta.get("source", "")),
                   retrieved=str(meta.get("retrieved", "")), problems=[tuple(p) for p in problems])


def _warn(text: str) -> None:
    print(f"splitplan: warning: {text}", file=sys.stderr)


def cached_catalog(key: str, sources, build, use_cache: bool = True):
    """``build()`` (a merged Catalog from the files ``sources``) through the cache.

    ``key`` names the loader ('files', 'sample', 'snapshot'); the entry is
    valid while every source file keeps its path, size and mtime and the
    program its version."""
    if not use_cache or os.environ.get("SPLITPLAN_NO_CACHE"):
        return build()
    sources = [Path(p).resolve() for p in sources]
    try:
        stats = _stats(sources)
        entry = _entry(key, sources)
    except (OSError, PlannerError) as exc:  # the cache folder cannot be made: load without it
        _warn(f"catalogue cache not used ({getattr(exc, 'strerror', None) or exc})")
        return build()
    try:
        cat = _read(entry, key, stats)
        if cat is not None:
            return cat
    except _Damaged as exc:
        try:
            where = f"moved to {quarantine(entry).name}"
        except OSError:
            where = "could not be moved aside"
        _warn(f"catalogue cache {entry.name} is damaged ({exc}); {where}, rebuilding")
    cat = build()
    head = {"format": FORMAT, "version": VERSION, "program": program_version(), "key": key, "sources": stats}
    try:
        _write(entry, head, cat)
    except Exception as exc:  # the cache is an optimisation: never fail the load
        _warn(f"cannot write the catalogue cache ({exc})")
    return cat
