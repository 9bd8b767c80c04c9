"""When each target is well placed tonight: analytic visibility for a whole catalogue at once.

Method (see docs/sky.md for the derivation and accuracy):

1. **Apparent place once per night.**  One ERFA context (``erfa.apco13``) at
   the middle of the dark window; its aberration velocity and
   bias-precession-nutation matrix are applied to every ICRS J2000 position
   in a few numpy array operations (``erfa.atciq`` without the Sun's light
   deflection, < 0.03" more than 20 deg from the Sun).  Over a night these change by
   well under an arcsecond.
2. **Hour angle is linear in time.**  H(t) = ERA(t) + longitude - RA_cirs,
   with the Earth rotation angle advancing at 2 pi x 1.00273781191135448 rad
   per UT1 day (IERS Conventions 2010).  Polar motion (< 0.5") and diurnal
   aberration (< 0.33") are left out of this fast path; :func:`alt_az_at`
   includes them.
3. **Rising and setting through the minimum altitude** from
   cos H0 = (sin h0 - sin phi sin dec) / (cos phi cos dec), where h0 is the
   TRUE altitude whose refracted altitude is the site's minimum (Bennett
   1982 refraction).  The up-intervals around the transits k = -1, 0, +1
   sidereal days from the one nearest the window's middle are intersected
   with the dark window: exact for windows up to a day.
4. **Best time** = highest point inside the window: the transit if one falls
   inside, otherwise the window edge with the smaller |hour angle|
   (altitude falls monotonically with |H|).
5. **Horizon profile** (if the site has one), which depends on azimuth:
   rising and setting through max(min_alt, profile(azimuth)) are found by
   scanning the hour angle from the transit out to the plain minimum-altitude
   crossing at 48 points and bisecting the first clear -> hidden bracket 16
   times, separately for the eastern and western branch.  The time above
   the limit inside the window comes from ``horizon_samples`` + 1 (default
   73) instants spread evenly over the window, with every clear/hidden change
   between two of them pinned down by 16 bisections -- only for targets that
   get above the minimum altitude at all, in chunks (bounded memory).
   The limit is looked up by azimuth in a 0.01-deg table of true altitudes.
   Obstructions narrower than a step can be missed.  If the analytic best
   instant is hidden, the highest clear instant found is taken instead.

No per-target Python loop and no dense time grid over the catalogue.
"""

from __future__ import annotations

import numpy as np

from planner.errors import InputError
from planner.sky import atmosphere as atm
from planner.sky._astrometry import OMEGA_RAD_S, altaz_rad, astrom_at, to_utc64, validate_radec
from planner.sky.night import Night, sun_alt_deg
from planner.sky.site import Site
from planner.units import wrap_public

__all__ = ["visibility", "alt_az_at", "VISIBILITY_COLUMNS", "apparent_place", "FastAltAz"]

#: Output columns, in order (DEVELOPERS.md contract).
VISIBILITY_COLUMNS = (
    "transit_utc", "rise_utc", "set_utc", "up_dark_min", "best_utc", "alt_best_deg",
    "az_best_deg", "airmass_best", "refraction_arcmin", "dispersion_arcsec", "moon_sep_deg",
    "sky_mag_arcsec2", "observable",
)

TWO_PI = 2.0 * np.pi
SIDEREAL_DAY_S = TWO_PI / OMEGA_RAD_S
_CHUNK = 20_000


def _wrap_pi(x):
    """Angle to (-pi, pi]."""
    return np.pi - np.mod(np.pi - x, TWO_PI)


def apparent_place(ra_deg, dec_deg, site: Site, when_utc):
    """CIRS right ascension/declination (rad) of ICRS targets at one instant, plus the ERFA context.

    Returns ``(ri, di, astrom)``; ``astrom["eral"]`` is the local Earth
    rotation angle (ERA + longitude, rad) and ``astrom["sphi"]``,
    ``astrom["cphi"]`` the sine and cosine of the site latitude.
    """
    ast = astrom_at(np.asarray(when_utc, dtype="datetime64[ns]"), site.lat_deg, site.lon_deg, site.elevation_m)
    ri, di, _p = _cirs_fast(np.radians(ra_deg), np.radians(dec_deg), ast)
    return ri, di, ast


