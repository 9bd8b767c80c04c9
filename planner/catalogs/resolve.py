"""Names to pairs and pairs to names, against a loaded catalogue.

* :func:`find_pairs` -- what an observer typed -> row labels of the pair
  table, best first.
* :func:`pair_names` -- the common name and constellation of pair rows, for
  the reports.

Joins (docs/names.md): a star of the name index reaches the catalogue through
its WDS id, the HD/HIP/ADS numbers of the catalogue's ORB6 orbits, the ADS
number of a BSC5 pair row and the DM number of a WDS row; by position only when
no number joins it (:data:`planner.catalogs.names.POSITION_TOLERANCE_ARCSEC`
against precise positions, :data:`~planner.catalogs.names.COARSE_TOLERANCE_ARCSEC`
against positions read from a WDS id).
"""

from __future__ import annotations

import difflib
import re

import numpy as np
import pandas as pd

from planner.catalogs import names as nm
from planner.catalogs.constellations import GREEK_KEYS, fold
from planner.errors import InputError, UnknownPairError

FETCH_HINT = "`splitplan catalog fetch` loads the full WDS"


# -- catalogue-side keys (built once per pair table) -----------------------------------

class _CatalogKeys:
    """Arrays of the loaded catalogue used by the joins."""

    def __init__(self, catalog):
        pairs = catalog.pairs
        self.pairs = pairs
        self.wds = pairs["wds_id"].astype(str).to_numpy()
        self.labels = pairs.index
        self.ra = pairs["ra_deg"].to_numpy(float)
        self.dec = pairs["dec_deg"].to_numpy(float)
        self.precise = pairs["coord_precise"].fillna(False).to_numpy(bool)
        self.disc = pairs["discoverer"].astype(str).to_numpy()
        self.comp = pairs["components"].astype(str).to_numpy()
        self.sep = pairs["sep_last_arcsec"].to_numpy(float)
        self._dm = None
        o = catalog.orbits
        self.o_wds = o["wds_id"].astype(str).to_numpy()
        self.o_hd = _number(o["hd"])
        self.o_hip = _number(o["hip"])
        self.o_ads = o["ads"].to_numpy(float)
        self.o_comp = o["components"].astype(str).to_numpy()
        self.o_a = o["a_arcsec"].to_numpy(float)
        self.o_pref = o["preferred"].fillna(False).to_numpy(bool)

    @property
    def dm(self) -> np.ndarray:
        if self._dm is None:
            d = self.pairs["dm_id"].astype(str)
            has = d.str.strip() != ""
            out = np.full(len(d), "", dtype=object)
            out[has.to_numpy()] = [nm.dm_zone_key(x) for x in d[has]]
            self._dm = out
        return self._dm


def _number(col: pd.Series) -> np.ndarray:
    return pd.to_numeric(col.astype(str).str.extract(r"(\d+)", expand=False), errors="coerce").to_numpy(float)


def _keys(catalog) -> _CatalogKeys:
    cached = getattr(catalog, "_resolve_keys", None)
    if cached is not None and cached.pairs is catalog.pairs:
        return cached
    k = _CatalogKeys(catalog)
    try:
        object.__setattr__(catalog, "_resolve_keys", k)
    except Exception:
        pass
    return k


def _letters(label: str) -> set:
    return set(re.findall(r"[A-Z]", str(label)))


# -- stars -> rows ----------------------------------------------------------------------

