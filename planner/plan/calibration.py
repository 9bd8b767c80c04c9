"""Your own split limit: the chance curve fitted to your observation log.

The published model (:mod:`planner.verdict`) says the chance of a split is a
logistic curve in ln(rho / limit) with its 50 % point at the model's limit and
a steepness of 14 (:data:`planner.verdict.CHANCE_PARAMS`, not fitted to
anyone).  This module fits that curve to the results *you* logged:

    P(split) = 1 / (1 + exp(-k (ln margin - a)))      margin = rho / model limit

``exp(a)`` is your 50 % point in units of the model limit (1.12: you need 12 %
more separation than the model says), ``k`` how sharply success turns into
failure.  ``clean`` and ``split`` count as a success, ``notched``,
``elongated`` and ``round`` as a failure; ``unseen`` entries say nothing about
separation and are left out of this curve.  They feed the second curve, the
companion's visibility, of the same form in the magnitude margin
``mag_limit - mag_faint`` (every result but ``unseen`` counts as seen), with
its 50 % point ``a_vis`` (mag) and steepness ``k_vis`` (1 / mag).

**Method.**  Bayesian logistic regression with a weakly informative prior, in
the spirit of Gelman, Jakulin, Pittau & Su (2008, "A weakly informative default
prior distribution for logistic and other regression models", *Annals of
Applied Statistics* 2, 1360): independent normal priors (the normal member of
the t family discussed there) on ``a`` and ``ln k``, centred on the published
curve (:data:`SPLIT_PRIOR`, :data:`VISIBILITY_PRIOR`), wide enough that some
tens of observations override it, narrow enough that a handful cannot
produce nonsense.  The posterior mode is found with
:func:`scipy.optimize.minimize` (``trust-exact``, exact gradient and Hessian);
the uncertainty is the **Laplace approximation**: a normal distribution
centred on the mode with the inverse Hessian of the negative log posterior as
its covariance (e.g. Bishop 2006, *Pattern Recognition and Machine Learning*,
section 4.4).  The interval on the 50 % point is ``exp(a +- z sd(a))``
(95 % by default); the band around the fitted curve is the pointwise 2.5-97.5 %
range of the curve over 2000 draws from that normal (fixed seed, so the same
log gives the same band).

Figures of merit on synthetic logs are in docs/log.md
(benchmarks/bench_calibration.py).
"""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass, field

import numpy as np

from planner.errors import InputError

#: results counted as a split / as a failure to split
SUCCESS = ("clean", "split")
FAILURE = ("notched", "elongated", "round")
#: confidence level of the reported intervals
LEVEL = 0.95
#: fewer observations than this for one scope: the fit is said to be mostly the prior
FEW = 10


@dataclass(frozen=True)
class Prior:
    """Normal prior on (a, ln k): centres and standard deviations."""

    a: float
    ln_k: float
    sd_a: float
    sd_ln_k: float

    def describe(self, unit: str) -> str:
        return (f"50 % point {self.a:+.2f}{unit} +- {self.sd_a:.2f} (one sd), steepness "
                f"{math.exp(self.ln_k):.3g} within a factor {math.exp(self.sd_ln_k):.2f}")


def _published():
    from planner.verdict import CHANCE_PARAMS

    return CHANCE_PARAMS


def split_prior() -> Prior:
    """Centred on the published curve: 50 % point at exp(-b0/b1) x the limit, steepness b1.
    sd(a) = 0.2 (the 50 % point within x/1.22 at one sd, x/1.49 at two), sd(ln k) = 0.5
    (an assumption of this project: observers' limits differ by some tens of per cent)."""
    p = _published()
    return Prior(a=-p["b0"] / p["b1"], ln_k=math.log(p["b1"]), sd_a=0.2, sd_ln_k=0.5)


def visibility_prior() -> Prior:
    """Centred on the published visibility curve: 50 % at the limiting magnitude, scale
    ``mag_scale``; sd(a) = 0.5 mag, sd(ln k) = 0.5 (assumptions of this project)."""
    p = _published()
    return Prior(a=float(p.get("mag_offset", 0.0)), ln_k=math.log(1.0 / p["mag_scale"]), sd_a=0.5,
                 sd_ln_k=0.5)


