"""Required separation for unequal pairs: the physical model and published rules.

All models are chosen by name from :data:`SEPARATION_MODELS` and return arcsec.

* ``physical`` -- this project's diffraction-plus-seeing model
  (:mod:`planner.optics.separability`).
* ``peterson1954`` -- Peterson, H. H. 1954, Sky & Telescope, Sept. 1954, p. 396
  (and Nov. 1980, p. 380), as cited by C. Lord: when the companion lies within
  2.4 mag of the telescope's limiting magnitude TLM = 9.1 + 5 log10 D[inch],
  the required separation is 10^((5/8)(m2 - TLM + 2.4)) times the equal-pair
  limit; otherwise the equal-pair limit.  Based on 323 doubles seen with a
  3-inch refractor at 45x.  Check: D = 3 in, m2 = 10, base 1.5" -> 5.6".
  Here the equal-pair limit is the physical model at dm = 0 with tonight's
  seeing (Peterson's "seeing or equal-pair limit").
* ``lord1994`` -- Lord, C. 1994, "A Report on the Analysis of the Telescopic
  Resolution of Unequal Binaries", Brayebrook Observatory, as transcribed in a
  secondary note: S = 1.033 x 10^((|dm| - 0.1)/n) x rho_base.  How Lord builds
  the performance index n from his aperture, obstruction and seeing classes is
  not documented in the material available to us, so **n must be given by the
  user** (``lord_n``); we do not guess it.  rho_base is taken as the selected
  classical limit (the stored excerpt does not define it either).  Stated
  validity: primary brighter than 9, secondary brighter than 13, 0 <= dm <= 7.

Treanor (1946) and the Napier-Munn logistic model are not implemented: their
coefficients were not available in a source we could check.
"""

from __future__ import annotations

import numpy as np

from planner.config.fields import APERTURE_MAX_MM, APERTURE_MIN_MM
from planner.errors import InputError
from planner.optics.limits import LIMIT_MODELS, check_criterion
from planner.optics.separability import (
    DEFAULT_CONTRAST,
    DEFAULT_STEADY_FRACTION,
    physical_separation_arcsec,
)
from planner.units import wrap_public

MM_PER_INCH = 25.4


def peterson_tlm(aperture_mm):
    """Telescope limiting magnitude of Peterson's rule, 9.1 + 5 log10 D[inch] (Peterson 1954)."""
    return 9.1 + 5.0 * np.log10(np.asarray(aperture_mm, dtype=float) / MM_PER_INCH)


def peterson_factor(mag2, aperture_mm):
    """Peterson's (1954) widening factor for a faint companion (>= 1)."""
    m2 = np.asarray(mag2, dtype=float)
    excess = m2 - peterson_tlm(aperture_mm) + 2.4
    return np.where(excess > 0, 10.0 ** (0.625 * np.maximum(excess, 0.0)), 1.0)


def lord_factor(delta_mag, n):
    """Lord's (1994) factor 1.033 x 10^((|dm| - 0.1)/n) for a user-given index n."""
    n = np.asarray(n, dtype=float)
    if np.any(~(n > 0)):
        raise InputError(f"lord_n = {float(n[~(n > 0)].flat[0]) if n.ndim else float(n)!r} is not allowed; give Lord's performance index n as a positive number")
    return 1.033 * 10.0 ** ((np.abs(np.asarray(delta_mag, dtype=float)) - 0.1) / n)


def _physical(aperture_mm, delta_mag, obstruction, seeing_arcsec, airmass, wavelength_nm, criterion,
              **kw):
    kw.pop("mag2", None)
    kw.pop("lord_n", None)
    return physical_separation_arcsec(aperture_mm, delta_mag, obstruction, seeing_arcsec, airmass,
                                      wavelength_nm, criterion, **kw)


