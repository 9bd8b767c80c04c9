"""Vectorised helpers for fixed-width catalogue text (WDS, ORB6).

A file is read once as bytes, cut into lines, and the lines are packed into a
2-D ``uint8`` array (one row per line, padded with blanks to the record
width).  Fields are then column slices of that array, converted to numbers or
text for every line at once; nothing on the hot path loops over lines in
Python.

Numbers are parsed from the bytes directly (:func:`parse_number`): an
all-blank field (or a lone ``.``) is *missing*; anything that is not an
optionally signed decimal number is *bad* and the caller reports the line.
The value is the integer made of all digits divided by a power of ten, a
single correctly rounded division, so it equals Python's ``float(text)``.
"""

from __future__ import annotations

import os
from pathlib import Path

import numpy as np

from planner.errors import CatalogError, InputError

SPACE = 32
DOT = ord(".")
PLUS = ord("+")
MINUS = ord("-")
ZERO = ord("0")
NINE = ord("9")


# -- reading ------------------------------------------------------------------


def user_path(path) -> Path:
    """``path`` as a Path with ``~`` expanded; an unknown ``~user`` is a one-line InputError."""
    try:
        return Path(os.fspath(path)).expanduser()
    except RuntimeError:  # pathlib: "Could not determine home directory"
        raise InputError(f"cannot expand {os.fspath(path)!r}: no such user's home folder; "
                         "give the full path") from None


def read_bytes(path, what: str) -> tuple[Path, bytes]:
    """The raw bytes of ``path``, or a one-line error for a missing, unreadable,
    empty or binary file, or a directory."""
    p = user_path(path)
    if not p.exists():
        raise InputError(f"{what} file {str(p)!r} does not exist")
    if p.is_dir():
        raise InputError(f"{str(p)!r} is a directory; give the path of a {what} text file")
    try:
        data = p.read_bytes()
    except OSError as exc:
        raise CatalogError(f"cannot read {what} file {str(p)!r}: {exc.strerror or exc}") from None
    if not data.strip():
        raise CatalogError(f"{what} file {str(p)!r} is empty")
    if b"\x00" in data[:65536]:
        raise CatalogError(f"{str(p)!r} is a binary file, not a {what} text file")
    return p, data


def split_lines(data: bytes) -> list[bytes]:
    """Lines without their end-of-line bytes (LF, CRLF or CR)."""
    if b"\r" in data:
        data = data.replace(b"\r\n", b"\n").replace(b"\r", b"\n")
    lines = data.split(b"\n")
    if lines and lines[-1] == b"":
        lines.pop()
    return lines


def to_array(lines: list[bytes], width: int, lengths: np.ndarray | None = None) -> np.ndarray:
    """Pack ``lines`` into an ``(n, width)`` uint8 array, blank padded, cut at ``width``.

    A NUL byte inside a line stays 0 (and is then reported as a control
    character); only the padding after the end of each line becomes a blank."""
    n = len(lines)
    if n == 0:
        return np.zeros((0, width), dtype=np.uint8)
    arr = np.array(lines, dtype=f"S{width}").view(np.uint8).reshape(n, width).copy()
    if lengths is None:
        lengths = np.fromiter(map(len, lines), dtype=np.int64, count=n)
    pad = np.arange(width)[None, :] >= np.asarray(lengths)[:, None]
    arr[pad] = SPACE
    return arr


def bad_bytes(arr: np.ndarray) -> np.ndarray:
    """Rows holding a control character or a non-ASCII byte (which would
    shift the columns or cannot be decoded as catalogue text)."""
    return ((arr < SPACE) | (arr > 126)).any(axis=1)


# -- fields -------------------------------------------------------------------


def is_digit(a: np.ndarray) -> np.ndarray:
    return (a >= ZERO) & (a <= NINE)


def is_letter(a: np.ndarray) -> np.ndarray:
    return ((a >= 65) & (a <= 90)) | ((a >= 97) & (a <= 122))


_POW10 = 10.0 ** np.arange(0, 40)


