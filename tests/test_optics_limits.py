"""Validation of the diffraction limits and the (obstructed) Airy pattern.

Reference values: docs/methods.md section 1.  Its tables are
[D] computations from the stated closed forms (Airy 1835; annular pupil, Born &
Wolf 8.5; encircled energy, Rayleigh 1881); here they are recomputed by our code
and compared to the printed digits.
"""

import numpy as np
import pytest
from scipy.special import jn_zeros

from planner.errors import InputError
from planner.optics import (
    LIMIT_MODELS,
    airy_radius_um,
    dawes_limit_arcsec,
    limit_arcsec,
    rayleigh_limit_arcsec,
    sparrow_limit_arcsec,
)
from planner.optics.limits import (
    airy_fwhm_lod,
    airy_intensity,
    bright_ring_maxima,
    dark_ring_radii_lod,
    encircled_energy,
    midpoint_dip,
    sparrow_lod,
)


def test_dark_ring_radii_are_zeros_of_j1():
    # docs/methods.md section 1 [D]: J1 zeros / pi = 1.21967, 2.23313, 3.23832 lambda/D;
    # independent oracle: scipy.special.jn_zeros
    got = dark_ring_radii_lod(3)
    np.testing.assert_allclose(got, [1.21967, 2.23313, 3.23832], atol=1e-5)
    np.testing.assert_allclose(got, jn_zeros(1, 3) / np.pi, rtol=1e-9)


def test_rayleigh_limit_in_arcsec():
    # docs/methods.md section 1 [D]: r1 = 138.4"/D[mm] at 550 nm; 1.384" at 100 mm, 0.692" at 200 mm
    assert rayleigh_limit_arcsec(1.0) == pytest.approx(138.4, abs=0.05)
    assert rayleigh_limit_arcsec(100) == pytest.approx(1.384, abs=5e-4)
    assert rayleigh_limit_arcsec(200) == pytest.approx(0.692, abs=5e-4)
    # proportional to wavelength (definition 1.22 lambda/D)
    assert rayleigh_limit_arcsec(100, 1100) == pytest.approx(2 * rayleigh_limit_arcsec(100, 550))


def test_dawes_limit():
    # Dawes 1867 via docs/methods.md section 1 [S]: 4.56"/inch = 115.8"/D[mm]; 1.158" at 100 mm
    assert dawes_limit_arcsec(100) == pytest.approx(1.158, abs=5e-4)
    assert dawes_limit_arcsec(25.4) == pytest.approx(4.56, abs=1e-9)


def test_sparrow_limit():
    # docs/methods.md section 1 [D]: Sparrow 0.9472 lambda/D, 1.074" at 100 mm, 550 nm;
    # recomputed here from its definition (zero second derivative at the midpoint)
    assert sparrow_lod(0.0) == pytest.approx(0.9472, abs=1e-4)
    # (0.9472 x 1.1345" = 1.0745"; the table truncates to 1.074, hence 1e-3)
    assert sparrow_limit_arcsec(100) == pytest.approx(1.074, abs=1e-3)


def test_limit_models_by_name():
    # every model in the dict answers by name with its published value for D = 150 mm,
    # 550 nm: Dawes 1867 4.56"/inch; Rayleigh 1.21967 lambda/D (first zero of J1 / pi,
    # scipy jn_zeros); Sparrow 1916 0.9472 lambda/D (methods-reference 1 [D])
    lod = 550e-6 / 150 * 206264.806
    published = {"dawes": 4.56 * 25.4 / 150, "rayleigh": jn_zeros(1, 1)[0] / np.pi * lod,
                 "sparrow": 0.9472 * lod}
    assert set(LIMIT_MODELS) == set(published)
    for name, want in published.items():
        assert limit_arcsec(150, 550, model=name) == pytest.approx(want, rel=1e-4), name
    with pytest.raises(InputError, match="criterion 'abbe' is unknown"):
        limit_arcsec(100, model="abbe")


def test_bright_rings():
    # docs/methods.md section 2 [D]: ring maxima 1.6347, 2.6793, 3.6987, 4.7097 lambda/D at
    # 0.01750, 0.00416, 0.00160, 0.00078 of the peak
    r, p = bright_ring_maxima(4)
    np.testing.assert_allclose(r, [1.6347, 2.6793, 3.6987, 4.7097], atol=1e-4)
    np.testing.assert_allclose(p, [0.01750, 0.00416, 0.00160, 0.00078], atol=6e-6)
    # first bright ring at 1.75 % of the peak (docs/methods.md section 1)
    assert p[0] == pytest.approx(0.0175, abs=5e-5)


