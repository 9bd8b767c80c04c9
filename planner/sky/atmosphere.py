"""Airmass, refraction, atmospheric dispersion and sky brightness.

Every model here is a plain numpy function of angles in degrees; models the
field has several of are chosen by name from one dict per concept
(:data:`AIRMASS_MODELS`, :data:`REFRACTION_MODELS`).  Formulas and check values
are those of docs/methods.md, sections 4, 6 and 8.

Conventions
-----------
* ``alt_deg`` is an altitude above the horizon in degrees.  Airmass models
  take the *apparent* (refracted) altitude; Bennett (1982) refraction takes
  the apparent altitude, Saemundsson (1986) the true (geometric) altitude.
* Pressure in hPa, temperature in degrees Celsius.
* Below the horizon (altitude < 0) every airmass is NaN: the star is not
  observable and no model is meaningful there.
"""

from __future__ import annotations

import numpy as np

from planner.errors import InputError
from planner.units import ARCSEC_PER_RAD
from planner.units import wrap_public

__all__ = [
    "AIRMASS_MODELS",
    "REFRACTION_MODELS",
    "airmass",
    "refraction_arcmin",
    "apparent_from_true_deg",
    "true_from_apparent_deg",
    "pressure_from_elevation_hpa",
    "refractivity_filippenko1982",
    "dispersion_arcsec",
    "moon_sky_nl",
    "twilight_sky_mag",
    "nl_from_mag",
    "mag_from_nl",
]

#: Standard pressure and temperature the refraction formulas are written for
#: (Meeus 1991, Astronomical Algorithms, p. 103: 101.0 kPa and 10 degC).
P_REF_HPA = 1010.0
T_REF_C = 10.0


def _asarray(x) -> np.ndarray:
    return np.asarray(x, dtype=float)


# ---------------------------------------------------------------------------
# Airmass
# ---------------------------------------------------------------------------

def airmass_plane_parallel(alt_deg):
    """Plane-parallel airmass X = sec z (textbook, no source needed).

    Valid only well above the horizon (error 1 % at z = 60 deg, 12 % at
    z = 85 deg against the models below); infinite at the horizon, so NaN is
    returned for altitudes <= 0.
    """
    h = _asarray(alt_deg)
    with np.errstate(divide="ignore", invalid="ignore"):
        x = 1.0 / np.sin(np.radians(h))
    return np.where(h > 0, x, np.nan)


def airmass_hardie1962(alt_deg):
    """Hardie (1962) polynomial in sec z.

    Hardie, R. H. 1962, in *Astronomical Techniques* (ed. W. A. Hiltner),
    Univ. Chicago Press, p. 180:
    X = sec z - 0.0018167 (sec z - 1) - 0.002875 (sec z - 1)^2
    - 0.0008083 (sec z - 1)^3, z the apparent zenith distance.  Better than
    0.1 % to X = 6.8; diverges near the horizon, so z is clamped at 1.52 rad
    (87.1 deg) as SLALIB's ``sla_AIRMAS`` does.  NaN below the horizon.
    """
    h = _asarray(alt_deg)
    z = np.minimum(np.radians(90.0 - h), 1.52)
    s = 1.0 / np.cos(z) - 1.0
    x = 1.0 + s - 0.0018167 * s - 0.002875 * s**2 - 0.0008083 * s**3
    return np.where(h >= 0, x, np.nan)


def airmass_kastenyoung1989(alt_deg):
    """Kasten & Young (1989): X = 1 / [cos z + 0.50572 (96.07995 - z)^-1.6364].

    Kasten, F. & Young, A. T. 1989, Applied Optics 28(22), 4735-4738; z the
    apparent zenith angle in degrees.  Finite at the horizon (X = 37.9).
    """
    h = _asarray(alt_deg)
    z = 90.0 - h
    with np.errstate(invalid="ignore"):
        x = 1.0 / (np.cos(np.radians(z)) + 0.50572 * (96.07995 - z) ** -1.6364)
    return np.where(h >= 0, x, np.nan)


def airmass_pickering2002(alt_deg):
    """Pickering (2002): X = 1 / sin(h + 244 / (165 + 47 h^1.1)).

    Pickering, K. A. 2002, DIO 12(1), 20-39; h the apparent altitude in
    degrees.  Finite at the horizon (X = 38.75).  The project's default.
    """
    h = _asarray(alt_deg)
    hc = np.maximum(h, 0.0)
    x = 1.0 / np.sin(np.radians(hc + 244.0 / (165.0 + 47.0 * hc**1.1)))
    return np.where(h >= 0, x, np.nan)


