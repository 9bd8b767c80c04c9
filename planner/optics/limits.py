"""Diffraction limits of a circular telescope aperture and its point-spread function.

Angles inside this module are either arcseconds (suffix ``_arcsec``) or
multiples of lambda/D (suffix ``_lod``: "lambda over D").  The Airy variable is
``v = pi * x`` with ``x`` in lambda/D.

Sources
-------
* Airy pattern, first zero of J1 at v = 3.8317 (1.21967 lambda/D): Airy, G. B. 1835,
  Trans. Cambridge Phil. Soc. 5, 283; Rayleigh criterion: Rayleigh 1879.
* Dawes limit 4.56"/D[inch] = 115.8"/D[mm]: Dawes, W. R. 1867, Mem. RAS 35, 137
  (empirical, equal moderately bright pairs).
* Sparrow limit (flat midpoint, zero second derivative): Sparrow, C. M. 1916, ApJ 44, 76.
* Annular (centrally obstructed) pupil: Born & Wolf, *Principles of Optics*, 8.5/8.8.
* Encircled energy 1 - J0^2 - J1^2: Rayleigh 1881.

All check values are in docs/methods.md section 1 and are
re-derived in ``tests/test_optics_limits.py``.
"""

from __future__ import annotations

import numpy as np

from planner.errors import InputError
from planner.units import ARCSEC_PER_RAD
from planner.units import wrap_public

#: first zero of J1 divided by pi: radius of the first dark ring in lambda/D
RAYLEIGH_LOD = 1.2196698912665045
#: Sparrow separation of two equal Airy patterns, lambda/D (root of the midpoint
#: second derivative, computed with scipy; docs/methods.md gives 0.9472)
SPARROW_LOD = 0.947155
#: Dawes' empirical constant, arcsec x mm (4.56"/inch x 25.4 mm/inch)
DAWES_ARCSEC_MM = 4.56 * 25.4
#: Airy full width at half maximum, lambda/D (docs/methods.md section 1: 1.0290)
AIRY_FWHM_LOD = 1.028993


def _arr(x, name: str, lo: float | None = None, hi: float | None = None, allowed: str = "") -> np.ndarray:
    a = np.asarray(x, dtype=float)
    bad = ~np.isfinite(a)
    if lo is not None:
        bad |= a < lo
    if hi is not None:
        bad |= a > hi
    if np.any(bad):
        first = float(a[bad].flat[0]) if a.ndim else float(a)
        raise InputError(f"{name} = {first!r} is not allowed; use {allowed}")
    return a


def _aperture(aperture_mm):
    return _arr(aperture_mm, "aperture_mm", 1.0, 1e5, "a clear aperture in millimetres (e.g. 100)")


def _wavelength(wavelength_nm):
    return _arr(wavelength_nm, "wavelength_nm", 200.0, 5000.0, "a wavelength between 200 and 5000 nm")


def lod_arcsec(aperture_mm, wavelength_nm=550.0):
    """lambda/D in arcseconds for ``aperture_mm`` at ``wavelength_nm``."""
    return _wavelength(wavelength_nm) * 1e-6 / _aperture(aperture_mm) * ARCSEC_PER_RAD


def rayleigh_limit_arcsec(aperture_mm, wavelength_nm=550.0):
    """Rayleigh limit 1.21967 lambda/D [arcsec]: the radius of the first dark ring.

    Source: Rayleigh (1879); Airy (1835) for the pattern.  138.4"/D[mm] at 550 nm.
    """
    return RAYLEIGH_LOD * lod_arcsec(aperture_mm, wavelength_nm)


def dawes_limit_arcsec(aperture_mm, wavelength_nm=None):
    """Dawes limit 115.8"/D[mm] [arcsec] (Dawes 1867, empirical, white light).

    ``wavelength_nm`` is accepted for a uniform signature and ignored: the
    figure is an observed one for visual white light.
    """
    return DAWES_ARCSEC_MM / _aperture(aperture_mm)


def sparrow_limit_arcsec(aperture_mm, wavelength_nm=550.0):
    """Sparrow limit 0.9472 lambda/D [arcsec] (Sparrow 1916): the summed profile
    of two equal Airy patterns is flat at the midpoint."""
    return SPARROW_LOD * lod_arcsec(aperture_mm, wavelength_nm)


