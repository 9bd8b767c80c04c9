"""Text and plot of one pair's :class:`~planner.plan.pair_report.PairReport` (``splitplan pair``).

:func:`render_report` (the position at the epoch), :func:`render_table` (over years),
:func:`render_tonight` (the verdict for an evening) and :func:`plot_pair` (the apparent
orbit or measured motion, PNG or SVG).  matplotlib is imported only by the plot.
"""

from __future__ import annotations

import datetime as dt
from pathlib import Path

from planner.motion.epochs import calendar_date_from_jd
from planner.report.angles import dec_text, ra_text

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
    """Plain text of the geometry at the epoch (``PairReport.geometry``)."""
    lines = []
    mags = ""
    if rep["mag1"] is not None or rep["mag2"] is not None:
        mags = f"   mags {_f(rep['mag1'], '.2f', '?')} / {_f(rep['mag2'], '.2f', '?')}"
    star = f"   {rep['name']}" if rep.get("name") else ""
    star += f" ({rep['constellation']})" if rep.get("constellation") else ""
    lines.append(f"{_name(rep)}   WDS {rep['wds_id']}{star}{mags}")
    if rep.get("other_pairs"):
        lines.append("also named so: " + "; ".join(rep["other_pairs"]))
    day = calendar_date_from_jd(rep["jd"])  # the UTC day of the epoch
    lines.append(f"date        {day}  (epoch {rep['epoch_yr']:.3f}, Besselian year)")
    if rep["rho_arcsec"] is None:
        lines.append(f"separation  unknown ({rep['reason']})")
    else:
        lines.append(f"separation  {rep['rho_arcsec']:.3f}\"  +/- {_f(rep['rho_unc_arcsec'], '.3f')}\"")
        if rep["theta_deg"] is None:  # a catalogued separation without angle (BSC5)
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
        ago = f"{_f(rep['years_since_measure'], '.0f')} yr ago"
        if last["rho_arcsec"] is not None:
            meas += f": {last['rho_arcsec']:.1f}\" at {_f(last['theta_deg'], '.0f')} deg"
            lines.append(f"last measure {meas} ({ago})")
        else:
            # an ORB6-only row: the year is the last observation the orbit was fitted to, not the
            # last time anyone measured the pair
            lines.append(f"orbit data  last observation used by the orbit: {meas} ({ago}; the pair may have "
                         "been measured since)")
    lines.append(f"note        {rep['reason']}")
    if rep["ra_date_deg"] is not None:
        lines.append(f"position    RA {ra_text(rep['ra_date_deg'])} = {rep['ra_date_deg']:.4f} deg,"
                     f" Dec {dec_text(rep['dec_date_deg'])} = {rep['dec_date_deg']:+.4f} deg"
                     " (J2000 axes, proper motion to the date)")
    else:
        lines.append("position    unknown")
    return "\n".join(lines) + "\n"


def render_table(rows: list[dict]) -> str:
    """Plain text of the table over years (``PairReport.table``)."""
    out = ["   epoch     rho\"   +/-     theta   +/-   method"]
    for r in rows:
        out.append(f"{r['epoch_yr']:9.2f}  {_f(r['rho_arcsec'], '6.3f', '     -')}  "
                   f"{_f(r['rho_unc_arcsec'], '5.3f', '    -')}  {_f(r['theta_deg'], '6.1f', '     -')}  "
                   f"{_f(r['theta_unc_deg'], '5.1f', '    -')}  {r['method']}")
    return "\n".join(out) + "\n"


_VERDICT_TEXT = {"split": "should split", "challenge": "a challenge (near the limit)", "no": "will not split"}


def _local(iso_utc: str, tz: str) -> str:
    """ISO UTC text -> 'YYYY-MM-DD HH:MM' in the zone ``tz``."""
    from zoneinfo import ZoneInfo

    t = dt.datetime.fromisoformat(iso_utc.replace("Z", "+00:00"))
    return t.astimezone(ZoneInfo(tz)).strftime("%Y-%m-%d %H:%M %Z")


