"""A printable PDF of a night plan (matplotlib ``PdfPages``, A4 landscape).

Page 1: inputs, the night, cautions and the two charts.  Then the schedule
tables (as many pages as needed) and a page of pair diagrams.  Every
catalogue/user string goes through :func:`planner.report.safe.pdf_text`.
"""

from __future__ import annotations

import io

import pandas as pd

from planner.report import charts
from planner.report.exports import fmt_num, local_hm, scope_label
from planner.report.safe import pdf_text as P

A4_LANDSCAPE = (11.69, 8.27)
ROWS_PER_PAGE = 24


_f = fmt_num


def _cover(plan, pdf, plt):
    fig = plt.figure(figsize=A4_LANDSCAPE)
    r, n, s = plan.request, plan.night, plan.session.site
    fig.text(0.04, 0.95, P(f"Double stars tonight - {r.site_name or 'site'} - evening of {n.get('local_date', '')}"),
             fontsize=16, weight="bold", color="#1f3b57")
    lines = [
        f"Site: {s.lat_deg:.4f}, {s.lon_deg:.4f}, {s.elevation_m:g} m, {s.tz}",
        "Telescopes: " + "; ".join(scope_label(sc) for sc in r.scopes),
        f"Seeing: {plan.seeing_origin}",
        f"Darkness: {r.darkness}; dark window {local_hm(plan, n.get('dark_start_utc'))} - "
        f"{local_hm(plan, n.get('dark_end_utc'))} {s.tz}",
        (f"Moon: at most {100 * float(n['moon_illumination']):.0f}% lit during the night, above the horizon for {n.get('moon_up', '?')} of the window"
         if n.get("moon_illumination") is not None else "Moon: -"),
        f"{r.minutes:g} min per target, "
        + (f"at most {r.limit} pairs per scope" if r.limit else "as many pairs as the night holds")
        + "; filters: "
        + (", ".join(f"{k}={v}" for k, v in (r.filters or {}).items()) or "none"),
        f"Catalogue: {plan.catalog_source}; splitplan {plan.version}",
    ]
    import textwrap

    wrapped = [w for line in lines for w in (textwrap.wrap(line, 150, subsequent_indent="    ") or [""])]
    y = 0.90
    for line in wrapped[:9]:
        fig.text(0.04, y, P(line), fontsize=9)
        y -= 0.026
    y -= 0.01
    fig.text(0.04, y, "Cautions", fontsize=10, weight="bold", color="#9c4221")
    for c in plan.cautions:
        for w in textwrap.wrap("- " + c, 170, subsequent_indent="  ")[:2]:
            y -= 0.023
            fig.text(0.05, y, P(w), fontsize=8, color="#9c4221")
    for fig_src, box in ((charts.altitude_figure(plan), [0.03, 0.02, 0.62, 0.50]),
                         (charts.sky_figure(plan), [0.66, 0.02, 0.32, 0.50])):
        buf = io.BytesIO()
        fig_src.savefig(buf, format="png", dpi=150)
        plt.close(fig_src)
        buf.seek(0)
        img = plt.imread(buf)
        ax = fig.add_axes(box)
        ax.imshow(img)
        ax.set_axis_off()
    pdf.savefig(fig)
    plt.close(fig)


def _table_pages(plan, pdf, plt):
    cols = ["#", "slot", "pair", "name", "WDS", "rho\"", "theta", "from", "mags", "alt", "X", "limit\"",
            "margin", "chance", "power", "note"]
    for sp in plan.scopes:
        sched = sp.schedule if sp.schedule is not None else pd.DataFrame()
        rows = []
        for r in sched.itertuples(index=False):
            note = (f"[{r.flag}] " if r.flag else "") + ("CHALLENGE: " if r.section == "challenge" else "") + str(r.reason)
            if str(getattr(r, "user_note", "") or "").strip() and str(r.user_note) != "nan":
                note += f" - your note: {r.user_note}"
            rows.append([str(r.slot), f"{r.slot_local}", f"{r.discoverer} {r.components}".strip(),
                         f"{getattr(r, 'name', '') or ''} {r.constellation}".strip(), str(r.wds_id),
                         _f(r.rho_arcsec, ".2f"), _f(r.theta_deg, ".0f"), str(r.method),
                         f"{_f(r.mag1, '.1f')}/{_f(r.mag2, '.1f')}", _f(r.alt_deg, ".0f"), _f(r.airmass, ".2f"),
                         _f(r.limit_arcsec, ".2f"), _f(r.margin, ".2f"), _f(100 * float(r.chance), ".0f") + "%",
                         f"{_f(r.power_min, '.0f')}-{_f(r.power_max, '.0f')}x", note[:60]])
        chunks = [rows[i:i + ROWS_PER_PAGE] for i in range(0, max(len(rows), 1), ROWS_PER_PAGE)]
        for k, chunk in enumerate(chunks):
            fig = plt.figure(figsize=A4_LANDSCAPE)
            fig.text(0.03, 0.95, P(f"{sp.name}: {float(sp.telescope.get('aperture_mm', 0)):g} mm - schedule"
                                   + (f" (page {k + 1})" if len(chunks) > 1 else "")),
                     fontsize=13, weight="bold", color="#1f3b57")
            ax = fig.add_axes([0.03, 0.05, 0.94, 0.86])
            ax.set_axis_off()
            if not chunk:
                ax.text(0, 1, "Nothing to schedule tonight.", va="top")
            else:
                tab = ax.table(cellText=[[P(c) for c in row] for row in chunk], colLabels=cols, loc="upper left",
                               cellLoc="left", colLoc="left")
                tab.auto_set_font_size(False)
                tab.set_fontsize(8)
                tab.auto_set_column_width(list(range(len(cols))))
                tab.scale(1.0, 1.35)
                for (i, j), cell in tab.get_celld().items():
                    cell.set_edgecolor("#d8dee6")
                    if i == 0:
                        cell.set_facecolor("#24425f")
                        cell.get_text().set_color("white")
                    elif i % 2 == 0:
                        cell.set_facecolor("#f4f7fa")
            pdf.savefig(fig)
            plt.close(fig)


def _diagram_page(plan, pdf, plt):
    sched = plan.schedule
    if len(sched) == 0:
        return
    aps = {s.name: float(s.telescope.get("aperture_mm", 100.0)) for s in plan.scopes}
    per_page = 24
    for start in range(0, len(sched), per_page):
        fig = plt.figure(figsize=A4_LANDSCAPE)
        fig.text(0.03, 0.95, "The pairs as seen (north up, east left; discs = Airy disc to scale)",
                 fontsize=12, weight="bold", color="#1f3b57")
        chunk = list(sched.iloc[start:start + per_page].itertuples(index=False))
        for k, r in enumerate(chunk):
            ax = fig.add_axes([0.03 + (k % 8) * 0.12, 0.66 - (k // 8) * 0.30, 0.10, 0.22])
            charts.draw_pair(ax, r, aps.get(r.scope, 100.0))
        pdf.savefig(fig)
        plt.close(fig)


def render_pdf(plan) -> bytes:
    """The PDF as bytes."""
    import matplotlib

    matplotlib.use("Agg", force=False)
    import matplotlib.pyplot as plt
    from matplotlib.backends.backend_pdf import PdfPages

    buf = io.BytesIO()
    with PdfPages(buf, metadata={"Title": "splitplan night plan", "Creator": f"splitplan {plan.version}"}) as pdf:
        _cover(plan, pdf, plt)
        _table_pages(plan, pdf, plt)
        _diagram_page(plan, pdf, plt)
    return buf.getvalue()
