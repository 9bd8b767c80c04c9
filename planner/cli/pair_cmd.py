"""``splitplan pair QUERY``: where the companion is today (or at any date).

Prints the separation rho and position angle theta of one pair at a date,
how they were obtained (orbit, straight-line motion, last measure), the orbit
grade and how far to trust the figures; optionally a table over a range of
years, a plot of the apparent orbit, or JSON.

The work is split into small functions so that other commands can reuse or
extend them: :func:`resolve_epoch`, :func:`parse_years`, :func:`find`,
:func:`geometry_report`, :func:`year_table`, :func:`render_report`,
:func:`render_table`, :func:`plot_pair`.  Heavy libraries (pandas, numpy,
matplotlib) are imported inside them, so the command starts fast.
"""

from __future__ import annotations

import sys
from pathlib import Path
from typing import Optional

from planner.cli import options as opt
from planner.cli.parser import Command

MAX_TABLE_ROWS = 2000
TONIGHT = "Verdict tonight (needs a site and a telescope)"


# -- input ----------------------------------------------------------------------


def resolve_epoch(date: Optional[str] = None, epoch: Optional[float] = None) -> float:
    """The epoch as a Besselian year from ``--date YYYY-MM-DD`` (0 h UTC) or
    ``--epoch 2031.5``; now when neither is given."""
    import datetime as dt

    from planner.errors import InputError
    from planner.motion.epochs import to_epoch_yr, today_epoch_yr

    if date is not None and epoch is not None:
        raise InputError("give either --date or --epoch, not both")
    if epoch is not None:
        if not (-3000.0 <= epoch <= 5000.0):
            raise InputError(f"--epoch {epoch} is out of range; give a year such as 2031.5 (-3000 to 5000)")
        return float(epoch)
    if date is not None:
        try:
            d = dt.date.fromisoformat(date.strip())
        except ValueError:
            raise InputError(f"--date {date!r} is not a date; use YYYY-MM-DD, e.g. 2031-07-02") from None
        return float(to_epoch_yr(d))
    return today_epoch_yr()


def parse_years(spec: str):
    """``FROM:TO[:STEP]`` (years; step default 1) -> numpy array of epochs, TO included."""
    import numpy as np

    from planner.errors import InputError

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
    return start + step * np.arange(n)


def find(catalog_spec: str, query: str, online: bool = False):
    """Load the catalogue and look the name up: (catalog, row labels best first).
    Unknown names raise UnknownPairError (one line with close matches, or what a
    known star is; exit 2); ``online`` asks CDS SIMBAD when the offline index has
    no answer (planner.catalogs.online)."""
    from planner.catalogs import find_pairs, load_catalog

    cat = load_catalog(catalog_spec or "sample")
    if online:
        from planner.catalogs.resolve import find_pairs_online

        return cat, find_pairs_online(cat, query)
    return cat, find_pairs(cat, query)


# -- computation ---------------------------------------------------------------


def _clean(v):
    """JSON-friendly scalar: NaN -> None, numpy -> Python."""
    import math

    if hasattr(v, "item"):
        v = v.item()
    if isinstance(v, float) and not math.isfinite(v):
        return None
    return v


def _sub_catalog(catalog, label, k: int = 1):
    """The catalogue cut to one pair repeated k times (for k epochs at once)."""
    from types import SimpleNamespace

    pairs = catalog.pairs.loc[[label] * k].reset_index(drop=True)
    o = catalog.orbits
    orbits = o[(o["wds_id"] == catalog.pairs.at[label, "wds_id"]).to_numpy()]
    return SimpleNamespace(pairs=pairs, orbits=orbits)


def chosen_orbit(catalog, label, reference: str):
    """The orbit row (a one-row DataFrame) that pair_geometry used, or None."""
    if not reference:
        return None
    from planner.catalogs.catalog import component_key

    o = catalog.orbits
    p = catalog.pairs.loc[label]
    key = component_key(o["components"]) == component_key(catalog.pairs.loc[[label], "components"]).iloc[0]
    sel = o[(o["wds_id"] == p["wds_id"]).to_numpy() & key.to_numpy() & (o["reference"] == reference).to_numpy()]
    return sel.iloc[:1] if len(sel) else None