def _unit(ra_rad, dec_rad):
    cd = np.cos(dec_rad)
    return np.cos(ra_rad) * cd, np.sin(ra_rad) * cd, np.sin(dec_rad)


def _cirs_fast(ra_rad, dec_rad, ast):
    """ICRS -> CIRS with one ERFA context, in plain numpy (what ``erfa.atciq`` does, minus light
    deflection by the Sun, which is below 0.03" more than 20 deg from the Sun).

    Annual aberration: the relativistic formula of ERFA ``eraAb`` (IERS Conventions 2010 /
    Explanatory Supplement 1992, eq. 3.252-3), observer velocity ``ast["v"]`` (units of c),
    ``ast["bm1"]`` = sqrt(1 - v^2); then the bias-precession-nutation matrix ``ast["bpn"]``.
    Returns (ri, di, (x, y, z) ICRS unit vectors).
    """
    x, y, z = _unit(ra_rad, dec_rad)
    v = np.asarray(ast["v"], dtype=float).reshape(3)
    bm1 = float(ast["bm1"])
    pdv = x * v[0] + y * v[1] + z * v[2]
    w1 = 1.0 + pdv / (1.0 + bm1)
    px, py, pz = bm1 * x + w1 * v[0], bm1 * y + w1 * v[1], bm1 * z + w1 * v[2]
    r = np.sqrt(px * px + py * py + pz * pz)
    px, py, pz = px / r, py / r, pz / r
    m = np.asarray(ast["bpn"], dtype=float).reshape(3, 3)
    cx = m[0, 0] * px + m[0, 1] * py + m[0, 2] * pz
    cy = m[1, 0] * px + m[1, 1] * py + m[1, 2] * pz
    cz = m[2, 0] * px + m[2, 1] * py + m[2, 2] * pz
    ri = np.arctan2(cy, cx)
    di = np.arctan2(cz, np.hypot(cx, cy))
    return ri, di, (x, y, z)


def alt_az_at(ra_deg, dec_deg, site: Site, when_utc, refracted: bool = False):
    """Altitude and azimuth (deg, azimuth N=0 E=90) of ICRS J2000 targets at UTC instants, broadcast.

    Full ERFA path (as astropy ``AltAz``): aberration, light deflection,
    precession-nutation, Earth rotation from UT1, polar motion, diurnal
    aberration.  ``refracted=True`` adds Saemundsson (1986) refraction for the
    site's pressure and temperature.  For the scheduler: evaluate any slot
    times, e.g. ``alt_az_at(ra[:, None], dec[:, None], site, slots[None, :])``.
    """
    ra, dec = validate_radec(ra_deg, dec_deg)
    t64 = to_utc64(when_utc)
    alt, az = altaz_rad(ra, dec, site.lat_deg, site.lon_deg, t64, site.elevation_m)
    alt_deg, az_deg = np.degrees(alt), np.degrees(az)
    if refracted:
        alt_deg = atm.apparent_from_true_deg(alt_deg, site.pressure_hpa, site.temperature_c)
    return alt_deg, az_deg


def conditions_at(ra_deg, dec_deg, site: Site, night: Night, when_utc, *, band_nm=atm.VISUAL_BAND_NM):
    """What the verdict reads about the sky, for targets at given instants (one instant per target).

    The same quantities, by the same models, that :func:`visibility` gives at each target's best
    time, so a pair judged at another instant (a schedule slot) is judged the same way:
    ``alt_deg`` (geometric), ``az_deg``, ``dispersion_arcsec`` (Filippenko 1982 at the apparent
    altitude, Saemundsson 1986 refraction) and ``sky_mag_arcsec2`` (dark sky, twilight and
    moonlight, as :func:`visibility`).  Returns a dict of arrays."""
    ra, dec = validate_radec(np.asarray(ra_deg, float).ravel(), np.asarray(dec_deg, float).ravel())
    when = to_utc64(np.asarray(when_utc, "datetime64[ns]")).ravel()
    alt, az = alt_az_at(ra, dec, site, when)
    P, T = site.pressure_hpa, site.temperature_c
    refr = np.where(alt >= -1.0, atm.refraction_saemundsson1986(alt, P, T), np.nan)
    alt_app = alt + np.nan_to_num(refr) / 60.0
    disp = atm.dispersion_arcsec(alt_app, band_nm, P, T)
    moon = night.moon_at(when)
    mx, my, mz = moon["xyz"]
    px, py, pz = _unit(np.radians(ra), np.radians(dec))
    dot = px * mx + py * my + pz * mz
    cross = np.sqrt((py * mz - pz * my) ** 2 + (pz * mx - px * mz) ** 2 + (px * my - py * mx) ** 2)
    moon_sep = np.degrees(np.arctan2(cross, dot))
    sky = _sky_mag(site, night, when, alt, moon, moon_sep)
    return {"alt_deg": np.asarray(alt, float), "az_deg": np.asarray(az, float),
            "dispersion_arcsec": np.asarray(disp, float), "sky_mag_arcsec2": np.asarray(sky, float)}


