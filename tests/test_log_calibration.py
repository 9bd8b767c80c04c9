"""planner.plan.calibration: the chance curve fitted to an observation log.

Outside checks: the score equations of logistic regression (at the maximum-likelihood
estimate the residuals sum to zero and are orthogonal to the regressor; McCullagh & Nelder
1989, Generalized Linear Models, 2nd ed., sec. 4.4), the gradient and Hessian against
scipy's finite differences, and the Laplace covariance against the inverse Fisher
information of the same model.  Every log in this file is SYNTHETIC: drawn with a fixed
seed from a known curve, made up for the tests.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.optimize import approx_fprime
from scipy.special import expit

from planner.config.logbook import Logbook
from planner.plan import calibration as cal
from planner.verdict import CHANCE_PARAMS, judge


def synthetic(n, m50=1.12, k=10.0, seed=1):
    """SYNTHETIC margins and outcomes from a known curve."""
    rng = np.random.default_rng(seed)
    x = rng.uniform(math.log(0.6), math.log(2.0), n)
    y = (rng.uniform(size=n) < expit(k * (x - math.log(m50)))).astype(float)
    return x, y


def entries_from(x, y, scope="4-inch"):
    results = np.where(y > 0, "clean", "round")
    return [{"margin": float(math.exp(v)), "result": str(r), "scope": scope, "aperture_mm": 102.0,
             "mag_limit": 11.0, "mag_faint": 7.0} for v, r in zip(x, results)]


def test_with_no_observations_the_answer_is_the_prior():
    prior = cal.split_prior()
    fit = cal.fit_logistic([], [], prior)
    assert fit.a == pytest.approx(prior.a, abs=1e-9) and fit.ln_k == pytest.approx(prior.ln_k, abs=1e-9)
    assert fit.sd_a == pytest.approx(prior.sd_a, rel=1e-6)


def test_prior_is_centred_on_the_published_curve():
    prior = cal.split_prior()
    # the published curve: b0 = 0, b1 = 14 -> 50 % at margin exp(-b0/b1) = 1 (planner.verdict)
    assert math.exp(prior.a) == pytest.approx(math.exp(-CHANCE_PARAMS["b0"] / CHANCE_PARAMS["b1"]))
    assert math.exp(prior.ln_k) == pytest.approx(CHANCE_PARAMS["b1"])


def test_with_a_flat_prior_the_mode_solves_the_score_equations():
    x, y = synthetic(400, seed=3)
    flat = cal.Prior(a=0.0, ln_k=math.log(14), sd_a=1e4, sd_ln_k=1e4)
    fit = cal.fit_logistic(x, y, flat, lapse=0.0)
    p = fit.curve(x)
    # McCullagh & Nelder: sum (y - p) = 0 and sum (y - p) x = 0 at the MLE
    assert abs(np.sum(y - p)) < 1e-5
    assert abs(np.sum((y - p) * x)) < 1e-5
    # Laplace covariance = inverse Fisher information (flat prior), in (b0, b1) = (-k a, k)
    k, a = fit.k, fit.a
    w = p * (1 - p)
    X = np.column_stack([np.ones_like(x), x])
    cov_b = np.linalg.inv(X.T @ (w[:, None] * X))
    # delta method to (a, ln k): a = -b0/b1, ln k = ln b1, with b0 = -k a, b1 = k
    J = np.array([[-1 / k, -a / k], [0.0, 1 / k]])
    cov_th = J @ cov_b @ J.T
    assert np.allclose(fit.cov, cov_th, rtol=1e-4, atol=1e-10)


@pytest.mark.parametrize("lapse", [0.0, cal.LAPSE])
def test_mode_and_laplace_covariance_agree_with_finite_differences(lapse):
    # the negative log posterior written out again here, independently of the module
    x, y = synthetic(60, seed=5)
    prior = cal.split_prior()
    fit = cal.fit_logistic(x, y, prior, lapse=lapse)

    def f(th):
        a, u = th
        p = lapse + (1 - 2 * lapse) * expit(math.exp(u) * (x - a))
        return (-np.sum(y * np.log(p) + (1 - y) * np.log1p(-p)) + 0.5 * ((a - prior.a) / prior.sd_a) ** 2
                + 0.5 * ((u - prior.ln_k) / prior.sd_ln_k) ** 2)

    th = np.array([fit.a, fit.ln_k])
    assert np.all(np.abs(approx_fprime(th, f, 1e-7)) < 1e-3)   # the mode: gradient ~ 0
    # numerical Hessian (scipy finite differences); its inverse is the Laplace covariance
    h = np.array([approx_fprime(th, lambda t, i=i: approx_fprime(t, f, 1e-6)[i], 1e-4) for i in range(2)])
    assert np.allclose(np.linalg.inv(h), fit.cov, rtol=2e-2)
    # and the mode is the minimum scipy's general-purpose minimiser finds from elsewhere
    from scipy.optimize import minimize

    other = minimize(f, [0.3, 1.5], method="Nelder-Mead", options={"xatol": 1e-8, "fatol": 1e-10})
    assert np.allclose(other.x, th, atol=1e-4)


def test_stray_results_far_from_the_limit_are_taken_as_lapses():
    prior = cal.split_prior()
    # three failures at twice the limit: the published curve gives them 1e-4; without lapses
    # the 50 % point would jump beyond 2x the limit
    plain = cal.fit_logistic([math.log(2.0)] * 3, [0, 0, 0], prior, lapse=0.0)
    robust = cal.fit_logistic([math.log(2.0)] * 3, [0, 0, 0], prior)
    assert math.exp(plain.a) > 2.0
    assert abs(robust.a - prior.a) < 0.25 * prior.sd_a


def test_two_hundred_synthetic_entries_find_the_true_50_percent_point():
    x, y = synthetic(200, m50=1.12, k=10, seed=11)
    c = cal.fit_entries(entries_from(x, y), "4-inch")
    assert abs(c.m50 / 1.12 - 1) < 0.10
    lo, hi = c.m50_interval()
    assert lo < c.m50 < hi


def test_three_entries_stay_near_the_prior():
    prior = cal.split_prior()
    shift = []
    for seed in range(50):  # 50 SYNTHETIC logs of 3 entries from a curve 12 % off the published one
        x, y = synthetic(3, m50=1.12, k=10, seed=100 + seed)
        c = cal.fit_entries(entries_from(x, y), "4-inch")
        shift.append(abs(c.split.a - prior.a) / prior.sd_a)
        assert c.mostly_prior() and "too few" in c.sentence()
    assert max(shift) < 2.0                  # never outside the prior's two-sd range
    assert np.median(shift) < 0.5            # typically well inside one sd


def test_unseen_feeds_only_the_visibility_curve():
    x, y = synthetic(100, seed=7)
    es = entries_from(x, y)
    extra = [{"margin": 3.0, "result": "unseen", "scope": "4-inch", "aperture_mm": 102.0,
              "mag_limit": 11.0, "mag_faint": 11.5}] * 20
    a = cal.fit_entries(es, "4-inch")
    b = cal.fit_entries(es + extra, "4-inch")
    assert b.split.n == a.split.n == 100 and b.split.a == pytest.approx(a.split.a)
    assert b.visibility.n == 120 and b.visibility.n_success == 100


def test_per_scope_and_pooled():
    x1, y1 = synthetic(50, seed=1)
    x2, y2 = synthetic(30, seed=2)
    es = entries_from(x1, y1, "4-inch") + [dict(e, scope=None, aperture_mm=203.0, obstruction=0.33)
                                            for e in entries_from(x2, y2)]
    cals = cal.fit_log(es)
    assert [c.scope for c in cals] == ["4-inch", "203 mm"]
    assert [c.split.n for c in cals] == [50, 30]
    pooled = cal.fit_log(es, per_scope=False)
    assert pooled[0].split.n == 80 and pooled[0].label == "all scopes"
    assert "from 30 observations with the 203 mm" in cals[1].sentence()


def test_the_fit_survives_the_log_and_drives_the_verdict(tmp_path):
    x, y = synthetic(200, m50=1.25, k=12, seed=4)
    c = cal.fit_entries(entries_from(x, y), "4-inch")
    with Logbook(tmp_path / "l.sqlite3") as log:
        log.save_fit(c.scope, c.to_dict())
        back = cal.Calibration.from_dict(log.latest_fit("4-inch"))
    assert back.to_dict() == c.to_dict()
    params = back.chance_params()
    plain = judge(1.0, np.nan, np.nan, 1.0, 102.0, 1.5)
    mine = judge(1.0, np.nan, np.nan, 1.0, 102.0, 1.5, chance_params=params)
    assert mine["limit_arcsec"].iloc[0] == pytest.approx(back.m50 * plain["limit_arcsec"].iloc[0])
    at_50 = judge(back.m50 * plain["limit_arcsec"].iloc[0], np.nan, np.nan, 1.0, 102.0, 1.5,
                  chance_params=params)
    assert at_50["chance"].iloc[0] == pytest.approx(0.5, abs=1e-9)


def test_reliability_table_counts_every_entry():
    x, y = synthetic(150, seed=8)
    es = entries_from(x, y)
    c = cal.fit_entries(es)
    rows = cal.reliability_table(es, c)
    assert sum(r["n"] for r in rows) == 150
    assert all(0 <= r["observed"] <= 1 and 0 <= r["fitted"] <= 1 for r in rows)
    # a calibrated curve: observed fractions rise with the fitted chance
    obs = [r["observed"] for r in rows]
    assert obs[0] < obs[-1]


def test_the_chart_is_a_png_with_the_dots_and_curves(tmp_path):
    from planner.report.calibration_chart import calibration_figure, write_calibration_png

    x, y = synthetic(40, seed=9)
    es = entries_from(x, y)
    c = cal.fit_entries(es, "4-inch")
    fig = calibration_figure(c, es)
    ax = fig.axes[0]
    assert len(ax.collections[1].get_offsets()) == 40       # one dot per attempt (after the band)
    assert len(ax.lines) >= 2                               # fitted and published curves
    out = tmp_path / "fit.png"
    write_calibration_png(c, es, out)
    assert out.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"     # PNG signature (ISO/IEC 15948)
