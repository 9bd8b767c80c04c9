"""One pair at one date: where the companion is, how that was obtained, and (with a site
and a telescope) the verdict for the evening: the :class:`PairReport`.

:func:`pair_report` gathers everything ``splitplan pair`` shows: the separation rho and
position angle theta at the epoch with their method and uncertainty
(:func:`planner.motion.pair_geometry`), optionally a table over a range of years (one
vectorised call), the orbit row that was used (for the orbit plot) and the verdict for
one telescope on one evening (:func:`planner.plan.single.check_pair`).  The text and
the plot are drawn by :mod:`planner.report.pair`; the JSON is :meth:`PairReport.to_dict`.
"""

from __future__ import annotations

import dataclasses
import datetime as _dt
import math

import numpy as np
import pandas as pd

from planner.catalogs.catalog import Catalog, component_key
from planner.errors import InputError
from planner.motion import pair_geometry
from planner.motion.epochs import (EPOCH_MAX_YR, EPOCH_MIN_YR, check_epoch_yr, jd_from_besselian_year,
                                   to_epoch_yr, today_epoch_yr)

#: at most this many rows in a table over years
MAX_TABLE_ROWS = 2000
#: the range of epochs accepted (years)
EPOCH_RANGE_YR = (EPOCH_MIN_YR, EPOCH_MAX_YR)


@dataclasses.dataclass(frozen=True)
class PairReport:
    """Everything ``splitplan pair`` says about one pair.

    ``geometry``: plain values at the epoch (the top level of the JSON output);
    ``table``: rho and theta over a range of years, or None; ``tonight``: the verdict
    for one telescope on one evening (:func:`planner.plan.single.check_pair` plus the
    telescope, time zone and seeing), or None; ``orbit``: the one-row orbit table the
    position came from, or None; ``precession``: how theta was precessed.
    """

    geometry: dict
    table: list | None = None
    tonight: dict | None = None
    orbit: pd.DataFrame | None = None
    precession: str = "j2000"
    attempts: list | None = None     # the latest attempts in the observation log, newest first

    def to_dict(self) -> dict:
        """The JSON document: the geometry, with ``table`` and ``tonight`` when present."""
        d = dict(self.geometry)
        if self.table is not None:
            d["table"] = self.table
        if self.tonight is not None:
            d["tonight"] = self.tonight
        if self.attempts:
            d["log"] = self.attempts
        return d


# -- inputs ------------------------------------------------------------------------------


def resolve_epoch(date: str | None = None, epoch: float | None = None) -> float:
    """The epoch as a Besselian year from a date ``YYYY-MM-DD`` (0 h UTC) or a year
    such as 2031.5; now when neither is given."""
    if date is not None and epoch is not None:
        raise InputError("give either --date or --epoch, not both")
    if epoch is not None:
        return float(check_epoch_yr(epoch, "--epoch"))
    if date is not None:
        try:
            d = _dt.date.fromisoformat(date.strip())
        except ValueError:
            raise InputError(f"--date {date!r} is not a date; use YYYY-MM-DD, e.g. 2031-07-02") from None
        return float(check_epoch_yr(to_epoch_yr(d), f"--date {date.strip()}: the epoch"))
    return today_epoch_yr()


def parse_years(spec: str) -> np.ndarray:
    """``FROM:TO[:STEP]`` (years; step default 1) -> the epochs, TO included."""
    parts = spec.split(":")
    try:
        nums = [float(p) for p in parts]
    except ValueError:
        nums = []
    if len(nums) not in (2, 3) or not all(np.isfinite(nums)):
        raise InputError(f"--years {spec!r} is not FROM:TO or FROM:TO:STEP, e.g. 2020:2040 or 2020:2040:0.5")
    start, stop = nums[0], nums[1]
    step = nums[2] if len(nums) == 3 else 1.0
    if step <= 0 or stop < start:
        raise InputError(f"--years {spec!r}: need FROM <= TO and a positive STEP")
    n = int(np.floor((stop - start) / step + 1e-9)) + 1
    if n > MAX_TABLE_ROWS:
        raise InputError(f"--years {spec!r} gives {n} rows; at most {MAX_TABLE_ROWS} (use a larger STEP)")
    check_epoch_yr([start, stop], f"--years {spec}: the year")
    return start + step * np.arange(n)


# -- computation ---------------------------------------------------------------------------


def _clean(v):
    """JSON-friendly scalar: NaN -> None, numpy -> Python."""
    if hasattr(v, "item"):
        v = v.item()
    if isinstance(v, float) and not math.isfinite(v):
        return None
    return v


def one_pair_catalog(catalog, label, k: int = 1) -> Catalog:
    """The catalogue cut to one pair (repeated ``k`` times, for ``k`` epochs at once) and its orbits."""
    pairs = catalog.pairs.loc[[label] * k].reset_index(drop=True)
    o = catalog.orbits
    orbits = o[(o["wds_id"] == catalog.pairs.at[label, "wds_id"]).to_numpy()]
    return Catalog(pairs=pairs, orbits=orbits, source=str(getattr(catalog, "source", "")),
                   retrieved=str(getattr(catalog, "retrieved", "")))


def chosen_orbit(catalog, label, reference: str):
    """The orbit row (a one-row DataFrame) that pair_geometry used, or None."""
    if not reference:
        return None
    o = catalog.orbits
    p = catalog.pairs.loc[label]
    key = component_key(o["components"]) == component_key(catalog.pairs.loc[[label], "components"]).iloc[0]
    sel = o[(o["wds_id"] == p["wds_id"]).to_numpy() & key.to_numpy() & (o["reference"] == reference).to_numpy()]
    return sel.iloc[:1] if len(sel) else None


