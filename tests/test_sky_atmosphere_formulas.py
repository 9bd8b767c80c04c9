"""Formula arithmetic and documented edges of planner/sky/atmosphere.py, written out from
the published formulas (issue 16 items 1 and 7: each constant of the module is checked
by a test that fails when it changes).

Sources: Filippenko 1982, PASP 94, 715, eqs. 1-3 (refractivity of air); Hardie 1962 with
the clamp of SLALIB's sla_AIRMAS (z <= 1.52 rad); Bennett 1982 and Saemundsson 1986 with
Meeus 1991 pp. 102-103 (refraction); methods-reference sections 4 and 8.
"""

from __future__ import annotations

import numpy as np
import pytest

from planner.sky import atmosphere as atm

MMHG_PER_HPA = 760.0 / 1013.25        # standard atmosphere: 760 mmHg = 1013.25 hPa


def filippenko(lam_nm, p_hpa, t_c, f_hpa=0.0):
    """Filippenko 1982 eqs. 1-3 as printed (lambda in um, P, f in mmHg, T in C)."""
    s2 = (1000.0 / lam_nm) ** 2
    n15 = 64.328 + 29498.1 / (146 - s2) + 255.4 / (41 - s2)
    p = p_hpa * MMHG_PER_HPA
    n = n15 * p * (1 + (1.049 - 0.0157 * t_c) * 1e-6 * p) / (720.883 * (1 + 0.003661 * t_c))
    n -= (0.0624 - 0.000680 * s2) / (1 + 0.003661 * t_c) * f_hpa * MMHG_PER_HPA
    return n * 1e-6


@pytest.mark.parametrize("lam", [400.0, 450.0, 550.0, 650.0])
@pytest.mark.parametrize("p, t, f", [(1013.25, 15.0, 0.0), (800.0, -10.0, 0.0),
                                     (1013.25, 25.0, 20.0), (1100.0, 0.0, 5.0)])
def test_refractivity_is_filippenko_1982(lam, p, t, f):
    # the P-dependent term (1.049 - 0.0157 T) 1e-6 P is a 1e-3 correction: rel 1e-9 sees it
    assert atm.refractivity_filippenko1982(lam, p, t, f) == pytest.approx(filippenko(lam, p, t, f),
                                                                          rel=1e-9)


def test_refractivity_standard_value():
    # Filippenko 1982 eq. 1 at 15 C, 760 mmHg, dry: (n - 1) 10^6 = 64.328 + ... ; at 550 nm
    # this is 277.7 (the textbook refractivity of dry air, ~2.78e-4)
    assert atm.refractivity_filippenko1982(550.0, 1013.25, 15.0) * 1e6 == pytest.approx(277.7, abs=0.3)


def test_hardie_is_clamped_like_slalib_and_defined_down_to_the_horizon():
    # SLALIB sla_AIRMAS clamps z at 1.52 rad (87.1 deg): every altitude from 0 to 2.9 deg gives
    # the airmass at z = 1.52; Hardie's polynomial written out (Hardie 1962)
    s = 1 / np.cos(1.52) - 1
    at_clamp = 1 + s - 0.0018167 * s - 0.002875 * s**2 - 0.0008083 * s**3
    for h in (0.0, 0.5, 1.0, 2.0):
        assert float(atm.airmass_hardie1962(h)) == pytest.approx(at_clamp, rel=1e-12), h
    assert np.isnan(atm.airmass_hardie1962(-0.5))


@pytest.mark.parametrize("fn", [atm.refraction_bennett1982, atm.refraction_saemundsson1986])
def test_refraction_below_minus_one_degree_is_the_value_at_minus_one(fn):
    # documented edge: altitudes below -1 deg are evaluated at -1 deg (the formulas' poles lie
    # at -4.4 / -5.1 deg); Bennett 1982 / Saemundsson 1986 written out at -1 deg
    want = {atm.refraction_bennett1982: 1 / np.tan(np.radians(-1 + 7.31 / 3.4)),
            atm.refraction_saemundsson1986: 1.02 / np.tan(np.radians(-1 + 10.3 / 4.11))}[fn]
    for h in (-1.0, -2.0, -3.0):
        assert float(fn(h)) == pytest.approx(want, rel=1e-12), h


def test_dispersion_defaults_are_sea_level():
    # documented defaults: 450-650 nm, 1013.25 hPa (760 mmHg), 10 C -- the sea-level table of
    # methods-reference 8 [D, Filippenko 1982]: 0.88" at 45 deg, 1.53" at 30 deg altitude
    assert float(atm.dispersion_arcsec(45.0)) == pytest.approx(0.88, abs=0.01)
    assert float(atm.dispersion_arcsec(30.0)) == pytest.approx(1.53, abs=0.015)


def test_moonlight_default_extinction_and_the_horizon():
    # default k = 0.2 mag/airmass (Schaefer 1985 via Green 1992, methods-reference 4) ...
    args = (40.0, 30.0, 50.0, 60.0)
    assert atm.moon_sky_nl(*args) == pytest.approx(atm.moon_sky_nl(*args, k=0.2), rel=1e-12)
    assert atm.moon_sky_nl(*args) != pytest.approx(atm.moon_sky_nl(*args, k=0.15), rel=1e-3)
    # ... and moonlight counts only with the Moon above the horizon (Krisciunas & Schaefer
    # 1991 scatter light from a Moon that is up): nothing at altitude 0, something just above
    assert atm.moon_sky_nl(40.0, 0.0, 50.0, 60.0) == 0.0
    assert atm.moon_sky_nl(40.0, 0.5, 50.0, 60.0) > 0.0