def _alt_az_fast(sd, cd, sphi, cphi, ha):
    """True altitude and azimuth (rad) from hour angle (spherical triangle), vectorised."""
    ch = np.cos(ha)
    salt = np.clip(sphi * sd + cphi * cd * ch, -1.0, 1.0)
    alt = np.arcsin(salt)
    az = np.mod(np.arctan2(-cd * np.sin(ha), sd * cphi - cd * ch * sphi), TWO_PI)
    return alt, az


class FastAltAz:
    """Geometric alt/az (deg) of a fixed set of targets at any instant of one night, fast.

    Steps 1 and 2 of the module docstring: the apparent (CIRS) place once, at
    ``when_utc`` (:func:`apparent_place`), then the hour angle advancing
    linearly with the Earth rotation angle.  Agrees with :func:`alt_az_at` to
    about an arcsecond over a night (polar motion and diurnal aberration left
    out), ample for scheduling; reported altitudes use :func:`alt_az_at`.
    ``fast(idx, when_utc)`` returns ``(alt_deg, az_deg)`` of the targets ``idx``.
    """

    def __init__(self, ra_deg, dec_deg, site: Site, when_utc):
        self.t0 = np.datetime64(when_utc, "ns")
        ri, di, ast = apparent_place(np.asarray(ra_deg, float), np.asarray(dec_deg, float), site, self.t0)
        self.ri = np.asarray(ri, float)
        self.sd, self.cd = np.sin(di), np.cos(di)
        self.eral = float(ast["eral"])
        self.sphi, self.cphi = float(ast["sphi"]), float(ast["cphi"])

    def __call__(self, idx, when_utc):
        dt_s = (np.datetime64(when_utc, "ns") - self.t0).astype("int64") / 1e9
        ha = self.eral + OMEGA_RAD_S * dt_s - self.ri[idx]
        alt, az = _alt_az_fast(self.sd[idx], self.cd[idx], self.sphi, self.cphi, ha)
        return np.degrees(alt), np.degrees(az)


def _h0(sd, cd, sphi, cphi, h0_true_rad):
    """Semi-diurnal arc above true altitude h0 (rad): 0 never up, pi always up."""
    with np.errstate(divide="ignore", invalid="ignore"):
        c = (np.sin(h0_true_rad) - sphi * sd) / (cphi * cd)
    c = np.where(np.isfinite(c), c, np.where(sphi * sd > np.sin(h0_true_rad), -2.0, 2.0))
    return np.arccos(np.clip(c, -1.0, 1.0))


def _to_t64(t_mid64, sec):
    """t_mid + seconds (float array, NaN -> NaT) as datetime64[ns]."""
    sec = np.asarray(sec, dtype=float)
    ok = np.isfinite(sec)
    ns = np.where(ok, np.round(np.where(ok, sec, 0.0) * 1e9), 0).astype(np.int64)
    out = t_mid64 + ns.astype("timedelta64[ns]")
    return np.where(ok, out, np.datetime64("NaT", "ns"))