def geometry_report(catalog, label, epoch_yr: float, precession: str = "j2000") -> dict:
    """Everything ``splitplan pair`` says about one pair at one epoch, as a dict
    (the JSON output; :func:`render_report` turns it into text)."""
    from planner.motion import pair_geometry
    from planner.motion.epochs import jd_from_besselian_year

    p = catalog.pairs.loc[label]
    g = pair_geometry(_sub_catalog(catalog, label), epoch_yr, precession=precession).iloc[0]
    from planner.catalogs import pair_names

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
    import numpy as np

    from planner.motion import pair_geometry

    epochs = np.asarray(epochs, dtype=float)
    g = pair_geometry(_sub_catalog(catalog, label, len(epochs)), epochs, precession=precession)
    cols = ("epoch_yr", "rho_arcsec", "theta_deg", "rho_unc_arcsec", "theta_unc_deg", "method")
    return [{c: _clean(v) for c, v in zip(cols, row)} for row in g[list(cols)].itertuples(index=False)]


# -- output ----------------------------------------------------------------------


def _f(v, fmt: str, missing: str = "-") -> str:
    return missing if v is None else format(v, fmt)


def _name(rep: dict) -> str:
    comp = f" {rep['components']}" if rep["components"] else ""
    return f"{rep['discoverer']}{comp}".strip() or rep["wds_id"]


_METHOD_TEXT = {
    "orbit": "orbit",
    "orbit-interferometric": "interferometric orbit (grade 8)",
    "linear": "straight-line motion from the first and last measures (an estimate)",
    "last": "last catalogued measure",
    "none": "no orbit and no measure",
}


def render_report(rep: dict) -> str:
    """Plain-text report of :func:`geometry_report`."""
    from planner.motion.epochs import JD_B1900

    lines = []
    mags = ""
    if rep["mag1"] is not None or rep["mag2"] is not None:
        mags = f"   mags {_f(rep['mag1'], '.2f', '?')} / {_f(rep['mag2'], '.2f', '?')}"
    star = f"   {rep['name']}" if rep.get("name") else ""
    star += f" ({rep['constellation']})" if rep.get("constellation") else ""
    lines.append(f"{_name(rep)}   WDS {rep['wds_id']}{star}{mags}")
    if rep.get("other_pairs"):
        lines.append("also named so: " + "; ".join(rep["other_pairs"]))
    # calendar date of the epoch (UTC, to the day)
    import datetime as dt

    day = dt.date(1899, 12, 31) + dt.timedelta(days=rep["jd"] - JD_B1900 + 0.81352)
    lines.append(f"date        {day.isoformat()}  (epoch {rep['epoch_yr']:.3f}, Besselian year)")
    if rep["rho_arcsec"] is None:
        lines.append(f"separation  unknown ({rep['reason']})")
    else:
        lines.append(f"separation  {rep['rho_arcsec']:.3f}\"  +/- {_f(rep['rho_unc_arcsec'], '.3f')}\"")
        if rep["theta_deg"] is None:
            lines.append("pos. angle  not catalogued")
        else:
            lines.append(f"pos. angle  {rep['theta_deg']:.1f} deg  +/- {_f(rep['theta_unc_deg'], '.1f')} deg"
                         "  (north through east)")
    method = _METHOD_TEXT.get(rep["method"], rep["method"])
    if rep.get("orbit"):
        o = rep["orbit"]
        method += (f" {o['reference']}, grade {_f(o['grade'], '.0f')}, P = {_f(o['period_yr'], '.2f')} yr,"
                   f" a = {_f(o['a_arcsec'], '.3f')}\"")
        if (rep["n_orbits"] or 0) > 1:
            method += f"; {rep['n_orbits']} orbits of this pair compared"
    lines.append(f"method      {method}")
    last = rep["last_measure"]
    if last["year"] is not None:
        meas = f"{last['year']:.0f}"
        if last["rho_arcsec"] is not None:
            meas += f": {last['rho_arcsec']:.1f}\" at {_f(last['theta_deg'], '.0f')} deg"
        lines.append(f"last measure {meas} ({_f(rep['years_since_measure'], '.0f')} yr ago)")
    lines.append(f"note        {rep['reason']}")
    lines.append(f"position    RA {rep['ra_date_deg']:.4f} deg, Dec {rep['dec_date_deg']:+.4f} deg"
                 " (J2000 axes, proper motion to the date)" if rep["ra_date_deg"] is not None else
                 "position    unknown")
    return "\n".join(lines) + "\n"


