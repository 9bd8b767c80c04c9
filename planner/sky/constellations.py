"""IAU constellation of a position, without importing ``astropy.coordinates``.

The 88 constellations' boundaries were drawn by Delporte (1930) along lines
of right ascension and declination of the equinox B1875.0; Roman (1987, PASP
99, 695; CDS catalogue VI/42) tabulated them as a list of (RA low, RA high,
Dec low, constellation) rows such that the first row, read top down, with
RA low < RA < RA high and Dec > Dec low names the constellation.  That table
ships with astropy (``astropy/coordinates/data/constellation_data_roman87.dat``,
with ``constellation_names.dat``); it is read here straight from astropy's
installed data folder, found without importing astropy.

The position is taken to the frame the table uses as astropy's
``get_constellation`` does: ICRS J2000 -> geocentric apparent place at
J2000.0 (aberration and light deflection, ERFA ``apcs13`` + ``atciqz``) ->
the mean equator and equinox of B1875.0 (Fukushima-Williams bias-precession,
IAU 2006, ERFA ``pfw06`` + ``fw2m``).  ``tests/test_sky_constellations.py``
checks the result against ``astropy.coordinates.get_constellation``.
"""

from __future__ import annotations

import importlib.util
import warnings
from functools import lru_cache
from pathlib import Path

import erfa
import numpy as np

from planner.errors import PlannerError

#: Julian date (TT) of the table's equinox B1875.0 and of the apparent place's epoch J2000.0
_B1875_JD = erfa.epb2jd(1875.0)
_J2000_JD = (2451545.0, 0.0)


def _data_dir() -> Path:
    spec = importlib.util.find_spec("astropy")
    if spec is None or not spec.submodule_search_locations:
        raise PlannerError("astropy is not installed; it provides the IAU constellation boundary table")
    return Path(list(spec.submodule_search_locations)[0]) / "coordinates" / "data"


@lru_cache(maxsize=1)
def _table() -> dict:
    """Roman (1987) rows as arrays: ``ral``, ``rau`` (RA low and high, h), ``decl`` (Dec low, deg), ``names``."""
    text = (_data_dir() / "constellation_data_roman87.dat").read_text("utf-8")
    rows = [ln.split() for ln in text.splitlines() if ln.strip() and not ln.startswith("#")]
    ral = np.array([float(r[0]) for r in rows])
    rau = np.array([float(r[1]) for r in rows])
    decl = np.array([float(r[2]) for r in rows])
    names = np.array([r[3] for r in rows], dtype=object)
    return {"ral": ral, "rau": rau, "decl": decl, "names": names}


@lru_cache(maxsize=1)
def constellation_names() -> dict:
    """Abbreviation -> full IAU name, e.g. ``{"Cyg": "Cygnus", ...}`` (88 entries)."""
    text = (_data_dir() / "constellation_names.dat").read_text("utf-8")
    return {ln[:3]: ln[4:].strip() for ln in text.splitlines() if ln.strip() and not ln.startswith("#")}


def constellation_abbreviations() -> set:
    """The 88 IAU abbreviations, lower case."""
    return {k.lower() for k in constellation_names()}


def b1875_place(ra_deg, dec_deg):
    """RA (h) and Dec (deg) of ICRS J2000 positions in the frame of the boundary table."""
    ra = np.radians(np.asarray(ra_deg, float))
    dec = np.radians(np.asarray(dec_deg, float))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", erfa.ErfaWarning)  # ERFA calls 1875 a "dubious year"
        astrom = erfa.apcs13(*_J2000_JD, np.zeros((), dtype=erfa.dt_pv))
        ri, di = erfa.atciqz(ra, dec, astrom)
        m = erfa.fw2m(*erfa.pfw06(*_B1875_JD))
    v = np.stack([np.cos(di) * np.cos(ri), np.cos(di) * np.sin(ri), np.sin(di)], axis=-1)
    p = v @ m.T
    ra_h = np.degrees(np.arctan2(p[..., 1], p[..., 0])) % 360.0 / 15.0
    dec_d = np.degrees(np.arctan2(p[..., 2], np.hypot(p[..., 0], p[..., 1])))
    return ra_h, dec_d


def constellation_of(ra_deg, dec_deg) -> np.ndarray:
    """IAU constellation abbreviation (object array) of each ICRS J2000 position (Roman 1987)."""
    ra = np.asarray(ra_deg, float).ravel()
    if ra.size == 0:
        return np.array([], dtype=object)
    rah, decd = b1875_place(ra, np.asarray(dec_deg, float).ravel())
    t = _table()
    ral, rau, decl, names = t["ral"], t["rau"], t["decl"], t["names"]
    # first row (top down) whose box holds the position; rows are few (357), positions many
    hit = (ral[None, :] < rah[:, None]) & (rah[:, None] < rau[None, :]) & (decd[:, None] > decl[None, :]) \
        if ra.size <= 20_000 else None
    if hit is None:
        idx = np.full(ra.size, -1)
        for i in range(len(ral)):
            todo = idx < 0
            if not todo.any():
                break
            m = todo & (ral[i] < rah) & (rah < rau[i]) & (decd > decl[i])
            idx[m] = i
    else:
        idx = np.where(hit.any(axis=1), hit.argmax(axis=1), -1)
    if (idx < 0).any():
        raise PlannerError("a position fell outside every constellation boundary row")
    return names[idx]
