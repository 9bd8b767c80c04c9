"""Benchmark: how well `splitplan log fit` recovers a known split curve from SYNTHETIC logs.

Every log here is SYNTHETIC: margins (rho / model limit) drawn log-uniform in
[0.6, 2.0], outcomes drawn from a known logistic curve P = expit(k (ln margin - ln m50)),
seeded, so the figures are reproducible.  It measures the statistics of the fit, not speed:

* with 200 entries, the fitted 50 % point against the truth (relative error);
* over 100 seeded repeats, how often the reported 95 % interval covers the truth;
* with 3 entries, how far the fit moves from the prior (in prior standard deviations) and
  how much of the prior's width the interval keeps.

Run by hand:  python benchmarks/bench_calibration.py [--repeats 100] [--truth 1.12] [--k 10]
Results go to docs/log.md, section "How good is the fit".
"""

from __future__ import annotations

import argparse
import math
import platform
import time

import numpy as np


def synthetic_log(n: int, m50: float, k: float, rng) -> tuple[np.ndarray, np.ndarray]:
    """SYNTHETIC ln margins and outcomes (1 split, 0 not) from the known curve."""
    from scipy.special import expit

    x = rng.uniform(math.log(0.6), math.log(2.0), n)
    y = (rng.uniform(size=n) < expit(k * (x - math.log(m50)))).astype(float)
    return x, y


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--repeats", type=int, default=100)
    ap.add_argument("--truth", type=float, default=1.12, help="true 50 %% point, x model limit")
    ap.add_argument("--k", type=float, default=10.0, help="true steepness")
    ap.add_argument("--seed", type=int, default=20261202)
    args = ap.parse_args()

    import scipy

    from planner.plan.calibration import LEVEL, fit_logistic, split_prior

    print(f"python {platform.python_version()}, numpy {np.__version__}, scipy {scipy.__version__}, "
          f"{platform.machine()}")
    print(f"SYNTHETIC logs: truth 50 % point {args.truth} x limit, steepness {args.k}, margins "
          f"log-uniform 0.6-2.0, {args.repeats} seeded repeats (seed {args.seed})")
    prior = split_prior()
    truth_a = math.log(args.truth)
    t0 = time.perf_counter()
    for n in (200, 50, 20):
        rng = np.random.default_rng(args.seed + n)
        err, cover, width = [], 0, []
        for _ in range(args.repeats):
            x, y = synthetic_log(n, args.truth, args.k, rng)
            fit = fit_logistic(x, y, prior)
            lo, hi = fit.interval_a(LEVEL)
            err.append(math.exp(fit.a) / args.truth - 1)
            cover += lo <= truth_a <= hi
            width.append(math.exp(hi) / math.exp(lo))
        err = np.abs(np.array(err))
        print(f"n = {n:3d}: 50 % point error median {np.median(err):.1%}, 90th percentile "
              f"{np.quantile(err, 0.9):.1%}, worst {err.max():.1%}; within 10 %: {np.mean(err < 0.10):.0%}; "
              f"{LEVEL:.0%} interval covers the truth {cover}/{args.repeats}; interval width "
              f"x{np.median(width):.2f} (median hi/lo)")
    rng = np.random.default_rng(args.seed + 3)
    shift, keep = [], []
    for _ in range(args.repeats):
        x, y = synthetic_log(3, args.truth, args.k, rng)
        fit = fit_logistic(x, y, prior)
        shift.append(abs(fit.a - prior.a) / prior.sd_a)
        keep.append(fit.sd_a / prior.sd_a)
    shift, keep = np.array(shift), np.array(keep)
    print(f"n =   3: moves from the prior by {np.median(shift):.2f} prior sd (median), "
          f"{np.quantile(shift, 0.9):.2f} (90th percentile), {shift.max():.2f} (worst); within one prior sd "
          f"{np.mean(shift < 1):.0%}; the interval keeps {np.median(keep):.0%} of the prior's width (median)")
    print(f"fits: {3 * args.repeats + args.repeats} in {time.perf_counter() - t0:.1f} s")


if __name__ == "__main__":
    main()