def render_table(rows: list[dict]) -> str:
    """Plain-text table of :func:`year_table`."""
    out = ["   epoch     rho\"   +/-     theta   +/-   method"]
    for r in rows:
        out.append(f"{r['epoch_yr']:9.2f}  {_f(r['rho_arcsec'], '6.3f', '     -')}  "
                   f"{_f(r['rho_unc_arcsec'], '5.3f', '    -')}  {_f(r['theta_deg'], '6.1f', '     -')}  "
                   f"{_f(r['theta_unc_deg'], '5.1f', '    -')}  {r['method']}")
    return "\n".join(out) + "\n"


def _plain(text: str) -> str:
    """Catalogue text for a matplotlib label: a '$' would start mathtext (and a lone
    one makes the drawing fail), so it is escaped; control characters are dropped."""
    return "".join(ch for ch in str(text) if ch >= " ").replace("$", r"\$")


def plot_pair(catalog, label, epoch_yr: float, path, precession: str = "j2000") -> Path:
    """Draw the apparent orbit (or the measured motion) of one pair to PNG/SVG.

    Primary at the origin; north up and east to the LEFT, as the pair appears
    on the sky without a diagonal (stated on the plot); the orbit over one
    period, periastron, the direction of motion, the first and last
    catalogued measures where known, and the position at ``epoch_yr``.
    """
    import io

    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    import numpy as np

    from planner.config.storage import atomic_write_bytes
    from planner.errors import InputError
    from planner.motion import orbit_grid

    path = Path(path)
    fmt = path.suffix.lower().lstrip(".")
    if fmt not in ("png", "svg"):
        raise InputError(f"--plot {path}: the file name must end in .png or .svg")
    rep = geometry_report(catalog, label, epoch_yr, precession)
    fig, ax = plt.subplots(figsize=(6.4, 6.4))
    ax.plot([0], [0], marker="*", ms=14, color="goldenrod", ls="none", label="primary")
    pts_e, pts_n = [0.0], [0.0]

    orb = chosen_orbit(catalog, label, rep["orbit_reference"] or "")
    if orb is not None:
        o = orb.iloc[0]
        P, T = float(o["period_yr"]), float(o["t_peri_yr"])
        ts = epoch_yr + np.linspace(0.0, P, 721)
        g = orbit_grid(orb, ts, precession=precession)
        n, e = g["x_north_arcsec"][0], g["y_east_arcsec"][0]
        ax.plot(e, n, "-", color="tab:blue", lw=1.2,
                label=_plain(f"orbit {o['reference']} (grade {o['grade']:.0f})"))
        pts_e += list(e)
        pts_n += list(n)
        # periastron: the next passage after the epoch
        k = np.ceil((epoch_yr - T) / P)
        gp = orbit_grid(orb, [T + k * P], precession=precession)
        ax.plot(gp["y_east_arcsec"][0], gp["x_north_arcsec"][0], "s", color="tab:purple", ms=6,
                label=f"periastron {T + k * P:.1f}")
        # direction of motion: an arrow along the orbit from the epoch
        ga = orbit_grid(orb, [epoch_yr, epoch_yr + P / 40.0], precession=precession)
        ax.annotate("", xy=(ga["y_east_arcsec"][0, 1], ga["x_north_arcsec"][0, 1]),
                    xytext=(ga["y_east_arcsec"][0, 0], ga["x_north_arcsec"][0, 0]),
                    arrowprops=dict(arrowstyle="->", color="tab:blue", lw=1.5))
    for key, style, text in (("first_measure", "o", "first measure"), ("last_measure", "D", "last measure")):
        m = rep[key]
        if m["rho_arcsec"] is not None and m["theta_deg"] is not None:
            th = np.radians(m["theta_deg"])
            e, n = m["rho_arcsec"] * np.sin(th), m["rho_arcsec"] * np.cos(th)
            ax.plot(e, n, style, mfc="none", color="dimgray", ms=8,
                    label=f"{text} {_f(m['year'], '.0f')}")
            pts_e.append(e)
            pts_n.append(n)
    if rep["method"] == "linear" and rep["rho_arcsec"] is not None:
        f = rep["first_measure"]
        thf, thn = np.radians(f["theta_deg"]), np.radians(rep["theta_deg"])
        ax.plot([f["rho_arcsec"] * np.sin(thf), rep["rho_arcsec"] * np.sin(thn)],
                [f["rho_arcsec"] * np.cos(thf), rep["rho_arcsec"] * np.cos(thn)], "--", color="gray",
                lw=1, label="straight-line estimate")
    if rep["rho_arcsec"] is not None and rep["theta_deg"] is not None:
        th = np.radians(rep["theta_deg"])
        e, n = rep["rho_arcsec"] * np.sin(th), rep["rho_arcsec"] * np.cos(th)
        ax.plot(e, n, "o", color="crimson", ms=8,
                label=f"at {rep['epoch_yr']:.2f}: {rep['rho_arcsec']:.3f}\", {rep['theta_deg']:.1f} deg")
        if rep["rho_unc_arcsec"]:
            ax.add_patch(plt.Circle((e, n), rep["rho_unc_arcsec"], color="crimson", alpha=0.15, lw=0))
        pts_e.append(e)
        pts_n.append(n)
    span = max(np.nanmax(np.abs(pts_e)), np.nanmax(np.abs(pts_n)), 1e-3) * 1.15
    ax.set_xlim(span, -span)  # east to the LEFT
    ax.set_ylim(-span, span)
    ax.set_aspect("equal")
    ax.axhline(0, color="0.85", lw=0.6, zorder=0)
    ax.axvline(0, color="0.85", lw=0.6, zorder=0)
    ax.set_xlabel("east offset [arcsec]  (east is to the LEFT)")
    ax.set_ylabel("north offset [arcsec]  (north up)")
    ax.set_title(_plain(f"{_name(rep)}  (WDS {rep['wds_id']})") + "\nN up, E left: as on the sky without a diagonal",
                 fontsize=10)
    ax.annotate("N", xy=(0.06, 0.95), xycoords="axes fraction", ha="center", fontsize=11, weight="bold")
    ax.annotate("", xy=(0.06, 0.93), xytext=(0.06, 0.82), xycoords="axes fraction",
                arrowprops=dict(arrowstyle="->"))
    ax.annotate("E", xy=(0.015, 0.80), xycoords="axes fraction", va="center", fontsize=11, weight="bold")
    ax.annotate("", xy=(0.03, 0.82), xytext=(0.14, 0.82), xycoords="axes fraction",
                arrowprops=dict(arrowstyle="->"))
    ax.legend(loc="lower right", fontsize=7, framealpha=0.85)
    buf = io.BytesIO()
    fig.savefig(buf, format=fmt, dpi=120, bbox_inches="tight")
    plt.close(fig)
    return atomic_write_bytes(path, buf.getvalue())


