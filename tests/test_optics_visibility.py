"""Limiting magnitude: Schaefer (1990) and the simple aperture laws.

Reference values: docs/methods.md section 5, [D] computations from the stated
formulas (NELM table for S = 18..22; simple laws for D = 200 mm).
"""

import numpy as np
import pytest

from planner.errors import InputError
from planner.optics import MAG_LIMIT_MODELS, limiting_magnitude
from planner.optics.visibility_limit import naked_eye_limit, schaefer1990, sky_nanolambert


def test_sky_brightness_in_nanolamberts():
    # docs/methods.md section 5 [D]: B(nL) = 34.08 x 10^(9 - 0.4 S)
    np.testing.assert_allclose(sky_nanolambert([18, 20, 21, 21.5, 22]), [2150, 341, 136, 85.6, 54.0], rtol=3e-3)


def test_naked_eye_limit_table():
    # docs/methods.md section 5 [D]: NELM = 7.93 - 5 log10(10^(4.316 - S/5) + 1), night branch
    got = naked_eye_limit([18, 20, 21, 21.5, 22], branch="night")
    np.testing.assert_allclose(got, [3.97, 5.49, 6.12, 6.38, 6.62], atol=0.006)
    # the model's own branch choice switches to the day branch above 10^3.17 nL
    # (S < 18.4); at S = 18 that gives a slightly fainter limit
    assert naked_eye_limit(18.0) > naked_eye_limit(18.0, branch="night")
    assert naked_eye_limit(21.0) == pytest.approx(naked_eye_limit(21.0, branch="night"))


def test_simple_aperture_laws_for_200_mm():
    # docs/methods.md section 5 [D]: D = 200 mm: N = 8.8 -> 13.28; 10.7 -> 15.18; 9.1 -> 13.58;
    # 16 + 5 log(D/1000) -> 12.51; Soviet form, 20 cm at 200x -> 14.51 (at the zenith here)
    expect = {"dimitroff-baker1945": 13.28, "sidgwick1971": 15.18, "peterson1954": 13.58,
              "stevenson": 12.51, "soviet-encyclopedia": 14.51}
    for name, value in expect.items():
        assert limiting_magnitude(200, magnification=200, model=name) == pytest.approx(value, abs=0.006)


def test_schaefer_behaves_as_described():
    # Schaefer 1990: a darker sky, a larger aperture and (below the seeing-disc limit)
    # more power help; extinction hurts by about 1.2 k (X - 1)
    assert schaefer1990(200, 21.5) > schaefer1990(200, 19.0)
    assert schaefer1990(300, 21.0) > schaefer1990(100, 21.0)
    assert schaefer1990(200, 20.0, magnification=150) > schaefer1990(200, 20.0, magnification=30)
    dm = schaefer1990(200, 21.0, 100, airmass=1.0) - schaefer1990(200, 21.0, 100, airmass=2.0)
    assert dm == pytest.approx(1.2 * 0.2 * 1.0, abs=1e-9)
    # the seeing-disc factor sets in when 2 theta M > 900"
    a = schaefer1990(200, 21.0, 400, seeing_arcsec=1.0)
    b = schaefer1990(200, 21.0, 400, seeing_arcsec=2.0)
    assert a > b


def test_telescope_with_every_factor_one_is_the_naked_eye():
    # With D = eye pupil, M = 1, no losses, one-eye factor 1, no extinction: the naked eye
    got = schaefer1990(7.0, 21.0, magnification=1.0, transmission=1.0, binocular_factor=1.0,
                       extinction_k=0.0, eye_pupil_mm=7.0)
    assert got == pytest.approx(naked_eye_limit(21.0))


def test_unknown_model():
    with pytest.raises(InputError, match="magnitude model 'guess' is unknown"):
        limiting_magnitude(100, model="guess")
    assert "schaefer1990" in MAG_LIMIT_MODELS