def parse_number(block: np.ndarray, dot_is_missing: bool = True):
    """Parse a fixed-width numeric field for every row at once.

    Returns ``(values, missing, bad)``: ``values`` float64 (NaN where missing
    or bad); ``missing`` True where the field is blank (or a lone '.', when
    ``dot_is_missing``); ``bad`` True where the text is not an optionally
    signed decimal number (inner blanks, letters, two points, a sign after
    a digit, more than 18 digits).

    The loop runs over the few columns of the field, each step on whole
    column vectors, so the cost is a handful of array operations per column.
    """
    block = np.asarray(block, dtype=np.uint8)
    n, w = block.shape
    mant = np.zeros(n, np.int64)
    nfrac = np.zeros(n, np.int64)
    ndig = np.zeros(n, np.int64)
    runs = np.zeros(n, np.int64)
    cnt = np.zeros(n, np.int64)
    seen_dot = np.zeros(n, bool)
    neg = np.zeros(n, bool)
    bad = np.zeros(n, bool)
    prev_ns = np.zeros(n, bool)
    for j in range(w):
        c = block[:, j]
        d = c - np.uint8(ZERO)  # wraps round for bytes below '0'
        isd = d < 10
        ns = c != SPACE
        isdot = c == DOT
        isminus = c == MINUS
        issign = isminus | (c == PLUS)
        bad |= ns & ~(isd | isdot | issign)
        bad |= issign & prev_ns
        bad |= isdot & seen_dot
        runs += ns & ~prev_ns
        cnt += ns
        neg |= isminus
        seen_dot |= isdot
        mant = np.where(isd, mant * 10 + d, mant)
        nfrac += isd & seen_dot
        ndig += isd
        prev_ns = ns
    blank = runs == 0
    lone_dot = (cnt == 1) & seen_dot
    missing = blank | lone_dot if dot_is_missing else blank
    bad |= (runs > 1) | (ndig == 0) | (ndig > 18)
    bad &= ~missing
    out = mant / _POW10[np.minimum(nfrac, 39)]
    out = np.where(neg, -out, out)
    out[bad | missing] = np.nan
    return out, missing, bad


def to_text(block: np.ndarray, split_code_number: bool = False,
            no_blanks: bool = False) -> np.ndarray:
    """Text of a field for every row: leading/trailing blanks removed, runs of
    blanks collapsed to one.  With ``split_code_number`` a blank is put where a
    letter is directly followed by a digit (``STF2272`` -> ``STF 2272``); with
    ``no_blanks`` every blank is removed (component labels).  Returns a numpy unicode array."""
    block = np.asarray(block, dtype=np.uint8)
    n, w = block.shape
    if n == 0:
        return np.array([], dtype="U1")
    if split_code_number and w > 1:
        bound = is_letter(block[:, :-1]) & is_digit(block[:, 1:])
        has = bound.any(axis=1)
        p = np.where(has, np.argmax(bound, axis=1) + 1, w)  # insert a blank before column p
        k = np.arange(w + 1)
        src = k - (k > p[:, None])
        src = np.minimum(src, w - 1)
        new = np.take_along_axis(block, src, axis=1)
        new[k[None, :] == p[:, None]] = SPACE
        block = new
        w += 1
    block = block.copy()
    sp = block == SPACE
    trailing = np.flip(np.logical_and.accumulate(np.flip(sp, 1), axis=1), 1)
    block[trailing] = 0
    if no_blanks:
        inner = sp & ~trailing
    else:
        prev_sp = np.ones_like(sp)
        prev_sp[:, 1:] = sp[:, :-1]
        inner = sp & prev_sp & ~trailing  # leading blanks and repeated blanks
    rows = np.flatnonzero(inner.any(axis=1))
    if len(rows):
        sub, drop = block[rows], inner[rows]
        order = np.argsort(drop, axis=1, kind="stable")
        sub = np.take_along_axis(sub, order, axis=1)
        sub[np.take_along_axis(drop, order, axis=1)] = 0
        block[rows] = sub
    return _decode(block, w)


