"""The chart of a personal calibration (``splitplan log fit --plot FILE``, and the HTML report).

Each logged attempt is a dot at its rho / model limit (log axis), at 1 when
it split and 0 when it did not, jittered up or down a little so that dots do
not hide each other (fixed seed: the same log gives the same picture).  Over
them: the fitted curve with its band (Laplace approximation, see
:mod:`planner.plan.calibration`), and the published curve the prior is
centred on, dashed.  Colours and layout are this project's own.
"""

from __future__ import annotations

import math

import numpy as np


def calibration_figure(cal, entries: list[dict], title: str = ""):
    """A matplotlib figure of ``cal`` (a :class:`planner.plan.calibration.Calibration`) over ``entries``."""
    from planner.plan.calibration import published_split_chance, split_data
    from planner.report.charts import _mpl
    from planner.report.safe import pdf_text

    plt = _mpl()
    x, y = split_data(entries)
    lo_m, hi_m = 0.5, 2.0
    if x.size:
        lo_m = min(lo_m, float(np.exp(x.min())) * 0.9)
        hi_m = max(hi_m, float(np.exp(x.max())) * 1.1)
    grid = np.linspace(math.log(lo_m), math.log(hi_m), 300)
    fig, ax = plt.subplots(figsize=(6.4, 3.8), dpi=100)
    band_lo, band_hi = cal.split.band(grid, cal.level)
    m = np.exp(grid)
    ax.fill_between(m, band_lo, band_hi, color="#1f6f8b", alpha=0.18, lw=0,
                    label=f"{cal.level:.0%} band")
    ax.plot(m, cal.split.curve(grid), color="#1f6f8b", lw=2, label="fitted to your log")
    ax.plot(m, published_split_chance(m), color="#5d6d7e", lw=1.2, ls="--", label="published model (prior centre)")
    if x.size:
        rng = np.random.default_rng(0)
        jit = rng.uniform(-0.04, 0.04, x.size)
        yy = np.where(y > 0, 1.0 - np.abs(jit), np.abs(jit))
        ax.scatter(np.exp(x), yy, s=14, color=np.where(y > 0, "#2e8b57", "#c0392b"), alpha=0.75, lw=0,
                   zorder=3, label="your attempts (split = 1, not split = 0)")
    ax.axvline(cal.m50, color="#1f6f8b", lw=0.8, ls=":")
    ax.set_xscale("log")
    ticks = [t for t in (0.5, 0.7, 1.0, 1.4, 2.0, 3.0, 5.0) if lo_m <= t <= hi_m]
    ax.set_xticks(ticks)
    ax.set_xticklabels([f"{t:g}" for t in ticks])
    ax.minorticks_off()
    ax.set_xlim(lo_m, hi_m)
    ax.set_ylim(-0.06, 1.06)
    ax.set_xlabel("separation / model limit")
    ax.set_ylabel("chance of a split")
    ax.set_title(pdf_text(title or f"Your split curve, {cal.label}"), fontsize=10)
    ax.legend(fontsize=7, loc="center right", frameon=False)
    ax.grid(alpha=0.25)
    fig.tight_layout()
    return fig


def write_calibration_png(cal, entries: list[dict], path) -> None:
    """Save the chart as PNG (atomic write)."""
    from planner.config.storage import atomic_write_bytes
    from planner.report.charts import figure_png

    atomic_write_bytes(path, figure_png(calibration_figure(cal, entries)))