def visibility(ra_deg, dec_deg, site: Site, night: Night, *, airmass_model: str = "pickering2002",
               band_nm=atm.VISUAL_BAND_NM, horizon_samples: int = 72, index=None):
    """Visibility of every target in the night's dark window, one row per target (pandas DataFrame).

    ``ra_deg``, ``dec_deg``: ICRS J2000 positions (arrays or pandas Series;
    a Series' index is kept unless ``index`` is given).  Columns
    (:data:`VISIBILITY_COLUMNS`):

    * ``transit_utc`` upper transit nearest the middle of the dark window;
    * ``rise_utc``, ``set_utc`` crossings of the minimum altitude (and horizon
      profile) before/after that transit; NaT when the target never gets
      that high or never goes that low;
    * ``up_dark_min`` minutes above the limit inside the dark window;
    * ``best_utc`` highest point inside the window; at that instant
      ``alt_best_deg`` (APPARENT, refracted), ``az_best_deg`` (N=0, E=90),
      ``airmass_best`` (``airmass_model``), ``refraction_arcmin``
      (Saemundsson 1986 at the site's P, T), ``dispersion_arcsec``
      (Filippenko 1982 across ``band_nm``), ``moon_sep_deg``,
      ``sky_mag_arcsec2`` (dark sky + twilight + moonlight, V);
    * ``observable`` True when the target is above the limit at some time
      inside the dark window.

    Without a dark window (polar summer) ``best_*`` are NaN/NaT and
    ``observable`` is False; transit/rise/set refer to the middle of the
    noon-to-noon interval.
    """
    import pandas as pd

    if not isinstance(site, Site):
        raise InputError(f"site must be a planner.sky.Site, got {type(site).__name__}")
    if not isinstance(night, Night):
        raise InputError(f"night must come from planner.sky.night_for, got {type(night).__name__}")
    if airmass_model not in atm.AIRMASS_MODELS:
        raise InputError(f"unknown airmass model {airmass_model!r}; choose one of: {', '.join(atm.AIRMASS_MODELS)}")
    if index is None and isinstance(ra_deg, pd.Series):
        index = ra_deg.index
    ra, dec = validate_radec(np.asarray(ra_deg, dtype=float).ravel(), np.asarray(dec_deg, dtype=float).ravel())
    if ra.shape != dec.shape:
        raise InputError(f"ra_deg and dec_deg differ in length ({ra.size} and {dec.size})")
    n = ra.size
    t_mid = night.middle_utc
    has_dark = night.has_dark
    if has_dark:
        a = (night.dark_start_utc - t_mid) / np.timedelta64(1, "s")
        b = (night.dark_end_utc - t_mid) / np.timedelta64(1, "s")
    else:
        a = b = 0.0

    # 1. apparent place at the middle of the window (one erfa call)
    ast = astrom_at(np.asarray(t_mid, dtype="datetime64[ns]"), site.lat_deg, site.lon_deg, site.elevation_m)
    ri, di, p_icrs = _cirs_fast(np.radians(ra), np.radians(dec), ast)
    sphi, cphi, eral = float(ast["sphi"]), float(ast["cphi"]), float(ast["eral"])
    sd, cd = np.sin(di), np.cos(di)
    ha_mid = _wrap_pi(eral - ri)
    tau0 = -ha_mid / OMEGA_RAD_S  # transit nearest the middle, s from t_mid

    # 2. rising/setting through the minimum altitude
    P, T = site.pressure_hpa, site.temperature_c
    h0_true = np.radians(atm.true_from_apparent_deg(site.min_alt_deg, P, T))
    H0 = _h0(sd, cd, sphi, cphi, h0_true)
    H_rise = H_set = H0
    if site.horizon is not None:
        H_rise = _h0_profile(sd, cd, sphi, cphi, site, H0, rising=True)
        H_set = _h0_profile(sd, cd, sphi, cphi, site, H0, rising=False)
    never = H_rise + H_set <= 0.0
    always = (H_rise >= np.pi) & (H_set >= np.pi)
    crosses = ~never & ~always
    rise_s = np.where(crosses, tau0 - H_rise / OMEGA_RAD_S, np.nan)
    set_s = np.where(crosses, tau0 + H_set / OMEGA_RAD_S, np.nan)

    # 3. time above the limit inside the dark window (analytic intersection)
    def up_seconds(h_r, h_s):
        tot = np.zeros(n)
        for k in (-1, 0, 1):  # three shifted copies, each vectorised over all targets
            lo = tau0 + k * SIDEREAL_DAY_S - h_r / OMEGA_RAD_S
            hi = tau0 + k * SIDEREAL_DAY_S + h_s / OMEGA_RAD_S
            tot += np.maximum(0.0, np.minimum(b, hi) - np.maximum(a, lo))
        return np.minimum(tot, b - a)

    up = up_seconds(H_rise, H_set) if has_dark else np.zeros(n)
    above_min = (up_seconds(H0, H0) > 0.0) if (has_dark and site.horizon is not None) else None

    # 4. best time: highest point inside the window
    if has_dark:
        best_s = np.full(n, np.nan)
        for k in (1, -1, 0):  # k = 0 last so it wins when several transits fall inside
            tk = tau0 + k * SIDEREAL_DAY_S
            best_s = np.where((tk >= a) & (tk <= b), tk, best_s)
        ha_a = np.abs(_wrap_pi(ha_mid + OMEGA_RAD_S * a))
        ha_b = np.abs(_wrap_pi(ha_mid + OMEGA_RAD_S * b))
        best_s = np.where(np.isnan(best_s), np.where(ha_a < ha_b, a, b), best_s)
        alt_t, az_t = _alt_az_fast(sd, cd, sphi, cphi, ha_mid + OMEGA_RAD_S * best_s)
        observable = up > 0.0
        if site.horizon is not None:
            up, observable, best_s, alt_t, az_t = _profile_sampling(
                sd, cd, sphi, cphi, ha_mid, a, b, site, up, best_s, alt_t, az_t, horizon_samples,
                above_min)
    else:
        best_s = np.full(n, np.nan)
        alt_t = az_t = np.full(n, np.nan)
        observable = np.zeros(n, dtype=bool)

    alt_true_deg = np.degrees(alt_t)
    # refraction only above the horizon (the formulas mean nothing below it)
    refr = np.where(alt_true_deg >= -1.0, atm.refraction_saemundsson1986(alt_true_deg, P, T), np.nan)
    alt_app = alt_true_deg + np.nan_to_num(refr) / 60.0
    am = atm.airmass(alt_app, airmass_model)
    disp = atm.dispersion_arcsec(alt_app, band_nm, P, T)

    best64 = _to_t64(t_mid, best_s)
    when_moon = np.where(np.isnat(best64), t_mid, best64)
    moon = night.moon_at(when_moon)
    mx, my, mz = moon["xyz"]
    px, py, pz = p_icrs
    dot = px * mx + py * my + pz * mz
    cross = np.sqrt((py * mz - pz * my) ** 2 + (pz * mx - px * mz) ** 2 + (px * my - py * mx) ** 2)
    moon_sep = np.degrees(np.arctan2(cross, dot))
    sky = _sky_mag(site, night, best64, alt_true_deg, moon, moon_sep)

    df = pd.DataFrame({
        "transit_utc": _to_t64(t_mid, tau0),
        "rise_utc": _to_t64(t_mid, rise_s),
        "set_utc": _to_t64(t_mid, set_s),
        "up_dark_min": up / 60.0,
        "best_utc": best64,
        "alt_best_deg": alt_app,
        "az_best_deg": np.degrees(az_t),
        "airmass_best": am,
        "refraction_arcmin": refr,
        "dispersion_arcsec": disp,
        "moon_sep_deg": moon_sep,
        "sky_mag_arcsec2": sky,
        "observable": np.asarray(observable, dtype=bool),
    }, index=index)
    return df


