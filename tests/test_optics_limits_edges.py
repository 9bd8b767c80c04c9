"""Documented ranges and the classical limits in lambda/D (planner/optics/limits.py).

Values written out from their definitions: Dawes 4.56"/inch (Dawes 1867), Rayleigh = first
zero of J1 / pi (scipy.special.jn_zeros), Sparrow 0.9472 lambda/D (methods-reference 1 [D]).
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.special import jn_zeros

from planner.errors import InputError
from planner.optics.limits import criterion_lod, dawes_limit_arcsec, rayleigh_limit_arcsec


@pytest.mark.parametrize("lam", [450.0, 550.0, 700.0])
def test_criterion_in_lambda_over_d(lam):
    lod_arcsec_1mm = lam * 1e-6 * 206264.806           # lambda/D in arcsec for D = 1 mm
    assert criterion_lod("rayleigh", lam) == pytest.approx(jn_zeros(1, 1)[0] / np.pi, rel=1e-6)
    assert criterion_lod("sparrow", lam) == pytest.approx(0.9472, abs=1e-4)
    # Dawes is fixed in arcsec, so in lambda/D it shrinks with wavelength: 1.021 at 550 nm
    assert criterion_lod("dawes", lam) == pytest.approx(4.56 * 25.4 / lod_arcsec_1mm, rel=1e-6)
    assert criterion_lod("dawes", 550.0) == pytest.approx(1.021, abs=5e-4)


def test_documented_ranges_include_their_ends():
    # apertures 1 mm to 100 m and wavelengths 200-5000 nm are allowed, ends included
    assert dawes_limit_arcsec(1e5) == pytest.approx(4.56 * 25.4 / 1e5)
    assert dawes_limit_arcsec(1.0) == pytest.approx(4.56 * 25.4)
    assert rayleigh_limit_arcsec(100, 200.0) > 0 and rayleigh_limit_arcsec(100, 5000.0) > 0
    with pytest.raises(InputError, match="aperture_mm = 100001.0 is not allowed"):
        dawes_limit_arcsec(1e5 + 1)
    with pytest.raises(InputError, match="aperture_mm = 0.5 is not allowed"):
        dawes_limit_arcsec(0.5)
    with pytest.raises(InputError, match="wavelength_nm = 5001.0 is not allowed"):
        rayleigh_limit_arcsec(100, 5001.0)


@pytest.mark.parametrize("x", [0.3, 0.5, 1.0, 1.6347, 2.0])
def test_encircled_energy_between_the_rings(x):
    # Rayleigh 1881: EE = 1 - J0(v)^2 - J1(v)^2, checked off the dark rings (where J1 = 0
    # hides the J1 term) against a numerical integral of the Airy pattern (2 J1(v)/v)^2,
    # whose total flux is 4 pi in v units (methods-reference 1)
    from scipy.integrate import quad
    from scipy.special import j1

    from planner.optics.limits import encircled_energy

    flux, _ = quad(lambda v: (2 * j1(v) / v) ** 2 * 2 * np.pi * v if v > 0 else 0.0,
                   0.0, np.pi * x, epsabs=1e-12, limit=200)
    assert float(encircled_energy(x)) == pytest.approx(flux / (4 * np.pi), abs=1e-9)


@pytest.mark.parametrize("dm", [0.0, 1.0, 2.5, 5.0])
def test_pair_profile_is_two_airy_patterns(dm):
    # I(x) = A(|x|) + 10^(-0.4 dm) A(|x - s|), A = (2 J1(pi x)/(pi x))^2 (Airy 1835)
    from scipy.special import j1

    from planner.optics.limits import pair_profile

    def airy(r):
        v = np.pi * np.abs(r)
        return (2 * j1(v) / v) ** 2

    x = np.array([-0.37, 0.41, 0.9, 1.73, 2.2])
    s = 1.3
    want = airy(x) + 10 ** (-0.4 * dm) * airy(x - s)
    np.testing.assert_allclose(pair_profile(x, s, dm), want, rtol=1e-9)
