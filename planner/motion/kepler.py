"""Kepler's equation for elliptic orbits, vectorised over numpy arrays.

Solves ``E - e sin E = M`` for the eccentric anomaly ``E`` (radians) given the
mean anomaly ``M`` (radians) and the eccentricity ``0 <= e < 1``.

Method (Danby, J. M. A. 1988, *Fundamentals of Celestial Mechanics*, 2nd ed.,
section 6.6; Murray & Dermott 1999, *Solar System Dynamics*, section 2.4):

* ``M`` is reduced to ``[0, pi]`` using the symmetry ``E(-M) = -E(M)`` and the
  period ``2 pi``; on that interval the root is bracketed by
  ``M <= E <= min(M + e, pi)`` because ``E - M = e sin E`` lies in ``[0, e]``.
* starting value ``E0 = M + 0.85 e`` (Danby's starter, also good at e > 0.9
  where ``E0 = M`` converges slowly near periastron);
* Halley's third-order iteration, safeguarded: a step that leaves the current
  bracket is replaced by bisection of the bracket, so the iteration cannot
  diverge for any ``e < 1`` (the case that defeats plain Newton at high
  eccentricity and small ``M``).

All elements are iterated together for a fixed maximum number of steps (no
per-element Python loop); the loop stops early once every element has moved
by less than ``tol`` in the last step.
"""

from __future__ import annotations

import numpy as np

TWO_PI = 2.0 * np.pi


def solve_kepler(mean_anomaly_rad, ecc, tol: float = 1e-13, max_iter: int = 40):
    """Eccentric anomaly E (radians) for mean anomaly ``M`` and eccentricity ``e``.

    Source: Danby (1988), Murray & Dermott (1999); see the module docstring.

    Parameters
    ----------
    mean_anomaly_rad : array_like
        Mean anomaly M [rad], any real value; broadcast against ``ecc``.
    ecc : array_like
        Eccentricity, ``0 <= e < 1``. Values outside give NaN.
    tol : float
        Stop when every step is below ``tol`` [rad] (default 1e-13; the
        residual ``|E - e sin E - M|`` is then below ~1e-12 rad).
    max_iter : int
        Upper bound on the number of vectorised iterations.

    Returns
    -------
    numpy.ndarray
        E [rad], with the same number of whole turns as M (so that
        ``E - e sin E == M`` holds without reduction). NaN where M or e is NaN
        or e is outside [0, 1).
    """
    M, e = np.broadcast_arrays(np.asarray(mean_anomaly_rad, dtype=float),
                               np.asarray(ecc, dtype=float))
    M = M.astype(float, copy=True)
    e = e.astype(float, copy=True)
    bad = ~np.isfinite(M) | ~np.isfinite(e) | (e < 0.0) | (e >= 1.0)
    e = np.where(bad, 0.0, e)
    M = np.where(bad, 0.0, M)

    # reduce to [-pi, pi), then fold to [0, pi]
    turns = np.floor((M + np.pi) / TWO_PI)
    m = M - turns * TWO_PI
    sign = np.where(m < 0.0, -1.0, 1.0)
    m = np.abs(m)

    lo = m.copy()
    hi = np.minimum(m + e, np.pi)
    E = np.minimum(m + 0.85 * e, np.pi)  # Danby's starter
    for _ in range(max_iter):
        sE, cE = np.sin(E), np.cos(E)
        f = E - e * sE - m
        f1 = 1.0 - e * cE
        f2 = e * sE
        # update the bracket with the sign of f (f is increasing in E)
        pos = f > 0.0
        hi = np.where(pos, E, hi)
        lo = np.where(pos, lo, E)
        with np.errstate(divide="ignore", invalid="ignore"):
            newton = f / f1
            step = newton / (1.0 - 0.5 * newton * f2 / f1)  # Halley
        E_new = E - step
        outside = ~((E_new >= lo) & (E_new <= hi)) | ~np.isfinite(E_new)
        E_new = np.where(outside, 0.5 * (lo + hi), E_new)
        delta = np.abs(E_new - E)
        E = E_new
        if not np.any(delta > tol):
            break
    out = np.where(bad, np.nan, sign * E + turns * TWO_PI)
    return out if out.ndim else out[()]


def kepler_residual(E_rad, mean_anomaly_rad, ecc):
    """``E - e sin E - M`` [rad]: zero for an exact solution."""
    E = np.asarray(E_rad, dtype=float)
    return E - np.asarray(ecc, dtype=float) * np.sin(E) - np.asarray(mean_anomaly_rad, dtype=float)