def _az_at_alt(sd, cd, sphi, cphi, H):
    """Azimuth (deg) at hour angle H (rad) -- the crossing point's azimuth."""
    _alt, az = _alt_az_fast(sd, cd, sphi, cphi, H)
    return np.degrees(az)


class _TrueLimit:
    """Lookup table of the site's limit as a TRUE altitude, by azimuth (0.01 deg steps).

    limit(az) = max(min_alt, horizon profile) is an apparent altitude; it is
    converted once per call of :func:`visibility` with Bennett (1982), and
    stored as its sine so that "clear" tests need no arcsin.  Nearest-step
    lookup: altitude error <= 0.005 deg x the profile's slope (deg/deg).
    """

    N = 36_000

    def __init__(self, site: Site):
        az = (np.arange(self.N) + 0.5) * (360.0 / self.N)
        lim_app = site.limit_alt_deg(az)
        self.sin_lim = np.sin(np.radians(atm.true_from_apparent_deg(lim_app, site.pressure_hpa,
                                                                    site.temperature_c)))

    def clear(self, sd, cd, sphi, cphi, ha):
        """(clear?, sin(alt), az rad) for hour angle(s) ``ha``; broadcast."""
        ch = np.cos(ha)
        salt = sphi * sd + cphi * cd * ch
        az = np.arctan2(-cd * np.sin(ha), sd * cphi - cd * ch * sphi)
        k = (az * (self.N / TWO_PI)).astype(np.int64) % self.N
        return salt >= self.sin_lim[k], salt, az