#: Airmass models by name.  Each takes the apparent altitude in degrees.
AIRMASS_MODELS = {
    "plane-parallel": airmass_plane_parallel,
    "hardie1962": airmass_hardie1962,
    "kastenyoung1989": airmass_kastenyoung1989,
    "pickering2002": airmass_pickering2002,
}


def _pick(models: dict, model: str, what: str):
    try:
        return models[model]
    except (KeyError, TypeError):
        raise InputError(
            f"unknown {what} model {model!r}; choose one of: {', '.join(models)}"
        ) from None


def airmass(alt_deg, model: str = "pickering2002"):
    """Relative airmass at apparent altitude ``alt_deg`` (degrees), by model name.

    ``model`` is a key of :data:`AIRMASS_MODELS`: ``"plane-parallel"``,
    ``"hardie1962"`` (Hardie 1962), ``"kastenyoung1989"`` (Kasten & Young
    1989) or ``"pickering2002"`` (Pickering 2002, default).  NaN below the
    horizon.
    """
    return _pick(AIRMASS_MODELS, model, "airmass")(alt_deg)


# ---------------------------------------------------------------------------
# Refraction
# ---------------------------------------------------------------------------

def _pt_factor(pressure_hpa, temperature_c):
    """(P / 1010 hPa) (283 / (273 + T)): Meeus 1991, Astronomical Algorithms, p. 103."""
    return (_asarray(pressure_hpa) / P_REF_HPA) * (283.0 / (273.0 + _asarray(temperature_c)))


def refraction_bennett1982(alt_deg, pressure_hpa=P_REF_HPA, temperature_c=T_REF_C):
    """Bennett (1982): R['] = cot(h_a + 7.31 / (h_a + 4.4)), h_a the APPARENT altitude.

    Bennett, G. G. 1982, J. Navigation 35(2), 255-259; accurate to 0.07'
    over 0-90 deg (Meeus 1991, p. 102).  Scaled by (P/1010)(283/(273+T)).
    Altitudes below -1 deg are evaluated at -1 deg (the formula's pole is at
    -4.4 deg); the result is clamped at >= 0 (the formula gives -0.001' at
    the zenith).
    """
    h = np.clip(_asarray(alt_deg), -1.0, 90.0)
    r = 1.0 / np.tan(np.radians(h + 7.31 / (h + 4.4)))
    return np.maximum(r, 0.0) * _pt_factor(pressure_hpa, temperature_c)


def refraction_saemundsson1986(alt_deg, pressure_hpa=P_REF_HPA, temperature_c=T_REF_C):
    """Saemundsson (1986): R['] = 1.02 cot(h + 10.3 / (h + 5.11)), h the TRUE altitude.

    Saemundsson, T. 1986, Sky & Telescope 72, 70; agrees with Bennett to 0.1'
    (Meeus 1991, p. 103).  Scaled by (P/1010)(283/(273+T)); altitudes below
    -1 deg are evaluated at -1 deg; clamped at >= 0.
    """
    h = np.clip(_asarray(alt_deg), -1.0, 90.0)
    r = 1.02 / np.tan(np.radians(h + 10.3 / (h + 5.11)))
    return np.maximum(r, 0.0) * _pt_factor(pressure_hpa, temperature_c)


#: Refraction models by name.  ``bennett1982`` takes the apparent altitude,
#: ``saemundsson1986`` the true (geometric) altitude.
REFRACTION_MODELS = {
    "bennett1982": refraction_bennett1982,
    "saemundsson1986": refraction_saemundsson1986,
}


def refraction_arcmin(alt_deg, model: str = "saemundsson1986",
                      pressure_hpa=P_REF_HPA, temperature_c=T_REF_C):
    """Atmospheric refraction in arcminutes, by model name.

    ``model="saemundsson1986"`` (default; input = true altitude, what the
    sky engine computes) or ``"bennett1982"`` (input = apparent altitude).
    ``pressure_hpa=0`` gives zero refraction (no atmosphere).
    """
    return _pick(REFRACTION_MODELS, model, "refraction")(alt_deg, pressure_hpa, temperature_c)


def apparent_from_true_deg(alt_true_deg, pressure_hpa=P_REF_HPA, temperature_c=T_REF_C):
    """Apparent altitude = true altitude + Saemundsson (1986) refraction."""
    return _asarray(alt_true_deg) + refraction_saemundsson1986(
        alt_true_deg, pressure_hpa, temperature_c) / 60.0


def true_from_apparent_deg(alt_app_deg, pressure_hpa=P_REF_HPA, temperature_c=T_REF_C):
    """True altitude = apparent altitude - Bennett (1982) refraction."""
    return _asarray(alt_app_deg) - refraction_bennett1982(
        alt_app_deg, pressure_hpa, temperature_c) / 60.0