def _decode(block: np.ndarray, w: int) -> np.ndarray:
    """Bytes rows to a unicode array; a byte outside ASCII (only in lines that are
    rejected anyway) becomes '?' so the conversion cannot fail."""
    block = np.ascontiguousarray(np.where(block > 126, np.uint8(63), block).astype(np.uint8))
    return block.view(f"S{w}").ravel().astype(f"U{w}")


def flag_chars(block: np.ndarray, keep) -> np.ndarray:
    """The characters of ``block`` selected by the boolean mask ``keep``,
    packed to the left, as a unicode array (used for flags beside numbers)."""
    n, w = block.shape
    if n == 0:
        return np.array([], dtype="U1")
    drop = ~keep
    order = np.argsort(drop, axis=1, kind="stable")
    out = np.take_along_axis(block, order, axis=1)
    out[np.take_along_axis(drop, order, axis=1)] = 0
    return _decode(out, w)


def col(arr: np.ndarray, first: int, last: int) -> np.ndarray:
    """Columns ``first``..``last`` (1-based, inclusive, as in the catalogue documents)."""
    return arr[:, first - 1:last]


def wds_id_ok(block: np.ndarray) -> np.ndarray:
    """True where a 10-column block is a valid WDS id ``HHMMm+DDMM`` (RA below 24 h, minutes below
    60, |Dec| at most +-90 deg 00')."""
    d = is_digit(block)
    pattern = d[:, [0, 1, 2, 3, 4, 6, 7, 8, 9]].all(axis=1) & (
        (block[:, 5] == PLUS) | (block[:, 5] == MINUS))
    v = block.astype(np.int16) - ZERO
    hh = v[:, 0] * 10 + v[:, 1]
    mm = v[:, 2] * 10 + v[:, 3]
    dd = v[:, 6] * 10 + v[:, 7]
    am = v[:, 8] * 10 + v[:, 9]
    # declination at most 90 deg 00': 9004 (90 deg 04') is not a declination
    return pattern & (hh < 24) & (mm < 60) & (am < 60) & ((dd < 90) | ((dd == 90) & (am == 0)))


def wds_id_coords(block: np.ndarray):
    """Approximate J2000 RA/Dec in degrees from a WDS id (to 0.1 min of RA, 1' of Dec)."""
    v = block.astype(np.float64) - ZERO
    hours = v[:, 0] * 10 + v[:, 1] + (v[:, 2] * 10 + v[:, 3] + v[:, 4] / 10.0) / 60.0
    deg = v[:, 6] * 10 + v[:, 7] + (v[:, 8] * 10 + v[:, 9]) / 60.0
    sgn = np.where(block[:, 5] == MINUS, -1.0, 1.0)
    return hours * 15.0, sgn * deg


def sexagesimal(block: np.ndarray):
    """RA/Dec in degrees from an 18-column ``hhmmss.ss+ddmmss.s`` block.

    Returns ``(ra_deg, dec_deg, blank, bad)``."""
    blank = (block == SPACE).all(axis=1)
    h, _, b1 = parse_number(block[:, 0:2], False)
    m, _, b2 = parse_number(block[:, 2:4], False)
    s, _, b3 = parse_number(block[:, 4:9], False)
    d, _, b4 = parse_number(block[:, 10:12], False)
    am, _, b5 = parse_number(block[:, 12:14], False)
    asec, _, b6 = parse_number(block[:, 14:18], False)
    sgn_ok = (block[:, 9] == PLUS) | (block[:, 9] == MINUS)
    ra = (h + m / 60.0 + s / 3600.0) * 15.0
    dec = np.where(block[:, 9] == MINUS, -1.0, 1.0) * (d + am / 60.0 + asec / 3600.0)
    parts = np.stack([h, m, s, d, am, asec])
    range_ok = ((parts >= 0).all(axis=0) & (h < 24) & (m < 60) & (s < 60) & (am < 60)
                & (asec < 60) & (np.abs(dec) <= 90))
    bad = ~blank & (b1 | b2 | b3 | b4 | b5 | b6 | ~sgn_ok | ~np.isfinite(ra) | ~np.isfinite(dec)
                    | ~range_ok)
    ra = np.where(blank | bad, np.nan, ra)
    dec = np.where(blank | bad, np.nan, dec)
    return ra, dec, blank, bad