def _h0_profile(sd, cd, sphi, cphi, site: Site, H0, rising: bool, scan: int = 48, bisect: int = 16):
    """Semi-arc from transit to the first crossing of max(min_alt, horizon profile), rad.

    The hour angle is scanned from the transit (H = 0) outwards to the
    crossing of the plain minimum altitude (H0) at ``scan`` points; the first
    clear -> hidden change brackets the crossing, which ``bisect`` halvings
    then pin down (about 0.1 s of time).  A fixed number of vectorised
    evaluations per target; obstructions narrower than the scan step
    (H0 / scan) can be missed.  Targets hidden already at transit get 0;
    targets clear all the way to H0 keep H0.
    """
    sign = -1.0 if rising else 1.0
    table = _TrueLimit(site)

    out = np.array(H0, dtype=float, copy=True)
    cand = np.flatnonzero(H0 > 0.0)
    for s0 in range(0, cand.size, _CHUNK):
        idx = cand[s0:s0 + _CHUNK]
        f = np.linspace(0.0, 1.0, scan + 1)
        Hs = H0[idx, None] * f[None, :]
        ok, _s, _a = table.clear(sd[idx, None], cd[idx, None], sphi, cphi, sign * Hs)
        circumpolar = H0[idx] >= np.pi
        ok[~circumpolar, -1] = False  # at H0 the star is at min_alt: count it as hidden
        never_hidden = ok.all(axis=1)  # circumpolar and clear of the profile all round
        first_hidden = np.argmax(~ok, axis=1)
        hidden_at_transit = first_hidden == 0
        lo = H0[idx] * f[np.maximum(first_hidden - 1, 0)]
        hi = H0[idx] * f[first_hidden]
        sd_i, cd_i = sd[idx], cd[idx]
        for _ in range(bisect):
            mid = 0.5 * (lo + hi)
            c, _s, _a = table.clear(sd_i, cd_i, sphi, cphi, sign * mid)
            lo = np.where(c, mid, lo)
            hi = np.where(c, hi, mid)
        res = 0.5 * (lo + hi)
        out[idx] = np.where(never_hidden, np.pi, np.where(hidden_at_transit, 0.0, res))
    return out


