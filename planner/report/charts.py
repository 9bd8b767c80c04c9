"""Charts of a night plan: altitude through the night, sky positions, and each pair as seen.

* :func:`altitude_figure` -- altitude versus local time of every scheduled
  pair, its own slot drawn thick, the dark window shaded, the minimum
  altitude dashed.
* :func:`sky_figure` -- an alt-az polar chart (zenith at the centre, north
  up, east to the left as when looking up) with each pair at its slot start,
  numbered, joined in observing order.
* :func:`pair_svg` / :func:`draw_pair` -- the pair as seen in the sky (north
  up, east left, no diagonal): primary at the centre, companion at position
  angle theta and separation rho, each drawn as its Airy disc (first dark
  ring radius 1.22 lambda/D at 550 nm) to the same scale as rho.

Colours and layout are this project's own.
"""

from __future__ import annotations

import io
import math

import numpy as np
import pandas as pd

from planner.optics.limits import RAYLEIGH_LOD
from planner.report.safe import html_text, pdf_text
from planner.sky.placement import alt_az_at
from planner.units import ARCSEC_PER_RAD

PALETTE = ["#1f6f8b", "#c0392b", "#7d5ba6", "#2e8b57", "#d68910", "#5d6d7e", "#a04000",
           "#117a65", "#884ea0", "#b03a2e", "#1a5276", "#7e5109"]


def airy_radius_arcsec(aperture_mm: float, wavelength_nm: float = 550.0) -> float:
    """First dark ring of the Airy pattern, 1.2197 lambda/D (Airy 1835; docs/methods.md section 1)."""
    return RAYLEIGH_LOD * wavelength_nm * 1e-9 / (aperture_mm * 1e-3) * ARCSEC_PER_RAD


def _mpl():
    import matplotlib

    matplotlib.use("Agg", force=False)
    import matplotlib.pyplot as plt

    return plt


def _utc_ns(t):
    ts = pd.Timestamp(t)
    if ts.tzinfo is not None:
        ts = ts.tz_convert("UTC").tz_localize(None)
    return np.datetime64(ts.to_datetime64(), "ns")


def _window(plan):
    n = plan.night
    if n.get("dark_start_utc") is None or pd.isna(n.get("dark_start_utc")):
        return None
    return _utc_ns(n["dark_start_utc"]), _utc_ns(n["dark_end_utc"])


def _label(r) -> str:
    return f"{r.discoverer} {r.components}".strip()


def altitude_figure(plan, sched: pd.DataFrame | None = None):
    """Altitude versus local time of the scheduled pairs."""
    plt = _mpl()
    sched = plan.schedule if sched is None else sched
    site = plan.session.site
    win = _window(plan)
    fig, ax = plt.subplots(figsize=(9.0, 4.2), dpi=110)
    if win is None or len(sched) == 0:
        ax.text(0.5, 0.5, "no dark window or nothing scheduled", ha="center", va="center",
                transform=ax.transAxes)
        ax.set_axis_off()
        return fig
    t0 = win[0] - np.timedelta64(60, "m")
    t1 = win[1] + np.timedelta64(60, "m")
    grid = np.arange(t0, t1, np.timedelta64(5, "m")).astype("datetime64[ns]")
    tz = plan.night.get("tz", "UTC")
    loc = pd.DatetimeIndex(grid).tz_localize("UTC").tz_convert(tz).tz_localize(None)
    ra = sched["ra_deg"].to_numpy(float)
    dec = sched["dec_deg"].to_numpy(float)
    alt, _ = alt_az_at(ra[:, None], dec[:, None], site, grid[None, :])
    alt = np.asarray(alt, float)
    wl = pd.DatetimeIndex(list(win)).tz_localize("UTC").tz_convert(tz).tz_localize(None)
    ax.axvspan(loc[0], wl[0], color="#f3e5c0", alpha=0.6, lw=0)
    ax.axvspan(wl[1], loc[-1], color="#f3e5c0", alpha=0.6, lw=0)
    ax.axhline(site.min_alt_deg, color="#888", ls="--", lw=0.8)
    for k, r in enumerate(sched.itertuples(index=False)):
        col = PALETTE[k % len(PALETTE)]
        ax.plot(loc, alt[k], color=col, lw=0.7, alpha=0.55)
        a = _utc_ns(r.slot_start_utc)
        b = _utc_ns(r.slot_end_utc)
        m = (grid >= a - np.timedelta64(5, "m")) & (grid <= b + np.timedelta64(5, "m"))
        ax.plot(loc[m], alt[k][m], color=col, lw=3.2, solid_capstyle="round")
        i = int(np.argmax(m)) if m.any() else 0
        ax.annotate(str(r.slot) if r.section == "plan" else f"c{r.slot}", (loc[i], alt[k][i]),
                    textcoords="offset points", xytext=(0, 5), fontsize=7, color=col, ha="center")
    ax.set_ylim(0, 90)
    ax.set_xlim(loc[0], loc[-1])
    ax.set_ylabel("altitude [deg]")
    ax.set_xlabel(f"local time ({pdf_text(tz)})")
    import matplotlib.dates as mdates

    ax.xaxis.set_major_formatter(mdates.DateFormatter("%H:%M"))
    ax.grid(alpha=0.25)
    ax.set_title("Altitude through the night (thick: the pair's slot; shaded: outside the dark window)",
                 fontsize=9)
    fig.tight_layout()
    return fig