@dataclass
class LogisticFit:
    """Posterior mode and Laplace covariance of (a, ln k) for one curve."""

    a: float
    ln_k: float
    cov: list                  # 2x2, [[var a, cov], [cov, var ln k]]
    n: int
    n_success: int
    prior: dict
    converged: bool = True
    lapse: float = 0.0

    @property
    def k(self) -> float:
        return math.exp(self.ln_k)

    @property
    def sd_a(self) -> float:
        return math.sqrt(self.cov[0][0])

    def interval_a(self, level: float = LEVEL) -> tuple[float, float]:
        from scipy.stats import norm

        z = float(norm.ppf(0.5 + level / 2))
        return self.a - z * self.sd_a, self.a + z * self.sd_a

    def curve(self, x) -> np.ndarray:
        from scipy.special import expit

        return expit(self.k * (np.asarray(x, float) - self.a))

    def band(self, x, level: float = LEVEL, draws: int = 2000, seed: int = 0) -> tuple[np.ndarray, np.ndarray]:
        """Pointwise interval of the curve at ``x`` over draws from the Laplace normal."""
        from scipy.special import expit

        rng = np.random.default_rng(seed)
        th = rng.multivariate_normal([self.a, self.ln_k], np.asarray(self.cov), size=draws)
        x = np.asarray(x, float)
        p = expit(np.exp(th[:, 1:2]) * (x[None, :] - th[:, 0:1]))
        q = (1 - level) / 2
        return np.quantile(p, q, axis=0), np.quantile(p, 1 - q, axis=0)


#: lapse rate: the share of entries at either end that have nothing to do with the separation
#: (a wrong star, a passing cloud, a typing slip).  Wichmann & Hill (2001, "The psychometric
#: function: I. Fitting, sampling, and goodness of fit", Perception & Psychophysics 63, 1293)
#: show that leaving lapses out biases the fitted slope and location; they fit rates of 0-6 %.
#: We fix 3 % at each end (an assumption of this project): P = lapse + (1 - 2 lapse) expit(...).
#: The lapses only protect the fit; the planner's chance uses the fitted core curve.
LAPSE = 0.03


def fit_logistic(x, y, prior: Prior, lapse: float = LAPSE) -> LogisticFit:
    """Posterior mode and Laplace covariance of (a, ln k) for
    P(y=1) = lapse + (1 - 2 lapse) expit(k (x - a)) under ``prior``.

    ``x``, ``y``: arrays (y in {0, 1}); any length, zero included (then the
    answer is the prior).  ``lapse=0`` is plain logistic regression."""
    from scipy.optimize import minimize
    from scipy.special import expit

    x = np.asarray(x, float)
    y = np.asarray(y, float)
    if x.shape != y.shape or x.ndim != 1:
        raise InputError("x and y must be 1-d arrays of the same length")
    if not 0.0 <= lapse < 0.5:
        raise InputError(f"lapse {lapse!r} must be in [0, 0.5)")
    ok = np.isfinite(x) & np.isfinite(y)
    x, y = x[ok], y[ok]
    ia, iu = 1.0 / prior.sd_a ** 2, 1.0 / prior.sd_ln_k ** 2
    c = 1.0 - 2.0 * lapse

    def parts(th):
        """eta, dl/deta and d2l/deta2 per observation (l: log-likelihood)."""
        a, u = th
        k = math.exp(u)
        eta = k * (x - a)
        s = expit(eta)
        w = s * (1.0 - s)
        if lapse == 0.0:
            ll = -(np.logaddexp(0.0, eta) - y * eta)
            return k, eta, ll, y - s, -w
        p = lapse + c * s
        q = lapse + c * (1.0 - s)          # 1 - p, without cancellation
        ll = y * np.log(p) + (1.0 - y) * np.log(q)
        A = c * w                          # dp/deta
        B = p * q
        r = y - p
        g = r * A / B
        h = -A * A / B + r * (c * w * (1.0 - 2.0 * s) * B - A * A * (q - p)) / (B * B)
        return k, eta, ll, g, h

    def f(th):
        k, eta, ll, g, h = parts(th)
        return -float(ll.sum()) + 0.5 * ia * (th[0] - prior.a) ** 2 + 0.5 * iu * (th[1] - prior.ln_k) ** 2

    def grad(th):
        k, eta, ll, g, h = parts(th)
        return np.array([k * g.sum() + ia * (th[0] - prior.a), -(g * eta).sum() + iu * (th[1] - prior.ln_k)])

    def hess(th):
        k, eta, ll, g, h = parts(th)
        haa = -k * k * h.sum() + ia
        hau = k * (h * eta + g).sum()
        huu = -(h * eta * eta + g * eta).sum() + iu
        return np.array([[haa, hau], [hau, huu]])

    start = np.array([prior.a, prior.ln_k])
    res = minimize(f, start, jac=grad, hess=hess, method="trust-exact")
    th = res.x
    h = hess(th)
    try:
        cov = np.linalg.inv(h)
        if not np.all(np.linalg.eigvalsh(cov) > 0):
            raise np.linalg.LinAlgError
    except np.linalg.LinAlgError:
        cov = np.diag([prior.sd_a ** 2, prior.sd_ln_k ** 2])
    return LogisticFit(a=float(th[0]), ln_k=float(th[1]), cov=cov.tolist(), n=int(x.size),
                       n_success=int(y.sum()), prior=asdict(prior), converged=bool(res.success),
                       lapse=float(lapse))