# -- command -----------------------------------------------------------------------


def tonight_report(catalog, label, *, site=None, lat=None, lon=None, elevation=None, tz=None, min_alt=None,
                   date=None, scope=None, aperture=None, obstruction=None, seeing=None, steadiness=None,
                   darkness=None) -> dict:
    """The verdict for one telescope tonight (or on the evening of ``date``):
    :func:`planner.plan.single.check_pair` with the site, telescope and seeing
    resolved exactly as ``splitplan night`` resolves them."""
    from planner.cli.night_cmd import build_request
    from planner.errors import InputError
    from planner.plan.session import resolve_seeing
    from planner.plan.single import check_pair

    opt.check_darkness(darkness)
    if scope and len(scope) > 1 or aperture and len(aperture) > 1:
        raise InputError("splitplan pair judges one telescope; use 'splitplan night' for several")
    req = build_request(site=site, lat=lat, lon=lon, elevation=elevation, tz=tz, min_alt=min_alt, date=date,
                        scope=scope, aperture=aperture, obstruction=obstruction, seeing=seeing,
                        steadiness=steadiness, darkness=darkness)
    seeing_arcsec, seeing_origin = resolve_seeing(req)
    rep = check_pair(catalog, label, req.site, req.date, req.scopes[0], seeing_arcsec,
                     darkness=req.darkness, minutes=req.minutes)
    rep["telescope"] = req.scopes[0]
    rep["tz"] = str(req.site.get("tz", "UTC")) if isinstance(req.site, dict) else "UTC"
    rep["seeing_arcsec"] = seeing_arcsec
    rep["seeing_origin"] = seeing_origin
    return rep