def sky_figure(plan, sched: pd.DataFrame | None = None):
    """Alt-az polar chart of the scheduled pairs at their slot starts."""
    plt = _mpl()
    sched = plan.schedule if sched is None else sched
    fig = plt.figure(figsize=(5.2, 5.2), dpi=110)
    ax = fig.add_subplot(projection="polar")
    ax.set_theta_zero_location("N")
    ax.set_theta_direction(1)  # azimuth grows anticlockwise: east to the left, as seen looking up
    ax.set_rlim(0, 90)
    ax.set_rticks([30, 60, 90])
    ax.set_yticklabels(["60°", "30°", "0°"], fontsize=7)
    ax.set_xticks(np.radians([0, 90, 180, 270]))
    ax.set_xticklabels(["N", "E", "S", "W"])
    if len(sched):
        th = np.radians(sched["az_deg"].to_numpy(float))
        r = 90.0 - sched["alt_deg"].to_numpy(float)
        main = (sched["section"] == "plan").to_numpy()
        ax.plot(th[main], r[main], "-", color="#9aa5b1", lw=0.8, zorder=1)
        for k, row in enumerate(sched.itertuples(index=False)):
            col = PALETTE[k % len(PALETTE)]
            ax.scatter([th[k]], [r[k]], s=28, color=col, zorder=2,
                       marker="o" if row.section == "plan" else "D")
            ax.annotate(str(row.slot) if row.section == "plan" else f"c{row.slot}", (th[k], r[k]),
                        textcoords="offset points", xytext=(4, 4), fontsize=7, color=col)
    ms = plan.session.site.min_alt_deg
    circ = np.linspace(0, 2 * np.pi, 181)
    ax.plot(circ, np.full_like(circ, 90.0 - float(ms)), "--", color="#888", lw=0.8)
    ax.set_title("Where they are at their slot (zenith at the centre)", fontsize=9)
    fig.tight_layout()
    return fig


def figure_png(fig) -> bytes:
    plt = _mpl()
    buf = io.BytesIO()
    fig.savefig(buf, format="png")
    plt.close(fig)
    return buf.getvalue()


def _pair_geometry(rho: float, theta: float, aperture_mm: float):
    airy = airy_radius_arcsec(aperture_mm)
    half = max(1.6 * rho, 3.0 * airy, 0.5) if np.isfinite(rho) else 3.0 * airy
    t = math.radians(theta if np.isfinite(theta) else 0.0)
    # sky as seen: north up (+y), east left (-x)
    dx = -rho * math.sin(t) if np.isfinite(rho) else 0.0
    dy = rho * math.cos(t) if np.isfinite(rho) else 0.0
    return airy, half, dx, dy


