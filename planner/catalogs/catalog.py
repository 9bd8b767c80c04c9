"""The loaded catalogue: pair table + orbit table, where they came from, and
pair look-up by name.

* :class:`Catalog` -- the dataclass every later stage receives.
* :func:`pairs_from_orbits` -- pair rows for ORB6 systems (no invented data).
* :func:`merge` -- WDS pairs plus ORB6 orbits, ``has_orbit`` set.
* :func:`load_catalog` -- ``'sample'``, ``'vizier'`` or a file path.
* :func:`find_pair` -- a WDS id or a designation to a row label.

Matching of pairs and orbits: on WDS id plus a component key, where blanks
are dropped, a hyphen counts as a comma (``AB-C`` = ``AB,C``) and a blank
component label counts as ``AB`` (the WDS leaves the label blank for a plain
pair, ORB6 often writes ``AB``).
"""

from __future__ import annotations

import difflib
import re
import sys
from dataclasses import dataclass, field
from datetime import date
from pathlib import Path

import numpy as np
import pandas as pd

from planner.catalogs._fixed import user_path as _user_path
from planner.errors import InputError, UnknownPairError
from planner.schema import ORBIT_COLUMNS, PAIR_COLUMNS

_DTYPES = {"float": "float64", "str": "str", "bool": "bool"}
#: a BSC5 pair whose separation exceeds this many times the semi-major axis of an
#: ORB6 orbit with the same WDS id and component key is a different pair
BRIGHT_OTHER_PAIR_RATIO = 5.0


@dataclass
class Catalog:
    """A loaded catalogue.

    ``pairs``: pair table (:data:`planner.schema.PAIR_COLUMNS`), one row per pair;
    ``orbits``: orbit table (:data:`planner.schema.ORBIT_COLUMNS`);
    ``source``: where it came from (text); ``retrieved``: ISO date of the copy;
    ``problems``: skipped lines as ``(file, line_no, reason)``.
    """

    pairs: pd.DataFrame
    orbits: pd.DataFrame
    source: str
    retrieved: str
    problems: list = field(default_factory=list)

    def summary(self) -> dict:
        """Counts for a quick look: pairs, pairs with a usable orbit, orbits by grade."""
        grades = self.orbits["grade"].dropna().astype(int).value_counts().sort_index()
        return {
            "source": self.source,
            "retrieved": self.retrieved,
            "pairs": int(len(self.pairs)),
            "pairs_with_usable_orbit": int(self.pairs["has_orbit"].sum()),
            "orbits": int(len(self.orbits)),
            "orbits_complete": int(self.orbits["complete"].sum()),
            "orbits_by_grade": {str(k): int(v) for k, v in grades.items()},
            "problems": len(self.problems),
        }


def empty_table(columns) -> pd.DataFrame:
    """An empty table with the schema's columns and types."""
    return pd.DataFrame({c.name: pd.Series([], dtype=_DTYPES.get(c.dtype, "float64"))
                         for c in columns})


def empty_orbits() -> pd.DataFrame:
    return empty_table(ORBIT_COLUMNS)


def component_key(comp: pd.Series) -> pd.Series:
    """Normalised component label for matching: no blanks, '-' -> ',', '' -> 'AB'."""
    k = comp.fillna("").astype(str).str.replace(" ", "", regex=False).str.replace("-", ",", regex=False)
    return k.where(k != "", "AB")


def usable_orbit(orbits: pd.DataFrame) -> pd.Series:
    """Orbits good enough to place a pair: complete elements and a visual grade 1-5."""
    return orbits["complete"].astype(bool) & orbits["grade"].between(1, 5)


