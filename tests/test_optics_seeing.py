"""Validation of the seeing scalings and the Kolmogorov blur.

Reference: docs/methods.md section 3 (ESO astroclimatology practice; Fried 1966;
Tokovinin 2002 as used in the ESO ETC).  Its check values are [D] computations from
the stated formulas.
"""

import numpy as np
import pytest

from planner.errors import InputError
from planner.optics.seeing import (
    fried_r0_m,
    seeing_fwhm_arcsec,
    seeing_from_r0_arcsec,
    total_fwhm_arcsec,
    von_karman_factor,
)
from planner.optics.separability import star_profile


def test_wavelength_and_airmass_scaling():
    # docs/methods.md section 3 [D]: (550/500)^-0.2 = 0.9811, 2^0.6 = 1.5157, 1.00" -> 1.487"
    assert seeing_fwhm_arcsec(1.0, 1.0, 550) == pytest.approx(0.9811, abs=1e-4)
    assert seeing_fwhm_arcsec(1.0, 2.0, 500) == pytest.approx(1.5157, abs=1e-4)
    assert seeing_fwhm_arcsec(1.0, 2.0, 550) == pytest.approx(1.487, abs=1e-3)


def test_fried_parameter():
    # docs/methods.md section 3 [D]: r0 = 10 cm -> 1.01"; 5 cm -> 2.02"; 20 cm -> 0.51" (500 nm)
    np.testing.assert_allclose(seeing_from_r0_arcsec([0.10, 0.05, 0.20]), [1.01, 2.02, 0.51], atol=0.005)
    # r0 at 550 nm for 1.0" seeing (at 550 nm) -> 11.1 cm
    assert fried_r0_m(1.0, 550) == pytest.approx(0.111, abs=5e-4)


def test_quadrature_and_outer_scale():
    # docs/methods.md section 3 [D]: D = 200 mm, 550 nm: FWHM_tel 0.584"; with 1.0" seeing 1.158"
    assert total_fwhm_arcsec(0.0, 200) == pytest.approx(0.584, abs=1e-3)
    assert total_fwhm_arcsec(1.0, 200) == pytest.approx(1.158, abs=1e-3)
    # von Karman factor, D = 0.2 m, L0 = 46 m, r0 = 0.1 m -> 0.928
    assert von_karman_factor(0.2, 46.0, 0.1) == pytest.approx(0.928, abs=1e-3)


def test_kolmogorov_kernel_has_the_stated_fwhm():
    # Fried 1966 / Dierickx 1992: the long-exposure Kolmogorov PSF has FWHM 0.98 lambda/r0.
    # With a blur of 40 lambda/D the diffraction core adds sqrt(40^2 + 1.03^2) - 40 ~ 0.013.
    r = np.linspace(0, 100, 20001)
    prof = star_profile(r, 0.0, 40.0)
    fwhm = 2 * np.interp(0.5, prof[::-1], r[::-1])
    assert fwhm == pytest.approx(np.hypot(40.0, 1.03), rel=5e-3)


def test_bad_seeing_and_airmass():
    with pytest.raises(InputError, match="seeing_arcsec = -1.0 is not allowed"):
        seeing_fwhm_arcsec(-1.0)
    with pytest.raises(InputError, match="airmass = 0.5 is not allowed"):
        seeing_fwhm_arcsec(1.0, 0.5)