def pair_svg(row, aperture_mm: float, size: int = 150) -> str:
    """A small SVG of the pair as seen (north up, east left) with Airy discs to scale."""
    rho, theta = float(row.rho_arcsec), float(row.theta_deg)
    airy, half, dx, dy = _pair_geometry(rho, theta, aperture_mm)
    s = size / (2 * half)  # px per arcsec
    c = size / 2
    m1 = float(row.mag1) if np.isfinite(float(row.mag1)) else 6.0
    m2 = float(row.mag2) if np.isfinite(float(row.mag2)) else m1
    op2 = max(0.25, min(1.0, (10 ** (-0.4 * (m2 - m1))) ** 0.35))
    scale_len = 10 ** math.floor(math.log10(half)) if half > 0 else 1
    title = html_text(f"{row.discoverer} {row.components}: rho {rho:.2f} arcsec, theta {theta:.0f} deg")
    parts = [
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{size}" height="{size + 18}" '
        f'viewBox="0 0 {size} {size + 18}" role="img" aria-label="{title}">',
        f"<title>{title}</title>",
        f'<rect x="0" y="0" width="{size}" height="{size}" fill="#0e1726" rx="6"/>',
        f'<circle cx="{c:.1f}" cy="{c:.1f}" r="{max(airy * s, 1.2):.2f}" fill="#fff7e0"/>',
        f'<circle cx="{c + dx * s:.1f}" cy="{c - dy * s:.1f}" r="{max(airy * s, 1.2):.2f}" '
        f'fill="#ffd27f" fill-opacity="{op2:.2f}"/>',
        f'<circle cx="{c:.1f}" cy="{c:.1f}" r="{rho * s:.1f}" fill="none" stroke="#3d5a80" '
        f'stroke-dasharray="2 3" stroke-width="0.8"/>',
        f'<line x1="{c:.1f}" y1="{c:.1f}" x2="{c:.1f}" y2="{c - rho * s:.1f}" stroke="#3d5a80" stroke-width="0.6"/>',
        # compass: N up, E left
        f'<line x1="{size - 14}" y1="30" x2="{size - 14}" y2="10" stroke="#cfd8e3" stroke-width="1"/>',
        f'<text x="{size - 14}" y="9" fill="#cfd8e3" font-size="9" text-anchor="middle" font-family="sans-serif">N</text>',
        f'<line x1="{size - 14}" y1="30" x2="{size - 34}" y2="30" stroke="#cfd8e3" stroke-width="1"/>',
        f'<text x="{size - 40}" y="33" fill="#cfd8e3" font-size="9" text-anchor="middle" font-family="sans-serif">E</text>',
        f'<line x1="8" y1="{size - 10}" x2="{8 + scale_len * s:.1f}" y2="{size - 10}" stroke="#cfd8e3" stroke-width="1.5"/>',
        f'<text x="8" y="{size - 14}" fill="#cfd8e3" font-size="8" font-family="sans-serif">{scale_len:g}"</text>',
        f'<text x="{c}" y="{size + 13}" fill="#243b53" font-size="10" text-anchor="middle" '
        f'font-family="sans-serif">{html_text(_label(row))} &#952;{theta:.0f}&#176; &#961;{rho:.2f}"</text>',
        "</svg>",
    ]
    return "".join(parts)


def draw_pair(ax, row, aperture_mm: float) -> None:
    """The same diagram on a matplotlib axis (for the PDF)."""
    from matplotlib.patches import Circle

    rho, theta = float(row.rho_arcsec), float(row.theta_deg)
    airy, half, dx, dy = _pair_geometry(rho, theta, aperture_mm)
    ax.set_facecolor("#0e1726")
    ax.add_patch(Circle((0, 0), airy, color="#fff7e0"))
    ax.add_patch(Circle((dx, dy), airy, color="#ffd27f"))
    ax.add_patch(Circle((0, 0), rho, fill=False, ls=":", color="#3d5a80", lw=0.6))
    ax.set_xlim(-half, half)
    ax.set_ylim(-half, half)
    ax.set_aspect("equal")
    ax.set_xticks([])
    ax.set_yticks([])
    arrow = {"arrowstyle": "->", "color": "#cfd8e3", "lw": 0.8}
    ax.annotate("", xy=(0.90, 0.92), xytext=(0.90, 0.72), xycoords="axes fraction", arrowprops=arrow)
    ax.annotate("", xy=(0.70, 0.72), xytext=(0.90, 0.72), xycoords="axes fraction", arrowprops=arrow)
    ax.text(0.90, 0.94, "N", transform=ax.transAxes, color="#cfd8e3", fontsize=6, ha="center", va="bottom")
    ax.text(0.67, 0.72, "E", transform=ax.transAxes, color="#cfd8e3", fontsize=6, ha="right", va="center")
    ax.set_title(pdf_text(f"{_label(row)}  θ{theta:.0f}° ρ{rho:.2f}\""), fontsize=6)