def pairs_from_orbits(orbits: pd.DataFrame) -> pd.DataFrame:
    """One pair row per (wds_id, components) of ``orbits``, from its preferred orbit.

    Carries the ORB6 identification, position, magnitudes and flags, and
    ``year_last`` from the orbit's last observation.  Catalogued separations,
    angles, first year and number of measures stay NaN: ORB6 does not list
    them (nothing is invented).  ``source`` = 'orb6'.
    """
    o = orbits[orbits["preferred"].astype(bool)]
    n = len(o)
    out = empty_table(PAIR_COLUMNS).reindex(range(n))
    for c in ("wds_id", "discoverer", "components", "ra_deg", "dec_deg", "mag1", "mag2",
              "mag1_flag", "mag2_flag", "line_no"):
        out[c] = o[c].to_numpy()
    out["year_last"] = o["year_last_obs"].to_numpy(float)
    for c in ("spectral_type", "dm_id", "note_flags"):
        out[c] = np.full(n, "")
    out["coord_precise"] = np.ones(n, bool)  # ORB6 gives hhmmss.ss / ddmmss.s positions
    out["has_orbit"] = usable_orbit(o).to_numpy(bool)
    out["source"] = np.full(n, "orb6")
    for c in PAIR_COLUMNS:
        if c.dtype == "str":
            out[c.name] = out[c.name].fillna("").astype(str)
        elif c.dtype == "bool":
            out[c.name] = out[c.name].fillna(False).astype(bool)
        else:
            out[c.name] = out[c.name].astype(float)
    return out


def merge(wds_pairs: pd.DataFrame | None, orbits: pd.DataFrame | None, source: str = "",
          retrieved: str = "", problems: list | None = None,
          bright_pairs: pd.DataFrame | None = None) -> Catalog:
    """WDS pairs plus ORB6 orbits (plus BSC5 bright pairs) as one :class:`Catalog`.

    WDS rows win; ORB6 systems with no WDS row (same WDS id and component
    key, see the module notes) are added from :func:`pairs_from_orbits`;
    ``bright_pairs`` (BSC5 rows, :func:`planner.catalogs.sample.read_bsc5_pairs`)
    only where neither has that pair, so a pair with an ORB6 orbit keeps it.
    ``has_orbit`` is True where a complete grade 1-5 orbit matches.
    """
    if orbits is None:
        orbits = empty_orbits()
    if wds_pairs is None:
        wds_pairs = empty_table(PAIR_COLUMNS)
    w = wds_pairs.reset_index(drop=True)
    okey = orbits["wds_id"].astype(str) + "|" + component_key(orbits["components"])
    wkey = w["wds_id"].astype(str) + "|" + component_key(w["components"])
    usable_keys = set(okey[usable_orbit(orbits)].tolist())
    w = w.assign(has_orbit=wkey.isin(usable_keys).to_numpy(bool))
    extra = pairs_from_orbits(orbits)
    if len(extra):
        ekey = extra["wds_id"] + "|" + component_key(extra["components"])
        extra = extra[~ekey.isin(set(wkey.tolist())).to_numpy()]
    if bright_pairs is not None and len(bright_pairs):
        bkey = bright_pairs["wds_id"].astype(str) + "|" + component_key(bright_pairs["components"])
        # an ORB6 pair with the same key but an orbit far smaller than the BSC5
        # separation is another pair (e.g. 'zet UMa', a = 0.8", beside Mizar AB, 14"):
        # both are kept; the orbit stays linked to its own row by designation
        o_a = pd.Series(orbits["a_arcsec"].abs().to_numpy(float), index=okey.to_numpy())
        o_a = o_a.groupby(level=0).max()
        a_same = o_a.reindex(bkey.to_numpy()).to_numpy(float)
        other_pair = np.isfinite(a_same) & (bright_pairs["sep_last_arcsec"].to_numpy(float)
                                            > BRIGHT_OTHER_PAIR_RATIO * a_same)
        taken = bkey.isin(set(wkey.tolist())).to_numpy().copy()
        if len(extra):
            taken |= bkey.isin(set((extra["wds_id"] + "|" + component_key(extra["components"])).tolist())
                               ).to_numpy() & ~other_pair
        bright = bright_pairs[~taken].assign(has_orbit=False)
    else:
        bright = bright_pairs if bright_pairs is not None else w.iloc[:0]
    parts = [p for p in (w, extra, bright) if len(p)]
    pairs = pd.concat(parts, ignore_index=True) if parts else empty_table(PAIR_COLUMNS)
    pairs = pairs[[c.name for c in PAIR_COLUMNS]]
    pairs.attrs = {}
    orbits = orbits.reset_index(drop=True)
    orbits.attrs = {}
    return Catalog(pairs=pairs, orbits=orbits, source=source,
                   retrieved=retrieved or date.today().isoformat(), problems=list(problems or []))


