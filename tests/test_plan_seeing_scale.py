"""The steadiness (1-10) to seeing (arcsec) table.

The default table is an assumption of this project describing Pickering's
ordinal scale (docs/methods.md section 3: 1-3 very poor ... 8-10 excellent);
the checks here are on its shape and on the override mechanism, not on
published numbers (there are none for steps 4-10).
"""

from __future__ import annotations

import numpy as np
import pytest

from planner.config import seeing_scale as ss
from planner.errors import CorruptFileError, InputError


def test_default_table_is_monotone_and_spans_the_scale():
    keys = sorted(ss.DEFAULT_SCALE)
    vals = [ss.DEFAULT_SCALE[k] for k in keys]
    assert keys[0] == 1 and keys[-1] == 10
    assert all(b < a for a, b in zip(vals, vals[1:]))  # steadier air -> smaller FWHM


def test_interpolation_between_steps():
    # linear between the table's points (documented behaviour)
    mid = ss.steadiness_to_seeing(6.5)
    assert mid == pytest.approx((ss.DEFAULT_SCALE[6] + ss.DEFAULT_SCALE[7]) / 2)
    s = np.array([ss.steadiness_to_seeing(x) for x in np.linspace(1, 10, 37)])
    assert np.all(np.diff(s) <= 0)


@pytest.mark.parametrize("bad", [0, 11, "six", float("nan")])
def test_out_of_range_steadiness(bad):
    with pytest.raises(InputError):
        ss.steadiness_to_seeing(bad)


def test_user_override_file_is_used():
    ss.scale_path().write_text("[steadiness]\n1 = 8.0\n10 = 1.0\n", "utf-8")
    table, origin = ss.load_scale()
    assert origin.endswith("seeing_scale.toml")
    assert ss.steadiness_to_seeing(5.5, table) == pytest.approx(4.5)  # halfway between 8 and 1


def test_override_that_grows_with_steadiness_is_refused():
    ss.scale_path().write_text("[steadiness]\n1 = 1.0\n10 = 3.0\n", "utf-8")
    with pytest.raises(InputError, match="must not grow"):
        ss.load_scale()


def test_damaged_override_is_quarantined():
    p = ss.scale_path()
    p.write_text("[steadiness\n1 = ", "utf-8")
    with pytest.raises(CorruptFileError):
        ss.load_scale()
    assert not p.exists() and list(p.parent.glob("seeing_scale.toml.corrupt-*"))
    assert ss.load_scale()[1] == "default"