def rows_for_star(catalog, ix: nm.StarIndex, i: int) -> tuple[np.ndarray, str]:
    """Positions (0-based) of the catalogue's pairs of star ``i``'s system and the join
    used: 'wds-id (<how the index got it>)', 'hd', 'hip', 'ads', 'dm', 'position' or ''."""
    k = _keys(catalog)
    s = ix.stars
    hits: list[np.ndarray] = []
    how: list[str] = []
    w = s["wds_id"][i]
    if w:
        r = np.flatnonzero(k.wds == w)
        if len(r):
            hits.append(r)
            how.append(f"wds-id ({s['wds_join'][i]})")
    wids = set()
    for col, arr in (("hd", k.o_hd), ("hip", k.o_hip), ("ads", k.o_ads)):
        v = int(s[col][i])
        if v:
            m = arr == v
            if m.any():
                wids.update(k.o_wds[m].tolist())
                how.append(col)
    if int(s["ads"][i]):
        r = np.flatnonzero(k.disc == f"ADS {int(s['ads'][i])}")
        if len(r):
            hits.append(r)
            how.append("ads")
    if wids:
        hits.append(np.flatnonzero(np.isin(k.wds, list(wids))))
    dm = nm.dm_zone_key(s["dm"][i])
    if dm and not hits:
        r = np.flatnonzero(k.dm == dm)
        if len(r):
            hits.append(r)
            how.append("dm")
    if not hits:
        ra, dec = float(s["ra_deg"][i]), float(s["dec_deg"][i])
        near = np.abs(k.dec - dec) < nm.COARSE_TOLERANCE_ARCSEC / 3600.0
        cand = np.flatnonzero(near)
        if len(cand):
            d = _sep_arcsec(ra, dec, k.ra[cand], k.dec[cand])
            tol = np.where(k.precise[cand], nm.POSITION_TOLERANCE_ARCSEC, nm.COARSE_TOLERANCE_ARCSEC)
            ok = cand[d <= tol]
            if len(ok):
                hits.append(np.flatnonzero(np.isin(k.wds, np.unique(k.wds[ok]))))
                how.append("position")
    if not hits:
        return np.array([], int), ""
    rows = np.unique(np.concatenate(hits))
    return rows, ", ".join(dict.fromkeys(how))


def _sep_arcsec(ra1, dec1, ra2, dec2):
    r1, d1, r2, d2 = (np.radians(np.asarray(v, float)) for v in (ra1, dec1, ra2, dec2))
    h = np.sin((d2 - d1) / 2) ** 2 + np.cos(d1) * np.cos(d2) * np.sin((r2 - r1) / 2) ** 2
    return 2 * np.degrees(np.arcsin(np.sqrt(np.clip(h, 0, 1)))) * 3600.0


def _star_letters(ix, i) -> set:
    return _letters(ix.stars["ads_comp"][i]) | _letters(ix.stars["iau_comp"][i])


# -- ordering ---------------------------------------------------------------------------

def _ckey(label: str) -> str:
    """catalog.component_key for one label (no blanks, '-' -> ',', '' -> 'AB')."""
    k = str(label).replace(" ", "").replace("-", ",")
    return k or "AB"


def _rho_proxy(catalog, labels) -> np.ndarray:
    """Catalogued separation of each pair, else the semi-major axis of its preferred orbit
    (only the few rows involved are touched)."""
    k = _keys(catalog)
    pos = k.labels.get_indexer(labels)
    rho = k.sep[pos].copy()
    miss = ~np.isfinite(rho)
    if miss.any() and len(k.o_wds):
        sel = np.flatnonzero(k.o_pref & np.isin(k.o_wds, np.unique(k.wds[pos[miss]])))
        a = {f"{k.o_wds[j]}|{_ckey(k.o_comp[j])}": abs(k.o_a[j]) for j in sel}
        rho[miss] = [a.get(f"{k.wds[i]}|{_ckey(k.comp[i])}", np.nan) for i in pos[miss]]
    return rho


def order_labels(catalog, labels, limit_arcsec: float | None = None) -> list:
    """Closest-to-splittable first: pairs at or above the limit, smallest margin first,
    then those below it, widest first, then pairs with no separation known."""
    labels = list(labels)
    if len(labels) < 2:
        return labels
    lim = float(limit_arcsec) if limit_arcsec else nm.DEFAULT_LIMIT_ARCSEC
    rho = _rho_proxy(catalog, labels)
    grp = np.where(~np.isfinite(rho), 2, np.where(rho >= lim, 0, 1))
    key = np.where(grp == 0, rho, np.where(grp == 1, -rho, 0.0))
    order = np.lexsort((np.arange(len(labels)), key, grp))
    return [labels[j] for j in order]


