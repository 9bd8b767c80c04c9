"""Validation of airmass, refraction, dispersion, pressure and moonlit-sky models.

Checked against: pvlib's independent implementations of the same airmass
models and of the standard-atmosphere pressure; the check tables of the
project's docs/methods.md (sections 4, 6 and 8), which were computed from
the published formulas; Bennett's published 5.39' at 10 deg (Meeus 1991);
the Krisciunas & Schaefer (1991) check value 19.855 mag/arcsec^2 (specsim
documentation).
"""

from __future__ import annotations

import numpy as np
import pytest

from planner.errors import InputError
from planner.sky import atmosphere as atm


# --- airmass -----------------------------------------------------------------

@pytest.mark.parametrize("ours, pvlib_name", [
    ("plane-parallel", "simple"),
    ("kastenyoung1989", "kastenyoung1989"),
    ("pickering2002", "pickering2002"),
])
def test_airmass_matches_pvlib(ours, pvlib_name):
    """Same model, independent code: pvlib.atmosphere.get_relative_airmass (pvlib 0.11+),
    altitude 1..90 deg; agreement to 1e-9 relative (floating point only)."""
    pvlib_atm = pytest.importorskip("pvlib.atmosphere")
    alt = np.linspace(1.0, 90.0, 400)
    theirs = pvlib_atm.get_relative_airmass(90.0 - alt, model=pvlib_name)
    np.testing.assert_allclose(atm.airmass(alt, ours), theirs, rtol=1e-9)


# docs/methods.md section 4, check table [D] (z in deg -> X per model)
AIRMASS_TABLE = [
    # z,   sec z,  Hardie,  Kasten-Young, Pickering
    (45, 1.4142, 1.4129, 1.4126, 1.4124),
    (60, 2.0000, 1.9945, 1.9943, 1.9932),
    (75, 3.8637, 3.8159, 3.8129, 3.8082),
    (80, 5.7588, 5.5979, 5.5860, 5.5807),
    (85, 11.474, 10.211, 10.306, 10.334),
]


@pytest.mark.parametrize("z, secz, hardie, ky, pick", AIRMASS_TABLE)
def test_airmass_check_table(z, secz, hardie, ky, pick):
    """Methods reference section 4 table (4-5 significant figures, so tolerance 6e-4 relative)."""
    alt = 90.0 - z
    assert atm.airmass(alt, "plane-parallel") == pytest.approx(secz, rel=6e-4)
    assert atm.airmass(alt, "hardie1962") == pytest.approx(hardie, rel=6e-4)
    assert atm.airmass(alt, "kastenyoung1989") == pytest.approx(ky, rel=6e-4)
    assert atm.airmass(alt) == pytest.approx(pick, rel=6e-4)  # default model is Pickering 2002


def test_airmass_at_horizon_and_below():
    """At the horizon Kasten-Young gives 37.92 and Pickering 38.75 (docs/methods.md section 4);
    below the horizon every model returns NaN (our convention: not observable)."""
    assert atm.airmass(0.0, "kastenyoung1989") == pytest.approx(37.92, abs=0.01)
    assert atm.airmass(0.0, "pickering2002") == pytest.approx(38.75, abs=0.01)
    for model in atm.AIRMASS_MODELS:
        assert np.isnan(atm.airmass(-1.0, model))


def test_airmass_unknown_model_is_input_error():
    with pytest.raises(InputError, match="unknown airmass model 'bogus'.*pickering2002"):
        atm.airmass(30.0, "bogus")


# --- refraction ----------------------------------------------------------------

def test_bennett_published_value_at_10_deg():
    """Bennett (1982) gives 5.39' at 10 deg apparent altitude (Meeus 1991, p. 102)."""
    assert atm.refraction_arcmin(10.0, "bennett1982") == pytest.approx(5.39, abs=0.005)


# docs/methods.md section 4 [D]: altitude -> Bennett R(h_a), Saemundsson R(h)
REFRACTION_TABLE = [(0, 34.48, 28.98), (10, 5.39, 5.41), (20, 2.70, 2.74), (45, 0.995, 1.013)]


@pytest.mark.parametrize("h, bennett, saem", REFRACTION_TABLE)
def test_refraction_check_table(h, bennett, saem):
    """Methods reference section 4 table, printed to 0.01' (0.001' at 45 deg)."""
    tol = 0.0015 if h == 45 else 0.006
    assert atm.refraction_arcmin(h, "bennett1982") == pytest.approx(bennett, abs=tol)
    assert atm.refraction_arcmin(h, "saemundsson1986") == pytest.approx(saem, abs=tol)


def test_refraction_zenith_clamped_and_models_agree():
    """Bennett gives -0.001' at the zenith; clamped to 0 (docs/methods.md, section 4).  Meeus (1991,
    p. 103): Saemundsson(true h) agrees with Bennett(apparent h) to 0.1' -- checked over 1-90 deg."""
    assert atm.refraction_arcmin(90.0, "bennett1982") == 0.0
    h_true = np.linspace(1.0, 90.0, 300)
    h_app = atm.apparent_from_true_deg(h_true)
    diff = atm.refraction_arcmin(h_app, "bennett1982") - atm.refraction_arcmin(h_true, "saemundsson1986")
    assert np.max(np.abs(diff)) < 0.1


