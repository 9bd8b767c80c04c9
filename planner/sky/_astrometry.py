"""Low-level astrometry on plain arrays: UTC handling, Earth orientation, erfa.

ICRS (J2000) catalogue places are turned into observed places with the IAU
SOFA/ERFA routines that astropy itself uses for ``ICRS -> AltAz``:

* ``erfa.apco13`` builds the star-independent "astrom" context for each UTC
  instant (Earth position and velocity from the built-in ERFA ephemeris
  ``epv00``, precession-nutation IAU 2006/2000A, Earth rotation angle from
  UT1, polar motion, site position);
* ``erfa.atciq`` applies light deflection, annual aberration and
  precession-nutation (ICRS -> CIRS);
* ``erfa.atioq`` applies Earth rotation, polar motion and diurnal aberration
  (CIRS -> observed); refraction is switched off (pressure 0).

UT1-UTC and polar motion come from the IERS table bundled with astropy
(``astropy-iers-data``), never downloaded (``iers.conf.auto_download`` is set
False); the arrays are cached in the user cache folder after the first read
(:func:`earth_orientation`).  Outside the table the edge values are used (UT1-UTC error then grows
by some ms per month, i.e. a fraction of an arcsecond per month).
"""

from __future__ import annotations

import numpy as np

from planner.errors import InputError

NS_PER_DAY = 86_400_000_000_000
UNIX_EPOCH_JD = 2440587.5
#: Earth rotation rate, radians per UT1 second (IERS Conventions 2010, ERA = 2 pi (0.7790572732640
#: + 1.00273781191135448 Tu)).
OMEGA_RAD_S = 2.0 * np.pi * 1.00273781191135448 / 86400.0

_offline_done = False


def ensure_offline() -> None:
    """Tell astropy not to download IERS tables (called before any astropy use)."""
    global _offline_done
    if _offline_done:
        return
    from astropy.utils import iers

    iers.conf.auto_download = False
    # The bundled table ages; its predictions are still far better than none.
    iers.conf.auto_max_age = None
    _offline_done = True


def to_utc64(when) -> np.ndarray:
    """Any supported time input as numpy ``datetime64[ns]`` UTC (array, same shape).

    Accepts numpy datetime64, ISO text, pandas Timestamp/DatetimeIndex (aware
    ones are converted to UTC), python datetimes and astropy ``Time``.
    """
    if type(when).__module__.startswith("astropy"):  # import astropy only for its own objects
        from astropy.time import Time

        if isinstance(when, Time):
            ensure_offline()
            return np.asarray(when.utc.to_value("datetime64"), dtype="datetime64[ns]")
    if isinstance(when, np.ndarray) and np.issubdtype(when.dtype, np.datetime64):
        return when.astype("datetime64[ns]")
    import pandas as pd

    try:
        if np.ndim(when) == 0 and not isinstance(when, (list, tuple)):
            ts = pd.Timestamp(when)
            if ts is pd.NaT:
                return np.asarray(np.datetime64("NaT", "ns"))
            if ts.tzinfo is not None:
                ts = ts.tz_convert("UTC").tz_localize(None)
            return np.asarray(ts.to_datetime64(), dtype="datetime64[ns]")
        idx = pd.DatetimeIndex(np.ravel(np.asarray(when, dtype=object)) if not hasattr(when, "dtype") else when)
        if idx.tz is not None:
            idx = idx.tz_convert("UTC").tz_localize(None)
        return idx.to_numpy(dtype="datetime64[ns]").reshape(np.shape(when))
    except (ValueError, TypeError) as exc:
        raise InputError(f"time {when!r} is not understood; give ISO UTC text or numpy datetime64 ({exc})") from None


def utc_jd(t64) -> tuple[np.ndarray, np.ndarray]:
    """Two-part UTC Julian date (jd1 = day boundary at 0h as x.5, jd2 = fraction) of datetime64[ns].

    The split follows ERFA's quasi-JD convention for UTC, so a leap-second day
    is handled by ERFA itself.
    """
    ns = np.asarray(t64, dtype="datetime64[ns]").astype(np.int64)
    days = np.floor_divide(ns, NS_PER_DAY)
    frac = (ns - days * NS_PER_DAY) / NS_PER_DAY
    return days + UNIX_EPOCH_JD, frac


