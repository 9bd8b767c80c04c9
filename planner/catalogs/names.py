"""Star names: what observers type, resolved offline to pairs of the loaded catalogue.

The index (``star_index.npz`` in the package ``planner.catalogs_sample``, built
by ``scripts/build_name_index.py`` from the Yale Bright Star Catalogue, 5th
revised ed., Hoffleit & Warren 1991, and the IAU Catalog of Star Names, IAU
WGSN 2022, CC BY 4.0) holds one row per star with its catalogue numbers,
Bayer/Flamsteed name, IAU proper name and WDS id, and a table of look-up keys.
It is read with ``numpy.load(..., allow_pickle=False)`` once per process.

Accepted forms (case, blanks, hyphens and diacritics ignored; docs/names.md
has the full table): proper name (``Albireo``, ``Cor Caroli``); Bayer letter
as a three-letter abbreviation, the full Greek name or the Greek letter, with
an optional superscript digit, then the constellation as abbreviation or Latin
name (``eps Lyr``, ``epsilon Lyrae``, ``ε¹ Lyr``, ``eps-1 Lyr``); Flamsteed
(``70 Oph``, ``70 Ophiuchi``); ``HR``, ``HD``, ``HIP``, ``SAO``, ``ADS`` numbers;
``BD``/``CD``/``CP``/``CPD`` numbers; any of these followed by component
letters (``Castor AB``).

Stars are joined to the loaded catalogue by numbers first -- the WDS id of the
index (IAU, ORB6 HD/ADS, WDS DM or the ADS group), then the HD, HIP and ADS
numbers of the catalogue's orbits and the DM numbers of its pairs -- and by
position only where no number joins: within :data:`POSITION_TOLERANCE_ARCSEC`
of a pair's precise position, or :data:`COARSE_TOLERANCE_ARCSEC` of a position
taken from a WDS id.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from planner.catalogs.constellations import (CONSTELLATION_KEYS, GREEK_KEYS, GREEK_LETTER, fold,
                                             superscript)

PACKAGE = "planner.catalogs_sample"
INDEX_FILE = "star_index.npz"
PAIRS_FILE = "bsc5_pairs.csv"
#: star to a catalogue pair with a precise position [arcsec]
POSITION_TOLERANCE_ARCSEC = 10.0
#: star to a catalogue pair whose position comes from its WDS id (0.1 min, 1') [arcsec]
COARSE_TOLERANCE_ARCSEC = 60.0
#: separation used to order several pairs of one name when no telescope is given:
#: the Dawes limit of a 100 mm aperture, 116"/D[mm] (Dawes 1867) = 1.16"
DEFAULT_LIMIT_ARCSEC = 1.16

STAR_TEXT = ("bayer", "const", "dm", "ads_comp", "iau_name", "iau_ascii", "iau_comp", "wds_id",
             "wds_join", "name_join")
STAR_INT = ("hr", "flamsteed", "bayer_sup", "hd", "sao", "hip", "ads")
STAR_FLOAT = ("ra_deg", "dec_deg", "vmag")


# -- keys --------------------------------------------------------------------------

def dm_zone_key(text: str) -> str:
    """Sign, zone and number of a Durchmusterung id, without the catalogue prefix:
    'BD+74 1056' and the WDS's '+74 1056' -> '+74:1056'; the WDS's '-3019790'
    (zone -30, number 19790) -> '-30:19790'; '' if not a DM number.  The WDS
    summary line leaves out the prefix (BD, CD or CPD), so catalogue joins on DM
    compare sign, zone and number only."""
    m = re.fullmatch(r"\s*(?:BD|CD|CPD|CP)?\s*([+-])\s*(\d{2})\s*[°d]?\s*(\d{1,5})\s*[A-Za-z]?\s*",
                     str(text), flags=re.I)
    if not m:
        return ""
    return f"{m.group(1)}{int(m.group(2)):02d}:{int(m.group(3))}"


def normalise_dm(text: str) -> str:
    """'BD+27 3410', 'BD +27°3410', 'CPD-60 5483' -> 'BD+27 3410' / 'CP-60 5483'; '' if not a DM number."""
    m = re.fullmatch(r"\s*(BD|CD|CPD|CP)\s*([+-])\s*(\d{1,2})\s*[°d ]?\s*(\d{1,5})\s*([A-Za-z]?)\s*",
                     str(text), flags=re.I)
    if not m:
        return ""
    pre = m.group(1).upper()
    pre = "CP" if pre == "CPD" else pre
    return f"{pre}{m.group(2)}{int(m.group(3)):02d} {int(m.group(4))}"


def _dm_key(dm: str) -> str:
    return "dm:" + dm.lower().replace(" ", ":") if dm else ""


def star_keys(stars) -> tuple[list[str], list[int]]:
    """Look-up keys of every star of a star table (mapping of column -> sequence):
    ``(keys, star_rows)``, one entry per key and star."""
    keys: list[str] = []
    rows: list[int] = []

    def add(k, i):
        if k:
            keys.append(k)
            rows.append(i)

    n = len(stars["hr"])
    for i in range(n):
        const = str(stars["const"][i])
        for nm in (stars["iau_ascii"][i], stars["iau_name"][i]):
            if nm:
                add("n:" + fold(nm), i)
        g, sup = str(stars["bayer"][i]), int(stars["bayer_sup"][i])
        if g and const:
            add(f"b:{g}:{const}", i)
            if sup:
                add(f"b:{g}{sup}:{const}", i)
        fl = int(stars["flamsteed"][i])
        if fl and const:
            add(f"f:{fl}:{const}", i)
        for col in ("hr", "hd", "hip", "sao", "ads"):
            v = int(stars[col][i])
            if v:
                add(f"{col}:{v}", i)
        add(_dm_key(str(stars["dm"][i])), i)
    # one entry per (key, star)
    seen = set()
    out_k, out_r = [], []
    for k, r in zip(keys, rows):
        if (k, r) not in seen:
            seen.add((k, r))
            out_k.append(k)
            out_r.append(r)
    return out_k, out_r


_NUMBER = re.compile(r"^(HR|HD|HIP|SAO|ADS)\s*[-_]?\s*(\d{1,6})\s*([A-Z]{0,2})?$", re.I)
_COMP = re.compile(r"^[A-H][a-h]?\d?(?:[,\-]?[A-H][a-h]?\d?)*$")


@dataclass(frozen=True)
class Query:
    """A parsed name: the look-up keys to try (any hit counts), component letters, and
    the same for the text without a last word that looks like component letters
    (``Castor AB``), tried when the whole text names no star."""

    text: str
    keys: tuple[str, ...]
    components: str = ""
    kind: str = ""  # 'name', 'bayer', 'flamsteed', 'number', 'dm', ''
    head: "Query | None" = None


def parse(text: str) -> Query:
    """Turn what an observer typed into index keys (see the module notes)."""
    t = " ".join(str(text).split())
    q = _parse_plain(t, normalise_dm)
    toks = t.split(" ")
    head = None
    if len(toks) >= 2 and _COMP.match(toks[-1]):
        h = _parse_plain(" ".join(toks[:-1]), normalise_dm)
        if h.keys:
            head = Query(h.text, h.keys, toks[-1], h.kind)
    return Query(t, q.keys, q.components, q.kind, head)


def _parse_plain(t: str, normalise_dm) -> Query:
    m = _NUMBER.match(t)
    if m:
        cat, num = m.group(1).lower(), int(m.group(2))
        comp = (m.group(3) or "") if cat == "ads" else ""
        return Query(t, (f"{cat}:{num}",), comp, "number")
    dm = normalise_dm(t)
    if dm:
        return Query(t, (_dm_key(dm),), "", "dm")
    f = fold(t)
    if not f:
        return Query(t, ())
    keys: list[str] = []
    kind = ""
    m = re.fullmatch(r"(\d{1,3})(\D+)", f)
    if m and m.group(2) in CONSTELLATION_KEYS:
        keys.append(f"f:{int(m.group(1))}:{CONSTELLATION_KEYS[m.group(2)]}")
        kind = "flamsteed"
    for form in sorted(GREEK_KEYS, key=len, reverse=True):
        if f.startswith(form):
            m = re.fullmatch(r"(\d{0,2})(\D+)", f[len(form):])
            if m and m.group(2) in CONSTELLATION_KEYS:
                sup = int(m.group(1)) if m.group(1) else 0
                keys.append(f"b:{GREEK_KEYS[form]}{sup or ''}:{CONSTELLATION_KEYS[m.group(2)]}")
                kind = kind or "bayer"
                break
    keys.append("n:" + f)
    return Query(t, tuple(keys), "", kind or "name")


# -- the index ---------------------------------------------------------------------

@dataclass(frozen=True)
class StarIndex:
    """The shipped index: star columns (numpy arrays) and key -> star rows."""

    stars: dict
    lookup: dict

    def __len__(self) -> int:
        return len(self.stars["hr"])

    def find(self, query: Query) -> list[int]:
        """Stars named by ``query`` (its whole text only)."""
        for k in query.keys:
            hit = self.lookup.get(k)
            if hit:
                return list(hit)
        return []

    def resolve(self, query: Query) -> tuple[list[int], Query]:
        """Stars named by ``query``, else by its text without trailing component
        letters; returns the stars and the query that matched."""
        hit = self.find(query)
        if not hit and query.head is not None:
            h = self.find(query.head)
            if h:
                return h, query.head
        return hit, query

    def label(self, i: int) -> str:
        """'Albireo = β¹ Cyg = HR 7417' style description of star ``i``."""
        s = self.stars
        parts = []
        if s["iau_name"][i]:
            parts.append(str(s["iau_name"][i]))
        b = bayer_text(s["bayer"][i], s["bayer_sup"][i], s["const"][i])
        if b:
            parts.append(b)
        if s["flamsteed"][i] and s["const"][i]:
            parts.append(f"{int(s['flamsteed'][i])} {s['const'][i]}")
        for col, lab in (("hr", "HR"), ("hd", "HD"), ("hip", "HIP")):
            if s[col][i]:
                parts.append(f"{lab} {int(s[col][i])}")
                break
        return " = ".join(parts)

    def common_name(self, i: int) -> str:
        """The name observers use: IAU proper name, else Bayer, else Flamsteed, else HR."""
        s = self.stars
        if s["iau_name"][i]:
            return str(s["iau_name"][i])
        b = bayer_text(s["bayer"][i], s["bayer_sup"][i], s["const"][i])
        if b:
            return b
        if s["flamsteed"][i] and s["const"][i]:
            return f"{int(s['flamsteed'][i])} {s['const'][i]}"
        if s["hr"][i]:
            return f"HR {int(s['hr'][i])}"
        return ""


def bayer_text(g, sup, const) -> str:
    """('eps', 1, 'Lyr') -> 'ε¹ Lyr'."""
    if not g or not const:
        return ""
    letter = GREEK_LETTER.get(str(g), str(g))
    return f"{letter}{superscript(str(int(sup))) if int(sup) else ''} {const}"


def _index_path():
    from importlib import resources

    try:
        return resources.files(PACKAGE) / INDEX_FILE
    except ModuleNotFoundError:  # a source checkout shadowing the installed package
        from pathlib import Path

        return Path(__file__).resolve().parents[2] / "catalogs_sample" / INDEX_FILE


@lru_cache(maxsize=1)
def load_index() -> StarIndex:
    """The shipped star-name index (read once per process; no pickle)."""
    from planner.errors import CatalogError

    p = _index_path()
    try:
        with p.open("rb") as fh, np.load(fh, allow_pickle=False) as z:
            data = {k: z[k] for k in z.files}
    except (OSError, ValueError, KeyError) as exc:
        raise CatalogError(f"the star-name index is missing or damaged ({exc}); reinstall splitplan") from None
    stars = {c: _Text(data["star_" + c]) for c in STAR_TEXT}
    for c in STAR_INT + STAR_FLOAT:
        stars[c] = data["star_" + c]
    return StarIndex(stars=stars, lookup=_SortedKeys(data["key"], data["key_star"]))


class _Text:
    """A UTF-8 bytes column read as text one element at a time (no bulk decoding)."""

    def __init__(self, raw: np.ndarray):
        self.raw = raw

    def __getitem__(self, i) -> str:
        return self.raw[i].decode("utf-8")

    def __len__(self) -> int:
        return len(self.raw)


class _SortedKeys:
    """Key -> star rows by binary search in the sorted key array (no dict to build)."""

    def __init__(self, keys: np.ndarray, rows: np.ndarray):
        self.keys, self.rows = keys, rows

    def get(self, key: str):
        k = key.encode("utf-8")
        lo = int(np.searchsorted(self.keys, k, side="left"))
        hi = int(np.searchsorted(self.keys, k, side="right"))
        return self.rows[lo:hi].tolist() if hi > lo else None

    def __len__(self) -> int:
        return len(self.keys)

    def prefixed(self, prefix: str) -> list[str]:
        """Every distinct key starting with ``prefix`` (for suggestions)."""
        p = prefix.encode("utf-8")
        lo = int(np.searchsorted(self.keys, p, side="left"))
        hi = int(np.searchsorted(self.keys, p + b"\xff", side="left"))
        return sorted({k.decode("utf-8") for k in self.keys[lo:hi].tolist()})


def write_index(path, stars_df) -> None:
    """Write the index file from a star table (DataFrame) with the columns above:
    text as UTF-8 bytes, numbers as int32/float64, keys sorted."""
    cols = {}
    for c in STAR_TEXT:
        vals = [str(v).encode("utf-8") for v in stars_df[c].fillna("").tolist()]
        cols["star_" + c] = np.asarray(vals, dtype=bytes)
    for c in STAR_INT:
        cols["star_" + c] = stars_df[c].fillna(0).astype("int64").to_numpy().astype(np.int32)
    for c in STAR_FLOAT:
        cols["star_" + c] = stars_df[c].astype(float).to_numpy()
    keys, rows = star_keys({c: stars_df[c].tolist() for c in stars_df.columns})
    kb = np.asarray([k.encode("utf-8") for k in keys], dtype=bytes)
    order = np.argsort(kb, kind="stable")
    cols["key"] = kb[order]
    cols["key_star"] = np.asarray(rows, dtype=np.int32)[order]
    with open(path, "wb") as fh:
        np.savez(fh, **cols)  # uncompressed: read without inflating (the wheel is compressed)
