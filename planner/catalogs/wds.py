"""Reader for the USNO Washington Double Star Catalog (WDS) summary file.

Layout: the USNO WDS summary format (Mason et al., The Washington Double Star Catalog; column layout in docs/catalogs.md) (USNO
``wdsweb_format.txt``, 2009-2012 table): 130 columns, one pair per line.
Text after column 130 is ignored; lines starting with ``#`` are comments;
blank lines are skipped.

The whole file is packed into one ``uint8`` array and every field is a
column slice converted for all lines at once (see :mod:`planner.catalogs._fixed`).

Magnitude flags: any character in a magnitude field (columns 59-63, 65-69)
or in the column just after it (64, 70) that is not a digit, point, sign or
blank is taken as a flag (e.g. ``K``, ``V``, ``?``, ``<``) and kept in
``mag1_flag``/``mag2_flag``; the number is read from what remains.

Positions: the precise J2000 position in columns 113-130 when present
(``coord_precise`` True); otherwise the position encoded in the WDS id
(RA to 0.1 min, Dec to 1'), ``coord_precise`` False.

Proper motions (columns 81-97) are stored as mas/yr: the unit is not stated
in the format table we could check (from memory: WDS gives them in mas/yr).

A line that cannot be read (WDS id not ``HHMMm+DDMM``, non-numeric text in a
numeric field that is not blank, a non-ASCII or control character, shorter
than the id and discoverer, 17 columns) is skipped and listed in
``df.attrs["problems"]`` as ``(line_no, reason)``; it never stops the load.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from planner.catalogs import _fixed as fx
from planner.errors import CatalogError
from planner.schema import PAIR_COLUMNS

WIDTH = 130
MIN_LENGTH = 17  # WDS id (1-10) and discoverer (11-17)

# name: (first, last) 1-based inclusive columns of the plain numeric fields
_NUMERIC = {
    "year_first": (24, 27), "year_last": (29, 32), "n_obs": (34, 37),
    "pa_first_deg": (39, 41), "pa_last_deg": (43, 45),
    "sep_first_arcsec": (47, 51), "sep_last_arcsec": (53, 57),
    "pm1_ra_masyr": (81, 84), "pm1_dec_masyr": (85, 88),
    "pm2_ra_masyr": (90, 93), "pm2_dec_masyr": (94, 97),
}
_MAGS = {"mag1": (59, 64), "mag2": (65, 70)}  # field plus the column after it


def _mag(block: np.ndarray):
    numeric = fx.is_digit(block) | (block == fx.DOT) | (block == fx.PLUS) | (
        block == fx.MINUS) | (block == fx.SPACE)
    flags = fx.flag_chars(block, ~numeric)
    cleaned = np.where(numeric, block, fx.SPACE).astype(np.uint8)
    val, _, bad = fx.parse_number(cleaned)
    return val, flags, bad


def read_wds(path) -> pd.DataFrame:
    """Read a USNO WDS summary text file into the pair table.

    Returns one row per readable line with the columns of
    :data:`planner.schema.PAIR_COLUMNS` (``source`` = 'wds').  Skipped lines
    are listed in ``df.attrs["problems"]`` as ``(line_no, reason)``.  A file
    in which no line can be read raises :class:`planner.errors.CatalogError`.
    Format source: USNO, WDS summary format description (Mason et al.).
    """
    p, data = fx.read_bytes(path, "WDS")
    lines = fx.split_lines(data)
    return parse_wds_lines(lines, name=str(p))


def parse_wds_lines(lines: list[bytes], name: str = "<lines>", source: str = "wds") -> pd.DataFrame:
    """Parse WDS summary lines (bytes, without line ends); see :func:`read_wds`."""
    n_all = len(lines)
    lengths = np.fromiter(map(len, lines), dtype=np.int64, count=n_all)
    arr = fx.to_array(lines, WIDTH, lengths)
    line_no = np.arange(1, n_all + 1)
    blank = (arr == fx.SPACE).all(axis=1) & (lengths <= WIDTH)
    comment = arr[:, 0] == ord("#") if n_all else np.zeros(0, bool)
    skip = blank | comment
    reason = np.full(n_all, "", dtype=object)

    def flag(mask, text):
        sel = mask & (reason == "") & ~skip
        reason[sel] = text

    flag(fx.bad_bytes(arr), "non-ASCII or control character")
    flag(lengths < MIN_LENGTH, "line too short to hold the WDS id and discoverer (17 columns)")
    flag(~fx.wds_id_ok(fx.col(arr, 1, 10)), "WDS id in columns 1-10 is not HHMMm+DDMM")

    nums = {}
    for key, (a, b) in _NUMERIC.items():
        v, _, bad = fx.parse_number(fx.col(arr, a, b))
        nums[key] = v
        flag(bad, f"non-numeric text in columns {a}-{b} ({key})")
    mags = {}
    for key, (a, b) in _MAGS.items():
        v, f, bad = _mag(fx.col(arr, a, b))
        mags[key] = (v, f)
        flag(bad, f"non-numeric text in columns {a}-{b - 1} ({key})")
    ra, dec, pos_blank, pos_bad = fx.sexagesimal(fx.col(arr, 113, 130))
    flag(pos_bad, "precise position in columns 113-130 is not hhmmss.ss+ddmmss.s")

    bad_mask = reason != ""
    keep = ~skip & ~bad_mask
    problems = [(int(line_no[i]), str(reason[i])) for i in np.flatnonzero(bad_mask)]
    if not keep.any():
        first = f"; first problem: line {problems[0][0]}: {problems[0][1]}" if problems else ""
        raise CatalogError(f"no WDS summary lines found in {name!r} "
                           f"(is it a WDS summary text file?){first}")

    k = keep
    A = arr[k] if not keep.all() else arr
    ids = fx.col(A, 1, 10)
    ra_id, dec_id = fx.wds_id_coords(ids)
    precise = ~pos_blank[k]
    cols = {
        "wds_id": fx.to_text(ids),
        "discoverer": fx.to_text(fx.col(A, 11, 17), split_code_number=True),
        "components": fx.to_text(fx.col(A, 18, 22), no_blanks=True),
        "ra_deg": np.where(precise, ra[k], ra_id),
        "dec_deg": np.where(precise, dec[k], dec_id),
        "mag1": mags["mag1"][0][k],
        "mag2": mags["mag2"][0][k],
    }
    for key in ("sep_first_arcsec", "sep_last_arcsec", "pa_first_deg", "pa_last_deg",
                "year_first", "year_last", "n_obs"):
        cols[key] = nums[key][k]
    cols["mag1_flag"] = mags["mag1"][1][k]
    cols["mag2_flag"] = mags["mag2"][1][k]
    cols["spectral_type"] = fx.to_text(fx.col(A, 71, 79))
    for key in ("pm1_ra_masyr", "pm1_dec_masyr", "pm2_ra_masyr", "pm2_dec_masyr"):
        cols[key] = nums[key][k]
    cols["dm_id"] = fx.to_text(fx.col(A, 99, 106))
    cols["note_flags"] = fx.to_text(fx.col(A, 108, 111), no_blanks=True)
    cols["coord_precise"] = precise
    cols["has_orbit"] = np.zeros(int(k.sum()), bool)
    cols["source"] = np.full(int(k.sum()), source)
    cols["line_no"] = line_no[k].astype(float)
    df = pd.DataFrame(cols)
    df = df[[c.name for c in PAIR_COLUMNS]]
    df.attrs["problems"] = problems
    df.attrs["source_file"] = name
    return df
