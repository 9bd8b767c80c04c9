"""The Telescope record: validation on entry and derived quantities."""

import warnings

import pytest

from planner.errors import InputError
from planner.optics import Telescope


def test_valid_telescope_and_derived_values():
    t = Telescope(200, 0.33, 2000, "sct", (25, 10), 3.76, name="club SCT")
    assert t.focal_ratio == 10
    assert t.magnifications == (80.0, 200.0)
    # pixel scale 206.265 x 3.76 um / 2000 mm = 0.3878" (definition of the plate scale)
    assert t.pixel_scale_arcsec == pytest.approx(0.3878, abs=1e-4)
    # Airy radius 1.22 x 0.55 um x f/10 = 6.708 um (1.22 lambda N, common practice)
    assert t.airy_radius_um() == pytest.approx(6.708, abs=1e-3)
    assert t.limit_arcsec("dawes") == pytest.approx(115.824 / 200)
    assert t.wavelength_nm == 550


@pytest.mark.parametrize("kwargs,message", [
    ({"aperture_mm": 5}, "aperture_mm 5 is out of range; allowed 10 to 10000 mm (clear aperture)"),
    ({"aperture_mm": 20000}, "aperture_mm 20000 is out of range"),
    ({"aperture_mm": "big"}, "aperture_mm 'big' is not a number"),
    ({"aperture_mm": True}, "aperture_mm True is not a number"),
    ({"aperture_mm": float("nan")}, "aperture_mm nan is out of range"),
    ({"aperture_mm": 100, "obstruction": 1.0}, "obstruction 1 is out of range"),
    ({"aperture_mm": 100, "obstruction": -0.1}, "obstruction -0.1 is out of range"),
    ({"aperture_mm": 100, "focal_length_mm": 0}, "focal_length_mm 0 is out of range"),
    ({"aperture_mm": 100, "kind": "periscope"}, "kind 'periscope' is unknown"),
    ({"aperture_mm": 100, "eyepieces_mm": (10,)}, "eyepieces were given without focal_length_mm"),
    ({"aperture_mm": 100, "pixel_um": -2}, "pixel_um = -2 is not allowed"),
    ({"aperture_mm": 100, "wavelength_nm": 50}, "wavelength_nm 50 is out of range"),
])
def test_bad_values_raise_one_line_input_error(kwargs, message):
    with pytest.raises(InputError) as info:
        Telescope(**kwargs)
    text = str(info.value)
    assert message in text and "\n" not in text


def test_large_obstruction_warns():
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        Telescope(300, 0.65)
    assert any("unusually large" in str(w.message) for w in caught)


def test_frozen():
    t = Telescope(100)
    with pytest.raises(AttributeError):
        t.aperture_mm = 200


def test_kind_aliases():
    assert Telescope(254, 0.2, kind="Dobsonian").kind == "newtonian"
    assert Telescope(203, 0.33, kind="schmidt-cassegrain").kind == "sct"