_eop = None
#: bump when the layout of the cached Earth-orientation arrays changes
_EOP_CACHE_FORMAT = 1


def _eop_cache_path():
    """Cache file of the Earth-orientation arrays, named after the bundled IERS data version
    (versions from the package metadata: importing astropy only for a version string is slow)."""
    from importlib import metadata

    from planner.config.storage import user_dir

    tag = f"{metadata.version('astropy-iers-data')}-{metadata.version('astropy')}-{_EOP_CACHE_FORMAT}"
    return user_dir("cache") / f"eop-{tag}.npz"


def _eop_from_astropy():
    """MJD, UT1-TAI (s, continuous over leap seconds), xp, yp (arcsec) from astropy's bundled
    IERS table (IERS-A with IERS-B where present; the same values astropy interpolates)."""
    from astropy.utils import iers

    ensure_offline()
    t = iers.earth_orientation_table.get()
    mjd = np.asarray(t["MJD"].to_value("d"), float)
    ut1_utc = np.asarray(t["UT1_UTC"].to_value("s"), float)
    xp = np.asarray(t["PM_x"].to_value("arcsec"), float)
    yp = np.asarray(t["PM_y"].to_value("arcsec"), float)
    ok = np.isfinite(ut1_utc) & np.isfinite(xp) & np.isfinite(yp)
    mjd, ut1_utc, xp, yp = mjd[ok], ut1_utc[ok], xp[ok], yp[ok]
    return {"mjd": mjd, "ut1_tai": ut1_utc - _tai_utc(mjd), "xp": xp, "yp": yp}


def _tai_utc(mjd):
    """TAI-UTC (s) at 0 h UTC of each MJD (ERFA ``dat``; leap seconds)."""
    import erfa

    jd = np.asarray(mjd, float) + 2400000.5
    y, m, d, _ = erfa.jd2cal(jd, 0.0)
    with np.errstate(all="ignore"):
        import warnings

        with warnings.catch_warnings():
            warnings.simplefilter("ignore", erfa.ErfaWarning)
            return np.asarray(erfa.dat(y, m, d, 0.0), float)


def _load_eop() -> dict:
    """The Earth-orientation arrays, from the cache when possible.

    Reading astropy's IERS table takes most of a second; the four arrays it
    yields are cached as ``.npz`` in the user cache folder, keyed by the
    versions of astropy and its bundled IERS data, so later runs load them in
    milliseconds.  A damaged cache file is moved aside, reported on stderr and
    rebuilt."""
    import sys
    import zipfile

    global _eop
    if _eop is not None:
        return _eop
    from planner.errors import PlannerError

    try:
        path = _eop_cache_path()
    except PlannerError:  # no cache folder (cannot be created): compute, keep nothing
        path = None
    if path is not None and path.exists():
        try:
            with np.load(path, allow_pickle=False) as z:
                eop = {k: np.asarray(z[k], float) for k in ("mjd", "ut1_tai", "xp", "yp")}
            if len(eop["mjd"]) > 1 and all(len(v) == len(eop["mjd"]) for v in eop.values()):
                _eop = eop
                return _eop
            raise ValueError("inconsistent arrays")
        except (OSError, ValueError, KeyError, zipfile.BadZipFile, EOFError):
            from planner.config.storage import quarantine

            kept = quarantine(path)
            print(f"splitplan: warning: Earth-orientation cache {path.name} was damaged; kept as {kept.name} "
                  "and rebuilt", file=sys.stderr)
    eop = _eop_from_astropy()
    import io

    from planner.config.storage import atomic_write_bytes

    buf = io.BytesIO()
    np.savez(buf, **eop)
    try:
        if path is not None:
            atomic_write_bytes(path, buf.getvalue())
    except Exception:  # a read-only cache folder only costs speed
        pass
    _eop = eop
    return _eop