# -- find_pairs -------------------------------------------------------------------------

def find_pairs(catalog, text, limit_arcsec: float | None = None) -> list:
    """Row labels of ``catalog.pairs`` named by ``text``, best first.

    ``text`` may be a WDS id, a discoverer designation (with or without
    components) or any star name of the offline index (module
    :mod:`planner.catalogs.names`).  Several pairs (a multiple system, or a
    name such as 'eps Lyr' covering several stars) come closest-to-splittable
    first for a resolution limit ``limit_arcsec`` (default
    :data:`~planner.catalogs.names.DEFAULT_LIMIT_ARCSEC`).

    Raises :class:`UnknownPairError`: for a known star with no pair loaded, a
    line saying what it is; otherwise suggestions from designations and names.
    """
    from planner.catalogs.catalog import designation_matches

    q = str(text).strip()
    if not q:
        raise InputError("empty pair name; give a name such as Albireo or 'eps Lyr', a WDS id "
                         "such as 18055+0230 or a designation such as STF2272AB")
    hit = designation_matches(catalog, q)
    if hit:
        # a WDS id or a catalogue designation, taken literally (also an ORB6 'other name'
        # such as 'del Vel' = its Aa,Ab orbit): the system's best pair first (catalog._best_of)
        return list(hit)
    ix = nm.load_index()
    stars, query = ix.resolve(nm.parse(q))
    labels = _star_labels(catalog, ix, stars, query) if (query.kind == "number" or stars) else []
    if labels:
        return order_labels(catalog, labels, limit_arcsec)
    if stars:
        raise UnknownPairError(q, [], message=_not_loaded(ix, stars, q))
    raise UnknownPairError(q, suggest_names(catalog, q))


def _star_labels(catalog, ix, stars, query) -> list:
    """Row labels of the pairs of ``stars`` (and of catalogue numbers the index lacks)."""
    k = _keys(catalog)
    rows_all = [rows_for_star(catalog, ix, i)[0] for i in stars]
    # catalogue numbers not in the index (fainter stars): ORB6 HD/HIP/ADS, WDS DM
    rows_all.append(_number_rows(k, query))
    rows = np.unique(np.concatenate(rows_all)).astype(int)
    letters = set()
    for i in stars:
        letters |= _star_letters(ix, i)
    want = _letters(query.components) if query.components else set()
    rows = _filter_components(k, rows, letters, want, query.components)
    return list(k.labels[rows])


def _number_rows(k: _CatalogKeys, query: nm.Query) -> np.ndarray:
    out = []
    for key in query.keys:
        m = re.fullmatch(r"(hd|hip|ads):(\d+)", key)
        if m:
            arr = {"hd": k.o_hd, "hip": k.o_hip, "ads": k.o_ads}[m.group(1)]
            w = k.o_wds[arr == int(m.group(2))]
            if len(w):
                out.append(np.flatnonzero(np.isin(k.wds, np.unique(w))))
            if m.group(1) == "ads":
                out.append(np.flatnonzero(k.disc == f"ADS {int(m.group(2))}"))
        m = re.fullmatch(r"dm:[a-z]+([+-]\d+):(\d+)", key)
        if m:
            out.append(np.flatnonzero(k.dm == nm.dm_zone_key(f"{m.group(1)} {m.group(2)}")))
    return np.unique(np.concatenate(out)) if out else np.array([], int)


def _filter_components(k: _CatalogKeys, rows: np.ndarray, letters: set, want: set, comp: str) -> np.ndarray:
    """Pairs of the named stars: given components exactly, else pairs sharing a
    component letter with the named stars, else the whole system."""
    if not len(rows):
        return rows
    comps = k.comp[rows]
    if comp:
        ck = _ckey(comp)
        exact = rows[np.array([_ckey(c) == ck for c in comps], bool)]
        if len(exact):
            return exact
        sub = rows[[bool(_letters(c)) and _letters(c) <= want for c in comps]]
        return sub
    if letters:
        share = rows[[bool(_letters(c) & letters) or not _letters(c) for c in comps]]
        if len(share):
            return share
    return rows