def pressure_from_elevation_hpa(elevation_m):
    """Standard-atmosphere pressure at an elevation: P = 1013.25 (1 - 2.25577e-5 h)^5.25588 hPa.

    The tropospheric barometric formula of the International Standard
    Atmosphere (ISO 2533:1975; U.S. Standard Atmosphere 1976); pvlib's
    ``alt2pres`` writes the same law with rounded constants (agreement
    1e-5).  Valid to 11 km.
    """
    h = _asarray(elevation_m)
    return 1013.25 * (1.0 - 2.25577e-5 * h) ** 5.25588


# ---------------------------------------------------------------------------
# Dispersion
# ---------------------------------------------------------------------------

MMHG_PER_HPA = 760.0 / 1013.25


def refractivity_filippenko1982(wavelength_nm, pressure_hpa=1013.25, temperature_c=15.0,
                                water_vapour_hpa=0.0):
    """Refractivity n - 1 of air (Filippenko 1982, PASP 94, 715, eqs. 1-3).

    (n-1) 10^6 = 64.328 + 29498.1 / (146 - s^2) + 255.4 / (41 - s^2) at 15 C,
    760 mmHg (s = 1/lambda in 1/um); scaled to P, T by
    P [1 + (1.049 - 0.0157 T) 10^-6 P] / [720.883 (1 + 0.003661 T)] (P in
    mmHg); water vapour of partial pressure f (mmHg) subtracts
    (0.0624 - 0.000680 s^2) / (1 + 0.003661 T) f 10^-6.
    """
    lam_um = _asarray(wavelength_nm) / 1000.0
    s2 = (1.0 / lam_um) ** 2
    n15 = 64.328 + 29498.1 / (146.0 - s2) + 255.4 / (41.0 - s2)
    p = _asarray(pressure_hpa) * MMHG_PER_HPA
    t = _asarray(temperature_c)
    n = n15 * p * (1.0 + (1.049 - 0.0157 * t) * 1e-6 * p) / (720.883 * (1.0 + 0.003661 * t))
    f = _asarray(water_vapour_hpa) * MMHG_PER_HPA
    n = n - (0.0624 - 0.000680 * s2) / (1.0 + 0.003661 * t) * f
    return n * 1e-6


#: Default band for the visual smear: 450-650 nm, the bulk of the eye's
#: photopic response (common practice, no source).  A narrower 500-600 nm band
#: roughly halves the figures.
VISUAL_BAND_NM = (450.0, 650.0)


def dispersion_arcsec(alt_deg, band_nm=VISUAL_BAND_NM, pressure_hpa=1013.25,
                      temperature_c=10.0, water_vapour_hpa=0.0):
    """Length of the spectrum of a star across ``band_nm`` (arcsec) at apparent altitude.

    Filippenko (1982, PASP 94, 715): Delta R = 206265 [n(l1) - n(l2)] tan z.
    Below 15 deg altitude tan z over-states refraction, so there the Bennett
    (1982) refraction is scaled by (n1 - n2) / (n(550 nm) - 1) instead
    (docs/methods.md section 8).  Blue is displaced toward the zenith.  NaN
    below the horizon.
    """
    h = _asarray(alt_deg)
    lo, hi = band_nm
    n1 = refractivity_filippenko1982(lo, pressure_hpa, temperature_c, water_vapour_hpa)
    n2 = refractivity_filippenko1982(hi, pressure_hpa, temperature_c, water_vapour_hpa)
    dn = n1 - n2
    with np.errstate(divide="ignore", invalid="ignore"):
        tanz = 1.0 / np.tan(np.radians(np.maximum(h, 1e-6)))
        high = ARCSEC_PER_RAD * dn * tanz
        nref = refractivity_filippenko1982(550.0, pressure_hpa, temperature_c, water_vapour_hpa)
        low = refraction_bennett1982(h, pressure_hpa, temperature_c) * 60.0 * dn / nref
    out = np.where(h >= 15.0, high, low)
    return np.where(h >= 0, out, np.nan)


# ---------------------------------------------------------------------------
# Sky brightness
# ---------------------------------------------------------------------------

def nl_from_mag(mag_arcsec2):
    """Surface brightness in nanolamberts: B = 34.08 exp(20.7233 - 0.92104 S).

    Conversion used with Schaefer (1990) and Krisciunas & Schaefer (1991);
    equivalently 34.08 x 10^(9 - 0.4 S) (docs/methods.md section 5).
    """
    return 34.08 * np.exp(20.7233 - 0.92104 * _asarray(mag_arcsec2))