def render_tonight(rep: dict) -> str:
    """Plain text of the verdict for the evening (``PairReport.tonight``)."""
    tz = rep["tz"]
    t = rep["telescope"]
    tel = f"{t.get('aperture_mm', 0):g} mm"
    if t.get("obstruction"):
        tel += f", obstruction {t['obstruction']:.2f}"
    if t.get("name") and t["name"] != f"{t.get('aperture_mm', 0):g} mm":
        tel = f"{t['name']} ({tel})"
    lines = ["", f"tonight     evening of {rep['date']} with {tel}, seeing {rep['seeing_origin']}"]
    if rep.get("calibration"):
        lines.append(f"chance      {rep['calibration']}")
    if rep["dark_start_utc"]:
        lines.append(f"dark window {_local(rep['dark_start_utc'], tz)} to {_local(rep['dark_end_utc'], tz)}"
                     f" ({rep['darkness']}, {tz})")
    if rep["best_local"]:
        lines.append(f"best time   {rep['best_local']} ({tz}), altitude {_f(rep['alt_best_deg'], '.0f')} deg,"
                     f" airmass {_f(rep['airmass_best'], '.2f')}, {_f(rep['up_dark_min'], '.0f')} min up in the dark")
    verdict = _VERDICT_TEXT.get(rep["verdict"], rep["verdict"])
    if rep.get("sky_text"):
        lines.append(f"sky         {rep['sky_text']}")
    if not rep["observable"]:
        # not up is not "will not split": the optical verdict alone, said as such
        verdict = f"{rep.get('verdict_basis') or 'at its best time'}: it {verdict}"
    lines.append(f"verdict     {verdict}: limit {_f(rep['limit_arcsec'], '.2f')}\", margin x{_f(rep['margin'], '.2f')},"
                 f" chance {_f(None if rep['chance'] is None else 100 * rep['chance'], '.0f')}%")
    lines.append(f"why         {rep['reason']}")
    if rep["power_min"] is not None:
        lines.append(f"power       {_f(rep['power_min'], '.0f')}x to {_f(rep['power_max'], '.0f')}x")
    b = rep["best_dates"]
    if b["ever_up"]:
        season = f"{b['good_from']} to {b['good_to']}" if b["good_from"] else "none"
        basis = b.get("season_basis") or f"transit within {b['season_hours']:g} h of midnight"
        lines.append(f"best dates  transits at midnight on {b['midnight_transit']}; good season {season}"
                     f" ({basis}), highest {b['max_alt_deg']:.0f} deg")
        if b.get("note"):
            lines.append(f"            {b['note']}")
    else:
        lines.append("best dates  never rises at this latitude")
    for c in rep["cautions"]:
        lines.append(f"! {c}")
    return "\n".join(lines) + "\n"


def _plain(text: str) -> str:
    """Catalogue text for a matplotlib label: a '$' would start mathtext (and a lone
    one makes the drawing fail), so it is escaped; control characters are dropped."""
    return "".join(ch for ch in str(text) if ch >= " ").replace("$", r"\$")


def plot_pair(report, path, force: bool = False) -> Path:
    """Draw the apparent orbit (or the measured motion) of one pair to PNG/SVG.

    Primary at the origin; north up and east to the LEFT, as the pair appears
    on the sky without a diagonal (stated on the plot); the orbit over one
    period, periastron, the direction of motion, the first and last
    catalogued measures where known, and the position at the report's epoch.
    ``report``: a :class:`~planner.plan.pair_report.PairReport`.
    """
    import io

    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    import numpy as np

    from planner.config.storage import write_output
    from planner.errors import InputError
    from planner.motion import orbit_grid

    path = Path(path)
    fmt = path.suffix.lower().lstrip(".")
    if fmt not in ("png", "svg"):
        raise InputError(f"--plot {path}: the file name must end in .png or .svg")
    rep, orb, precession = report.geometry, report.orbit, report.precession
    epoch_yr = rep["epoch_yr"]
    fig, ax = plt.subplots(figsize=(6.4, 6.4))
    ax.plot([0], [0], marker="*", ms=14, color="goldenrod", ls="none", label="primary")
    pts_e, pts_n = [0.0], [0.0]

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
    return write_output(path, buf.getvalue(), force=force, option="--plot")


def render_text(report) -> str:
    """The whole text of ``splitplan pair``: the position, the verdict, the table."""
    text = render_report(report.geometry)
    if report.tonight is not None:
        text += render_tonight(report.tonight)
    text += render_attempts(getattr(report, "attempts", None) or [])
    if report.table is not None:
        text += "\n" + render_table(report.table)
    return text


def render_attempts(rows: list[dict]) -> str:
    """The latest attempts at the pair in the observation log (docs/log.md), newest first."""
    if not rows:
        return ""
    lines = [""]
    for k, e in enumerate(rows):
        head = "your log    " if k == 0 else " " * 12
        scope = e.get("scope") or f"{e['aperture_mm']:g} mm"
        margin = "-" if e.get("margin") is None else format(e["margin"], ".2f")
        note = f" ({e['note']})" if e.get("note") else ""
        lines.append(f"{head}{_local(e['when_utc'], e['tz'])}: {e['result']} with {scope}, margin {margin}{note}")
    return "\n".join(lines) + "\n"
