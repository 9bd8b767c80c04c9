"""Is the companion bright enough to be seen at all?

Models by name in :data:`MAG_LIMIT_MODELS`; all return the faintest star
[V mag, outside the atmosphere] the observer can see.

``schaefer1990`` -- Schaefer, B. E. 1990, PASP 102, 212 ("Telescopic limiting
magnitudes"), as laid out in docs/methods.md section 5.  The eye's threshold
illuminance follows Hecht's form I = C (1 + sqrt(K B))^2, B = background in
nanolamberts seen at the eyepiece; night branch (log10 B < 3.17): C = 10^-9.8,
K = 10^-1.9; day branch: C = 10^-8.35, K = 10^-5.9; m = -16.57 - 2.5 log10 I*.
The threshold is multiplied by correction factors:

* Fb = 1.41: one eye at the eyepiece, where the naked-eye law is for two eyes;
* Fe = 10^(0.4 q k X): extinction at airmass X, q = 1.2 at night (the eye's
  night-time band suffers more extinction than V);
* Ft = 1 / (transmission (1 - eps^2)): optics losses and the obstruction
  (the per-surface form t^n is folded into one ``transmission``);
* Fa = (De / D)^2: the aperture collects (D/De)^2 times the light of the eye
  pupil De (this gain is the heart of the model; its explicit form is from
  memory of the paper);
* Fp = (D / (M De))^2 when the exit pupil D/M exceeds the eye pupil;
* Fr = sqrt(2 theta M / 900) when the magnified seeing disc 2 theta M exceeds
  900" (15'), theta = seeing FWHM;
* Fc (colour) and Fs (experience): 1 by default, user-settable.

The sky seen at the eyepiece is B x transmission (1 - eps^2) x
min(1, (D/(M De))^2): magnification darkens the background once the exit
pupil is smaller than the eye's.  B[nL] = 34.08 x 10^(9 - 0.4 S) with S the sky
brightness in mag/arcsec^2 (moonlight and twilight included by the caller).
With every factor 1 the model gives the naked-eye limit
NELM = 7.93 - 5 log10(10^(4.316 - S/5) + 1) (derived, docs/methods.md section 5).

The simple aperture laws m = N + 5 log10 D[inch] ignore sky, power and
extinction; Schaefer (1990, eq. 1) calls them "correct to 1-2 mag".
"""

from __future__ import annotations

import numpy as np

from planner.errors import InputError
from planner.units import wrap_public

MM_PER_INCH = 25.4
DEFAULT_EXTINCTION_K = 0.2   # mag per airmass, V (Schaefer 1985 via Green 1992, ICQ 14, 55)
DEFAULT_EYE_PUPIL_MM = 7.0   # dark-adapted pupil, common practice, no source
DEFAULT_TRANSMISSION = 0.8   # whole optical train, common practice, no source


def sky_nanolambert(sky_mag_arcsec2):
    """Sky brightness in nanolamberts from mag/arcsec^2: 34.08 x 10^(9 - 0.4 S)
    (Schaefer 1990 via a secondary implementation; docs/methods.md section 5)."""
    s = np.asarray(sky_mag_arcsec2, dtype=float)
    return 34.08 * 10.0 ** (9.0 - 0.4 * s)


def threshold_illuminance(background_nl, branch="auto"):
    """Hecht/Schaefer threshold illuminance I = C (1 + sqrt(K B))^2 with the night
    branch below log10 B = 3.17 and the day branch above (Schaefer 1990).
    ``branch`` 'night' or 'day' forces one branch."""
    b = np.asarray(background_nl, dtype=float)
    if branch not in ("auto", "night", "day"):
        raise InputError(f"branch {branch!r} is unknown; choose auto, night or day")
    night = np.log10(np.maximum(b, 1e-30)) < 3.17
    if branch != "auto":
        night = np.full(b.shape, branch == "night")
    c = np.where(night, 10.0**-9.8, 10.0**-8.35)
    k = np.where(night, 10.0**-1.9, 10.0**-5.9)
    return c * (1.0 + np.sqrt(k * b)) ** 2


def _mag(illuminance):
    return -16.57 - 2.5 * np.log10(illuminance)


def naked_eye_limit(sky_mag_arcsec2, branch="auto"):
    """Naked-eye limit with every correction factor 1 (Schaefer 1990).
    Check (docs/methods.md section 5, night branch): S = 21.0 -> 6.12.  Skies brighter
    than about 18.4 mag/arcsec^2 (B > 10^3.17 nL) use the day branch unless
    ``branch='night'``."""
    return _mag(threshold_illuminance(sky_nanolambert(sky_mag_arcsec2), branch))