#: Classical equal-pair limits by name.  Each takes ``(aperture_mm, wavelength_nm)``.
LIMIT_MODELS = {
    "dawes": dawes_limit_arcsec,
    "rayleigh": rayleigh_limit_arcsec,
    "sparrow": sparrow_limit_arcsec,
}


def check_criterion(criterion: str) -> str:
    key = str(criterion).strip().lower()
    if key not in LIMIT_MODELS:
        raise InputError(f"criterion {criterion!r} is unknown; choose one of {', '.join(LIMIT_MODELS)}")
    return key


def criterion_lod(criterion: str, wavelength_nm=550.0) -> float:
    """The classical limit of ``criterion`` expressed in lambda/D at ``wavelength_nm``.

    Dawes is an arcsecond figure independent of wavelength; in lambda/D it is
    1.021 at 550 nm (docs/methods.md section 1).
    """
    key = check_criterion(criterion)
    if key == "rayleigh":
        return RAYLEIGH_LOD
    if key == "sparrow":
        return SPARROW_LOD
    return float(dawes_limit_arcsec(100.0) / lod_arcsec(100.0, wavelength_nm))


def limit_arcsec(aperture_mm, wavelength_nm=550.0, model: str = "dawes"):
    """Classical equal-pair limit by name (``LIMIT_MODELS``: dawes, rayleigh, sparrow)."""
    return LIMIT_MODELS[check_criterion(model)](aperture_mm, wavelength_nm)


def airy_radius_um(focal_length_mm, aperture_mm, wavelength_nm=550.0):
    """Radius of the first dark ring in the focal plane, r0 = 1.22 lambda f / D [micrometres].

    Common practice (a fact of the trade): lambda = 0.5 um, f = 200 mm, D = 100 mm
    gives about 1.2 um.
    """
    f = _arr(focal_length_mm, "focal_length_mm", 1e-3, 1e6, "a positive focal length in millimetres")
    return RAYLEIGH_LOD * _wavelength(wavelength_nm) * 1e-3 * f / _aperture(aperture_mm)


# --------------------------------------------------------------------------
# point-spread function of a (centrally obstructed) circular aperture
# --------------------------------------------------------------------------

def _jinc(v):
    """2 J1(v) / v with the limit 1 at v = 0."""
    from scipy.special import j1

    v = np.asarray(v, dtype=float)
    out = np.ones_like(v)
    nz = np.abs(v) > 1e-8
    out[nz] = 2.0 * j1(v[nz]) / v[nz]
    return out


def airy_intensity(x_lod, obstruction=0.0):
    """Peak-normalised intensity of the (obstructed) Airy pattern at ``x_lod`` lambda/D.

    I/I0 = [2J1(v)/v - eps^2 2J1(eps v)/(eps v)]^2 / (1 - eps^2)^2,  v = pi x
    (Airy 1835; annular pupil: Born & Wolf 8.5).  Equal flux: multiply by
    ``1 - eps^2`` to compare with a clear aperture of the same diameter.
    """
    eps = float(obstruction)
    v = np.pi * np.abs(np.asarray(x_lod, dtype=float))
    amp = _jinc(v) - eps**2 * _jinc(eps * v)
    return amp**2 / (1.0 - eps**2) ** 2


def dark_ring_radii_lod(n: int = 3, obstruction=0.0) -> np.ndarray:
    """Radii (lambda/D) of the first ``n`` zeros of the (obstructed) Airy amplitude."""
    from scipy.optimize import brentq

    eps = float(obstruction)
    f = lambda x: float(_jinc(np.pi * x) - eps**2 * _jinc(eps * np.pi * x))  # noqa: E731
    xs = np.arange(0.3, n * 1.5 + 3, 0.01)
    vals = np.array([f(x) for x in xs])
    roots = []
    for i in np.nonzero(np.sign(vals[:-1]) != np.sign(vals[1:]))[0]:
        roots.append(brentq(f, xs[i], xs[i + 1], xtol=1e-12))
        if len(roots) == n:
            break
    return np.array(roots)