def _not_loaded(ix, stars, q) -> str:
    mags = [float(ix.stars["vmag"][j]) if np.isfinite(ix.stars["vmag"][j]) else 99.0 for j in stars]
    named = [0 if ix.stars["iau_name"][j] else 1 for j in stars]
    i = stars[int(np.lexsort((mags, named))[0])]
    what = ix.label(i)
    w = ix.stars["wds_id"][i]
    extra = f", WDS {w}" if w and ix.stars["wds_join"][i] != "position" else ""
    if len(stars) > 1:
        what += f" (and {len(stars) - 1} more star{'s' if len(stars) > 2 else ''})"
    return f"{what}{extra}: not in the loaded catalogue; {FETCH_HINT}"


# -- suggestions ------------------------------------------------------------------------

def _name_pool(ix) -> dict:
    """Folded name -> shown name, for every proper, Bayer and Flamsteed name."""
    cached = getattr(_name_pool, "_cache", None)
    if cached is not None and cached[0] is ix:
        return cached[1]
    pool: dict[str, str] = {}
    s = ix.stars
    for i in range(len(ix)):
        if s["iau_name"][i]:
            pool.setdefault(fold(s["iau_ascii"][i]), s["iau_name"][i])
        g, c = s["bayer"][i], s["const"][i]
        if g and c:
            sup = int(s["bayer_sup"][i])
            pool.setdefault(f"{g}{sup or ''}{c.lower()}", f"{g}{sup or ''} {c}")
        if int(s["flamsteed"][i]) and c:
            pool.setdefault(f"{int(s['flamsteed'][i])}{c.lower()}", f"{int(s['flamsteed'][i])} {c}")
    _name_pool._cache = (ix, pool)
    return pool


def suggest_names(catalog, q: str, n: int = 5) -> list[str]:
    """Close matches among star names (proper, Bayer, Flamsteed) and the catalogue's
    designations and WDS ids."""
    from planner.catalogs.catalog import suggest

    f = fold(q)
    for form in sorted(GREEK_KEYS, key=len, reverse=True):
        if f.startswith(form) and len(f) > len(form):
            f = GREEK_KEYS[form] + f[len(form):]
            break
    out = []
    if f and not re.match(r"^\d{4}", f):
        pool = _name_pool(nm.load_index())
        cand = [k for k in pool if k[:1] == f[:1]]
        out += [pool[k] for k in difflib.get_close_matches(f, cand, n=n, cutoff=0.75)]
    out += suggest(catalog, q, n=n)
    return list(dict.fromkeys(out))[:n]


# -- pair names -------------------------------------------------------------------------

