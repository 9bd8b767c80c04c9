"""Apparent relative orbits: separation and position angle at any epoch.

Campbell elements (P, T, e, a, i, Omega, omega) -> Thiele-Innes constants ->
rectangular offsets of the companion from the primary -> (rho, theta), with
the position angle corrected for precession to the equinox of date.

Sources
-------
* Thiele-Innes constants and the ephemeris recipe: Heintz, W. D. 1978,
  *Double Stars* (Reidel), ch. 4; Aitken, R. G. 1935, *The Binary Stars*;
  check values: Meeus, J. 1998, *Astronomical Algorithms* 2nd ed., ch. 57
  (eta CrB, Example 57.a).  Formulas as written in the project's
  docs/methods.md section 7.
* Kepler's equation: :mod:`planner.motion.kepler`.
* Precession of the position angle, first order:
  ``d theta = 0.00557 deg x sin(alpha) sec(delta) x (t - t0)`` (annual
  general precession in declination n = 20.04"/yr; e.g. Heintz 1978; checked
  against rigorous IAU 2006 precession from erfa in the tests).

Conventions
-----------
* ``x_north_arcsec``, ``y_east_arcsec``: companion minus primary, x towards
  north, y towards east (on the sky east is to the LEFT when north is up).
* ``theta_deg`` = atan2(y, x) in [0, 360), north through east.
* Epochs are Besselian years (:mod:`planner.motion.epochs`).
* A negative semi-major axis (one ORB6 row, HIP1997d for 02130+0851) is used
  as catalogued: the Thiele-Innes constants change sign, so the position
  angle comes out 180 deg from that of |a| with a positive rho.  This is what
  the catalogue's own ephemeris lists for that orbit (see
  ``docs/orbit-validation.md``).  A negative inclination (one row, Ghe2003)
  enters only through cos i and sin i is never used, so it equals |i|.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from planner.motion.epochs import to_epoch_yr
from planner.motion.kepler import solve_kepler
from planner.units import wrap_public

#: Annual precession in position angle per unit sin(alpha) sec(delta) [deg/yr]
#: (n = 20.043"/yr; docs/methods.md section 7).
PRECESSION_RATE_DEG_PER_YR = 0.00557

#: Grades (ORB6 column 234).
VISUAL_GRADES = (1, 2, 3, 4, 5)
INTERFEROMETRIC_GRADE = 8
ASTROMETRIC_GRADE = 9

ELEMENT_COLUMNS = ("period_yr", "a_arcsec", "incl_deg", "node_deg", "t_peri_yr", "ecc", "omega_deg")


def _reference_equinox_j2000(orbits: pd.DataFrame) -> np.ndarray:
    return np.full(len(orbits), 2000.0)


def _reference_equinox_column(orbits: pd.DataFrame) -> np.ndarray:
    eq = _col(orbits, "equinox")
    return np.where(np.isfinite(eq), eq, 2000.0)


def _reference_equinox_none(orbits: pd.DataFrame) -> np.ndarray:
    return np.full(len(orbits), np.nan)


#: How the position angle is precessed to the date.  The value is the
#: function giving each orbit's reference equinox t0 (NaN = no correction).
#:
#: * ``"j2000"`` (default): from 2000.0 whatever the equinox column says.
#:   The catalogue's own ephemeris (2005-2009) is reproduced best this way
#:   (USNO appears to have referred the nodes to 2000 when compiling ORB6);
#:   see ``docs/orbit-validation.md``.
#: * ``"equinox"``: from the orbit's equinox column (2000 where blank), the
#:   literal reading of the catalogue format.
#: * ``"none"``: no precession; theta refers to the equinox of the elements.
PRECESSION_MODELS = {
    "j2000": _reference_equinox_j2000,
    "equinox": _reference_equinox_column,
    "none": _reference_equinox_none,
}


def _col(df: pd.DataFrame, name: str, default=np.nan) -> np.ndarray:
    if name in df.columns:
        return pd.to_numeric(df[name], errors="coerce").to_numpy(dtype=float, na_value=np.nan)
    return np.full(len(df), default, dtype=float)


def thiele_innes(a_arcsec, incl_deg, node_deg, omega_deg):
    """Thiele-Innes constants (A, B, F, G) [arcsec] from Campbell elements.

    Source: Heintz (1978); Meeus (1998) ch. 57; docs/methods.md section 7::

        A = a( cos w cos W - sin w sin W cos i)
        B = a( cos w sin W + sin w cos W cos i)
        F = a(-sin w cos W - cos w sin W cos i)
        G = a(-sin w sin W + cos w cos W cos i)

    with w = omega (argument of periastron), W = Omega (node).  A, F give the
    north (x) and B, G the east (y) offsets.
    """
    a = np.asarray(a_arcsec, dtype=float)
    ci = np.cos(np.radians(incl_deg))
    W = np.radians(node_deg)
    w = np.radians(omega_deg)
    cW, sW, cw, sw = np.cos(W), np.sin(W), np.cos(w), np.sin(w)
    A = a * (cw * cW - sw * sW * ci)
    B = a * (cw * sW + sw * cW * ci)
    F = a * (-sw * cW - cw * sW * ci)
    G = a * (-sw * sW + cw * cW * ci)
    return A, B, F, G


def precession_pa_deg(ra_deg, dec_deg, years):
    """First-order change of position angle from precession [deg].

    ``d theta = 0.00557 deg x sin(alpha) sec(delta) x (t - t0)`` (methods-
    reference section 7; Heintz 1978).  ``years`` = t - t0.  Degrades near
    the celestial poles (0.03 deg off at dec 80 over 50 yr; see tests).
    """
    ra = np.radians(np.asarray(ra_deg, dtype=float))
    dec = np.radians(np.asarray(dec_deg, dtype=float))
    return PRECESSION_RATE_DEG_PER_YR * np.sin(ra) / np.cos(dec) * np.asarray(years, dtype=float)


def orbit_xy(period_yr, t_peri_yr, ecc, A, B, F, G, epoch_yr):
    """Offsets (x north, y east) [arcsec] at ``epoch_yr``; all inputs broadcast.

    Steps (docs/methods.md section 7): M = 2 pi (t - T) / P; Kepler for E;
    X = cos E - e; Y = sqrt(1 - e^2) sin E; x = A X + F Y; y = B X + G Y.
    """
    M = 2.0 * np.pi * (np.asarray(epoch_yr, dtype=float) - t_peri_yr) / period_yr
    E = solve_kepler(M, ecc)
    X = np.cos(E) - ecc
    with np.errstate(invalid="ignore"):  # e >= 1 already gave E = NaN
        Y = np.sqrt(1.0 - ecc * ecc) * np.sin(E)
    return A * X + F * Y, B * X + G * Y


def _status(orbits: pd.DataFrame, el: dict) -> tuple[np.ndarray, np.ndarray]:
    n = len(orbits)
    status = np.full(n, "ok", dtype=object)
    reason = np.full(n, "", dtype=object)
    grade = _col(orbits, "grade")
    finite = np.ones(n, dtype=bool)
    for k in ELEMENT_COLUMNS:
        finite &= np.isfinite(el[k])
    valid = finite & (el["period_yr"] > 0) & (el["ecc"] >= 0) & (el["ecc"] < 1) & (el["a_arcsec"] != 0)
    if "complete" in orbits.columns:
        valid &= orbits["complete"].fillna(False).to_numpy(dtype=bool)
    status[grade == INTERFEROMETRIC_GRADE] = "interferometric"
    reason[grade == INTERFEROMETRIC_GRADE] = "grade 8: interferometric orbit, not graded on rho/theta"
    status[grade == ASTROMETRIC_GRADE] = "astrometric"
    reason[grade == ASTROMETRIC_GRADE] = "grade 9: astrometric (photocentre) orbit, gives no separation"
    status[~valid] = "incomplete"
    reason[~valid] = "incomplete or invalid elements (needs P > 0, 0 <= e < 1, a, i, Omega, T, omega)"
    return status, reason


@dataclass(frozen=True)
class _Prepared:
    """What both position functions need per orbit row: elements, status, which rows to
    use, the Thiele-Innes constants (A, B, F, G) and the equinox the PA is precessed from."""

    el: dict
    status: np.ndarray
    reason: np.ndarray
    use: np.ndarray
    abfg: tuple
    t0: np.ndarray


def _prepare(orbits: pd.DataFrame, precession: str, astrometric: bool) -> _Prepared:
    if precession not in PRECESSION_MODELS:
        from planner.errors import InputError

        raise InputError(f"precession={precession!r} is not known; use one of {', '.join(PRECESSION_MODELS)}")
    el = {k: _col(orbits, k) for k in ELEMENT_COLUMNS}
    status, reason = _status(orbits, el)
    use = (status == "ok") | (status == "interferometric") | ((status == "astrometric") & astrometric)
    A, B, F, G = thiele_innes(el["a_arcsec"], el["incl_deg"], el["node_deg"], el["omega_deg"])
    t0 = PRECESSION_MODELS[precession](orbits)
    return _Prepared(el=el, status=status, reason=reason, use=use, abfg=(A, B, F, G), t0=t0)


def _epochs_for_rows(epoch, n: int) -> np.ndarray:
    t = np.asarray(to_epoch_yr(epoch), dtype=float)
    try:
        return np.broadcast_to(t, (n,)).copy()
    except ValueError:
        from planner.errors import InputError

        raise InputError(f"{t.size} epochs given for {n} rows; give one epoch or one per row") from None


def orbit_positions(orbits: pd.DataFrame, epoch, precession: str = "j2000",
                    astrometric: bool = False) -> pd.DataFrame:
    """Separation and position angle of each orbit at ``epoch``.

    Sources: Thiele-Innes method (Heintz 1978; Meeus 1998 ch. 57), Kepler
    solver of :mod:`planner.motion.kepler`, first-order precession of the
    position angle; see the module docstring.

    Parameters
    ----------
    orbits : DataFrame
        Orbit table (``planner.schema.ORBIT_COLUMNS``): needs ``period_yr``,
        ``a_arcsec``, ``incl_deg``, ``node_deg``, ``t_peri_yr``, ``ecc``,
        ``omega_deg``; uses ``grade``, ``complete``, ``equinox``, ``ra_deg``,
        ``dec_deg`` when present.
    epoch : float, array, astropy Time, datetime
        Besselian year(s); an array must broadcast against the rows (length 1
        or ``len(orbits)``).
    precession : {"j2000", "equinox", "none"}
        Reference equinox of the catalogued node (:data:`PRECESSION_MODELS`).
    astrometric : bool
        Compute grade-9 (photocentre) orbits too.  Off by default: their
        "separation" is the photocentre's wobble, not the pair's separation.

    Returns
    -------
    DataFrame aligned with ``orbits.index``: ``epoch_yr``, ``x_north_arcsec``,
    ``y_east_arcsec``, ``rho_arcsec``, ``theta_deg`` (north through east,
    [0, 360), precessed to the date), ``precession_deg`` (correction added),
    ``status`` (``ok``, ``interferometric``, ``astrometric``,
    ``incomplete``) and ``reason`` (text; empty when ``ok``).  Positions are
    NaN for incomplete orbits and, unless ``astrometric=True``, for grade 9.
    """
    n = len(orbits)
    t = _epochs_for_rows(epoch, n)
    pr = _prepare(orbits, precession, astrometric)
    el, status, reason, use, t0 = pr.el, pr.status, pr.reason, pr.use, pr.t0
    A, B, F, G = pr.abfg
    x, y = orbit_xy(el["period_yr"], el["t_peri_yr"], el["ecc"], A, B, F, G, t)
    x = np.where(use, x, np.nan)
    y = np.where(use, y, np.nan)
    rho = np.hypot(x, y)
    dth = precession_pa_deg(_col(orbits, "ra_deg"), _col(orbits, "dec_deg"), t - t0)
    dth = np.where(np.isfinite(dth), dth, 0.0)
    theta = np.mod(np.degrees(np.arctan2(y, x)) + dth, 360.0)
    theta = np.where(theta >= 360.0, 0.0, theta)  # mod can round up to 360.0
    if precession != "none":  # report the offsets in the frame of date too
        c, s = np.cos(np.radians(dth)), np.sin(np.radians(dth))
        x, y = x * c - y * s, x * s + y * c
    return pd.DataFrame(
        {
            "epoch_yr": t,
            "x_north_arcsec": x,
            "y_east_arcsec": y,
            "rho_arcsec": rho,
            "theta_deg": theta,
            "precession_deg": np.where(use, dth, np.nan),
            "status": pd.array(status, dtype="str"),
            "reason": pd.array(reason, dtype="str"),
        },
        index=orbits.index,
    )


def orbit_grid(orbits: pd.DataFrame, epochs, precession: str = "j2000",
               astrometric: bool = False) -> dict[str, np.ndarray]:
    """Positions of every orbit at every epoch: arrays of shape (n_orbits, n_epochs).

    Same method and conventions as :func:`orbit_positions` (one vectorised
    call, no loop over orbits or epochs).  Returns a dict with
    ``epoch_yr`` (1-D), ``x_north_arcsec``, ``y_east_arcsec``, ``rho_arcsec``,
    ``theta_deg`` (2-D) and ``status`` (1-D, per orbit).
    """
    t = np.atleast_1d(np.asarray(to_epoch_yr(epochs), dtype=float))
    pr = _prepare(orbits, precession, astrometric)
    el, status, reason, use, t0 = pr.el, pr.status, pr.reason, pr.use, pr.t0
    A, B, F, G = pr.abfg
    col = lambda v: np.asarray(v)[:, None]  # noqa: E731
    x, y = orbit_xy(col(el["period_yr"]), col(el["t_peri_yr"]), col(el["ecc"]),
                    col(A), col(B), col(F), col(G), t[None, :])
    x = np.where(col(use), x, np.nan)
    y = np.where(col(use), y, np.nan)
    dth = precession_pa_deg(col(_col(orbits, "ra_deg")), col(_col(orbits, "dec_deg")), t[None, :] - col(t0))
    dth = np.where(np.isfinite(dth), dth, 0.0)
    theta = np.mod(np.degrees(np.arctan2(y, x)) + dth, 360.0)
    theta = np.where(theta >= 360.0, 0.0, theta)
    c, s = np.cos(np.radians(dth)), np.sin(np.radians(dth))
    return {
        "epoch_yr": t,
        "x_north_arcsec": x * c - y * s,
        "y_east_arcsec": x * s + y * c,
        "rho_arcsec": np.hypot(x, y),
        "theta_deg": theta,
        "status": status,
        "reason": reason,
    }


# every public function above accepts astropy Quantity arguments (planner.units)
wrap_public(globals())
