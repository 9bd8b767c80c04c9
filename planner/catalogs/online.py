"""Optional online look-up of a name the offline index does not know: the CDS SIMBAD
name resolver, through astroquery's public API (``Simbad.query_objectids`` and
``Simbad.query_object``).

Never contacted unless asked (``splitplan catalog resolve NAME --online``,
``--online`` where a pair name is accepted), and only when the offline index has
no answer.  Answers (identifiers and J2000 position) are cached in the user cache
folder (``name_resolver.json``, written atomically), so a name is asked once.
The answer is joined to the loaded catalogue like an index star: its WDS
identifier, then its HD/HIP/HR/ADS/DM identifiers through the offline index and
the catalogue's numbers, then its position
(:data:`planner.catalogs.names.POSITION_TOLERANCE_ARCSEC`).

Acknowledgement: this uses the SIMBAD database, operated at CDS, Strasbourg, France.
"""

from __future__ import annotations

import json
import re
from datetime import datetime, timezone

import numpy as np

from planner.catalogs.constellations import fold
from planner.errors import CatalogError, NetworkError

CACHE_NAME = "name_resolver.json"
SERVICE = "CDS SIMBAD"


def cache_path():
    from planner.config.storage import user_dir

    return user_dir("cache") / CACHE_NAME


def _read_cache() -> dict:
    p = cache_path()
    if not p.exists():
        return {}
    try:
        data = json.loads(p.read_text(encoding="utf-8"))
        return data if isinstance(data, dict) else {}
    except (OSError, ValueError):
        from planner.config.storage import quarantine

        quarantine(p)
        return {}


def _write_cache(cache: dict) -> None:
    from planner.config.storage import atomic_write_text

    atomic_write_text(cache_path(), json.dumps(cache, indent=1, ensure_ascii=False))


def _column(table, *names):
    for n in names:
        if n in table.colnames:
            return table[n]
    return None


def ask_simbad(name: str) -> dict:
    """Identifiers and J2000 position of ``name`` from SIMBAD (no cache)."""
    try:
        from astroquery.simbad import Simbad

        ids = Simbad.query_objectids(name)
        obj = Simbad.query_object(name)
    except Exception as exc:  # connection refused, time-out, blocked socket, HTTP error
        raise NetworkError(f"cannot reach {SERVICE} for {name!r} ({type(exc).__name__}); "
                           "check the connection") from None
    if ids is None or len(ids) == 0 or obj is None or len(obj) == 0:
        return {"name": name, "found": False}
    col = _column(ids, "id", "ID")
    identifiers = [str(v).strip() for v in col] if col is not None else []
    ra_c, dec_c = _column(obj, "ra", "RA"), _column(obj, "dec", "DEC")
    ra = dec = None
    if ra_c is not None and dec_c is not None:
        try:
            ra, dec = float(ra_c[0]), float(dec_c[0])  # astroquery >= 0.4.8: degrees
        except (TypeError, ValueError):
            from astropy.coordinates import Angle

            ra = float(Angle(str(ra_c[0]), unit="hourangle").deg)
            dec = float(Angle(str(dec_c[0]), unit="deg").deg)
    main = _column(obj, "main_id", "MAIN_ID")
    return {"name": name, "found": True, "main_id": str(main[0]).strip() if main is not None else "",
            "identifiers": identifiers, "ra_deg": ra, "dec_deg": dec}


def resolve_online(name: str, refresh: bool = False) -> dict:
    """SIMBAD's answer for ``name`` (cached; ``refresh`` asks again)."""
    key = fold(name)
    if not key:
        raise CatalogError("empty name")
    cache = _read_cache()
    if key in cache and not refresh:
        return dict(cache[key], cached=True)
    ans = ask_simbad(name)
    ans["service"] = SERVICE
    ans["retrieved"] = datetime.now(timezone.utc).date().isoformat()
    cache[key] = ans
    _write_cache(cache)
    return dict(ans, cached=False)


_WDS_IDENT = re.compile(r"^WDS\s+J?(\d{5}[+-]\d{4})\s*([A-Za-z,\-]*)$")


def pairs_for_answer(catalog, ans: dict, limit_arcsec=None) -> list:
    """Row labels of the loaded catalogue's pairs for a SIMBAD answer: its WDS
    identifier, else its catalogue numbers, else its position."""
    from planner.catalogs.resolve import _keys, _sep_arcsec, find_pairs, order_labels
    from planner.catalogs import names as nm
    from planner.errors import UnknownPairError

    if not ans.get("found"):
        return []
    k = _keys(catalog)
    for ident in ans.get("identifiers", []):
        m = _WDS_IDENT.match(ident)
        if m and (k.wds == m.group(1)).any():
            return order_labels(catalog, list(k.labels[k.wds == m.group(1)]), limit_arcsec)
    for ident in ans.get("identifiers", []):
        if re.match(r"^(HD|HIP|HR|ADS|BD|CD|CPD)\s*[+\-]?\d", ident):
            try:
                return find_pairs(catalog, ident, limit_arcsec=limit_arcsec)
            except UnknownPairError:
                continue
    ra, dec = ans.get("ra_deg"), ans.get("dec_deg")
    if ra is None or dec is None:
        return []
    d = _sep_arcsec(ra, dec, k.ra, k.dec)
    tol = np.where(k.precise, nm.POSITION_TOLERANCE_ARCSEC, nm.COARSE_TOLERANCE_ARCSEC)
    hit = np.flatnonzero(d <= tol)
    if not len(hit):
        return []
    return order_labels(catalog, list(k.labels[np.isin(k.wds, np.unique(k.wds[hit]))]), limit_arcsec)
