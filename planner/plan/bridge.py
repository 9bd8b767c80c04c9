"""The plan layer's one door to the modules on its left.

Catalogue loading, today's geometry, the sky engine and the optics verdict
are built by other parts of the package; this module calls them through a
few small functions with fixed signatures, so that the planner does not
depend on the exact shape of each engine's API and any adaptation lives in
one place.
"""

from __future__ import annotations

import inspect

import numpy as np

from planner.errors import InputError


def _kwargs_for(fn, kw: dict) -> dict:
    """Keep only the keyword arguments ``fn`` accepts."""
    try:
        params = inspect.signature(fn).parameters
    except (TypeError, ValueError):
        return kw
    if any(p.kind is inspect.Parameter.VAR_KEYWORD for p in params.values()):
        return kw
    return {k: v for k, v in kw.items() if k in params}


# -- catalogue and geometry ------------------------------------------------------

def load_catalog(spec: str):
    from planner.catalogs.catalog import load_catalog as _load

    return _load(spec)


def geometry(catalog, epoch_yr: float):
    """rho, theta tonight per pair (aligned with ``catalog.pairs.index``)."""
    from planner.motion import pair_geometry

    return pair_geometry(catalog, epoch_yr)


# -- site, night, positions ------------------------------------------------------

def make_site(d: dict, name: str = ""):
    from planner.sky.site import Site

    kw = {k: d[k] for k in ("lat_deg", "lon_deg", "elevation_m", "tz", "min_alt_deg") if k in d}
    if d.get("horizon_file"):
        kw["horizon"] = d["horizon_file"]
    return Site(name=name or d.get("name", ""), **kw)


def make_night(site, local_date, darkness: str):
    from planner.sky.night import night_for

    return night_for(site, local_date, darkness=darkness)


def altaz(ra_deg, dec_deg, site, when_utc):
    """Geometric (unrefracted) altitude and azimuth (deg) of J2000 positions at UTC instant(s), broadcast."""
    from planner.sky.placement import alt_az_at

    return alt_az_at(np.asarray(ra_deg, float), np.asarray(dec_deg, float), site,
                     np.asarray(when_utc, "datetime64[ns]"))


class FastAltAz:
    """Geometric alt/az of a fixed set of targets at any instant of one night, fast.

    The sky engine's method: the apparent (CIRS) place once per night
    (:func:`planner.sky.placement.apparent_place`, ERFA), then the hour angle
    advances linearly with the Earth rotation angle.  Agrees with the full
    path to about an arcsecond over a night (polar motion and diurnal
    aberration left out), which is ample for scheduling; reported altitudes
    use :func:`altaz` (full path).
    """

    def __init__(self, ra_deg, dec_deg, site, when_utc):
        from planner.sky._astrometry import OMEGA_RAD_S
        from planner.sky.placement import apparent_place

        self.t0 = np.datetime64(when_utc, "ns")
        ri, di, ast = apparent_place(np.asarray(ra_deg, float), np.asarray(dec_deg, float), site, self.t0)
        self.ri = np.asarray(ri, float)
        self.sd, self.cd = np.sin(di), np.cos(di)
        self.eral = float(ast["eral"])
        self.sphi, self.cphi = float(ast["sphi"]), float(ast["cphi"])
        self.omega = OMEGA_RAD_S

    def __call__(self, idx, when_utc):
        dt = (np.datetime64(when_utc, "ns") - self.t0).astype("int64") / 1e9
        ha = self.eral + self.omega * dt - self.ri[idx]
        sd, cd = self.sd[idx], self.cd[idx]
        ch = np.cos(ha)
        alt = np.arcsin(np.clip(self.sphi * sd + self.cphi * cd * ch, -1.0, 1.0))
        az = np.mod(np.arctan2(-cd * np.sin(ha), sd * self.cphi - cd * ch * self.sphi), 2 * np.pi)
        return np.degrees(alt), np.degrees(az)


def sun_alt_sep(site, when_utc, ra_deg, dec_deg):
    """Sun altitude (deg) at the site and its distance (deg) from each target at the same instants."""
    from planner.sky.night import sun_alt_deg, sun_sep_deg

    when = np.asarray(when_utc, "datetime64[ns]")
    return (np.asarray(sun_alt_deg(site, when), float),
            np.asarray(sun_sep_deg(np.asarray(ra_deg, float), np.asarray(dec_deg, float), site, when), float))


def airmass(alt_deg):
    from planner.sky.atmosphere import airmass as _airmass

    return np.asarray(_airmass(np.asarray(alt_deg, float)), float)


def visibility(ra_deg, dec_deg, site, night):
    from planner.sky.placement import visibility as _vis

    return _vis(np.asarray(ra_deg, float), np.asarray(dec_deg, float), site, night)


# -- optics and verdict ---------------------------------------------------------

def make_telescope(d: dict, name: str = ""):
    from planner.optics import Telescope

    kw = {"aperture_mm": d.get("aperture_mm"), "obstruction": d.get("obstruction", 0.0),
          "kind": d.get("kind"), "focal_length_mm": d.get("focal_mm"),
          "wavelength_nm": d.get("wavelength_nm"), "name": name or d.get("name", "")}
    kw = {k: v for k, v in kw.items() if v is not None}
    if kw.get("aperture_mm") is None:
        raise InputError("a telescope needs an aperture in mm (--aperture 102)")
    return Telescope(**_kwargs_for(Telescope, kw))


def judge(telescope, pairs, seeing_arcsec: float, airmass_x, sky_mag=None, dispersion_arcsec=None):
    """The verdict table (positional, 0..n-1) for ``pairs`` (``rho_arcsec``, ``mag1``, ``mag2``) with this scope.

    ``airmass_x``: airmass per pair at the instant judged (NaN: not up).
    """
    from planner.verdict import judge as _judge

    kw = {}
    if sky_mag is not None:
        kw["sky_mag_arcsec2"] = np.asarray(sky_mag, float)
    if dispersion_arcsec is not None:
        kw["dispersion_arcsec"] = np.nan_to_num(np.asarray(dispersion_arcsec, float))
    return _judge(pairs["rho_arcsec"].to_numpy(float), pairs["mag1"].to_numpy(float),
                  pairs["mag2"].to_numpy(float), np.asarray(airmass_x, float), telescope,
                  float(seeing_arcsec), **kw)