def _profile_sampling(sd, cd, sphi, cphi, ha_mid, a, b, site, up, best_s, alt_t, az_t, m, above_min):
    """Time above max(min_alt, profile) inside the window [a, b] (s from the middle), candidates only.

    The window is cut into ``m`` equal steps; at the ``m + 1`` step edges we
    test whether the target clears the limit; in every step whose two ends
    differ, the crossing is found by 16 bisections (about 0.05 s).  Minutes
    clear are then exact except for obstructions that hide (or gaps that
    show) the target only strictly inside one step.  If the analytic best
    instant is hidden, the highest clear step edge or crossing is taken.
    """
    P, T = site.pressure_hpa, site.temperature_c
    up = up.copy()
    best_s, alt_t, az_t = best_s.copy(), alt_t.copy(), az_t.copy()
    observable = np.zeros(up.shape, dtype=bool)
    cand = np.flatnonzero(above_min)  # only targets above min_alt at some time can clear the profile
    g = a + (b - a) * np.arange(m + 1) / m
    step = (b - a) / m

    table = _TrueLimit(site)

    def clear_at(rows, t):
        # altitudes are compared and ranked as sines (monotonic); converted once at the end
        return table.clear(sd[rows], cd[rows], sphi, cphi, ha_mid[rows] + OMEGA_RAD_S * t)

    for s in range(0, cand.size, _CHUNK):
        idx = cand[s:s + _CHUNK]
        C, alt, az = clear_at(idx[:, None], g[None, :])
        up_i = (C[:, :-1] & C[:, 1:]).sum(axis=1) * step
        best_alt = np.where(C, alt, -np.inf)
        j_best = np.argmax(best_alt, axis=1)
        best_alt = best_alt[np.arange(idx.size), j_best]
        best_t = g[j_best]
        best_az = az[np.arange(idx.size), j_best]
        r, j = np.nonzero(C[:, :-1] != C[:, 1:])
        if r.size:
            rows = idx[r]
            lo, hi = g[j].copy(), g[j + 1].copy()
            left_clear = C[r, j]
            for _ in range(16):
                mid = 0.5 * (lo + hi)
                c, _alt, _az = clear_at(rows, mid)
                same = c == left_clear
                lo = np.where(same, mid, lo)
                hi = np.where(same, hi, mid)
            tc = 0.5 * (lo + hi)
            part = np.where(left_clear, tc - g[j], g[j + 1] - tc)
            np.add.at(up_i, r, part)
            _c, alt_c, az_c = clear_at(rows, tc)
            better = alt_c > best_alt[r]
            # several crossings per row: keep the highest (order-independent via a sort)
            order = np.lexsort((alt_c, r))
            r_o, alt_o, tc_o, az_o, b_o = r[order], alt_c[order], tc[order], az_c[order], better[order]
            last = np.r_[r_o[1:] != r_o[:-1], True]
            keep = last & b_o
            best_alt[r_o[keep]] = alt_o[keep]
            best_t[r_o[keep]] = tc_o[keep]
            best_az[r_o[keep]] = az_o[keep]
        up[idx] = up_i
        observable[idx] = up_i > 0.0
        # analytic best hidden by the profile -> highest clear instant found above
        lim_best = atm.true_from_apparent_deg(site.limit_alt_deg(np.degrees(az_t[idx])), P, T)
        hidden = (np.degrees(alt_t[idx]) < lim_best) & np.isfinite(best_alt)
        sel = idx[hidden]
        best_s[sel] = best_t[hidden]
        alt_t[sel] = np.arcsin(np.clip(best_alt[hidden], -1.0, 1.0))
        az_t[sel] = np.mod(best_az[hidden], TWO_PI)
    return up, observable, best_s, alt_t, az_t


def _sky_mag(site: Site, night: Night, best64, alt_true_deg, moon, moon_sep):
    """V sky brightness (mag/arcsec^2) at each target at its best time.

    dark sky: zenith value brightened toward the horizon as in Krisciunas &
    Schaefer (1991) eq. 2, B = B_zen X 10^(-0.4 k (X - 1)); twilight: the
    approximate zenith model :func:`planner.sky.atmosphere.twilight_sky_mag`
    at the Sun's altitude (interpolated from 25 samples over the window);
    moonlight: Krisciunas & Schaefer (1991).
    """
    k = site.extinction_k
    z = 90.0 - np.clip(alt_true_deg, 0.0, 90.0)
    X = atm._ks_airmass(z)
    b_dark = atm.nl_from_mag(site.sky_mag_zenith) * X * 10.0 ** (-0.4 * k * (X - 1.0))
    b_moon = atm.moon_sky_nl(moon_sep, moon["alt_deg"], alt_true_deg, moon["phase_angle_deg"], k)
    if night.has_dark:
        grid = night.dark_start_utc + ((night.dark_end_utc - night.dark_start_utc) // 24) * np.arange(25)
        sun = sun_alt_deg(site, grid)
        t = np.where(np.isnat(best64), night.middle_utc, best64).astype(np.int64).astype(float)
        sun_best = np.interp(t, grid.astype(np.int64).astype(float), sun)
        b_tw = atm.nl_from_mag(atm.twilight_sky_mag(sun_best))
    else:
        b_tw = 0.0
    out = atm.mag_from_nl(b_dark + b_moon + b_tw)
    return np.where(alt_true_deg >= 0.0, out, np.nan)


# every public function above accepts astropy Quantity arguments (planner.units)
wrap_public(globals())
