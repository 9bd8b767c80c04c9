"""Published empirical rules for unequal pairs (docs/methods.md section 2).

Only the arithmetic of the rules is checked against the worked example the
reference gives; the rules are not ground truth.
"""

import numpy as np
import pytest

from planner.errors import InputError
from planner.optics import SEPARATION_MODELS, required_separation_arcsec
from planner.optics.rules import lord_factor, peterson_factor, peterson_tlm


def test_peterson_worked_example():
    # Peterson 1954 (S&T Sept. 1954 p. 396) via docs/methods.md section 2 [D]:
    # D = 3 in, m2 = 10, base limit 1.5" -> TLM = 11.49, required separation 5.6"
    assert peterson_tlm(3 * 25.4) == pytest.approx(11.49, abs=0.005)
    assert 1.5 * peterson_factor(10.0, 3 * 25.4) == pytest.approx(5.6, abs=0.05)


def test_peterson_only_widens_in_the_faint_zone():
    # Peterson 1954 (as cited by C. Lord, methods-reference 2): within 2.4 mag of the
    # telescope's limit TLM the required separation widens by 10^((5/8)(m2 - TLM + 2.4));
    # outside that zone the rule leaves the equal-pair limit alone
    tlm = peterson_tlm(100)
    f = peterson_factor([tlm - 5, tlm - 2.4, tlm - 1.0, tlm], 100)
    assert f[0] == 1.0 and f[1] == pytest.approx(1.0)
    assert f[2] == pytest.approx(10 ** (0.625 * 1.4))
    assert f[3] == pytest.approx(10 ** (0.625 * 2.4))


def test_peterson_model_uses_physical_equal_pair_base():
    base = required_separation_arcsec(100, 0.0, 0.0, 1.5, 1.2)
    got = required_separation_arcsec(100, 3.0, 0.0, 1.5, 1.2, model="peterson1954", mag2=11.0)
    # Peterson 1954: TLM = 9.1 + 5 log10(D[in]), factor 10^((5/8)(m2 - TLM + 2.4)), written out
    tlm = 9.1 + 5 * np.log10(100 / 25.4)
    assert got == pytest.approx(base * 10 ** (0.625 * (11.0 - tlm + 2.4)), rel=1e-9)


def test_lord_formula_with_user_index():
    # Lord 1994 via docs/methods.md section 2 [S, secondary]: S = 1.033 x 10^((|dm| - 0.1)/n) x rho
    assert lord_factor(2.1, 2.0) == pytest.approx(1.033 * 10.0)
    got = required_separation_arcsec(100, [0.1, 2.1], model="lord1994", lord_n=2.0)
    np.testing.assert_allclose(got, [1.033 * 1.15824, 1.033 * 10 * 1.15824], rtol=1e-9)


def test_rules_need_their_inputs():
    with pytest.raises(InputError, match="needs lord_n"):
        required_separation_arcsec(100, 1.0, model="lord1994")
    with pytest.raises(InputError, match="needs the companion's magnitude"):
        required_separation_arcsec(100, 1.0, model="peterson1954")
    with pytest.raises(InputError, match="lord_n = -1.0 is not allowed"):
        required_separation_arcsec(100, 1.0, model="lord1994", lord_n=-1)


def test_every_registered_model_answers():
    for name in SEPARATION_MODELS:
        v = required_separation_arcsec(150, 2.0, 0.2, 1.0, 1.5, model=name, mag2=9.0, lord_n=2.0)
        assert np.isfinite(v) and v > 0