def scope_key(entry: dict) -> str:
    """The telescope an entry was made with, as a fit is kept: the saved name, else the aperture
    ("102 mm", the name a night plan gives a telescope given by its aperture)."""
    if entry.get("scope"):
        return str(entry["scope"])
    return f"{float(entry['aperture_mm']):g} mm"


def split_data(entries: list[dict]) -> tuple[np.ndarray, np.ndarray]:
    """ln(margin) and success (1/0) of the entries that bear on the split curve."""
    rows = [(math.log(e["margin"]), 1.0 if e["result"] in SUCCESS else 0.0) for e in entries
            if e.get("result") in SUCCESS + FAILURE and e.get("margin") not in (None,)
            and e["margin"] > 0 and math.isfinite(e["margin"])]
    if not rows:
        return np.empty(0), np.empty(0)
    a = np.array(rows)
    return a[:, 0], a[:, 1]


def visibility_data(entries: list[dict]) -> tuple[np.ndarray, np.ndarray]:
    """Magnitude margin (mag_limit - mag_faint) and companion seen (1/0)."""
    rows = [(e["mag_limit"] - e["mag_faint"], 0.0 if e["result"] == "unseen" else 1.0) for e in entries
            if e.get("mag_limit") is not None and e.get("mag_faint") is not None
            and math.isfinite(e["mag_limit"] - e["mag_faint"])]
    if not rows:
        return np.empty(0), np.empty(0)
    a = np.array(rows)
    return a[:, 0], a[:, 1]


