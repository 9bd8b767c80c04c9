"""Per-pair geometry at a date: separation, position angle, how they were
obtained and how far to trust them.

:func:`pair_geometry` is the module contract (DEVELOPERS.md): one row per
pair of ``catalog.pairs``.  For each pair, in this order:

1. ``orbit`` -- the pair has a complete visual orbit (ORB6 grade 1-5): the
   preferred one (ORB6 reader's ``preferred`` flag, else lowest grade, then
   newest reference) gives rho and theta at the date
   (:func:`planner.motion.orbits.orbit_positions`).
2. ``orbit-interferometric`` -- only a complete grade-8 orbit: used, flagged.
3. ``linear`` -- no usable orbit, and the first and last catalogued measures
   differ by more than the measurement error allows (test below): rectilinear
   extrapolation in x, y from the first to the last measure, with an
   uncertainty that grows with the time since the last measure.
4. ``last`` -- the last catalogued measure, unchanged; the uncertainty grows
   with the years since it at the largest rate the measures cannot exclude.
5. ``none`` -- nothing measured: NaN.

Grade-9 (astrometric) orbits never give a separation; a pair with only such
an orbit falls through to 3-5 and says so in ``reason``.

Uncertainty model (stated here, in docs/motion.md, and in the output)
---------------------------------------------------------------------
All uncertainty figures are *rough one-sigma-like sizes*, not formal errors.

* Orbits: the larger of (a) the spread at the date between the preferred
  orbit and the other complete orbits of the same grade class of the pair
  (largest |d rho| and largest |d theta|), and (b) a floor
  ``GRADE_FLOOR_FRACTION[grade] x rho`` in rho and ``degrees(fraction)`` in
  theta (1 % for grade 1 up to 20 % for grade 5; common practice, no source:
  ORB6 grades are described only in words, "definitive" ... "indeterminate").
* Measures: one catalogued measure is taken to be good to
  ``sqrt(0.1"^2 + (rho x 1 deg)^2)`` in position (WDS summary lines round rho
  to 0.1" and theta to 1 deg; historic micrometer measures scatter by about
  that much; common practice, no source).
* Motion test: significant when the first-to-last displacement exceeds
  ``MOTION_SIGMA`` (3) times its error ``sqrt(s_first^2 + s_last^2)``, with at
  least two measures and a baseline of ``MIN_BASELINE_YR`` (1) year.
* ``linear``: s(t) = sqrt(s_last^2 + (s_v dt)^2 + (k |v| dt)^2) with
  s_v = displacement error / baseline and k = ``CURVATURE_FRACTION`` (0.5):
  a straight line ignores orbital curvature, so half the extrapolated shift
  is added as model error (common practice, no source).
* ``last``: s(t) = sqrt(s_last^2 + (v_max dt)^2), v_max = 3 x displacement
  error / baseline (the fastest motion the test could have missed); with a
  single measure the motion is unknown and only s_last is given, with a
  reason saying so.
* theta uncertainty = degrees(s / rho), capped at 180.

Coordinates of date: J2000 position plus the primary's proper motion
(``pm1_ra_masyr`` is mu_alpha* = mu_alpha cos dec) times (t - 2000.0),
applied as a straight line in space on the unit sphere (no parallax, no
radial velocity), which is what ``SkyCoord.apply_space_motion`` does without
a distance (checked in the tests).  The catalogued positions are taken to be
at epoch 2000.0 (the WDS gives no epoch).  No precession: the coordinates
stay ICRS/J2000 axes.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from planner.motion.orbits import VISUAL_GRADES, _epochs_for_rows, orbit_positions
from planner.units import wrap_public

#: Uncertainty floor per ORB6 grade, as a fraction of rho (theta: degrees of
#: the same fraction in radians).  Common practice, no source.
GRADE_FLOOR_FRACTION = {1: 0.01, 2: 0.02, 3: 0.05, 4: 0.10, 5: 0.20, 8: 0.10}

MEASURE_RHO_ERR_ARCSEC = 0.1   # common practice, no source (WDS rounding 0.1")
MEASURE_THETA_ERR_DEG = 1.0    # common practice, no source (WDS rounding 1 deg)
MOTION_SIGMA = 3.0
MIN_BASELINE_YR = 1.0
CURVATURE_FRACTION = 0.5
COORD_EPOCH_YR = 2000.0

METHODS = ("orbit", "orbit-interferometric", "linear", "last", "none")

GEOMETRY_COLUMNS = (
    "rho_arcsec", "theta_deg", "method", "grade", "rho_unc_arcsec", "theta_unc_deg",
    "years_since_measure", "ra_date_deg", "dec_date_deg", "orbit_reference", "n_orbits",
    "epoch_yr", "reason",
)


def _num(df: pd.DataFrame, name: str) -> np.ndarray:
    if name in df.columns:
        return pd.to_numeric(df[name], errors="coerce").to_numpy(dtype=float, na_value=np.nan)
    return np.full(len(df), np.nan)


def _txt(df: pd.DataFrame, name: str) -> pd.Series:
    if name in df.columns:
        return df[name].fillna("").astype(str)
    return pd.Series([""] * len(df), index=df.index, dtype="str")


def measure_error_arcsec(rho_arcsec):
    """Positional error of one catalogued measure [arcsec] (common practice, no source):
    sqrt(0.1"^2 + (rho x 1 deg)^2)."""
    rho = np.asarray(rho_arcsec, dtype=float)
    return np.hypot(MEASURE_RHO_ERR_ARCSEC, rho * np.radians(MEASURE_THETA_ERR_DEG))


def _xy(rho, theta_deg):
    th = np.radians(theta_deg)
    return rho * np.cos(th), rho * np.sin(th)  # x north, y east


def theta_unc_from(sigma_arcsec, rho_arcsec):
    """Position-angle uncertainty [deg] of a position uncertain by sigma at distance rho."""
    with np.errstate(divide="ignore", invalid="ignore"):
        out = np.degrees(np.asarray(sigma_arcsec, float) / np.asarray(rho_arcsec, float))
    return np.where(np.isfinite(out), np.minimum(out, 180.0), np.where(np.isnan(sigma_arcsec), np.nan, 180.0))


def linear_positions(rho_first, theta_first_deg, year_first, rho_last, theta_last_deg, year_last,
                     epoch_yr, n_obs=None) -> pd.DataFrame:
    """Last measure, or rectilinear extrapolation from the first to the last measure.

    Rectilinear motion x = x0 + vx (t - t0), y = y0 + vy (t - t0) as in the
    USNO catalogues of rectilinear elements (Hartkopf & Mason, LIN1/LIN2;
    docs/methods.md section 7), here through the first and last catalogued
    measures only.  Motion test and uncertainty model: module docstring.

    Returns a DataFrame (positional index) with ``moving`` (bool),
    ``x_north_arcsec``, ``y_east_arcsec``, ``rho_arcsec``, ``theta_deg``,
    ``sigma_arcsec``, ``theta_unc_deg``, ``speed_arcsec_per_yr``,
    ``baseline_yr``, ``single_epoch`` (bool).
    """
    r1, t1, y1 = (np.asarray(v, dtype=float) for v in (rho_first, theta_first_deg, year_first))
    r2, t2, y2 = (np.asarray(v, dtype=float) for v in (rho_last, theta_last_deg, year_last))
    nobs = np.nan if n_obs is None else np.asarray(n_obs, dtype=float)
    r1, t1, y1, r2, t2, y2, t, nobs = (np.atleast_1d(v) for v in np.broadcast_arrays(
        r1, t1, y1, r2, t2, y2, np.asarray(epoch_yr, dtype=float), nobs))

    x1, e1 = _xy(r1, t1)
    x2, e2 = _xy(r2, t2)
    s1, s2 = measure_error_arcsec(r1), measure_error_arcsec(r2)
    baseline = y2 - y1
    disp = np.hypot(x2 - x1, e2 - e1)
    s_disp = np.hypot(s1, s2)
    two_epochs = np.isfinite(disp) & np.isfinite(baseline) & (baseline >= MIN_BASELINE_YR) & ~(nobs < 2)
    moving = two_epochs & (disp > MOTION_SIGMA * s_disp)
    with np.errstate(divide="ignore", invalid="ignore"):
        vx = np.where(moving, (x2 - x1) / baseline, 0.0)
        vy = np.where(moving, (e2 - e1) / baseline, 0.0)
        s_v = s_disp / baseline
    dt = t - y2
    dt_fwd = np.abs(dt)
    x = x2 + vx * dt
    y = e2 + vy * dt
    speed = np.hypot(vx, vy)
    sig_linear = np.sqrt(s2**2 + (s_v * dt_fwd) ** 2 + (CURVATURE_FRACTION * speed * dt_fwd) ** 2)
    sig_last = np.where(two_epochs, np.hypot(s2, MOTION_SIGMA * s_v * dt_fwd), s2)
    sigma = np.where(moving, sig_linear, sig_last)
    sigma = np.where(np.isfinite(r2), sigma, np.nan)
    rho = np.hypot(x, y)
    theta = np.mod(np.degrees(np.arctan2(y, x)), 360.0)
    theta = np.where(theta >= 360.0, 0.0, theta)
    return pd.DataFrame({
        "moving": moving, "x_north_arcsec": x, "y_east_arcsec": y, "rho_arcsec": rho,
        "theta_deg": theta, "sigma_arcsec": sigma, "theta_unc_deg": theta_unc_from(sigma, rho),
        "speed_arcsec_per_yr": np.where(moving, speed, np.nan), "baseline_yr": baseline,
        "single_epoch": ~two_epochs & np.isfinite(r2),
    })


def apply_proper_motion(ra_deg, dec_deg, pm_ra_masyr, pm_dec_masyr, years):
    """Position after ``years`` of proper motion [deg, deg].

    ``pm_ra_masyr`` is mu_alpha* (= mu_alpha cos dec).  Straight-line motion in
    space with no parallax or radial velocity: p(t) = p0 + t (mu_a* e_ra +
    mu_d e_dec), normalised (Green, R. M. 1985, *Spherical Astronomy*, ch. 9;
    the model of erfa ``starpm`` with zero parallax and radial velocity).
    NaN proper motion = no motion applied.
    """
    ra = np.radians(np.asarray(ra_deg, dtype=float))
    dec = np.radians(np.asarray(dec_deg, dtype=float))
    k = np.radians(1.0 / 3.6e6)  # mas -> rad
    pa = np.nan_to_num(np.asarray(pm_ra_masyr, dtype=float)) * k * np.asarray(years, dtype=float)
    pd_ = np.nan_to_num(np.asarray(pm_dec_masyr, dtype=float)) * k * np.asarray(years, dtype=float)
    cr, sr, cd, sd = np.cos(ra), np.sin(ra), np.cos(dec), np.sin(dec)
    px = cd * cr - pa * sr - pd_ * sd * cr
    py = cd * sr + pa * cr - pd_ * sd * sr
    pz = sd + pd_ * cd
    ra2 = np.mod(np.degrees(np.arctan2(py, px)), 360.0)
    dec2 = np.degrees(np.arctan2(pz, np.hypot(px, py)))
    return ra2, dec2


def _pair_key(df: pd.DataFrame) -> pd.Series:
    """Link key between the pair and orbit tables: WDS id + the catalogue's
    component key (blanks dropped, '-' = ',', a blank label = 'AB'), the same
    rule :func:`planner.catalogs.catalog.merge` uses for ``has_orbit``."""
    from planner.catalogs.catalog import component_key

    return _txt(df, "wds_id").str.strip() + "|" + component_key(_txt(df, "components"))


def _disc_key(df: pd.DataFrame) -> pd.Series:
    return _txt(df, "discoverer").str.replace(r"[\s,\-]", "", regex=True).str.upper()


def _link_orbits(pairs: pd.DataFrame, orbits: pd.DataFrame) -> tuple[np.ndarray, np.ndarray]:
    """Links between orbit rows and pair rows, as two position arrays
    ``(orbit_pos, pair_pos)`` (one entry per link; a pair table that repeats
    a pair links its orbits to every copy).

    First on WDS id + component key + discoverer; an orbit left over is
    linked on WDS id + component key alone when exactly one pair (one
    designation) has that key (e.g. bet Sco, 16054-1948: ORB6 rows for
    'bet Sco' and 'BU 947 AB' both have the component key AB and must not be
    mixed).
    """
    P = pd.DataFrame({"p": np.arange(len(pairs)), "key": _pair_key(pairs).to_numpy()})
    P["full"] = P["key"] + "|" + _disc_key(pairs).to_numpy()
    O = pd.DataFrame({"o": np.arange(len(orbits)), "key": _pair_key(orbits).to_numpy()})
    O["full"] = O["key"] + "|" + _disc_key(orbits).to_numpy()
    m1 = O.merge(P[["p", "full"]], on="full")
    rest = O[~O["o"].isin(m1["o"])]
    ident = P.drop_duplicates("full")
    n_ident = ident.groupby("key").size()
    single = P[P["key"].isin(n_ident.index[n_ident.to_numpy() == 1])]
    m2 = rest.merge(single[["p", "key"]], on="key")
    o_pos = np.concatenate([m1["o"].to_numpy(int), m2["o"].to_numpy(int)])
    p_pos = np.concatenate([m1["p"].to_numpy(int), m2["p"].to_numpy(int)])
    return o_pos, p_pos


def _orbit_choice(pairs: pd.DataFrame, orbits: pd.DataFrame, t_pair: np.ndarray, precession: str) -> pd.DataFrame:
    """One row per pair that has a usable orbit: the chosen orbit's position,
    grade, reference, spread of the alternatives and the orbit count."""
    cols = ["pair", "rho", "theta", "grade", "reference", "spread_rho", "spread_theta", "n", "class"]
    if orbits is None or len(orbits) == 0 or len(pairs) == 0:
        return pd.DataFrame(columns=cols).set_index("pair")
    o_pos, pair_pos = _link_orbits(pairs, orbits)
    o = orbits.iloc[o_pos]
    if len(o) == 0:
        return pd.DataFrame(columns=cols).set_index("pair")
    p = orbit_positions(o, t_pair[pair_pos], precession=precession)
    grade = _num(o, "grade")
    usable = (p["status"].isin(["ok", "interferometric"]).to_numpy()
              & np.isfinite(p["rho_arcsec"].to_numpy(float)))
    cls = np.where(np.isin(grade, VISUAL_GRADES), 0, 1)  # 0 visual, 1 interferometric
    ref_year = pd.to_numeric(_txt(o, "reference").str.extract(r"(\d{4})", expand=False),
                             errors="coerce").to_numpy(float)
    preferred = o["preferred"].fillna(False).to_numpy(bool) if "preferred" in o.columns else np.zeros(len(o), bool)
    t = pd.DataFrame({
        "pair": pair_pos, "rho": p["rho_arcsec"].to_numpy(float), "theta": p["theta_deg"].to_numpy(float),
        "grade": grade, "reference": _txt(o, "reference").to_numpy(), "class": cls,
        "notpref": (~preferred).astype(int), "g": np.nan_to_num(grade, nan=99.0),
        "ry": -np.nan_to_num(ref_year, nan=0.0), "usable": usable,
    })[usable]
    if len(t) == 0:
        return pd.DataFrame(columns=cols).set_index("pair")
    # visual before interferometric; within that the reader's preferred flag, grade, newest reference
    t = t.sort_values(["pair", "class", "notpref", "g", "ry"], kind="stable")
    best = t.drop_duplicates("pair", keep="first").set_index("pair")
    same = t.merge(best[["class", "rho", "theta"]].reset_index(), on=["pair", "class"],
                   suffixes=("", "_best"))
    same["drho"] = (same["rho"] - same["rho_best"]).abs()
    same["dth"] = ((same["theta"] - same["theta_best"] + 180.0) % 360.0 - 180.0).abs()
    agg = same.groupby("pair").agg(spread_rho=("drho", "max"), spread_theta=("dth", "max"), n=("rho", "size"))
    return best[["rho", "theta", "grade", "reference", "class"]].join(agg)


def _linear_reasons(speed_arcsec_yr: np.ndarray) -> np.ndarray:
    """The note for pairs on straight-line motion, with the speed to 0.001"/yr.

    Formatted once per distinct rounded speed and gathered back (a full
    catalogue has far fewer distinct speeds than pairs), so the cost does not
    grow with a per-pair string operation."""
    k = np.round(np.nan_to_num(np.asarray(speed_arcsec_yr, float)), 3)
    uniq, inv = np.unique(k, return_inverse=True)
    text = np.array([f"no orbit; straight-line motion from first to last measure ({v:.3f}\"/yr)" for v in uniq],
                    dtype=object)
    return text[inv.reshape(-1)]


def pair_geometry(catalog, epoch_yr=None, precession: str = "j2000") -> pd.DataFrame:
    """Separation, position angle, method and uncertainty of every pair at a date.

    Sources: orbits -- Thiele-Innes method (Heintz 1978; Meeus 1998 ch. 57) via
    :func:`planner.motion.orbits.orbit_positions`; no orbit -- rectilinear
    motion (Hartkopf & Mason, USNO LIN catalogues) through the first and last
    WDS measures; proper motion -- Green (1985).  Uncertainty model and
    thresholds: module docstring (rough sizes, common practice, no source).

    Parameters
    ----------
    catalog : planner.catalogs.Catalog (or any object with ``pairs`` and
        ``orbits`` DataFrames)
    epoch_yr : float, array aligned with the pairs, astropy Time or datetime;
        Besselian year(s).  Default: now.
    precession : orbit position-angle precession model
        (:data:`planner.motion.orbits.PRECESSION_MODELS`).

    Returns
    -------
    DataFrame aligned with ``catalog.pairs.index``: ``rho_arcsec``,
    ``theta_deg``, ``method`` (orbit, orbit-interferometric, linear, last,
    none), ``grade`` (of the orbit used, else NaN), ``rho_unc_arcsec``,
    ``theta_unc_deg``, ``years_since_measure`` (date minus the last catalogued
    measure), ``ra_date_deg``, ``dec_date_deg``, ``orbit_reference``,
    ``n_orbits`` (orbits of the class used: visual or interferometric),
    ``epoch_yr``, ``reason`` (one line on how the figures were obtained).
    """
    from planner.motion.epochs import today_epoch_yr

    pairs = catalog.pairs
    orbits = getattr(catalog, "orbits", None)
    n = len(pairs)
    t = _epochs_for_rows(today_epoch_yr() if epoch_yr is None else epoch_yr, n)

    # -- measures: last / linear -------------------------------------------
    year_last = _num(pairs, "year_last")
    lin = linear_positions(_num(pairs, "sep_first_arcsec"), _num(pairs, "pa_first_deg"), _num(pairs, "year_first"),
                           _num(pairs, "sep_last_arcsec"), _num(pairs, "pa_last_deg"), year_last, t,
                           _num(pairs, "n_obs"))
    moving = lin["moving"].to_numpy(bool)
    # a separation without a position angle (BSC5 multiple-star fields) is still a last
    # measure: rho as catalogued, theta unknown (NaN)
    measured = np.isfinite(_num(pairs, "sep_last_arcsec"))
    no_theta = measured & ~np.isfinite(_num(pairs, "pa_last_deg"))
    last_rho = _num(pairs, "sep_last_arcsec")
    last_theta = _num(pairs, "pa_last_deg")
    rho = np.where(moving, lin["rho_arcsec"].to_numpy(float), last_rho)
    theta = np.where(moving, lin["theta_deg"].to_numpy(float), last_theta)
    rho_unc = lin["sigma_arcsec"].to_numpy(float, copy=True)
    theta_unc = np.where(moving, lin["theta_unc_deg"].to_numpy(float),
                         theta_unc_from(rho_unc, last_rho))
    theta_unc = np.where(np.isfinite(theta), theta_unc, np.nan)
    method = np.full(n, "none", dtype=object)
    method[measured] = "last"
    method[moving] = "linear"
    grade = np.full(n, np.nan)
    reference = np.full(n, "", dtype=object)
    n_orbits = np.zeros(n, dtype=int)
    by_orbit = np.zeros(n, dtype=bool)  # method is orbit or orbit-interferometric
    speed = lin["speed_arcsec_per_yr"].to_numpy(float)
    single = lin["single_epoch"].to_numpy(bool)
    dt_last = t - year_last
    reason = np.full(n, "no orbit and no measure", dtype=object)
    reason[measured & single] = "no orbit; last measure, motion unknown (single epoch)"
    reason[measured & ~single] = "no orbit; last measure (no significant motion between first and last measure)"
    reason[no_theta] = "no orbit; last catalogued separation, position angle not catalogued"
    if moving.any():
        reason[moving] = _linear_reasons(speed[moving])

    # -- orbits ---------------------------------------------------------------
    ch = _orbit_choice(pairs, orbits, t, precession)
    if len(ch):
        i = ch.index.to_numpy(int)
        r = ch["rho"].to_numpy(float)
        g = ch["grade"].to_numpy(float)
        frac = pd.Series(g).map(GRADE_FLOOR_FRACTION).to_numpy(float)
        frac = np.where(np.isfinite(frac), frac, 0.2)
        rho[i] = r
        theta[i] = ch["theta"].to_numpy(float)
        rho_unc[i] = np.maximum(ch["spread_rho"].to_numpy(float), frac * r)
        theta_unc[i] = np.minimum(np.maximum(ch["spread_theta"].to_numpy(float), np.degrees(frac)), 180.0)
        visual = ch["class"].to_numpy(int) == 0
        method[i] = np.where(visual, "orbit", "orbit-interferometric")
        by_orbit[i] = True
        grade[i] = g
        reference[i] = ch["reference"].to_numpy(object)
        n_orbits[i] = ch["n"].to_numpy(int)
        reason[i] = np.where(ch["n"].to_numpy(int) > 1,
                             "orbit; uncertainty = spread of the pair's orbits or the grade floor, whichever is larger",
                             "orbit; uncertainty = floor for the orbit grade")
        # np.char.add: numpy 1.x has no "+" between text arrays
        reason[i] = np.where(visual, reason[i],
                             np.char.add("interferometric orbit (grade 8); ", reason[i].astype(str)))
    # pairs with only astrometric/incomplete orbits say so
    if orbits is not None and len(orbits) and n:
        o_pos, p_pos = _link_orbits(pairs, orbits)
        astro = p_pos[_num(orbits, "grade")[o_pos] == 9]
        has_astro = np.zeros(n, bool)
        has_astro[astro] = True
        only_astro = has_astro & ~by_orbit
        reason[only_astro] = np.char.add("astrometric orbit only (grade 9, no separation); ",
                                         reason[only_astro].astype(str))
        incomplete = ~(orbits["complete"].fillna(False).to_numpy(bool)) if "complete" in orbits.columns \
            else np.zeros(len(orbits), bool)
        inc = p_pos[incomplete[o_pos]]
        has_inc = np.zeros(n, bool)
        has_inc[inc] = True
        only_inc = has_inc & ~by_orbit
        reason[only_inc] = np.char.add("orbit with incomplete elements (not used); ",
                                       reason[only_inc].astype(str))

    ra_d, dec_d = apply_proper_motion(_num(pairs, "ra_deg"), _num(pairs, "dec_deg"), _num(pairs, "pm1_ra_masyr"),
                                      _num(pairs, "pm1_dec_masyr"), t - COORD_EPOCH_YR)
    return pd.DataFrame({
        "rho_arcsec": rho, "theta_deg": theta,
        "method": pd.array(method, dtype="str"),
        "grade": grade, "rho_unc_arcsec": rho_unc, "theta_unc_deg": theta_unc,
        "years_since_measure": dt_last, "ra_date_deg": ra_d, "dec_date_deg": dec_d,
        "orbit_reference": pd.array(reference, dtype="str"),
        "n_orbits": n_orbits, "epoch_yr": t,
        "reason": pd.array(reason, dtype="str"),
    }, index=pairs.index)


# every public function above accepts astropy Quantity arguments (planner.units)
wrap_public(globals())