def schaefer1990(aperture_mm, sky_mag_arcsec2=21.0, magnification=None, airmass=1.0,
                 extinction_k=DEFAULT_EXTINCTION_K, obstruction=0.0, seeing_arcsec=0.0,
                 eye_pupil_mm=DEFAULT_EYE_PUPIL_MM, transmission=DEFAULT_TRANSMISSION,
                 binocular_factor=1.41, colour_factor=1.0, experience_factor=1.0, q=1.2):
    """Telescopic limiting magnitude (Schaefer, B. E. 1990, PASP 102, 212).

    ``magnification`` None means the power giving a 2 mm exit pupil
    (D / 2 mm), common practice for faint stars, no source.  Vectorised.
    """
    d = np.asarray(aperture_mm, dtype=float)
    de = float(eye_pupil_mm)
    m = d / 2.0 if magnification is None else np.asarray(magnification, dtype=float)
    eps = np.asarray(obstruction, dtype=float)
    exit_pupil = d / m
    b = sky_nanolambert(sky_mag_arcsec2)
    dark = np.minimum(1.0, (exit_pupil / de) ** 2)
    b_eye = b * transmission * (1.0 - eps**2) * dark
    i = threshold_illuminance(b_eye)
    fe = 10.0 ** (0.4 * q * extinction_k * np.asarray(airmass, dtype=float))
    ft = 1.0 / (transmission * (1.0 - eps**2))
    fa = (de / d) ** 2
    fp = np.where(exit_pupil > de, (exit_pupil / de) ** 2, 1.0)
    disc = 2.0 * np.asarray(seeing_arcsec, dtype=float) * m
    fr = np.where(disc > 900.0, np.sqrt(np.maximum(disc, 900.0) / 900.0), 1.0)
    factors = binocular_factor * fe * ft * fa * fp * fr * colour_factor * experience_factor
    return _mag(i * factors)


def _simple(n, source):
    def law(aperture_mm, *args, **kw):
        return n + 5.0 * np.log10(np.asarray(aperture_mm, dtype=float) / MM_PER_INCH)
    law.__doc__ = f"m_lim = {n} + 5 log10 D[inch] ({source}); aperture only."
    return law


def stevenson(aperture_mm, *args, **kw):
    """16 + 5 log10(D[mm] / 1000) (attributed to Stevenson; secondary source)."""
    return 16.0 + 5.0 * np.log10(np.asarray(aperture_mm, dtype=float) / 1000.0)


def great_soviet_encyclopedia(aperture_mm, sky_mag_arcsec2=21.0, magnification=None, *args, **kw):
    """5.5 + 2.5 log10 D[cm] + 2.5 log10 M (Great Soviet Encyclopedia)."""
    d = np.asarray(aperture_mm, dtype=float)
    m = d / 2.0 if magnification is None else np.asarray(magnification, dtype=float)
    return 5.5 + 2.5 * np.log10(d / 10.0) + 2.5 * np.log10(m)


#: Limiting-magnitude models by name.  The simple laws take only the aperture.
MAG_LIMIT_MODELS = {
    "schaefer1990": schaefer1990,
    "dimitroff-baker1945": _simple(8.8, "Dimitroff & Baker 1945, via Schaefer 1990 eq. 1"),
    "peterson1954": _simple(9.1, "Peterson 1954, Sky & Telescope"),
    "sidgwick1971": _simple(10.7, "Sidgwick 1971, via Schaefer 1990 eq. 1"),
    "stevenson": stevenson,
    "soviet-encyclopedia": great_soviet_encyclopedia,
}


def limiting_magnitude(aperture_mm, sky_mag_arcsec2=21.0, magnification=None, airmass=1.0,
                       model="schaefer1990", **kw):
    """Faintest visible star [mag outside the atmosphere] by ``model``
    (:data:`MAG_LIMIT_MODELS`).  Only ``schaefer1990`` uses sky, airmass and power;
    for the simple laws extinction k X is subtracted here so every model answers
    the same question."""
    key = str(model).strip().lower()
    if key not in MAG_LIMIT_MODELS:
        raise InputError(f"magnitude model {model!r} is unknown; choose one of {', '.join(MAG_LIMIT_MODELS)}")
    if key == "schaefer1990":
        return schaefer1990(aperture_mm, sky_mag_arcsec2, magnification, airmass, **kw)
    k = kw.get("extinction_k", DEFAULT_EXTINCTION_K)
    base = MAG_LIMIT_MODELS[key](aperture_mm, sky_mag_arcsec2, magnification)
    return base - k * (np.asarray(airmass, dtype=float) - 1.0)


# every public function above accepts astropy Quantity arguments (planner.units)
wrap_public(globals())
