"""Ranking: how worthwhile and how certain a pair is for this telescope tonight.

The score (0-100) is a product of a *certainty* factor and a *worth* factor::

    score = 100 * chance * certainty * (W_MARGIN * close + W_BRIGHT * bright + W_ALT * high)

``chance``
    the verdict's chance of success (0-1) at the best time tonight.
``certainty``
    how well tonight's rho is known: orbit grade 1-2 -> 1.0, 3 -> 0.9,
    4 -> 0.8, 5 -> 0.65; an interferometric-grade orbit 0.7; a linear
    extrapolation 0.6; the last measure alone 0.85 decaying with the years
    since that measure (half-life 40 years, floor 0.3).  A pair whose rho
    uncertainty eats into the margin is cut further by
    ``1 / (1 + (rho_unc / (rho - limit))^2)`` when the margin is small.
    These weights are project choices (common practice, no source): a
    well-graded orbit is trusted, an old measure of a moving pair is not.
``close``
    worth of the split itself: a bell in log(margin) peaking at a margin of
    1.6 (a split that needs care but is not a gamble) and falling off both
    towards a barely-split pair and towards a trivially wide one
    (``exp(-(ln(margin / 1.6))^2 / (2 * 0.6^2))``).
``bright``
    companion brightness: ``clip((12 - mag2) / 6, 0, 1)`` (a 6th-magnitude
    companion scores 1, a 12th-magnitude one 0).
``high``
    altitude at the best time: ``clip((alt - min_alt) / (60 - min_alt), 0, 1)``
    (airmass and seeing get worse lower down).

Weights ``W_MARGIN = 0.45``, ``W_BRIGHT = 0.25``, ``W_ALT = 0.30`` are
assumptions of this project.  All arrays, no per-pair loops.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

W_MARGIN = 0.45
W_BRIGHT = 0.25
W_ALT = 0.30
MARGIN_PEAK = 1.6
MARGIN_WIDTH = 0.6

#: certainty of tonight's rho by the method/grade that produced it
GRADE_CERTAINTY = {1: 1.0, 2: 1.0, 3: 0.9, 4: 0.8, 5: 0.65, 8: 0.7}
METHOD_CERTAINTY = {"linear": 0.6, "none": 0.0}
LAST_MEASURE_START = 0.85
LAST_MEASURE_HALFLIFE_YR = 40.0
LAST_MEASURE_FLOOR = 0.3


def geometry_certainty(method, grade, years_since, rho_arcsec=None, rho_unc_arcsec=None,
                       limit_arcsec=None) -> np.ndarray:
    """Certainty (0-1) of tonight's separation; see the module docstring."""
    method = np.asarray(method, dtype=object).astype(str)
    grade = np.asarray(grade, dtype=float)
    years = np.nan_to_num(np.asarray(years_since, dtype=float), nan=50.0)
    g = np.zeros(method.shape, dtype=float)
    is_orbit = np.char.startswith(method.astype(str), "orbit")
    gc = np.full(method.shape, 0.65)
    for k, v in GRADE_CERTAINTY.items():
        gc[grade == k] = v
    g = np.where(is_orbit, gc, g)
    g = np.where(method == "orbit-interferometric", GRADE_CERTAINTY[8], g)
    decay = np.maximum(LAST_MEASURE_FLOOR,
                       LAST_MEASURE_START * 0.5 ** (np.clip(years, 0, None) / LAST_MEASURE_HALFLIFE_YR))
    g = np.where(method == "last", decay, g)
    for k, v in METHOD_CERTAINTY.items():
        g = np.where(method == k, v, g)
    if rho_arcsec is not None and rho_unc_arcsec is not None and limit_arcsec is not None:
        rho = np.asarray(rho_arcsec, float)
        unc = np.nan_to_num(np.asarray(rho_unc_arcsec, float), nan=0.0)
        room = np.maximum(rho - np.asarray(limit_arcsec, float), 1e-3)
        g = g / (1.0 + (unc / room) ** 2)
    return g


def score_pairs(df: pd.DataFrame, min_alt_deg: float) -> np.ndarray:
    """Score (0-100) per row of a judged candidate table.

    Needs columns ``chance``, ``margin``, ``mag2``, ``alt_best_deg``,
    ``method``, ``grade``, ``years_since_measure``, ``rho_arcsec``,
    ``rho_unc_arcsec``, ``limit_arcsec``.
    """
    chance = np.nan_to_num(df["chance"].to_numpy(float), nan=0.0)
    margin = np.clip(np.nan_to_num(df["margin"].to_numpy(float), nan=1e-3), 1e-3, None)
    close = np.exp(-np.log(margin / MARGIN_PEAK) ** 2 / (2 * MARGIN_WIDTH ** 2))
    mag2 = np.nan_to_num(df["mag2"].to_numpy(float), nan=12.0)
    bright = np.clip((12.0 - mag2) / 6.0, 0, 1)
    alt = np.nan_to_num(df["alt_best_deg"].to_numpy(float), nan=min_alt_deg)
    high = np.clip((alt - min_alt_deg) / max(60.0 - min_alt_deg, 1.0), 0, 1)
    cert = geometry_certainty(df["method"].to_numpy(), df["grade"].to_numpy(float),
                              df["years_since_measure"].to_numpy(float),
                              df["rho_arcsec"].to_numpy(float), df["rho_unc_arcsec"].to_numpy(float),
                              df["limit_arcsec"].to_numpy(float))
    return 100.0 * chance * cert * (W_MARGIN * close + W_BRIGHT * bright + W_ALT * high)