@dataclass
class Calibration:
    """A fitted calibration: the split curve and the visibility curve, for one scope or pooled."""

    scope: str                       # scope key ('' = all scopes pooled)
    split: LogisticFit
    visibility: LogisticFit
    n_entries: int                   # entries considered (all results)
    n_skipped: int                   # entries without the circumstances needed
    level: float = LEVEL
    method: str = ("Bayesian logistic regression, normal priors centred on the published curve "
                   "(Gelman et al. 2008); posterior mode by scipy.optimize; Laplace-approximation interval")
    model_version: str = ""
    extra: dict = field(default_factory=dict)

    @property
    def label(self) -> str:
        return "all scopes" if not self.scope else (
            f"the {self.scope}" if self.scope.endswith(" mm") else self.scope)

    @property
    def m50(self) -> float:
        """Your 50 % point in units of the model limit."""
        return math.exp(self.split.a)

    def m50_interval(self) -> tuple[float, float]:
        lo, hi = self.split.interval_a(self.level)
        return math.exp(lo), math.exp(hi)

    def chance_params(self) -> dict:
        """Parameters for :func:`planner.verdict.judge`: the model limit is scaled to your
        50 % point, the curve has your steepness; the visibility curve is shifted and scaled."""
        return {"limit_scale": self.m50, "b0": 0.0, "b1": self.split.k,
                "mag_offset": self.visibility.a, "mag_scale": 1.0 / self.visibility.k}

    def mostly_prior(self) -> bool:
        return self.split.n < FEW or self.split.sd_a > 0.7 * self.split.prior["sd_a"]

    def sentence(self) -> str:
        """The result in plain words."""
        lo, hi = self.m50_interval()
        n = self.split.n
        s = (f"your 50 % point is {self.m50:.2f} x the model limit ({lo:.2f}-{hi:.2f}, "
             f"{self.level:.0%} interval), from {n} observation{'s' if n != 1 else ''} with {self.label}")
        if self.mostly_prior():
            s += "; too few to move far from the published curve"
        return s

    def header(self) -> str:
        """One line for the heading of a plan that uses this calibration."""
        lo, hi = self.m50_interval()
        return (f"calibration: yours ({self.label}): limit x {self.m50:.2f} ({lo:.2f}-{hi:.2f}), "
                f"steepness {self.split.k:.3g}, from {self.split.n} observations")

    def to_dict(self) -> dict:
        return {"scope": self.scope, "split": asdict(self.split), "visibility": asdict(self.visibility),
                "n_entries": self.n_entries, "n_skipped": self.n_skipped, "level": self.level,
                "method": self.method, "model_version": self.model_version, "extra": self.extra}

    @classmethod
    def from_dict(cls, d: dict) -> "Calibration":
        try:
            return cls(scope=str(d["scope"]), split=LogisticFit(**d["split"]),
                       visibility=LogisticFit(**d["visibility"]), n_entries=int(d["n_entries"]),
                       n_skipped=int(d["n_skipped"]), level=float(d.get("level", LEVEL)),
                       method=str(d.get("method", "")), model_version=str(d.get("model_version", "")),
                       extra=dict(d.get("extra") or {}))
        except (KeyError, TypeError, ValueError) as exc:
            from planner.errors import CorruptFileError

            raise CorruptFileError(f"the stored calibration cannot be read ({exc}); run 'splitplan log fit' "
                                   "again") from None


def fit_entries(entries: list[dict], scope: str = "") -> Calibration:
    """Fit both curves to ``entries`` (already cut to one scope, or all for a pooled fit)."""
    from planner import __version__

    xs, ys = split_data(entries)
    xv, yv = visibility_data(entries)
    n_skipped = sum(1 for e in entries if e.get("margin") is None and e.get("mag_limit") is None)
    return Calibration(scope=scope, split=fit_logistic(xs, ys, split_prior()),
                       visibility=fit_logistic(xv, yv, visibility_prior()), n_entries=len(entries),
                       n_skipped=n_skipped, model_version=f"splitplan {__version__}")


def fit_log(entries: list[dict], per_scope: bool = True) -> list[Calibration]:
    """One calibration per scope in the log (``per_scope``) or one pooled; largest first."""
    if not per_scope:
        return [fit_entries(entries, "")]
    groups: dict[str, list] = {}
    for e in entries:
        groups.setdefault(scope_key(e), []).append(e)
    cals = [fit_entries(g, k) for k, g in groups.items()]
    return sorted(cals, key=lambda c: (-c.n_entries, c.scope))


def published_split_chance(margin) -> np.ndarray:
    """The published model's split curve (without the visibility factor)."""
    from scipy.special import expit

    p = _published()
    m = np.asarray(margin, float)
    return expit(p["b0"] + p["b1"] * np.log(np.where(m > 0, m, 1e-12)))


RELIABILITY_BINS = (0.0, 0.2, 0.4, 0.6, 0.8, 1.0)


def reliability_table(entries: list[dict], cal: Calibration, bins=RELIABILITY_BINS) -> list[dict]:
    """How often a split happened, against the chance given beforehand (fitted and published).

    One row per band of fitted chance: ``band``, ``n``, ``fitted`` (mean fitted
    chance), ``published`` (mean published chance), ``observed`` (fraction split)."""
    x, y = split_data(entries)
    if not x.size:
        return []
    fitted = cal.split.curve(x)
    pub = published_split_chance(np.exp(x))
    idx = np.clip(np.digitize(fitted, bins[1:-1]), 0, len(bins) - 2)
    rows = []
    for b in range(len(bins) - 1):
        sel = idx == b
        if not sel.any():
            continue
        rows.append({"band": f"{bins[b]:.0%}-{bins[b + 1]:.0%}", "n": int(sel.sum()),
                     "fitted": float(fitted[sel].mean()), "published": float(pub[sel].mean()),
                     "observed": float(y[sel].mean())})
    return rows