def pair_names(catalog, labels=None, rows=None) -> pd.DataFrame:
    """``name`` (common name of the pair's primary: IAU proper name, Bayer, Flamsteed or HR)
    and ``constellation`` (IAU abbreviation, '' where no star is known) of the pairs
    ``labels`` of ``catalog.pairs`` (default: all), or of ``rows`` (any table with
    ``wds_id``, ``discoverer``, ``components``, ``ra_deg``, ``dec_deg`` and, if present,
    ``dm_id`` and ``coord_precise``), joined by WDS id, the ORB6 HD/HIP/ADS numbers of
    ``catalog.orbits``, BSC5 ADS number, DM number, else position."""
    if rows is not None:
        pairs = rows
    else:
        pairs = catalog.pairs if labels is None else catalog.pairs.loc[list(labels)]
    n = len(pairs)
    name = np.full(n, "", dtype=object)
    const = np.full(n, "", dtype=object)
    if not n:
        return pd.DataFrame({"name": name, "constellation": const}, index=pairs.index)
    ix = nm.load_index()
    maps = _star_maps(ix)
    wds = pairs["wds_id"].astype(str).to_numpy()
    comps = pairs["components"].astype(str).to_numpy()
    disc = pairs["discoverer"].astype(str).to_numpy()
    cand: list[list[int]] = [list(maps["wds"].get(w, ())) for w in wds]
    need = [j for j in range(n) if not cand[j]]
    if need:
        o = getattr(catalog, "orbits", None)
        if o is None:
            o = pd.DataFrame({"wds_id": [], "hd": [], "hip": [], "ads": []})
        sub = o[o["wds_id"].isin(set(wds[need]))]
        by_w: dict[str, set] = {}
        for w, hd, hip, ads in zip(sub["wds_id"].astype(str), _number(sub["hd"]), _number(sub["hip"]),
                                   sub["ads"].to_numpy(float)):
            for col, v in (("hd", hd), ("hip", hip), ("ads", ads)):
                if np.isfinite(v) and int(v) in maps[col]:
                    by_w.setdefault(w, set()).update(maps[col][int(v)])
        for j in need:
            cand[j] = sorted(by_w.get(wds[j], ()))
            if not cand[j]:
                m = re.fullmatch(r"ADS (\d+)", disc[j])
                if m:
                    cand[j] = list(maps["ads"].get(int(m.group(1)), ()))
    need = [j for j in range(n) if not cand[j]]
    if need:
        dms = (pairs["dm_id"] if "dm_id" in pairs else pd.Series([""] * n)).astype(str).to_numpy()
        for j in need:
            d = nm.dm_zone_key(dms[j]) if dms[j].strip() else ""
            if d:
                cand[j] = list(maps["dm"].get(d, ()))
    need = [j for j in range(n) if not cand[j]]
    if need:
        ra = pairs["ra_deg"].to_numpy(float)
        dec = pairs["dec_deg"].to_numpy(float)
        precise = (pairs["coord_precise"].fillna(False).to_numpy(bool) if "coord_precise" in pairs
                   else np.zeros(n, bool))
        sdec = maps["dec_sorted"]
        order = maps["dec_order"]
        win = nm.COARSE_TOLERANCE_ARCSEC / 3600.0
        lo = np.searchsorted(sdec, dec[need] - win)
        hi = np.searchsorted(sdec, dec[need] + win)
        for j, a, b in zip(need, lo, hi):
            if b <= a or not np.isfinite(ra[j]):
                continue
            idx = order[a:b]
            d = _sep_arcsec(ra[j], dec[j], ix.stars["ra_deg"][idx], ix.stars["dec_deg"][idx])
            tol = nm.POSITION_TOLERANCE_ARCSEC if precise[j] else nm.COARSE_TOLERANCE_ARCSEC
            if (d <= tol).any():
                cand[j] = [int(idx[np.argmin(d)])]
    for j in range(n):
        if cand[j]:
            i = _primary_star(ix, cand[j], comps[j])
            name[j] = ix.common_name(i)
            const[j] = ix.stars["const"][i]
    return pd.DataFrame({"name": name, "constellation": const}, index=pairs.index)


def _primary_star(ix, cands: list[int], comp: str) -> int:
    """The star of ``cands`` that holds the pair's first component, else the brightest."""
    first = (_letters(comp) and sorted(_letters(comp), key=str(comp).find)[0]) or "A"
    hold = [i for i in cands if first in _star_letters(ix, i)]
    pool = hold or cands
    v = [float(ix.stars["vmag"][i]) if np.isfinite(ix.stars["vmag"][i]) else 99.0 for i in pool]
    named = [0 if ix.stars["iau_name"][i] else 1 for i in pool]
    return pool[int(np.lexsort((v, named))[0])] if hold else pool[int(np.argmin(v))]


