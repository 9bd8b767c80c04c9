"""Atmospheric seeing: size of the blur at a given airmass and wavelength.

Convention: the observer's seeing figure is the long-exposure FWHM at 500 nm at
the zenith (ESO practice).  It grows as airmass^(3/5) and shrinks as
wavelength^(-1/5):

    FWHM(X, lambda) = FWHM_500,zenith * X^0.6 * (lambda / 500 nm)^-0.2

Sources: ESO astroclimatology pages (Paranal, La Silla); Fried, D. L. 1966,
JOSA 56, 1372 (r0); 0.98 lambda / r0 (Dierickx 1992; used in DIMM reductions);
long-exposure Kolmogorov transfer function exp(-3.44 (lambda f / r0)^(5/3))
(Fried 1966); outer-scale (von Karman) factor: Tokovinin, A. 2002, PASP 114,
1156, as used in the ESO exposure-time calculators.  Check values in
docs/methods.md section 3.
"""

from __future__ import annotations

import numpy as np

from planner.errors import InputError
from planner.units import ARCSEC_PER_RAD
from planner.units import wrap_public

#: FWHM of the long-exposure Kolmogorov PSF in units of lambda / r0 (Dierickx 1992)
FWHM_PER_LAMBDA_R0 = 0.98
#: reference wavelength of a seeing figure, nm (ESO convention)
SEEING_REF_NM = 500.0


def _nonneg(x, name, allowed):
    a = np.asarray(x, dtype=float)
    bad = ~(a >= 0)  # catches NaN too
    if np.any(bad & ~np.isnan(a)) or (name != "airmass" and np.any(np.isnan(a))):
        first = float(a[bad].flat[0]) if a.ndim else float(a)
        raise InputError(f"{name} = {first!r} is not allowed; use {allowed}")
    return a


def seeing_fwhm_arcsec(seeing_arcsec, airmass=1.0, wavelength_nm=550.0):
    """Long-exposure seeing FWHM [arcsec] at ``airmass`` and ``wavelength_nm``.

    ``seeing_arcsec`` is the FWHM at 500 nm at the zenith.  Scaling
    X^0.6 lambda^-0.2 (ESO; Fried 1966).  Check: 1.00" at X = 2, 550 nm gives
    1.00 x 0.9811 x 1.5157 = 1.487" (docs/methods.md section 3).
    """
    s = _nonneg(seeing_arcsec, "seeing_arcsec", "a seeing FWHM in arcsec, 0 or more (e.g. 2)")
    x = np.asarray(airmass, dtype=float)
    if np.any(x < 1.0):
        raise InputError(f"airmass = {float(x[x < 1.0].flat[0])!r} is not allowed; airmass is 1 or more")
    lam = np.asarray(wavelength_nm, dtype=float)
    return s * x**0.6 * (lam / SEEING_REF_NM) ** -0.2


def fried_r0_m(seeing_arcsec, wavelength_nm=500.0):
    """Fried parameter r0 [m] for a long-exposure FWHM [arcsec] at ``wavelength_nm``:
    r0 = 0.98 lambda / FWHM (Fried 1966; Dierickx 1992)."""
    return FWHM_PER_LAMBDA_R0 * np.asarray(wavelength_nm) * 1e-9 / (np.asarray(seeing_arcsec) / ARCSEC_PER_RAD)


def seeing_from_r0_arcsec(r0_m, wavelength_nm=500.0):
    """Long-exposure FWHM [arcsec] = 0.98 lambda / r0 (Fried 1966; Dierickx 1992)."""
    return FWHM_PER_LAMBDA_R0 * np.asarray(wavelength_nm) * 1e-9 / np.asarray(r0_m) * ARCSEC_PER_RAD


def von_karman_factor(aperture_m, outer_scale_m, r0_m):
    """Outer-scale correction to the seeing FWHM (Tokovinin 2002, as in the ESO ETC):
    sqrt(1 + F_K 2.183 (r0/L0)^0.356), F_K = 1/(1 + 300 D/L0) - 1.

    Not applied by default (the outer scale at amateur sites is unknown); offered
    for users who know theirs.
    """
    fk = 1.0 / (1.0 + 300.0 * np.asarray(aperture_m) / np.asarray(outer_scale_m)) - 1.0
    return np.sqrt(1.0 + fk * 2.183 * (np.asarray(r0_m) / np.asarray(outer_scale_m)) ** 0.356)


def total_fwhm_arcsec(seeing_fwhm, aperture_mm, wavelength_nm=550.0):
    """Quadrature sum of seeing and telescope FWHM (ESO ETC practice), with
    FWHM_tel = 1.029 lambda/D (AIRY_FWHM_LOD).  Check: D = 200 mm, 1.0" -> 1.158"."""
    from planner.optics.limits import AIRY_FWHM_LOD, lod_arcsec

    tel = AIRY_FWHM_LOD * lod_arcsec(aperture_mm, wavelength_nm)
    return np.hypot(np.asarray(seeing_fwhm, dtype=float), tel)


def kolmogorov_mtf(nu, fwhm_lod):
    """Long-exposure atmospheric transfer function at normalised frequency ``nu``
    (units of D/lambda) for a seeing FWHM of ``fwhm_lod`` lambda/D:
    exp(-3.44 (nu D / r0)^(5/3)) with D/r0 = fwhm_lod / 0.98 (Fried 1966)."""
    nu = np.asarray(nu, dtype=float)
    return np.exp(-3.44 * (nu * float(fwhm_lod) / FWHM_PER_LAMBDA_R0) ** (5.0 / 3.0))


# every public function above accepts astropy Quantity arguments (planner.units)
wrap_public(globals())
