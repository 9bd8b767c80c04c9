"""Per-pair verdict: can this telescope split this pair tonight, and why (or why not)?

:func:`judge` takes arrays (or pandas Series, whose index it keeps) with one
entry per pair, evaluated at the pair's best moment of the night (its
airmass then), and returns one row per pair:

=================  =========================================================
column             meaning
=================  =========================================================
limit_arcsec       separation needed tonight (:func:`planner.optics.required_separation_arcsec`)
margin             rho / limit_arcsec
chance             0-1, logistic in ln(margin) times a logistic in the
                   companion's magnitude margin -- **not fitted yet**
verdict            'split', 'challenge' or 'no' (categorical)
reason_code        short key, see :data:`REASONS` (categorical)
reason             the same in words (categorical)
companion_visible  fainter star brighter than mag_limit (NA when magnitudes are unknown)
mag_limit          faintest star visible (Schaefer 1990 by default), mag outside the atmosphere
power_min          lowest power that shows the split to the eye
power_max          highest useful power tonight
eyepiece_mm        eyepiece at hand giving the lowest power in [power_min, power_max] (NaN if none)
sep_px             separation in camera pixels (NaN without a camera)
airy_radius_px     radius of the first dark ring in pixels (NaN without a camera)
delta_mag          |mag2 - mag1| used (0 when unknown)
blur_arcsec        blur FWHM used: steady_fraction x seeing at the airmass, with dispersion
limit_best_arcsec  separation needed in perfect air at the zenith (the aperture's floor
                   for this dm); computed only where margin < 0.9, NaN elsewhere
=================  =========================================================

Thresholds (assumptions of this project, to be revisited with observers' logs):

* split: margin >= 1.10 and the fainter star at least 0.5 mag brighter than mag_limit;
* challenge: margin in [0.90, 1.10), or the fainter star within 0.5 mag of mag_limit;
* no: margin < 0.90, companion fainter than mag_limit, no separation, or not up.

Chance of success: P = 1 / (1 + exp(-(b0 + b1 ln margin))) x
1 / (1 + exp(-(mag_limit - m_faint) / s_m)) with b0 = 0, b1 = 14, s_m = 0.25 mag:
50 % at margin 1, about 80 % at margin 1.1 and 20 % at 0.9.  These numbers are
**not fitted**; they are placeholders to be calibrated from observers' logs
(:data:`CHANCE_PARAMS`).  A personal calibration fitted to an observation log
(:mod:`planner.plan.calibration`, ``splitplan log fit``) is passed as
``chance_params`` (or carried by the telescope, ``Telescope.chance_params``) with two more keys: ``limit_scale`` (the observer's 50 %
point in units of the model limit; the limit, and so the margin and the
verdict, are taken relative to it) and ``mag_offset`` (mag, shifts the
visibility curve).

Eyepiece advice (common practice, no source): the eye separates two points
about 2-4 arcmin apart at the eyepiece; we use 3' (180"), so
power_min = max(180" / rho, D / eye pupil).  The highest useful power is about
2x per mm of aperture, lowered when the blur, magnified, would exceed 10'
(600" / blur), and capped by the seeing: beyond the power at which the seeing
disc (its full FWHM at the pair's airmass, :func:`planner.optics.seeing.seeing_fwhm_arcsec`)
looks 5' across, more power only magnifies the boiling (common practice, no source;
about 150x in 2" seeing, 300x in 1"):
power_max = min(2 D[mm], 600" / blur, 300" / seeing(X)).
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from planner.errors import InputError
from planner.optics.limits import AIRY_FWHM_LOD, check_criterion, lod_arcsec
from planner.optics.rules import required_separation_arcsec
from planner.optics.separability import (
    DEFAULT_CONTRAST,
    DEFAULT_STEADY_FRACTION,
    effective_blur_lod,
)
from planner.optics.seeing import seeing_fwhm_arcsec
from planner.optics.telescope import Telescope
from planner.units import ARCSEC_PER_RAD
from planner.optics.visibility_limit import (
    DEFAULT_EXTINCTION_K,
    DEFAULT_EYE_PUPIL_MM,
    limiting_magnitude,
)
from planner.units import wrap_public

#: thresholds of the verdict classes (see module docstring)
MARGIN_SPLIT = 1.10
MARGIN_CHALLENGE = 0.90
MAG_CHALLENGE = 0.5
#: logistic parameters of the chance column -- NOT FITTED YET
CHANCE_PARAMS = {"b0": 0.0, "b1": 14.0, "mag_scale": 0.25}
#: eye resolution at the eyepiece, arcsec (common practice, no source: 2-4 arcmin)
EYE_RESOLUTION_ARCSEC = 180.0
#: highest useful power per mm of aperture (common practice, no source)
POWER_PER_MM = 2.0
#: largest apparent size of the blur worth magnifying, arcsec (assumption)
BLUR_APPARENT_MAX_ARCSEC = 600.0
#: largest apparent size of the seeing disc worth magnifying, arcsec (common practice, no source)
SEEING_APPARENT_MAX_ARCSEC = 300.0
#: magnitude difference from which a failure in perfect air is blamed on the rings
RING_DM = 2.5
#: Airmass from which a pair that would pass at the zenith is called "too low"
#: rather than "seeing-limited": 2.0, i.e. about 30 deg altitude, the usual
#: lower bound for careful close-double work (common practice, no source).
LOW_AIRMASS = 2.0

#: reason codes and their wording
REASONS = {
    "no-separation": "no separation known",
    "not-up": "not up in the dark tonight",
    "too-faint": "companion too faint for this aperture and sky",
    "in-first-ring": "companion lost in the primary's first diffraction ring",
    "in-rings": "companion lost in the primary's outer diffraction rings",
    "too-close": "too close for this aperture at any seeing",
    "too-low": "too low in the sky: airmass and dispersion blur it",
    "seeing-halo": "faint companion drowned in the seeing halo",
    "seeing": "seeing-limited tonight",
    "near-limit": "at the edge: needs steady moments",
    "faint-companion": "companion near the faintness limit",
    "clean": "should split cleanly",
}


def _values(x, unit: str | None = None):
    """Plain float array from a scalar, array, Series or astropy Quantity."""
    if hasattr(x, "unit") and hasattr(x, "to_value") and unit is not None:
        x = x.to_value(unit)
    if isinstance(x, pd.Series):
        return x.to_numpy(dtype=float, na_value=np.nan)
    return np.asarray(x, dtype=float)


def _chance(margin, mag_margin, params):
    with np.errstate(divide="ignore", over="ignore", invalid="ignore"):
        lm = np.log(np.where(margin > 0, margin, 1e-12))
        p_sep = 1.0 / (1.0 + np.exp(-(params["b0"] + params["b1"] * lm)))
        p_vis = 1.0 / (1.0 + np.exp(-(mag_margin - params.get("mag_offset", 0.0)) / params["mag_scale"]))
    return p_sep * np.where(np.isnan(mag_margin), 1.0, p_vis)


def judge(rho_arcsec, mag1, mag2, airmass, telescope, seeing_arcsec, sky_mag_arcsec2=21.0,
          criterion="dawes", wavelength_nm=None, *, model="physical",
          steady_fraction=DEFAULT_STEADY_FRACTION, contrast=DEFAULT_CONTRAST,
          extinction_k=DEFAULT_EXTINCTION_K, dispersion_arcsec=None, magnification=None,
          mag_model="schaefer1990", eye_pupil_mm=DEFAULT_EYE_PUPIL_MM,
          eye_resolution_arcsec=EYE_RESOLUTION_ARCSEC, power_per_mm=POWER_PER_MM,
          lord_n=None, chance_params=None) -> pd.DataFrame:
    """Judge every pair: limit, margin, chance, verdict and reason (vectorised).

    Parameters
    ----------
    rho_arcsec : separation tonight [arcsec]; NaN -> verdict 'no', 'no separation known'
    mag1, mag2 : magnitudes of the two stars (order does not matter; NaN = unknown)
    airmass : airmass at the pair's best time (NaN or inf: not up)
    telescope : :class:`planner.optics.Telescope` (or a bare aperture in mm)
    seeing_arcsec : seeing FWHM at the zenith, 500 nm [arcsec] (scalar or per pair)
    sky_mag_arcsec2 : sky brightness at the pair [mag/arcsec^2], moonlight and
        twilight included (scalar or per pair)
    criterion : equal-pair calibration, 'dawes' (default), 'rayleigh', 'sparrow'
    wavelength_nm : observing band; default the telescope's (550 nm)
    model : required-separation model ('physical', 'peterson1954', 'lord1994')
    dispersion_arcsec : atmospheric dispersion spread per pair (optional)
    magnification : power for the visibility test; None = best power in
        [power_min, power_max]
    mag_model : limiting-magnitude model (``MAG_LIMIT_MODELS``)

    Returns a DataFrame with the columns listed in the module docstring, indexed
    like the first pandas Series given (else 0..n-1).
    """
    if not isinstance(telescope, Telescope):
        telescope = Telescope(aperture_mm=telescope)
    criterion = check_criterion(criterion)
    lam = telescope.wavelength_nm if wavelength_nm is None else float(_values(wavelength_nm, "nm"))
    if chance_params is None:
        chance_params = {**CHANCE_PARAMS, **dict(telescope.chance_params)}
    params = dict(chance_params)
    index = None
    for x in (rho_arcsec, mag1, mag2, airmass, seeing_arcsec, sky_mag_arcsec2, dispersion_arcsec):
        if isinstance(x, pd.Series):
            index = x.index
            break
    rho, m1, m2, xm, see, sky = np.broadcast_arrays(
        _values(rho_arcsec, "arcsec"), _values(mag1), _values(mag2), _values(airmass),
        _values(seeing_arcsec, "arcsec"), _values(sky_mag_arcsec2))
    rho = np.atleast_1d(rho).astype(float)
    n = rho.size
    m1, m2, xm, see, sky = (np.atleast_1d(a).astype(float).ravel() for a in (m1, m2, xm, see, sky))
    rho = rho.ravel()
    if index is not None and len(index) != n:
        raise InputError(f"the inputs have different lengths ({len(index)} and {n}); give one value per pair")
    if index is None:
        index = pd.RangeIndex(n)
    disp = np.zeros(n) if dispersion_arcsec is None else np.broadcast_to(
        _values(dispersion_arcsec, "arcsec"), (n,)).astype(float)
    disp = np.nan_to_num(disp)
    if np.any(see[np.isfinite(see)] < 0) or np.any(np.isnan(see)):
        raise InputError("seeing_arcsec must be a FWHM in arcsec, 0 or more, for every pair")
    bad_x = np.isfinite(xm) & (xm < 1.0)
    if np.any(bad_x):
        raise InputError(f"airmass = {xm[bad_x][0]:g} is not allowed; airmass is 1 or more (NaN when not up)")

    ap = telescope.aperture_mm
    eps = telescope.obstruction
    up = np.isfinite(xm)
    xcalc = np.where(up, xm, 1.0)
    mags_known = np.isfinite(m1) & np.isfinite(m2)
    dm = np.where(mags_known, np.abs(m2 - m1), 0.0)
    m_faint = np.where(mags_known, np.maximum(m1, m2), np.where(np.isfinite(m2), m2, np.nan))

    common = dict(steady_fraction=steady_fraction, contrast=contrast, lord_n=lord_n)
    mag2_arg = m_faint if model == "peterson1954" else None
    limit = required_separation_arcsec(ap, dm, eps, see, xcalc, lam, criterion, model=model,
                                       dispersion_arcsec=disp, mag2=mag2_arg, **common)
    # a personal calibration (planner.plan.calibration) moves the limit to the observer's 50 % point
    scale = float(params.get("limit_scale", 1.0))
    limit = np.broadcast_to(limit, (n,)).astype(float) * scale
    with np.errstate(invalid="ignore", divide="ignore"):
        margin = rho / limit
    # the perfect-air and zenith limits only matter to explain a failure: compute them
    # for the failing pairs only (keeps the whole-catalogue call fast)
    limit_best = np.full(n, np.nan)
    limit_zenith = np.full(n, np.nan)
    need = ~(margin >= MARGIN_CHALLENGE)
    if need.any():
        m2n = None if mag2_arg is None else mag2_arg[need]
        limit_best[need] = scale * required_separation_arcsec(ap, dm[need], eps, 0.0, 1.0, lam, criterion,
                                                              model=model, mag2=m2n, **common)
        limit_zenith[need] = scale * required_separation_arcsec(ap, dm[need], eps, see[need], 1.0, lam,
                                                                criterion, model=model, mag2=m2n, **common)

    # -- magnification ------------------------------------------------------
    lod = float(lod_arcsec(ap, lam))
    blur = effective_blur_lod(ap, see, xcalc, lam, steady_fraction, disp) * lod
    blur_tot = np.hypot(blur, AIRY_FWHM_LOD * lod)
    power_max = np.minimum(power_per_mm * ap, BLUR_APPARENT_MAX_ARCSEC / blur_tot)
    seeing_x = seeing_fwhm_arcsec(see, xcalc, lam)
    with np.errstate(divide="ignore"):
        power_max = np.minimum(power_max, np.where(seeing_x > 0, SEEING_APPARENT_MAX_ARCSEC / seeing_x, np.inf))
    with np.errstate(divide="ignore", invalid="ignore"):
        power_min = np.maximum(eye_resolution_arcsec / rho, ap / eye_pupil_mm)
    power_min = np.where(rho > 0, power_min, np.nan)

    eyepiece = np.full(n, np.nan)
    if telescope.magnifications:
        powers = np.array(telescope.magnifications)
        fl = telescope.focal_length_mm / powers
        j = np.searchsorted(powers, np.nan_to_num(power_min, nan=np.inf) - 1e-9)
        ok = j < powers.size
        pj = powers[np.minimum(j, powers.size - 1)]
        ok &= pj <= power_max + 1e-9
        eyepiece = np.where(ok, fl[np.minimum(j, powers.size - 1)], np.nan)

    # -- is the companion visible? -------------------------------------------
    mag_kw = dict(extinction_k=extinction_k)
    if str(mag_model).strip().lower() == "schaefer1990":
        mag_kw.update(obstruction=eps, seeing_arcsec=blur, eye_pupil_mm=eye_pupil_mm)
    if magnification is not None:
        mag_limit = limiting_magnitude(ap, sky, magnification, xcalc, model=mag_model, **mag_kw)
    else:
        # best of three powers: the lowest that shows the split, the one where the
        # magnified blur reaches 15' (Schaefer's seeing-disc factor starts), the highest useful
        lo_p = np.minimum(np.nan_to_num(power_min, nan=ap / eye_pupil_mm), power_max)
        with np.errstate(divide="ignore"):
            knee = np.clip(450.0 / np.maximum(blur, 1e-9), lo_p, power_max)
        mag_limit = np.full(n, -np.inf)
        for cand in (lo_p, knee, power_max):
            mag_limit = np.maximum(mag_limit, limiting_magnitude(ap, sky, cand, xcalc, model=mag_model,
                                                                 **mag_kw))
    mag_limit = np.broadcast_to(mag_limit, (n,)).astype(float)
    mag_margin = mag_limit - m_faint           # NaN when the fainter magnitude is unknown
    visible = pd.array(np.where(np.isfinite(mag_margin), mag_margin >= 0, False), dtype="boolean")
    visible[~np.isfinite(mag_margin)] = pd.NA

    chance = _chance(margin, mag_margin, params)

    # -- verdict and reason (first matching rule wins) -------------------------
    has_rho = np.isfinite(rho)
    faint = np.isfinite(mag_margin) & (mag_margin < 0)
    near_faint = np.isfinite(mag_margin) & (mag_margin >= 0) & (mag_margin < MAG_CHALLENGE)
    fails_perfect = rho < limit_best
    first_ring_lod = 2.233  # second dark ring of the clear aperture, lambda/D (docs/methods.md section 1)
    ring_zone = rho < first_ring_lod * lod
    ok_at_zenith = rho >= MARGIN_CHALLENGE * limit_zenith
    conds = [
        ~has_rho,
        ~up,
        faint,
        (margin < MARGIN_CHALLENGE) & fails_perfect & (dm >= RING_DM) & ring_zone,
        (margin < MARGIN_CHALLENGE) & fails_perfect & (dm >= RING_DM),
        (margin < MARGIN_CHALLENGE) & fails_perfect,
        (margin < MARGIN_CHALLENGE) & ok_at_zenith & (xcalc >= LOW_AIRMASS),
        (margin < MARGIN_CHALLENGE) & (dm >= 3.0),
        margin < MARGIN_CHALLENGE,
        margin < MARGIN_SPLIT,
        near_faint,
    ]
    codes = ["no-separation", "not-up", "too-faint", "in-first-ring", "in-rings", "too-close",
             "too-low", "seeing-halo", "seeing", "near-limit", "faint-companion"]
    all_codes = codes + ["clean"]
    code_idx = np.select(conds, list(range(len(codes))), default=len(codes))
    verdict_idx = np.where(code_idx < 9, 0, np.where(code_idx < 11, 1, 2))
    reason_words = [REASONS[c] for c in all_codes]
    unknown = ~mags_known & has_rho
    reason_idx = np.where(unknown, code_idx + len(all_codes), code_idx)
    reason_words += [w + " (magnitudes unknown: judged as an equal pair)" for w in reason_words]
    chance = np.where(has_rho & up, chance, 0.0)

    # -- camera ----------------------------------------------------------------
    if telescope.has_camera:
        scale = telescope.pixel_um * 1e-3 / telescope.focal_length_mm * ARCSEC_PER_RAD
        sep_px = rho / scale
        airy_px = np.full(n, telescope.airy_radius_um() / telescope.pixel_um)
    else:
        sep_px = np.full(n, np.nan)
        airy_px = np.full(n, np.nan)

    return pd.DataFrame({
        "limit_arcsec": limit,
        "margin": margin,
        "chance": chance,
        "verdict": pd.Categorical.from_codes(verdict_idx, categories=["no", "challenge", "split"]),
        "reason_code": pd.Categorical.from_codes(code_idx, categories=all_codes),
        "reason": pd.Categorical.from_codes(reason_idx, categories=reason_words),
        "companion_visible": visible,
        "mag_limit": mag_limit,
        "power_min": power_min,
        "power_max": power_max,
        "eyepiece_mm": eyepiece,
        "sep_px": sep_px,
        "airy_radius_px": airy_px,
        "delta_mag": dm,
        "blur_arcsec": blur,
        "limit_best_arcsec": limit_best,
    }, index=index)


# every public function above accepts astropy Quantity arguments (planner.units)
wrap_public(globals())