_VERDICT_TEXT = {"split": "should split", "challenge": "a challenge (near the limit)", "no": "will not split"}


def _local(iso_utc: str, tz: str) -> str:
    """ISO UTC text -> 'YYYY-MM-DD HH:MM' in the zone ``tz``."""
    import datetime as dt
    from zoneinfo import ZoneInfo

    t = dt.datetime.fromisoformat(iso_utc.replace("Z", "+00:00"))
    return t.astimezone(ZoneInfo(tz)).strftime("%Y-%m-%d %H:%M %Z")


def render_tonight(rep: dict) -> str:
    """Plain-text verdict section of :func:`tonight_report`."""
    tz = rep["tz"]
    t = rep["telescope"]
    tel = f"{t.get('aperture_mm', 0):g} mm"
    if t.get("obstruction"):
        tel += f", obstruction {t['obstruction']:.2f}"
    if t.get("name") and t["name"] != f"{t.get('aperture_mm', 0):g} mm":
        tel = f"{t['name']} ({tel})"
    lines = ["", f"tonight     evening of {rep['date']} with {tel}, seeing {rep['seeing_origin']}"]
    if rep["dark_start_utc"]:
        lines.append(f"dark window {_local(rep['dark_start_utc'], tz)} to {_local(rep['dark_end_utc'], tz)}"
                     f" ({rep['darkness']}, {tz})")
    else:
        lines.append(f"dark window none tonight ({rep['darkness']} darkness is not reached)")
    if rep["best_local"]:
        lines.append(f"best time   {rep['best_local']} ({tz}), altitude {_f(rep['alt_best_deg'], '.0f')} deg,"
                     f" airmass {_f(rep['airmass_best'], '.2f')}, {_f(rep['up_dark_min'], '.0f')} min up in the dark")
    verdict = _VERDICT_TEXT.get(rep["verdict"], rep["verdict"])
    if not rep["observable"]:
        verdict = f"not well placed tonight; at its best time it {verdict}"
    lines.append(f"verdict     {verdict}: limit {_f(rep['limit_arcsec'], '.2f')}\", margin x{_f(rep['margin'], '.2f')},"
                 f" chance {_f(None if rep['chance'] is None else 100 * rep['chance'], '.0f')}%")
    lines.append(f"why         {rep['reason']}")
    if rep["power_min"] is not None:
        lines.append(f"power       {_f(rep['power_min'], '.0f')}x to {_f(rep['power_max'], '.0f')}x")
    b = rep["best_dates"]
    if b["ever_up"]:
        season = f"{b['good_from']} to {b['good_to']}" if b["good_from"] else "-"
        lines.append(f"best dates  transits at midnight on {b['midnight_transit']}; good season {season}"
                     f" (transit within {b['season_hours']:g} h of midnight), highest {b['max_alt_deg']:.0f} deg")
    else:
        lines.append("best dates  never rises at this latitude")
    for c in rep["cautions"]:
        lines.append(f"! {c}")
    return "\n".join(lines) + "\n"


