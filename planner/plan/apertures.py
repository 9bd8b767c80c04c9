"""How many pairs each aperture splits: tonight, or over a range of nights.

For each aperture (same obstruction, seeing, site and catalogue) every pair
is judged at its best time of the night; a pair *counts* when the verdict is
``split`` and it is up in the dark long enough for one observing slot.  Over
a date range a few nights are sampled evenly (``nights``) and a pair counts
when it splits on at least one of them.  The pairs "added" by a step are
those the larger aperture splits and the previous (smaller) one does not.
"""

from __future__ import annotations

import dataclasses
import datetime as _dt

import numpy as np
import pandas as pd

from planner.config.fields import check
from planner.errors import InputError
from planner.optics.telescope import Telescope
from planner.plan.model import NightRequest
from planner.plan.night import judge_scope, prepare
from planner.plan.session import Session, parse_date, site_of


def _dates(date_from: str, date_to: str | None, nights: int) -> list[str]:
    a = _dt.date.fromisoformat(date_from)
    if not date_to:
        return [a.isoformat()]
    try:
        b = _dt.date.fromisoformat(date_to)
    except ValueError:
        raise InputError(f"date {date_to!r} is not a valid YYYY-MM-DD date") from None
    if b < a:
        raise InputError(f"--to {date_to} is before --from {date_from}")
    span = (b - a).days
    n = max(1, min(int(nights), span + 1))
    offs = np.unique(np.round(np.linspace(0, span, n)).astype(int))
    return [(a + _dt.timedelta(days=int(o))).isoformat() for o in offs]


def compare_apertures(request: NightRequest, apertures_mm, date_to: str | None = None,
                      nights: int = 4, catalog=None) -> dict:
    """Counts per aperture and the pairs each step adds.

    ``request`` gives the site, date (start of the range), seeing, filters and
    the obstruction (of its first scope).  Returns a dict with ``dates``,
    ``table`` (DataFrame: ``aperture_mm``, ``n_split``, ``n_added``, ``added``)
    and ``pairs`` (DataFrame of every pair split by the largest aperture with
    the smallest aperture that splits it, ``first_aperture_mm``).
    """
    aps = sorted({check("aperture_mm", a) for a in apertures_mm})
    if not aps:
        raise InputError("give at least one aperture in mm, e.g. 60 80 102 127")
    nights = check("nights", nights, "--nights")
    start = parse_date(request.date, site_of(request))
    dates = _dates(start, date_to, nights)
    base_scope = dict(request.scopes[0]) if request.scopes else {}
    obstruction = float(base_scope.get("obstruction", 0.0))
    tels = [Telescope.from_mapping({"aperture_mm": a, "obstruction": obstruction, "kind": base_scope.get("kind")},
                                   f"{a:g} mm") for a in aps]
    calibrations = ()
    if request.calibration is not None:
        from planner.plan.observations import calibrate

        tels, calibrations = calibrate(tels, request.calibration)
    # Over the nights: per pair, does each aperture split it on at least one night, and its best
    # ranking score with each aperture (the night plan's own score, planner.plan.score); names and
    # positions are kept from every night a pair was seen, so every pair counted has its name.
    split_any = None
    best_score = None
    names = None
    info_cols = ["wds_id", "discoverer", "components", "rho_arcsec", "mag1", "mag2"]
    for d in dates:
        session = Session.from_request(dataclasses.replace(request, date=d), need_scopes=False)
        nt = prepare(session, catalog)
        catalog, table = nt.catalog, nt.table
        up = nt.up
        judged = [judge_scope(tel, table, nt.vis, session.seeing_arcsec, session.site.min_alt_deg) for tel in tels]
        m = pd.DataFrame(np.stack([(j["verdict"].astype(str).to_numpy() == "split") & up for j in judged], axis=1)
                         if judged else np.zeros((len(table), 0), bool), index=table.index)
        sc = pd.DataFrame(np.stack([np.where(m.iloc[:, k].to_numpy(), j["score"].to_numpy(float), -np.inf)
                                    for k, j in enumerate(judged)], axis=1)
                          if judged else np.zeros((len(table), 0)), index=table.index)
        if split_any is None:
            split_any, best_score, names = m, sc, table[info_cols]
        else:
            idx = split_any.index.union(m.index)
            split_any = split_any.reindex(idx, fill_value=False) | m.reindex(idx, fill_value=False)
            best_score = np.maximum(best_score.reindex(idx, fill_value=-np.inf), sc.reindex(idx, fill_value=-np.inf))
            names = names.combine_first(table[info_cols]).reindex(idx)
    seeing, origin = session.seeing_arcsec, session.seeing_origin
    mat = split_any.to_numpy(bool)
    scores = best_score.to_numpy(float)
    counts = mat.sum(axis=0)
    names = names.reindex(split_any.index)
    label = (names["discoverer"].astype(str) + " " + names["components"].astype(str)).str.strip().to_numpy()
    rows = []
    prev = np.zeros(len(mat), bool)
    for k, a in enumerate(aps):
        new = np.flatnonzero(mat[:, k] & ~prev)
        # most interesting first: the night plan's ranking score with this aperture, best night
        new = new[np.argsort(-scores[new, k], kind="stable")]
        rows.append({"aperture_mm": a, "n_split": int(counts[k]), "n_added": int(new.size),
                     "added": [str(x) for x in label[new]]})
        prev = mat[:, k]
    any_k = mat.any(axis=1)
    first = np.where(any_k, np.array(aps)[np.argmax(mat, axis=1)] if len(aps) else np.nan, np.nan)
    pairs = pd.DataFrame({"wds_id": names["wds_id"].to_numpy(), "discoverer": names["discoverer"].to_numpy(),
                          "components": names["components"].to_numpy(),
                          "rho_arcsec": names["rho_arcsec"].to_numpy(float),
                          "first_aperture_mm": first}, index=split_any.index)[any_k]
    s_ = session.site
    site_label = (f"{request.site_name} ({s_.lat_deg:.2f}, {s_.lon_deg:.2f})" if request.site_name
                  else f"{s_.lat_deg:.2f}, {s_.lon_deg:.2f}")
    return {"dates": dates, "site": site_label, "seeing_arcsec": seeing, "seeing_origin": origin, "obstruction": obstruction,
            "table": pd.DataFrame(rows), "pairs": pairs.sort_values("first_aperture_mm", kind="stable"),
            "calibrations": calibrations}


