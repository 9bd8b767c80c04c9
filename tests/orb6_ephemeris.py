"""Test-side reader of the ORB6 ephemeris file (``orb6_ephemerides_2005_2009.txt``).

Source of the layout: the USNO ORB6 ephemeris file (layout inferred, see docs/orbit-validation.md) (inferred
from the file itself; no USNO format document exists for it).  The fields are
read by column, never by whitespace, because theta and rho touch when
rho >= 100" (``254.3326.882``).  Columns (1-based, inclusive):

* 1-10 WDS id; 13-26 name; 30 grade; 37-44 reference code;
* theta / rho for 2005.0: 50-54 / 55-61, then every 15 columns for
  2006.0, 2007.0, 2008.0 and 2009.0;
* 124- remark (``astrometric orbit`` or ``incomplete elements``).

This lives in ``tests/`` on purpose: the ephemeris file is a validation
oracle, not an input of the planner.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd

EPOCHS = (2005.0, 2006.0, 2007.0, 2008.0, 2009.0)
HEADER_LINES = 8


def _num(text: str) -> float:
    text = text.strip()
    if text in ("", "."):
        return np.nan
    return float(text)


def read_ephemerides(path) -> pd.DataFrame:
    """One row per orbit line: wds_id, name, grade, reference, remark,
    theta_2005 ... theta_2009 [deg], rho_2005 ... rho_2009 [arcsec], line_no."""
    rows = []
    lines = Path(path).read_text(encoding="latin-1").splitlines()
    for line_no, line in enumerate(lines, start=1):
        if line_no <= HEADER_LINES or not line.strip():
            continue
        row = {
            "wds_id": line[0:10].strip(),
            "name": line[12:26].strip(),
            "grade": _num(line[29:30]),
            "reference": line[36:44].strip(),
            "remark": line[123:].strip(),
            "line_no": line_no,
        }
        for k, ep in enumerate(EPOCHS):
            start = 49 + 15 * k  # 0-based start of theta (col 50 for 2005)
            row[f"theta_{int(ep)}"] = _num(line[start:start + 5])
            row[f"rho_{int(ep)}"] = _num(line[start + 5:start + 12])
        rows.append(row)
    return pd.DataFrame(rows)


def one_to_one(orbits: pd.DataFrame, eph: pd.DataFrame) -> pd.DataFrame:
    """Orbit rows joined to ephemeris rows where the (WDS id, reference) pair
    occurs exactly once in each file (reference README: match on id +
    reference, not on the name, whose component labels changed).

    Returns the orbit columns plus ``eph_theta_YYYY`` / ``eph_rho_YYYY`` and
    ``eph_grade``, ``eph_remark``; the orbit table's index is kept in
    ``orbit_index``.
    """
    key = ["wds_id", "reference"]
    o = orbits.reset_index(names="orbit_index")
    o_n = o.groupby(key)["orbit_index"].transform("size")
    e_n = eph.groupby(key)["line_no"].transform("size")
    o1 = o[o_n == 1]
    e1 = eph[e_n == 1].rename(columns={c: f"eph_{c}" for c in eph.columns if c not in key})
    return o1.merge(e1, on=key, how="inner", validate="one_to_one")


def compare(matched: pd.DataFrame, positions_at, theta_tol_deg=0.15, rho_tol_arcsec=0.0015) -> pd.DataFrame:
    """Long table, one row per (orbit, epoch): computed vs catalogued theta, rho.

    ``positions_at(frame, epoch)`` must return a DataFrame with ``theta_deg``
    and ``rho_arcsec`` aligned with ``frame`` (i.e. ``orbit_positions``).
    The theta difference is wrapped to [-180, 180).
    """
    parts = []
    for ep in EPOCHS:  # five epochs, each one vectorised call over all orbits
        pos = positions_at(matched, ep)
        th_cat = matched[f"eph_theta_{int(ep)}"].to_numpy(float)
        rho_cat = matched[f"eph_rho_{int(ep)}"].to_numpy(float)
        dth = (pos["theta_deg"].to_numpy(float) - th_cat + 180.0) % 360.0 - 180.0
        drho = pos["rho_arcsec"].to_numpy(float) - rho_cat
        parts.append(pd.DataFrame({
            "wds_id": matched["wds_id"].to_numpy(), "reference": matched["reference"].to_numpy(),
            "grade": matched["grade"].to_numpy(float), "period_yr": matched["period_yr"].to_numpy(float),
            "epoch": ep, "theta_calc": pos["theta_deg"].to_numpy(float), "theta_cat": th_cat,
            "rho_calc": pos["rho_arcsec"].to_numpy(float), "rho_cat": rho_cat,
            "dtheta_deg": dth, "drho_arcsec": drho,
        }))
    out = pd.concat(parts, ignore_index=True)
    out["ok"] = (np.abs(out["dtheta_deg"]) <= theta_tol_deg) & (np.abs(out["drho_arcsec"]) <= rho_tol_arcsec)
    return out