def _star_maps(ix) -> dict:
    cached = getattr(_star_maps, "_cache", None)
    if cached is not None and cached[0] is ix:
        return cached[1]
    s = ix.stars
    maps: dict = {"wds": {}, "hd": {}, "hip": {}, "ads": {}, "dm": {}}
    for i in range(len(ix)):
        w = s["wds_id"][i]
        if w:
            maps["wds"].setdefault(w, []).append(i)
        d = nm.dm_zone_key(s["dm"][i])
        if d:
            maps["dm"].setdefault(d, []).append(i)
    for col in ("hd", "hip", "ads"):
        arr = s[col]
        for i in np.flatnonzero(arr):
            maps[col].setdefault(int(arr[i]), []).append(int(i))
    order = np.argsort(s["dec_deg"])
    maps["dec_order"] = order
    maps["dec_sorted"] = s["dec_deg"][order]
    _star_maps._cache = (ix, maps)
    return maps


# -- describing a name (``splitplan catalog resolve``) ---------------------------------

def star_record(ix: nm.StarIndex, i: int) -> dict:
    """What the index knows about star ``i``, as plain values."""
    s = ix.stars
    out = {"label": ix.label(i), "name": ix.common_name(i), "constellation": s["const"][i]}
    for col in ("hr", "hd", "hip", "sao", "ads"):
        out[col] = int(s[col][i]) or None
    out["ads_components"] = s["ads_comp"][i]
    out["dm"] = s["dm"][i]
    out["wds_id"] = s["wds_id"][i]
    out["wds_id_from"] = s["wds_join"][i]
    out["iau_name_joined_by"] = s["name_join"][i]
    out["ra_deg"] = float(s["ra_deg"][i])
    out["dec_deg"] = float(s["dec_deg"][i])
    v = float(s["vmag"][i])
    out["vmag"] = v if np.isfinite(v) else None
    return out


def describe(catalog, text, online: bool = False, limit_arcsec: float | None = None) -> dict:
    """Everything known about a name: the stars of the offline index, the pairs of
    the loaded catalogue (best first) and, when ``online`` and the offline index has
    no answer, the CDS SIMBAD answer (:mod:`planner.catalogs.online`, cached)."""
    q = str(text).strip()
    ix = nm.load_index()
    stars, _ = ix.resolve(nm.parse(q))
    out = {"query": q, "stars": [star_record(ix, i) for i in stars], "pairs": [], "source": "offline index",
           "online": None}
    try:
        out["pairs"] = list(find_pairs(catalog, q, limit_arcsec=limit_arcsec))
    except UnknownPairError as exc:
        out["message"] = str(exc)
        out["suggestions"] = exc.suggestions
    if online and not out["pairs"] and not out["stars"]:
        from planner.catalogs import online as onl

        ans = onl.resolve_online(q)
        out["online"] = ans
        out["source"] = f"{onl.SERVICE}" + (" (cached answer)" if ans.get("cached") else "")
        out["pairs"] = onl.pairs_for_answer(catalog, ans, limit_arcsec=limit_arcsec)
        if out["pairs"]:
            out.pop("message", None)
            out.pop("suggestions", None)
        elif ans.get("found"):
            out["message"] = (f"{q!r} is {ans.get('main_id') or q} in {onl.SERVICE}, but no pair of the "
                              f"loaded catalogue matches it; {FETCH_HINT}")
        else:
            out["message"] = f"{q!r} is not known to {onl.SERVICE} either"
    return out


def find_pairs_online(catalog, text, limit_arcsec: float | None = None) -> list:
    """:func:`find_pairs`, then (only when the offline index has no answer) the CDS
    SIMBAD look-up of :mod:`planner.catalogs.online`."""
    try:
        return find_pairs(catalog, text, limit_arcsec=limit_arcsec)
    except UnknownPairError as exc:
        if exc.known:  # a known star without a pair: the online service adds nothing
            raise
        d = describe(catalog, text, online=True, limit_arcsec=limit_arcsec)
        if d["pairs"]:
            return d["pairs"]
        raise UnknownPairError(str(text).strip(), exc.suggestions, message=d.get("message")) from None