# -- loading ------------------------------------------------------------------


def detect_kind(path) -> str:
    """'wds' or 'orb6' from the content of a text file (the first data lines)."""
    from planner.catalogs import _fixed as fx

    p, data = fx.read_bytes(path, "catalogue")
    head = [ln for ln in fx.split_lines(data[:200_000]) if ln.strip() and not ln.startswith(b"#")]
    arr_w = fx.to_array(head[:200], 130)
    arr_o = fx.to_array(head[:200], 264)
    n_w = int(fx.wds_id_ok(fx.col(arr_w, 1, 10)).sum())
    n_o = int(fx.wds_id_ok(fx.col(arr_o, 20, 29)).sum())
    if n_w == 0 and n_o == 0:
        raise InputError(f"{str(p)!r} is neither a WDS summary nor an ORB6 orbits text file "
                         "(no WDS id found in columns 1-10 or 20-29)")
    return "orb6" if n_o > n_w else "wds"


def _problems(df, file) -> list:
    return [(str(file), ln, why) for ln, why in df.attrs.get("problems", [])]


def _retrieved(path: Path) -> str:
    from datetime import datetime, timezone

    return datetime.fromtimestamp(path.stat().st_mtime, timezone.utc).date().isoformat()


def load_files(path, orbits=None, use_cache: bool = True) -> Catalog:
    """A catalogue from a WDS or ORB6 file (kind detected from the content),
    with an optional ORB6 file of orbits for a WDS file; the merged catalogue
    is cached (:mod:`planner.catalogs.cache`)."""
    from planner.catalogs.cache import cached_catalog

    path = _user_path(path)
    op = _user_path(orbits) if orbits is not None else None
    sources = [path] + ([op] if op is not None else [])
    return cached_catalog("files", sources, lambda: _parse_files(path, op, orbits), use_cache)


def _parse_files(path: Path, op: Path | None, orbits_text) -> Catalog:
    from planner.catalogs.orb6 import read_orb6
    from planner.catalogs.wds import read_wds

    kind = detect_kind(path)
    problems: list = []
    wds = orb = None
    if kind == "wds":
        wds = read_wds(path)
        problems += _problems(wds, path)
    else:
        orb = read_orb6(path)
        problems += _problems(orb, path)
    if op is not None:
        if detect_kind(op) != "orb6":
            raise InputError(f"{str(op)!r} is not an ORB6 orbits text file")
        more = read_orb6(op)
        problems += _problems(more, op)
        orb = more if orb is None else pd.concat([orb, more], ignore_index=True)
    source = f"{kind.upper()} file {path}" + (f" + ORB6 file {orbits_text}" if orbits_text else "")
    return merge(wds, orb, source=source, retrieved=_retrieved(path), problems=problems)