def mag_from_nl(b_nl):
    """Inverse of :func:`nl_from_mag` (mag/arcsec^2)."""
    return (20.7233 - np.log(_asarray(b_nl) / 34.08)) / 0.92104


def _ks_airmass(z_deg):
    """Krisciunas & Schaefer (1991) eq. 3: X(Z) = (1 - 0.96 sin^2 Z)^-1/2."""
    return (1.0 - 0.96 * np.sin(np.radians(_asarray(z_deg))) ** 2) ** -0.5


def moon_sky_nl(sep_deg, moon_alt_deg, target_alt_deg, phase_angle_deg, k=0.2):
    """Moonlit sky brightness at a target, nanolamberts (Krisciunas & Schaefer 1991).

    Krisciunas, K. & Schaefer, B. E. 1991, PASP 103, 1033 (accuracy 8-23 %):
    I* = 10^(-0.4 (3.84 + 0.026 |a| + 4e-9 a^4)) (a = phase angle, 0 = full);
    f(rho) = 10^5.36 (1.06 + cos^2 rho) + 10^(6.15 - rho/40);
    B = f(rho) I* 10^(-0.4 k X(Z_moon)) [1 - 10^(-0.4 k X(Z_target))],
    with X(Z) = (1 - 0.96 sin^2 Z)^-1/2.  Zero when the Moon is below the
    horizon; the target's zenith distance is limited to 90 deg.  ``k`` is
    the V-band extinction coefficient (mag/airmass).
    """
    a = np.abs(_asarray(phase_angle_deg))
    istar = 10.0 ** (-0.4 * (3.84 + 0.026 * a + 4e-9 * a**4))
    rho = np.radians(_asarray(sep_deg))
    f = 10.0**5.36 * (1.06 + np.cos(rho) ** 2) + 10.0 ** (6.15 - np.degrees(rho) / 40.0)
    zm = 90.0 - np.clip(_asarray(moon_alt_deg), 0.0, 90.0)
    zt = 90.0 - np.clip(_asarray(target_alt_deg), 0.0, 90.0)
    b = f * istar * 10.0 ** (-0.4 * k * _ks_airmass(zm)) * (1.0 - 10.0 ** (-0.4 * k * _ks_airmass(zt)))
    return np.where(_asarray(moon_alt_deg) > 0, b, 0.0)


#: Patat, Ugolnikov & Postylyakov 2006, A&A 455, 385, Table 4, V band: zenith twilight
#: sky m = a0 + a1 (zeta - 95) + a2 (zeta - 95)^2 mag/arcsec^2, zeta = Sun's zenith
#: distance in degrees, fitted over 95-105 deg at ESO-Paranal (night sky included).
TWILIGHT_V_FIT = (11.84, 1.518, -0.057)


def twilight_sky_mag(sun_alt_deg):
    """Zenith twilight sky brightness (V mag/arcsec^2) added by the Sun, from its altitude.

    Patat, Ugolnikov & Postylyakov (2006, A&A 455, 385) measured the zenith twilight
    sky at ESO-Paranal and fitted m = 11.84 + 1.518 d - 0.057 d^2 (V band, d = zeta - 95,
    zeta = Sun's zenith distance, 95-105 deg): 13.30 with the Sun 6 deg down, 19.67 at
    12 deg.  Their fit includes the night sky and levels off at its maximum (21.95, Sun
    18.3 deg down); the term returned here is the *excess* over that level, the
    scattered sunlight alone, so that the caller can add it to its own night sky: it
    fades to nothing (returns inf) at 18.3 deg, the end of astronomical twilight.  Above
    5 deg down the fit's slope at 95 deg is continued (the planner never observes
    there).  Paranal (2600 m) is about 30 % darker in twilight than a low site (same
    paper), so the term is a little optimistic for sea-level sites.
    """
    a0, a1, a2 = TWILIGHT_V_FIT
    zeta = 90.0 - _asarray(sun_alt_deg)
    d_top = -a1 / (2.0 * a2)                        # the fit's maximum (night level)
    d = np.minimum(zeta - 95.0, d_top)
    m = np.where(d >= 0.0, a0 + a1 * d + a2 * d * d, a0 + a1 * d)
    m_night = a0 + a1 * d_top + a2 * d_top * d_top
    with np.errstate(divide="ignore", invalid="ignore"):
        excess = 10.0 ** (-0.4 * m) - 10.0 ** (-0.4 * m_night)
        return np.where(excess > 0.0, -2.5 * np.log10(np.where(excess > 0, excess, 1.0)),
                        np.inf)


# every public function above accepts astropy Quantity arguments (planner.units)
wrap_public(globals())
