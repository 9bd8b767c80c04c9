"""Sky engine: site, night, twilight, Moon, visibility, airmass, refraction, dispersion.

Light on purpose: nothing heavy is imported until a name is used (module
``__getattr__``), so the command line starts fast.

Public names:

* :class:`Site`, :class:`Horizon` -- observing site (``planner.sky.site``);
* :func:`night_for`, :class:`Night` -- Sun, twilight, dark window, Moon
  (``planner.sky.night``);
* :func:`visibility`, :func:`alt_az_at` -- whole-catalogue visibility and
  alt/az at arbitrary instants (``planner.sky.placement``);
* :func:`airmass`, :func:`refraction_arcmin`, :func:`dispersion_arcsec`,
  ``AIRMASS_MODELS``, ``REFRACTION_MODELS`` (``planner.sky.atmosphere``);
* :func:`altaz` -- geometric alt/az of ICRS positions (below).
"""

from __future__ import annotations

_LAZY = {
    "Site": "planner.sky.site",
    "Horizon": "planner.sky.site",
    "Night": "planner.sky.night",
    "night_for": "planner.sky.night",
    "sun_alt_deg": "planner.sky.night",
    "sun_sep_deg": "planner.sky.night",
    "DARKNESS_LEVELS": "planner.sky.night",
    "visibility": "planner.sky.placement",
    "alt_az_at": "planner.sky.placement",
    "VISIBILITY_COLUMNS": "planner.sky.placement",
    "airmass": "planner.sky.atmosphere",
    "refraction_arcmin": "planner.sky.atmosphere",
    "dispersion_arcsec": "planner.sky.atmosphere",
    "AIRMASS_MODELS": "planner.sky.atmosphere",
    "REFRACTION_MODELS": "planner.sky.atmosphere",
}

__all__ = sorted([*_LAZY, "altaz"])


def __getattr__(name):
    mod = _LAZY.get(name)
    if mod is None:
        raise AttributeError(f"module 'planner.sky' has no attribute {name!r}")
    import importlib

    value = getattr(importlib.import_module(mod), name)
    globals()[name] = value
    return value


def __dir__():
    return __all__


def altaz(ra_deg, dec_deg, lat_deg, lon_deg, when, elevation_m=0.0):
    """Geometric (unrefracted) altitude and azimuth, degrees, of ICRS J2000 positions.

    ``when``: UTC instant(s) as numpy ``datetime64``, ISO text or astropy
    ``Time``; all arguments broadcast (e.g. ``ra[:, None]`` against
    ``times[None, :]``).  Azimuth is measured from north through east.
    Same reduction as astropy's ``ICRS -> AltAz`` with pressure 0 (ERFA
    ``apco13``/``atciq``/``atioq``, UT1-UTC and polar motion from the IERS
    table bundled with astropy; nothing is downloaded).  Returns
    ``(alt_deg, az_deg)`` as numpy arrays.
    """
    import numpy as np

    from planner.errors import InputError
    from planner.sky._astrometry import altaz_rad, to_utc64, validate_radec

    ra, dec = validate_radec(ra_deg, dec_deg)
    lat = np.asarray(lat_deg, dtype=float)
    lon = np.asarray(lon_deg, dtype=float)
    if np.any(~np.isfinite(lat) | (np.abs(lat) > 90.0)):
        raise InputError(f"latitude {lat_deg!r} is out of range; allowed -90 to 90 deg")
    if np.any(~np.isfinite(lon)):
        raise InputError(f"longitude {lon_deg!r} is not a number; allowed -180 to 360 deg east")
    lon = np.where(lon > 180.0, lon - 360.0, lon)
    alt, az = altaz_rad(ra, dec, lat, lon, to_utc64(when), elevation_m)
    return np.degrees(alt), np.degrees(az)