def counts_figure(result: dict):
    """The matplotlib figure of :func:`plot_counts`: pairs split against aperture, the y axis from
    zero (a count), the site and the dates in the title."""
    import matplotlib

    matplotlib.use("Agg", force=False)
    import matplotlib.pyplot as plt

    t = result["table"]
    fig, ax = plt.subplots(figsize=(6.4, 4.0), dpi=110)
    ax.plot(t["aperture_mm"], t["n_split"], "o-", color="#2b6cb0")
    for a, n in zip(t["aperture_mm"], t["n_split"]):
        ax.annotate(str(n), (a, n), textcoords="offset points", xytext=(0, 6), ha="center", fontsize=8)
    ax.set_xlabel("clear aperture [mm]")
    ax.set_ylabel("pairs split")
    top = float(t["n_split"].max()) if len(t) else 1.0
    ax.set_ylim(0, max(1.0, top) * 1.12)
    d = result["dates"]
    span = d[0] if len(d) == 1 else f"{d[0]} to {d[-1]} ({len(d)} nights)"
    site = result.get("site") or ""
    ax.set_title(f"Pairs within reach{' at ' + site if site else ''}\n{span}, seeing {result['seeing_arcsec']:.2g}\"",
                 fontsize=10)
    ax.grid(alpha=0.3)
    fig.tight_layout()
    return fig


def plot_counts(result: dict, path, force: bool = False) -> None:
    """Count of split pairs versus aperture (matplotlib; PNG, SVG or PDF by extension)."""
    import io

    import matplotlib.pyplot as plt

    from planner.config.storage import write_output

    fig = counts_figure(result)
    buf = io.BytesIO()
    ext = str(path).rsplit(".", 1)[-1].lower()
    fig.savefig(buf, format=ext if ext in ("png", "svg", "pdf") else "png")
    plt.close(fig)
    write_output(path, buf.getvalue(), force=force, option="--plot")