def arguments(p) -> None:
    p.add_argument("query",
                   help="A star name (Albireo, 'eps Lyr', 'ε¹ Lyr', '70 Oph', 'HD 165341', 'BD+27 3410'), "
                        "a WDS id (18055+0230) or a designation (STF2272AB, 'STF 2272 AB', STF2272); "
                        "see docs/names.md.")
    p.add_argument("--online", action="store_true",
                   help="If the offline name index does not know the name, ask the CDS SIMBAD name "
                        "resolver (needs the network; answers are cached).")
    g = p  # the general options
    opt.catalog(g, "sample")
    g.add_argument("--date", metavar="YYYY-MM-DD",
                   help="Date (the evening, for the verdict); default now.")
    g.add_argument("--epoch", type=float, metavar="YEAR", help="Epoch as a year, e.g. 2031.5 (Besselian).")
    g.add_argument("--years", metavar="FROM:TO[:STEP]", help="Table over a range of years, e.g. 2020:2040:2.")
    g.add_argument("--plot", type=opt.path, metavar="FILE", help="Draw the apparent orbit to FILE.png or FILE.svg.")
    g.add_argument("--json", dest="as_json", action="store_true", help="Machine-readable output.")
    g.add_argument("--precession", default="j2000", metavar="FRAME",
                   help="Precession of theta: j2000 (default), equinox or none.")
    t = p.add_argument_group(TONIGHT)
    opt.site(t)
    opt.telescope(t, many=False)
    opt.air(t)


def run(a) -> None:
    """Separation and position angle of one pair, and the verdict when a site and a
    telescope are given."""
    site, lat, lon, elevation, tz, min_alt = (a.site, a.lat, a.lon, a.elevation, a.tz, a.min_alt)
    scope, aperture, obstruction = a.scope, a.aperture, a.obstruction
    seeing, steadiness, darkness = a.seeing, a.steadiness, a.darkness
    query, catalog, date, epoch, years, plot, as_json, precession = (
        a.query, a.catalog, a.date, a.epoch, a.years, a.plot, a.as_json, a.precession)
    import json

    from planner.errors import InputError

    wants_verdict = any(v for v in (site, lat, lon, scope, aperture))
    epoch_yr = resolve_epoch(date, epoch)
    epochs = parse_years(years) if years else None
    cat, labels = find(catalog, query, online=a.online)
    label = labels[0]
    rep = geometry_report(cat, label, epoch_yr, precession)
    others = cat.pairs.loc[labels[1:]]
    rep["other_pairs"] = [f"{r.discoverer} {r.components}".strip() + f" ({r.wds_id})"
                          for r in others.itertuples()]
    tonight = None
    if wants_verdict:
        if epoch is not None:
            raise InputError("the verdict is for an evening: give --date YYYY-MM-DD, not --epoch")
        tonight = tonight_report(cat, label, site=site, lat=lat, lon=lon, elevation=elevation, tz=tz,
                                 min_alt=min_alt, date=date, scope=scope, aperture=aperture,
                                 obstruction=obstruction, seeing=seeing, steadiness=steadiness,
                                 darkness=darkness)
    elif any(v is not None for v in (seeing, steadiness, darkness, obstruction, elevation, tz, min_alt)):
        raise InputError("a verdict needs a site (--site or --lat/--lon/--tz) and a telescope (--aperture or --scope)")
    table = year_table(cat, label, epochs, precession) if epochs is not None else None
    if plot is not None:
        written = plot_pair(cat, label, epoch_yr, plot, precession)
        print(f"splitplan: wrote {written}", file=sys.stderr)
    if as_json:
        if table is not None:
            rep["table"] = table
        if tonight is not None:
            rep["tonight"] = tonight
        sys.stdout.write(json.dumps(rep, indent=2) + "\n")
        return
    from planner.report.safe import terminal_text

    text = render_report(rep)
    if tonight is not None:
        text += render_tonight(tonight)
    if table is not None:
        text += "\n" + render_table(table)
    sys.stdout.write(terminal_text(text))


COMMAND = Command(
    "pair", arguments=arguments, run=run, usage="query", no_args_is_help=True,
    summary="Where the companion is today: separation, position angle, method, uncertainty.",
    help="Separation and position angle of one pair today (or at --date/--epoch), with method and "
         "uncertainty; with a site and a telescope, also the verdict for tonight, the best time and "
         "the best dates of the year.")