def bright_ring_maxima(n: int = 4, obstruction=0.0) -> tuple[np.ndarray, np.ndarray]:
    """Radii (lambda/D) and peak-normalised intensities of the first ``n`` bright rings."""
    from scipy.optimize import minimize_scalar

    zeros = dark_ring_radii_lod(n + 1, obstruction)
    radii, peaks = [], []
    for a, b in zip(zeros[:-1], zeros[1:]):
        res = minimize_scalar(lambda x: -airy_intensity(x, obstruction), bounds=(a, b),
                              method="bounded", options={"xatol": 1e-10})
        radii.append(res.x)
        peaks.append(-res.fun)
    return np.array(radii), np.array(peaks)


def encircled_energy(x_lod, obstruction=0.0):
    """Fraction of the total flux inside radius ``x_lod`` (lambda/D).

    Clear aperture: EE = 1 - J0(v)^2 - J1(v)^2 (Rayleigh 1881).  Obstructed:
    numerical integral of the PSF, whose total in v units is
    4 pi / (1 - eps^2) for the peak-normalised pattern.
    """
    from scipy.special import j0, j1

    eps = float(obstruction)
    x = np.asarray(x_lod, dtype=float)
    if eps == 0.0:
        v = np.pi * x
        return 1.0 - j0(v) ** 2 - j1(v) ** 2
    from scipy.integrate import quad

    total = 4.0 * np.pi / (1.0 - eps**2)

    def ee(xx):
        val, _ = quad(lambda v: airy_intensity(v / np.pi, eps) * 2 * np.pi * v, 0.0, np.pi * xx,
                      limit=400, epsabs=1e-11, epsrel=1e-10)
        return val / total

    return np.vectorize(ee)(x)


def airy_fwhm_lod(obstruction=0.0) -> float:
    """Full width at half maximum of the (obstructed) Airy core, lambda/D."""
    from scipy.optimize import brentq

    return 2.0 * brentq(lambda x: airy_intensity(x, obstruction) - 0.5, 0.1, 0.8, xtol=1e-12)


def pair_profile(x_lod, separation_lod, delta_mag=0.0, obstruction=0.0):
    """Intensity along the line through two Airy images (primary at 0, companion at
    ``separation_lod``), normalised to the primary's peak."""
    f = 10.0 ** (-0.4 * float(delta_mag))
    x = np.asarray(x_lod, dtype=float)
    return airy_intensity(x, obstruction) + f * airy_intensity(x - separation_lod, obstruction)


def midpoint_dip(separation_lod, obstruction=0.0, delta_mag=0.0) -> float:
    """Dip of the profile between two stars in perfect seeing: 1 - I(min) / I(fainter maximum).

    For an equal pair the minimum is at the midpoint and the maxima lie at or
    slightly inside the star positions; docs/methods.md section 1 gives
    26.5 % at the Rayleigh separation and 3.2 % at the Dawes separation.
    Returns 0 when the profile has no separate maximum for the companion.
    """
    s = float(separation_lod)
    x = np.linspace(-0.5, s + 0.5, 40001)
    prof = pair_profile(x, s, delta_mag, obstruction)
    half = s / 2
    left = np.where(x <= half, prof, -np.inf)
    right = np.where(x >= half, prof, -np.inf)
    i1, i2 = int(np.argmax(left)), int(np.argmax(right))
    # a maximum sitting on the midpoint (or the edge of the window) is not a separate peak
    if x[i1] >= half - 1e-9 or x[i2] <= half + 1e-9 or i2 == len(x) - 1:
        return 0.0
    lo = prof[i1:i2 + 1].min()
    top = min(prof[i1], prof[i2])
    return float(max(0.0, 1.0 - lo / top))


def sparrow_lod(obstruction=0.0) -> float:
    """Sparrow separation (lambda/D) of two equal obstructed Airy patterns."""
    from scipy.optimize import brentq

    def d2(s):
        h = 1e-4
        g = lambda x: pair_profile(x, s, 0.0, obstruction)  # noqa: E731
        return float(g(s / 2 + h) - 2 * g(s / 2) + g(s / 2 - h))

    return brentq(d2, 0.6, 1.2, xtol=1e-10)


# every public function above accepts astropy Quantity arguments (planner.units)
wrap_public(globals())
