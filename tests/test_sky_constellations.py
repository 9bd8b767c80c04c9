"""Constellation names without astropy.coordinates, checked against astropy's get_constellation.

Reference: astropy.coordinates.get_constellation (Roman 1987 boundary table, B1875.0), the
general reference library named in the brief; the positions are random over the whole sky plus
points a few arcseconds either side of boundary corners, where a wrong frame would show.
"""

from __future__ import annotations

import subprocess
import sys

import numpy as np

from planner.sky.constellations import _table, constellation_abbreviations, constellation_names, constellation_of


def _astropy(ra, dec):
    from astropy.coordinates import SkyCoord, get_constellation

    return np.asarray(get_constellation(SkyCoord(ra=ra, dec=dec, unit="deg"), short_name=True), dtype=object)


def test_random_sky_agrees_with_astropy():
    rng = np.random.default_rng(11)
    ra = rng.uniform(0, 360, 20000)
    dec = np.degrees(np.arcsin(rng.uniform(-1, 1, 20000)))
    assert (constellation_of(ra, dec) == _astropy(ra, dec)).all()


def test_near_boundaries_agrees_with_astropy():
    # boundary rows are B1875 boxes; probe 2" inside/outside their lower corners, taken back
    # to J2000 by astropy (independent of our own frame chain)
    from astropy.coordinates import PrecessedGeocentric, SkyCoord

    t = _table()
    ral, decl = t["ral"], t["decl"]
    pts = []
    for d_ra in (-2 / 3600 / 15, 2 / 3600 / 15):
        for d_dec in (-2 / 3600, 2 / 3600):
            pts.append(np.stack([(ral + d_ra) % 24 * 15, np.clip(decl + d_dec, -89.99, 89.99)], axis=1))
    p = np.concatenate(pts)
    b1875 = SkyCoord(ra=p[:, 0], dec=p[:, 1], unit="deg", frame=PrecessedGeocentric(equinox="B1875"))
    icrs = b1875.icrs
    ra, dec = icrs.ra.deg, icrs.dec.deg
    assert (constellation_of(ra, dec) == _astropy(ra, dec)).all()


def test_names_and_known_stars():
    names = constellation_names()
    assert len(names) == 88 and names["Cyg"] == "Cygnus" and "uma" in constellation_abbreviations()
    # Albireo (beta Cyg) and 70 Oph (SIMBAD J2000 positions, from memory to 0.1 deg)
    assert list(constellation_of([292.68, 271.36], [27.96, 2.50])) == ["Cyg", "Oph"]
    assert constellation_of([], []).size == 0


def test_module_does_not_import_astropy_coordinates():
    code = ("import sys; from planner.sky.constellations import constellation_of; "
            "constellation_of([10.0], [20.0]); print('astropy.coordinates' in sys.modules)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout
    assert out.strip() == "False"
