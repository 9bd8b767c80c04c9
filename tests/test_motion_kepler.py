"""Validation of the Kepler solver (planner.motion.kepler).

What is checked, against what:

* the residual |E - e sin E - M| of Kepler's equation itself (the equation is
  the reference: Kepler 1609; any textbook, e.g. Murray & Dermott 1999 eq. 2.52)
  stays below 1e-12 rad for 0 <= e <= 0.999 and any M, including the hard
  corner of high e and small M;
* E agrees with an independent root finder (scipy.optimize.brentq) on a grid;
* Meeus (1998, Astronomical Algorithms, ch. 57, Example 57.a; docs/methods.md
  section 7): eta CrB at 1980.0 has M = 37.788 deg, E = 49.896 deg.
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from planner.motion.kepler import kepler_residual, solve_kepler


@settings(max_examples=300, deadline=None)
@given(M=st.floats(-100.0, 100.0, allow_nan=False), e=st.floats(0.0, 0.999))
def test_residual_below_1e12_rad_for_any_M_and_e_up_to_0999(M, e):
    # reference: Kepler's equation itself; tolerance 1e-12 rad (brief: converge to 1e-12)
    E = solve_kepler(M, e)
    assert abs(float(kepler_residual(E, M, e))) < 1e-12


def test_high_eccentricity_near_periastron_converges():
    # the case where plain Newton from E0 = M oscillates (Danby 1988 section 6.6);
    # reference: Kepler's equation, tolerance 1e-12 rad
    e = np.array([0.9, 0.95, 0.99, 0.995, 0.999])[:, None]
    M = np.concatenate([-np.logspace(-8, 0, 60), np.logspace(-8, 0, 60), np.linspace(-np.pi, np.pi, 61)])[None, :]
    E = solve_kepler(M, e)
    assert E.shape == (5, 181)
    assert np.all(np.isfinite(E))
    assert np.max(np.abs(kepler_residual(E, M, e))) < 1e-12


def test_agrees_with_brentq():
    # independent reference: scipy.optimize.brentq on f(E) = E - e sin E - M, bracket [M - 1, M + 1]
    from scipy.optimize import brentq

    rng = np.random.default_rng(3)
    M = rng.uniform(-10, 10, 50)
    e = rng.uniform(0, 0.99, 50)
    ref = np.array([brentq(lambda x, m=m, ee=ee: x - ee * np.sin(x) - m, m - 1.0, m + 1.0, xtol=1e-15)
                    for m, ee in zip(M, e)])
    np.testing.assert_allclose(solve_kepler(M, e), ref, atol=1e-11, rtol=0)


def test_eta_crb_meeus():
    # Meeus 1998, Astronomical Algorithms ch. 57, Ex. 57.a: M = 37.788 deg -> E = 49.896 deg (3 decimals printed)
    P, T, e = 41.623, 1934.008, 0.2763
    M = 2 * np.pi * (1980.0 - T) / P
    assert np.degrees(M) % 360 == pytest.approx(37.788, abs=0.0005)
    assert np.degrees(solve_kepler(M, e)) % 360 == pytest.approx(49.896, abs=0.0005)


def test_invalid_eccentricity_gives_nan_not_a_guess():
    # common practice, no source: e outside [0, 1) has no elliptic solution
    E = solve_kepler(np.array([1.0, 1.0, 1.0, np.nan]), np.array([1.0, -0.1, 6.36, 0.5]))
    assert np.all(np.isnan(E))


def test_circular_orbit_is_identity():
    # e = 0: E = M exactly (Kepler's equation)
    M = np.linspace(-20, 20, 101)
    np.testing.assert_allclose(solve_kepler(M, 0.0), M, atol=1e-13)