def earth_orientation(jd1, jd2):
    """UT1-UTC (s) and polar motion xp, yp (rad) at UTC instants (two-part JD).

    Linear interpolation in the daily values of the IERS table bundled with
    astropy (what astropy's ``IERS.ut1_utc`` and ``pm_xy`` do), with UT1-UTC
    interpolated as UT1-TAI so that leap seconds do not disturb it.  Outside
    the table the edge values are used.
    """
    eop = _load_eop()
    mjd = (np.asarray(jd1, float) - 2400000.5) + np.asarray(jd2, float)
    ut1_tai = np.interp(mjd, eop["mjd"], eop["ut1_tai"])
    dut1 = ut1_tai + _tai_utc(np.floor(mjd))
    arcsec = np.pi / (180.0 * 3600.0)
    return (dut1, np.interp(mjd, eop["mjd"], eop["xp"]) * arcsec, np.interp(mjd, eop["mjd"], eop["yp"]) * arcsec)


def astrom_at(t64, lat_deg, lon_deg, elevation_m=0.0):
    """ERFA astrom context (``erfa.apco13``, no refraction) for UTC instants, shape of ``t64``."""
    import erfa

    jd1, jd2 = utc_jd(t64)
    dut1, xp, yp = earth_orientation(jd1, jd2)
    with np.errstate(all="ignore"):
        import warnings

        with warnings.catch_warnings():
            warnings.simplefilter("ignore", erfa.ErfaWarning)
            astrom, _eo = erfa.apco13(jd1, jd2, dut1, np.radians(lon_deg), np.radians(lat_deg),
                                      elevation_m, xp, yp, 0.0, 0.0, 0.0, 0.55)
    return astrom


def cirs_place(ra_deg, dec_deg, astrom):
    """ICRS -> CIRS (light deflection, aberration, precession-nutation) with a given astrom, radians."""
    import erfa

    ri, di = erfa.atciq(np.radians(ra_deg), np.radians(dec_deg), 0.0, 0.0, 0.0, 0.0, astrom)
    return ri, di


def altaz_rad(ra_deg, dec_deg, lat_deg, lon_deg, t64, elevation_m=0.0):
    """Geometric observed altitude and azimuth (radians), fully broadcast, via erfa."""
    import erfa

    t64 = np.asarray(t64, dtype="datetime64[ns]")
    if np.isnat(t64).any():
        raise InputError("time is NaT (not a time); give UTC instants")
    ra, dec, lat, lon, t64, h = np.broadcast_arrays(
        np.asarray(ra_deg, float), np.asarray(dec_deg, float), np.asarray(lat_deg, float),
        np.asarray(lon_deg, float), t64, np.asarray(elevation_m, float))
    # One astrom per unique (time, site): the usual call has few of them.
    key = np.stack([t64.astype(np.int64).ravel(), np.ascontiguousarray(lat).ravel().view(np.int64),
                    np.ascontiguousarray(lon).ravel().view(np.int64),
                    np.ascontiguousarray(h).ravel().view(np.int64)], axis=1)
    uniq, inv = np.unique(key, axis=0, return_inverse=True)
    inv = inv.reshape(-1)
    ast = astrom_at(uniq[:, 0].astype("datetime64[ns]"), uniq[:, 1].view(np.float64),
                    uniq[:, 2].view(np.float64), uniq[:, 3].view(np.float64))
    ast = ast[inv]
    ri, di = erfa.atciq(np.radians(ra.ravel()), np.radians(dec.ravel()), 0.0, 0.0, 0.0, 0.0, ast)
    aob, zob, _hob, _dob, _rob = erfa.atioq(ri, di, ast)
    alt = (0.5 * np.pi - zob).reshape(ra.shape)
    az = np.mod(aob, 2.0 * np.pi).reshape(ra.shape)
    return alt, az


def validate_radec(ra_deg, dec_deg):
    ra = np.asarray(ra_deg, dtype=float)
    dec = np.asarray(dec_deg, dtype=float)
    bad = ~np.isfinite(dec) | (np.abs(dec) > 90.0)
    bad_dec = dec[bad & np.isfinite(dec)] if bad.any() else ()
    if len(bad_dec):
        raise InputError(f"declination {float(bad_dec.ravel()[0])!r} is out of range; allowed -90 to 90 deg")
    return ra, dec