def test_dips_at_rayleigh_and_dawes():
    # docs/methods.md section 1 [D]: midpoint at 0.7350 of the peak at the Rayleigh separation
    # (dip 26.5 %); dip 3.2 % at the Dawes separation (1.021 lambda/D at 550 nm)
    assert midpoint_dip(1.21967) == pytest.approx(0.265, abs=5e-4)
    assert midpoint_dip(dawes_limit_arcsec(100) / rayleigh_limit_arcsec(100) * 1.21967) == pytest.approx(0.032, abs=5e-4)
    # below Sparrow an equal pair shows no dip at all
    assert midpoint_dip(0.9) == 0.0


def test_airy_fwhm():
    # docs/methods.md section 1 [D]: Airy FWHM 1.0290 lambda/D
    assert airy_fwhm_lod() == pytest.approx(1.0290, abs=1e-4)


def test_encircled_energy_clear():
    # Rayleigh 1881 closed form via docs/methods.md section 1 [D]: 0.8378 / 0.9099 / 0.9376
    np.testing.assert_allclose(encircled_energy([1.21967, 2.23313, 3.23832]),
                               [0.8378, 0.9099, 0.9376], atol=1e-4)
    # the numerical path (used for eps > 0) agrees with the closed form at eps -> 0
    assert float(encircled_energy(1.21967, 1e-6)) == pytest.approx(0.8378, abs=1e-4)


# docs/methods.md section 1, table "Effect of central obstruction" [D]
OBSTRUCTION_TABLE = [
    # eps, 1st zero, 1st ring radius, ring I/I0, EE core, peak (equal flux), Rayleigh-sep dip, Sparrow
    (0.00, 1.2197, 1.6347, 0.0175, 0.838, 1.000, 0.265, 0.947),
    (0.20, 1.1665, 1.6302, 0.0304, 0.764, 0.960, 0.230, 0.933),
    (0.25, 1.1416, 1.6244, 0.0380, 0.726, 0.938, 0.215, 0.925),
    (0.33, 1.0977, 1.6070, 0.0540, 0.654, 0.891, 0.190, 0.909),
    (0.50, 1.0009, 1.5351, 0.0963, 0.479, 0.750, 0.146, 0.863),
]


@pytest.mark.parametrize("row", OBSTRUCTION_TABLE, ids=lambda r: f"eps={r[0]}")
def test_central_obstruction_table(row):
    eps, zero, ring_r, ring_i, ee, peak, dip, sparrow = row
    z = dark_ring_radii_lod(1, eps)[0]
    r, p = bright_ring_maxima(1, eps)
    # radii and ring intensity: the table prints 4 decimals, checked to 1e-4; the other
    # columns print 3 decimals, checked to half a unit of the last digit (5e-4)
    half = 5e-4 + 1e-12
    assert z == pytest.approx(zero, abs=1e-4)
    assert r[0] == pytest.approx(ring_r, abs=1e-4)
    assert p[0] == pytest.approx(ring_i, abs=1e-4)
    assert float(encircled_energy(z, eps)) == pytest.approx(ee, abs=half)
    # equal-flux peak relative to a clear aperture = 1 - eps^2
    assert float(airy_intensity(0.0, eps)) * (1 - eps**2) == pytest.approx(peak, abs=half)
    # "Rayleigh-sep dip": the dip with the stars at this pattern's own first zero
    assert midpoint_dip(z, eps) == pytest.approx(dip, abs=half)
    assert sparrow_lod(eps) == pytest.approx(sparrow, abs=half)


def test_airy_radius_focal_plane():
    # common practice (a fact of the trade): lambda = 0.5 um, f = 200 mm, D = 100 mm -> r0 ~ 1.2 um
    assert airy_radius_um(200, 100, 500) == pytest.approx(1.22, abs=0.01)


def test_bad_aperture_is_one_line_input_error():
    with pytest.raises(InputError, match=r"aperture_mm = -5\.0 is not allowed"):
        rayleigh_limit_arcsec(-5)