def test_refraction_pressure_temperature_factor():
    """Meeus (1991) p. 103 factor (P/101 kPa)(283/(273+T)); docs/methods.md: 1.012 at 95 kPa, -10 C.
    pressure 0 (no air) gives no refraction."""
    r0 = atm.refraction_arcmin(20.0, "bennett1982")
    r = atm.refraction_arcmin(20.0, "bennett1982", pressure_hpa=950.0, temperature_c=-10.0)
    assert r / r0 == pytest.approx(1.012, abs=0.0005)
    assert atm.refraction_arcmin(20.0, pressure_hpa=0.0) == 0.0


def test_true_apparent_round_trip():
    """Bennett and Saemundsson are near-inverses: round trip within 0.1' (Meeus 1991)."""
    h = np.linspace(2.0, 89.0, 100)
    back = atm.true_from_apparent_deg(atm.apparent_from_true_deg(h))
    assert np.max(np.abs(back - h)) * 60 < 0.1


# --- pressure ------------------------------------------------------------------

def test_pressure_from_elevation_matches_pvlib():
    """Standard atmosphere (ISO 2533): pvlib.atmosphere.alt2pres writes the same law with rounded
    constants (100 ((44331.514 - h) / 11880.516)^(1/0.1902632) Pa); agreement to 2e-5 relative."""
    pvlib_atm = pytest.importorskip("pvlib.atmosphere")
    h = np.array([-400.0, 0.0, 500.0, 2400.0, 4200.0])
    np.testing.assert_allclose(atm.pressure_from_elevation_hpa(h), pvlib_atm.alt2pres(h) / 100.0, rtol=2e-5)
    # 1013.25 hPa at sea level by definition of the standard atmosphere
    assert atm.pressure_from_elevation_hpa(0.0) == pytest.approx(1013.25)


# --- dispersion ----------------------------------------------------------------

def test_filippenko_refractivity_standard_value():
    """Filippenko (1982) eq. 1 at 15 C, 760 mmHg: (n-1) x 1e6 = 277.9 near 550 nm (recomputed from the
    published constants: 64.328 + 29498.1/(146 - 3.3058) + 255.4/(41 - 3.3058))."""
    s2 = (1 / 0.55) ** 2
    expected = 64.328 + 29498.1 / (146 - s2) + 255.4 / (41 - s2)
    assert atm.refractivity_filippenko1982(550.0, 1013.25, 15.0) * 1e6 == pytest.approx(expected, rel=1e-4)


def test_dispersion_ctio_table():
    """CTIO differential-refraction table (2 km site) at sec z = 2 relative to 500 nm:
    R(400) - R(500) = 1.07", R(500) - R(650) = 0.75" (docs/methods.md section 8, [S]);
    Filippenko with P = 600 mmHg, T = 7 C gives 1.10" and 0.77" [D].  Tolerance 0.05"."""
    p_hpa = 600.0 * 1013.25 / 760.0
    assert atm.dispersion_arcsec(30.0, (400, 500), p_hpa, 7.0) == pytest.approx(1.07, abs=0.05)
    assert atm.dispersion_arcsec(30.0, (500, 650), p_hpa, 7.0) == pytest.approx(0.75, abs=0.05)


@pytest.mark.parametrize("alt, wide, narrow", [
    (60, 0.51, 0.24), (45, 0.88, 0.42), (30, 1.53, 0.72), (20, 2.43, 1.15), (15, 3.30, 1.56),
])
def test_dispersion_sea_level_table(alt, wide, narrow):
    """Methods reference section 8 [D]: sea level (760 mmHg, 10 C), 450-650 nm and 500-600 nm,
    printed to 0.01"."""
    assert atm.dispersion_arcsec(alt, (450, 650), 1013.25, 10.0) == pytest.approx(wide, abs=0.011)
    assert atm.dispersion_arcsec(alt, (500, 600), 1013.25, 10.0) == pytest.approx(narrow, abs=0.011)


def test_dispersion_low_altitude_uses_bennett_scaling():
    """Below 15 deg the Bennett-scaled form is used; docs/methods.md section 8: 4.9" for
    450-650 nm at 10 deg (vs 5.0" from tan z).  Tolerance 0.1"."""
    assert atm.dispersion_arcsec(10.0, (450, 650), 1013.25, 10.0) == pytest.approx(4.9, abs=0.1)
    assert np.isnan(atm.dispersion_arcsec(-2.0))


# --- sky brightness --------------------------------------------------------------

def test_krisciunas_schaefer_check_value():
    """Krisciunas & Schaefer (1991): target z = 20, Moon z = 70, separation 50 deg, phase angle 45 deg,
    k = 0.15 -> 19.855 mag/arcsec^2 (specsim documentation, docs/methods.md section 6)."""
    b = atm.moon_sky_nl(50.0, 90.0 - 70.0, 90.0 - 20.0, 45.0, k=0.15)
    assert atm.mag_from_nl(b) == pytest.approx(19.855, abs=0.001)


def test_sky_brightness_conversion():
    """B[nL] = 34.08 exp(20.7233 - 0.92104 S): 21.0 -> 136 nL, 18.0 -> 2150 nL (docs/methods.md section 5)."""
    assert atm.nl_from_mag(21.0) == pytest.approx(136, rel=0.005)
    assert atm.nl_from_mag(18.0) == pytest.approx(2150, rel=0.005)
    assert atm.mag_from_nl(atm.nl_from_mag(19.3)) == pytest.approx(19.3)  # exact inverse


def test_moon_below_horizon_adds_nothing():
    """K&S moonlight is scattered light from a Moon above the horizon; below it we add zero."""
    assert atm.moon_sky_nl(30.0, -5.0, 50.0, 0.0) == 0.0