def load_catalog(spec: str = "sample", orbits=None) -> Catalog:
    """Load a catalogue: ``'sample'`` (bundled), ``'vizier'`` (the local
    snapshot of the CDS VizieR download; falls back to the sample, saying so
    on stderr), or the path of a WDS summary or ORB6 orbits file
    (``orbits``: an optional ORB6 file to go with a WDS file)."""
    spec = str(spec)
    if orbits is not None and spec in ("sample", "vizier"):
        raise InputError(f"an orbits file ({orbits}) goes with the path of a WDS summary file, "
                         f"not with the catalogue {spec!r}; give --catalog PATH too")
    if spec == "sample":
        from planner.catalogs.sample import load_sample

        return load_sample()
    if spec == "vizier":
        from planner.catalogs.vizier import load_snapshot_or_fallback

        return load_snapshot_or_fallback()
    p = _user_path(spec)
    if not p.exists():
        raise InputError(f"catalogue {spec!r} not found; use 'sample', 'vizier' or the path "
                         "of a WDS summary or ORB6 orbits file")
    return load_files(p, orbits=orbits)


# -- look-up ------------------------------------------------------------------

_WDS_ID = re.compile(r"^\d{5}[+-]\d{4}$")


def _norm(s) -> str:
    return re.sub(r"[\s,\-]", "", str(s)).upper()


def _norm_series(s: pd.Series) -> pd.Series:
    return s.astype(str).str.replace(r"[\s,\-]", "", regex=True).str.upper()


def _names(pairs: pd.DataFrame, catalog=None) -> tuple[pd.Series, pd.Series]:
    """Normalised designations (without and with components), computed once per
    pair table and kept on the catalogue object for later look-ups."""
    cached = getattr(catalog, "_name_keys", None) if catalog is not None else None
    if cached is not None and cached[0] is pairs:
        return cached[1], cached[2]
    disc = _norm_series(pairs["discoverer"])
    full = disc + _norm_series(pairs["components"])
    if catalog is not None:
        try:
            object.__setattr__(catalog, "_name_keys", (pairs, disc, full))
        except Exception:
            pass
    return disc, full


def _best_of(pairs: pd.DataFrame, idx) -> object:
    """Among several rows of one system: a pair with a usable orbit first
    (closest catalogued separation, then brightest), else the AB (or blank)
    pair, else the closest, else the first."""
    sub = pairs.loc[list(idx)]
    if len(sub) == 1:
        return sub.index[0]
    ab = component_key(sub["components"]) == "AB"
    sep = sub["sep_last_arcsec"].fillna(np.inf)
    mag = sub["mag1"].fillna(99) + sub["mag2"].fillna(99)
    order = pd.DataFrame({"orbit": ~sub["has_orbit"].astype(bool), "ab": ~ab, "sep": sep,
                          "mag": mag, "pos": np.arange(len(sub))}, index=sub.index)
    order = order.sort_values(["orbit", "ab", "sep", "mag", "pos"], kind="stable")
    return order.index[0]


def designation_matches(catalog: Catalog, query: str) -> list:
    """Row labels named by a WDS id (with optional components) or a discoverer
    designation (with or without blanks and components; or another ORB6 name
    such as ``alp Cen``): the whole system when no components are given,
    best pair first (see :func:`_best_of`); [] when nothing matches."""
    pairs = catalog.pairs
    q = str(query).strip()
    m = re.match(r"^(\d{5}[+-]\d{4})\s*([A-Za-z].*)?$", q)
    if m:
        sel = pairs.index[(pairs["wds_id"] == m.group(1)).to_numpy()]
        if m.group(2):
            ck = component_key(pd.Series([m.group(2)])).iloc[0]
            return [i for i, k in zip(sel, component_key(pairs.loc[sel, "components"])) if k == ck]
        return _best_first(pairs, sel)
    qn = _norm(q)
    disc, full = _names(pairs, catalog)
    hit = pairs.index[(full == qn).to_numpy()]
    if len(hit):
        return _best_first(pairs, hit)
    hit = pairs.index[(disc == qn).to_numpy()]
    if len(hit):
        return _best_first(pairs, hit)
    # "STF2272AB" where the components are spelt AB in the catalogue but blank in the
    # query's system, or the plain pair given as "...AB"
    if qn.endswith("AB"):
        hit = pairs.index[((disc == qn[:-2]) & (component_key(pairs["components"]) == "AB")).to_numpy()]
        if len(hit):
            return _best_first(pairs, hit)
    return []