def geometry_at(catalog, label, epoch_yr: float, precession: str = "j2000") -> dict:
    """rho, theta, method, uncertainty, the catalogued measures and the orbit of one pair at one epoch."""
    from planner.catalogs import pair_names

    p = catalog.pairs.loc[label]
    g = pair_geometry(one_pair_catalog(catalog, label), epoch_yr, precession=precession).iloc[0]
    star = pair_names(catalog, [label]).iloc[0]
    rep = {
        "wds_id": str(p["wds_id"]), "discoverer": str(p["discoverer"]), "components": str(p["components"]),
        "name": str(star["name"]), "constellation": str(star["constellation"]),
        "source": str(p.get("source", "")),
        "mag1": _clean(p.get("mag1")), "mag2": _clean(p.get("mag2")),
        "epoch_yr": float(epoch_yr), "jd": float(jd_from_besselian_year(epoch_yr)),
    }
    for c in ("rho_arcsec", "theta_deg", "method", "grade", "rho_unc_arcsec", "theta_unc_deg",
              "years_since_measure", "ra_date_deg", "dec_date_deg", "orbit_reference", "n_orbits", "reason"):
        rep[c] = _clean(g[c])
    rep["precession"] = precession
    rep["first_measure"] = {"year": _clean(p.get("year_first")), "rho_arcsec": _clean(p.get("sep_first_arcsec")),
                            "theta_deg": _clean(p.get("pa_first_deg"))}
    rep["last_measure"] = {"year": _clean(p.get("year_last")), "rho_arcsec": _clean(p.get("sep_last_arcsec")),
                           "theta_deg": _clean(p.get("pa_last_deg"))}
    orb = chosen_orbit(catalog, label, rep["orbit_reference"] or "")
    if orb is not None:
        o = orb.iloc[0]
        rep["orbit"] = {k: _clean(o[k]) for k in ("reference", "grade", "period_yr", "a_arcsec", "incl_deg",
                                                    "node_deg", "t_peri_yr", "ecc", "omega_deg", "equinox",
                                                    "year_last_obs")}
    return rep


def year_table(catalog, label, epochs, precession: str = "j2000") -> list[dict]:
    """rho, theta, method and uncertainty of one pair at many epochs (one vectorised call)."""
    epochs = np.asarray(epochs, dtype=float)
    g = pair_geometry(one_pair_catalog(catalog, label, len(epochs)), epochs, precession=precession)
    cols = ("epoch_yr", "rho_arcsec", "theta_deg", "rho_unc_arcsec", "theta_unc_deg", "method")
    return [{c: _clean(v) for c, v in zip(cols, row)} for row in g[list(cols)].itertuples(index=False)]


def tonight_verdict(catalog, label, request) -> dict:
    """The verdict for the request's first telescope on the request's evening
    (:func:`planner.plan.single.check_pair`), with the telescope, the time zone and
    the seeing and where it came from."""
    from planner.plan.session import resolve_seeing
    from planner.plan.single import check_pair

    if len(request.scopes) > 1:
        raise InputError("splitplan pair judges one telescope; use 'splitplan night' for several")
    seeing_arcsec, seeing_origin = resolve_seeing(request)
    rep = check_pair(catalog, label, request.site, request.date, request.scopes[0], seeing_arcsec,
                     darkness=request.darkness, minutes=request.minutes, calibration=request.calibration)
    rep["telescope"] = request.scopes[0]
    rep["tz"] = str(request.site.get("tz", "UTC")) if isinstance(request.site, dict) else "UTC"
    rep["seeing_arcsec"] = seeing_arcsec
    rep["seeing_origin"] = seeing_origin
    return rep


def pair_report(catalog, label, epoch_yr: float, *, precession: str = "j2000", years=None,
                request=None, others=()) -> PairReport:
    """The :class:`PairReport` of one pair (``label``: its row in ``catalog.pairs``) at
    ``epoch_yr``; ``years``: epochs for a table (or None); ``request``: a
    :class:`~planner.plan.model.NightRequest` with the site, one telescope and the
    evening for the verdict (or None)."""
    geometry = geometry_at(catalog, label, epoch_yr, precession)
    op = catalog.pairs.loc[[o for o in others if o != label]]
    geometry["other_pairs"] = [f"{r.discoverer} {r.components}".strip() + f" ({r.wds_id})"
                               for r in op.itertuples()]
    tonight = tonight_verdict(catalog, label, request) if request is not None else None
    table = year_table(catalog, label, years, precession) if years is not None else None
    orbit = chosen_orbit(catalog, label, geometry["orbit_reference"] or "")
    attempts = logged_attempts(geometry["wds_id"], geometry["components"])
    return PairReport(geometry=geometry, table=table, tonight=tonight, orbit=orbit, precession=precession,
                      attempts=attempts)


def logged_attempts(wds_id: str, components: str, n: int = 3) -> list[dict]:
    """The latest ``n`` attempts at this pair in the observation log (none without a log;
    sqlite3 is then not imported)."""
    from planner.config.storage import log_path

    if not log_path().exists():
        return []
    from planner.config.logbook import Logbook
    from planner.plan.observations import last_attempts

    with Logbook(create=False) as log:
        return last_attempts(log, wds_id, (components or "").strip() or None, n=n)