def _peterson(aperture_mm, delta_mag, obstruction, seeing_arcsec, airmass, wavelength_nm, criterion,
              mag2=None, **kw):
    if mag2 is None:
        raise InputError("model 'peterson1954' needs the companion's magnitude (mag2)")
    kw.pop("lord_n", None)
    base = physical_separation_arcsec(aperture_mm, 0.0 * np.asarray(delta_mag, dtype=float), obstruction,
                                      seeing_arcsec, airmass, wavelength_nm, criterion, **kw)
    return base * peterson_factor(mag2, aperture_mm)


def _lord(aperture_mm, delta_mag, obstruction, seeing_arcsec, airmass, wavelength_nm, criterion,
          lord_n=None, **kw):
    if lord_n is None:
        raise InputError("model 'lord1994' needs lord_n, Lord's performance index n "
                         "(how Lord combines his class indices is not documented here)")
    base = LIMIT_MODELS[check_criterion(criterion)](aperture_mm, wavelength_nm)
    return base * lord_factor(delta_mag, lord_n) + 0.0 * np.asarray(airmass, dtype=float)


#: Required-separation models by name (see module docstring for sources).
SEPARATION_MODELS = {
    "physical": _physical,
    "peterson1954": _peterson,
    "lord1994": _lord,
}


def required_separation_arcsec(aperture_mm, delta_mag, obstruction=0.0, seeing_arcsec=0.0, airmass=1.0,
                               wavelength_nm=550.0, criterion="dawes", *, model="physical",
                               steady_fraction=DEFAULT_STEADY_FRACTION, contrast=DEFAULT_CONTRAST,
                               dispersion_arcsec=0.0, mag2=None, lord_n=None):
    """Smallest separation [arcsec] at which a pair of magnitude difference
    ``delta_mag`` shows as split, vectorised over arrays.

    Parameters
    ----------
    aperture_mm : clear aperture [mm]
    delta_mag : magnitude difference m2 - m1 [mag] (sign ignored)
    obstruction : central obstruction, diameter ratio [0, 1)
    seeing_arcsec : seeing FWHM at the zenith and 500 nm [arcsec]
    airmass : airmass of the pair (>= 1)
    wavelength_nm : observing wavelength [nm]; 550 for visual work
    criterion : equal-pair limit the model is calibrated to: 'dawes' (default),
        'rayleigh' or 'sparrow' (:data:`planner.optics.LIMIT_MODELS`)
    model : 'physical' (default), 'peterson1954' (needs ``mag2``) or
        'lord1994' (needs ``lord_n``); see :data:`SEPARATION_MODELS`
    steady_fraction : fraction k of the long-exposure seeing FWHM used for
        visual work (steady moments), default 0.6 -- an assumption, not fitted
    contrast : companion peak over the primary's rings/halo needed, default 2
    dispersion_arcsec : atmospheric dispersion spread added to the blur
    """
    key = str(model).strip().lower()
    if key not in SEPARATION_MODELS:
        raise InputError(f"model {model!r} is unknown; choose one of {', '.join(SEPARATION_MODELS)}")
    ap = np.asarray(aperture_mm, dtype=float)
    bad = ~((ap >= APERTURE_MIN_MM) & (ap <= APERTURE_MAX_MM))
    if np.any(bad):
        raise InputError(f"aperture_mm = {float(ap[bad].flat[0])!r} is not allowed; "
                         f"use a clear aperture between {APERTURE_MIN_MM:g} and {APERTURE_MAX_MM:g} mm")
    eps = np.asarray(obstruction, dtype=float)
    if np.any(~((eps >= 0) & (eps < 1))):
        raise InputError(f"obstruction = {float(eps[~((eps >= 0) & (eps < 1))].flat[0])!r} is not allowed; "
                         "use a diameter ratio from 0 up to (not including) 1")
    return SEPARATION_MODELS[key](ap, delta_mag, eps, seeing_arcsec, airmass, wavelength_nm, criterion,
                                  steady_fraction=steady_fraction, contrast=contrast,
                                  dispersion_arcsec=dispersion_arcsec, mag2=mag2, lord_n=lord_n)


# every public function above accepts astropy Quantity arguments (planner.units)
wrap_public(globals())