def _best_first(pairs: pd.DataFrame, idx) -> list:
    idx = list(idx)
    if len(idx) < 2:
        return idx
    best = _best_of(pairs, idx)
    return [best] + [i for i in idx if i != best]


def find_pair(catalog: Catalog, query: str):
    """The index label of the pair named by ``query`` in ``catalog.pairs``.

    Accepts a WDS id (``18055+0230``), a discoverer designation with or
    without blanks and components (``STF2272AB``, ``STF 2272 AB``, ``stf2272``),
    another ORB6 name (``alp Cen``), or any star name of the offline name index
    (``Albireo``, ``eps Lyr``, ``70 Oph``, ``HD 165341``; see
    :func:`planner.catalogs.resolve.find_pairs`).  When a system has several
    pairs and no components are given: the pair with a usable orbit, then the
    AB pair, then the closest, then the brightest (see :func:`_best_of`); for a
    star name, the first of :func:`~planner.catalogs.resolve.find_pairs`.
    Unknown names raise :class:`planner.errors.UnknownPairError` with close
    matches, or say what a known star is when none of its pairs is loaded.
    """
    q = str(query).strip()
    if not q:
        raise InputError("empty pair name; give a name such as Albireo or 'eps Lyr', a WDS id "
                         "such as 18055+0230 or a designation such as STF2272AB")
    from planner.catalogs.resolve import find_pairs

    return find_pairs(catalog, q)[0]


def _suggest_pool(catalog: Catalog):
    """Normalised name -> shown label, and the WDS ids; built once per pair table."""
    pairs = catalog.pairs
    cached = getattr(catalog, "_suggest_keys", None)
    if cached is not None and cached[0] is pairs:
        return cached[1], cached[2]
    disc, full = _names(pairs, catalog)
    comp = pairs["components"].astype(str)
    labels = pairs["discoverer"].astype(str) + np.where(comp != "", " " + comp, "")
    cand = dict(zip(full.tolist()[::-1], labels.tolist()[::-1]))  # first occurrence wins
    for key, lab in zip(disc.tolist()[::-1], pairs["discoverer"].astype(str).tolist()[::-1]):
        cand.setdefault(key, lab)
    ids = pairs["wds_id"].astype(str).unique().tolist()
    try:
        object.__setattr__(catalog, "_suggest_keys", (pairs, cand, ids))
    except Exception:
        pass
    return cand, ids


def suggest(catalog: Catalog, query: str, n: int = 5) -> list[str]:
    """Close matches for ``query`` among WDS ids and designations (difflib).

    On a large catalogue only names that share the query's first two (else first)
    characters are compared, which keeps an unknown name quick to report."""
    cand, ids = _suggest_pool(catalog)
    q = str(query).strip()
    out = []
    if re.match(r"^\d", q):
        pool_ids = ids
        if len(ids) > 5000:
            pool_ids = [i for i in ids if i[:3] == q[:3]] or [i for i in ids if i[:2] == q[:2]]
        out += difflib.get_close_matches(q, pool_ids, n=n, cutoff=0.6)
    qn = _norm(q)
    pool = list(cand)
    if len(pool) > 5000:
        pool = [k for k in pool if k[:2] == qn[:2]] or [k for k in pool if k[:1] == qn[:1]][:20000]
    keys = difflib.get_close_matches(qn, pool, n=n, cutoff=0.6)
    out += [cand[k] for k in keys]
    seen, res = set(), []
    for s in out:
        if s not in seen:
            seen.add(s)
            res.append(s)
    return res[:n]


def note(message: str) -> None:
    """A one-line notice on stderr."""
    print(f"splitplan: {message}", file=sys.stderr)
