"""A self-contained HTML page of a night plan.

Everything is inline: the style sheet, the charts (PNG as base64 data URIs)
and the pair diagrams (SVG).  No script, no fonts, no network.  Every
catalogue or user string goes through :func:`planner.report.safe.html_text`.
"""

from __future__ import annotations

import base64

import pandas as pd

from planner.report import charts
from planner.report.angles import dec_text, ra_text
from planner.report.exports import fmt_num, local_hm, scope_label
from planner.report.safe import html_text as E

CSS = """
:root{--ink:#1b2a3a;--muted:#5b6b7c;--line:#d8dee6;--band:#f4f7fa;--accent:#1f6f8b;--warn:#9c4221}
*{box-sizing:border-box}
body{margin:0;font:14px/1.45 system-ui,-apple-system,"Segoe UI",Roboto,sans-serif;color:var(--ink);background:#eef2f6}
header{background:linear-gradient(120deg,#0e1726,#1f3b57);color:#f2f6fa;padding:22px 32px 18px}
header h1{margin:0 0 4px;font-size:24px;font-weight:650;letter-spacing:.2px}
header p{margin:0;color:#b9c7d6}
main{max-width:1180px;margin:0 auto;padding:18px 24px 40px}
.grid{display:grid;grid-template-columns:repeat(auto-fit,minmax(260px,1fr));gap:14px}
.card{background:#fff;border:1px solid var(--line);border-radius:10px;padding:14px 16px;margin:0 0 14px}
.card h2{font-size:15px;margin:0 0 8px;color:var(--accent);text-transform:uppercase;letter-spacing:.6px}
dl{display:grid;grid-template-columns:max-content 1fr;gap:3px 12px;margin:0}
dt{color:var(--muted)} dd{margin:0}
.cautions{background:#fff6ed;border-color:#f0c9a5}
.cautions h2{color:var(--warn)} .cautions li{margin:3px 0}
.charts{display:grid;grid-template-columns:2fr 1fr;gap:14px;align-items:start}
.charts img{width:100%;height:auto;border-radius:6px}
table{border-collapse:collapse;width:100%;font-size:12.5px}
th{background:#24425f;color:#fff;font-weight:600;text-align:left;padding:6px 7px;position:sticky;top:0}
td{padding:5px 7px;border-bottom:1px solid var(--line);vertical-align:top}
tr:nth-child(even) td{background:var(--band)}
td.n{text-align:right;font-variant-numeric:tabular-nums;white-space:nowrap}
.pair{font-weight:600} .star{font-style:italic} .sub{color:var(--muted);font-size:11.5px}
.flag{display:inline-block;background:#fde2c8;color:var(--warn);border-radius:4px;padding:0 5px;font-size:11px;font-weight:600}
.chal th{background:#8a5a14}
.scope h2{display:flex;justify-content:space-between;gap:12px;flex-wrap:wrap}
.scope h2 small{color:var(--muted);text-transform:none;letter-spacing:0;font-weight:400}
.diagrams{display:flex;flex-wrap:wrap;gap:10px}
.diagrams figure{margin:0}
.tag{font-size:11px;border-radius:3px;padding:0 4px}
.t-split{background:#d6f0e0;color:#1d6b3c} .t-near{background:#fbecc8;color:#7a5300} .t-none{color:#99a}
footer{color:var(--muted);font-size:12px;margin-top:22px}
@media print{body{background:#fff}header{background:#1f3b57;-webkit-print-color-adjust:exact;print-color-adjust:exact}.card{break-inside:avoid}}
"""


def _f(v, spec, dash="–"):
    return fmt_num(v, spec, dash)


def _png(fig) -> str:
    return "data:image/png;base64," + base64.b64encode(charts.figure_png(fig)).decode("ascii")


def _radec(ra_deg, dec_deg) -> str:
    """RA and Dec, sexagesimal and in degrees: ``18h05m27.2s +02°30′09″ (271.3634°, +2.5024°)``."""
    if _f(ra_deg, ".4f") == "-":
        return ""
    dms = dec_text(dec_deg).replace("d", "°", 1).replace("m", "′", 1).replace("s", "″", 1)
    return E(f"{ra_text(ra_deg)} {dms} ({_f(ra_deg, '.4f')}°, {_f(dec_deg, '+.4f')}°)")


def _rows(plan, sched: pd.DataFrame) -> str:
    from planner.report.exports import _clock_marks

    marks = _clock_marks(sched, plan.session.site.tz)
    out = []
    for k, r in enumerate(sched.itertuples(index=False)):
        if k in marks:
            out.append(f'<tr><td colspan="11" class="sub"><b>{E(marks[k].strip("- "))}</b></td></tr>')
        flag = f' <span class="flag">{E(r.flag)}</span>' if r.flag else ""
        how = {"orbit": "orbit", "orbit-interferometric": "orbit (interf.)", "linear": "linear est.",
               "last": "last measure"}.get(str(r.method), str(r.method))
        out.append(
            "<tr>"
            f'<td class="n">{E(r.slot)}</td>'
            f'<td class="n">{E(r.slot_local)}–{E(local_hm(plan, r.slot_end_utc))}{flag}</td>'
            f'<td><span class="pair">{E(r.discoverer)} {E(r.components)}</span>'
            + (f' <span class="star">{E(r.name)}</span>' if getattr(r, "name", "") else "")
            + f'<br><span class="sub">WDS {E(r.wds_id)} · {E(r.constellation)}</span><br>'
            f'<span class="sub">{_radec(r.ra_deg, r.dec_deg)}</span></td>'
            f'<td class="n">{_f(r.rho_arcsec, ".2f")}″<br><span class="sub">{_f(r.theta_deg, ".0f")}°</span></td>'
            f"<td>{E(how)}</td>"
            f'<td class="n">{_f(r.mag1, ".1f")} / {_f(r.mag2, ".1f")}<br><span class="sub">Δm {_f(r.dm, ".1f")}</span></td>'
            f'<td class="n">{_f(r.alt_deg, ".0f")}°<br><span class="sub">X {_f(r.airmass, ".2f")}</span></td>'
            f'<td class="n">{_f(r.limit_arcsec, ".2f")}″<br><span class="sub">×{_f(r.margin, ".2f")}</span></td>'
            f'<td class="n">{_f(100 * float(r.chance), ".0f")}%</td>'
            f'<td class="n">{_f(r.power_min, ".0f")}–{_f(r.power_max, ".0f")}×</td>'
            f"<td>{E(r.reason)}{_user_note(r)}</td>"
            "</tr>")
    return "\n".join(out)


def _user_note(r) -> str:
    note = str(getattr(r, "user_note", "") or "").strip()
    return f'<br><span class="sub">your note: {E(note)}</span>' if note and note != "nan" else ""


def _targets(plan) -> str:
    t = getattr(plan, "targets", None)
    if t is None or len(t) == 0:
        return ""
    rows = "".join(f"<tr><td>{E(r.query)}</td><td>{E(r.pair or '-')}</td><td>{E(r.status)}</td>"
                   f"<td>{E(r.user_note)}</td></tr>" for r in t.itertuples(index=False))
    return ('<section class="card"><h2>Your targets</h2><p class="sub">Every name of the target list: '
            'scheduled, or why not.</p><table><tr><th>listed as</th><th>pair</th><th>tonight</th>'
            f"<th>your note</th></tr>{rows}</table></section>")


TABLE_HEAD = ("<tr><th>#</th><th>slot (site's clock)</th><th>pair</th><th>ρ / θ tonight</th><th>from</th>"
              "<th>mags</th><th>alt / airmass</th><th>limit / margin</th><th>chance</th>"
              "<th>power</th><th>why</th></tr>")


def _scope_section(plan, sp) -> str:
    t = sp.telescope
    sched = sp.schedule if sp.schedule is not None else pd.DataFrame()
    head = (f'<section class="card scope"><h2>{E(sp.name)} <small>{_f(t.get("aperture_mm"), "g")} mm, '
            f'obstruction {_f(t.get("obstruction", 0), ".2f")} · {E(sp.summary)}</small></h2>')
    if len(sched) == 0:
        return head + "<p>Nothing to schedule: no pair splits and stays up long enough in the dark window.</p></section>"
    main = sched[sched["section"] == "plan"]
    chal = sched[sched["section"] == "challenge"]
    body = f'<table class="plan">{TABLE_HEAD}{_rows(plan, main)}</table>'
    if len(chal):
        body += ('<h3>Challenges — near misses, may not split tonight</h3>'
                 f'<table class="chal">{TABLE_HEAD}{_rows(plan, chal)}</table>')
    return head + body + "</section>"


def _matrix(plan) -> str:
    m = plan.matrix
    if m is None or len(m) == 0:
        return ""
    names = [s.name for s in plan.scopes]
    head = "<tr><th>pair</th>" + "".join(f"<th>{E(n)}</th>" for n in names) + "<th>observed with</th></tr>"
    rows = []
    for _, r in m.iterrows():
        cells = []
        for n in names:
            v = r[n]
            cls = {"split": "t-split", "near": "t-near"}.get(v, "t-none")
            cells.append(f'<td><span class="tag {cls}">{E(v)}</span> '
                         f'<span class="sub">×{_f(r[f"{n} margin"], ".2f")}</span></td>')
        rows.append(f'<tr><td><span class="pair">{E(r["discoverer"])} {E(r["components"])}</span> '
                    f'<span class="sub">{E(r["wds_id"])}</span></td>{"".join(cells)}<td>{E(r["assigned"])}</td></tr>')
    return ('<section class="card"><h2>Who splits what</h2><p class="sub">Each pair goes to the smallest '
            f"scope that splits it with a margin of at least {plan.request.share_margin:g}, "
            "balancing the list lengths; see docs/plan.md.</p>"
            f"<table>{head}{''.join(rows)}</table></section>")


def _inputs(plan) -> str:
    r = plan.request
    s = plan.session.site
    scopes = "; ".join(scope_label(sc) for sc in r.scopes)
    filt = ", ".join(f"{k}={v}" for k, v in (r.filters or {}).items()) or "none"
    items = [("site", f"{r.site_name or 'unnamed'}: {_f(s.lat_deg, '.4f')}°, {_f(s.lon_deg, '.4f')}°, "
                      f"{_f(s.elevation_m, 'g')} m"),
             ("time zone", s.tz),
             ("minimum altitude", f"{_f(s.min_alt_deg, 'g')}°"),
             ("telescopes", scopes), ("seeing", plan.seeing_origin),
             ("per target", f"{r.minutes:g} min, " + (f"at most {r.limit} pairs per scope" if r.limit
                                                       else "as many pairs as the night holds")),
             *[(f"chance, {name}", cal.header()) for name, cal in plan.session.calibrations],
             ("filters", filt), ("catalogue", f"{plan.catalog_source} ({r.catalog})"),
             ("splitplan", plan.version)]
    return "<dl>" + "".join(f"<dt>{E(k)}</dt><dd>{E(v)}</dd>" for k, v in items) + "</dl>"


def _night(plan) -> str:
    n = plan.night
    items = [("date (evening)", n.get("local_date", "")),
             ("darkness", plan.request.darkness),
             ("dark window", f"{local_hm(plan, n.get('dark_start_utc'))} – {local_hm(plan, n.get('dark_end_utc'))} {plan.session.site.tz}"),
             ("sunset / sunrise", f"{local_hm(plan, n.get('sunset_utc'))} / {local_hm(plan, n.get('sunrise_utc'))}")]
    if n.get("moon_illumination") is not None:
        items.append(("Moon", f"at most {100 * float(n['moon_illumination']):.0f}% lit during the night, above the horizon for "
                              f"{n.get('moon_up', '?')} of the window"))
    if n.get("status"):
        items.append(("status", n["status"]))
    for note in plan.notes:
        items.append(("note", note))
    return "<dl>" + "".join(f"<dt>{E(k)}</dt><dd>{E(v)}</dd>" for k, v in items) + "</dl>"


def _calibration(plan) -> str:
    """The fitted chance curves, when the plan uses the observer's calibration (``--calibration mine``)."""
    cals = plan.session.calibrations
    if not cals:
        return ""
    from planner.report.calibration_chart import calibration_figure

    figs = "".join(f'<img class="calibration-chart" alt="your fitted split curve, {E(name)}" '
                   f'src="{_png(calibration_figure(cal, [], title=f"Your split curve, {name}"))}">'
                   for name, cal in cals)
    words = "".join(f"<li>{E(name)}: {E(cal.sentence())}</li>" for name, cal in cals)
    return ('<section class="card"><h2>Your calibration</h2><p class="sub">Limits and chances in this plan use '
            "the curve fitted to your observation log (splitplan log fit), not the published model (dashed).</p>"
            f"<ul>{words}</ul><div class=\"charts\">{figs}</div></section>")


def render_html(plan) -> str:
    """The whole page as text."""
    sched = plan.schedule
    site = plan.session.site
    site_label = plan.request.site_name or f"{site.lat_deg:.2f}, {site.lon_deg:.2f}"
    alt_img = _png(charts.altitude_figure(plan, sched))
    sky_img = _png(charts.sky_figure(plan, sched))
    aps = {s.name: float(s.telescope.get("aperture_mm", 100.0)) for s in plan.scopes}
    diagrams = "".join(f"<figure>{charts.pair_svg(r, aps.get(r.scope, 100.0))}</figure>"
                       for r in sched.itertuples(index=False))
    parts = [
        "<!DOCTYPE html>",
        '<html lang="en"><head><meta charset="utf-8">',
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        f"<title>Double stars tonight — {E(site_label)} — {E(plan.night.get('local_date', ''))}</title>",
        f"<style>{CSS}</style></head><body>",
        f"<header><h1>Double stars tonight · {E(site_label)}</h1>"
        f"<p>Evening of {E(plan.night.get('local_date', ''))} · {len(sched)} pairs scheduled · "
        f"{E(', '.join(s.name for s in plan.scopes))}</p></header><main>",
        '<div class="grid">',
        f'<section class="card"><h2>Inputs</h2>{_inputs(plan)}</section>',
        f'<section class="card"><h2>The night</h2>{_night(plan)}</section>',
        '<section class="card cautions"><h2>Cautions</h2><ul>'
        + "".join(f"<li>{E(c)}</li>" for c in plan.cautions) + "</ul></section>",
        "</div>",
        '<section class="card"><h2>Through the night</h2><div class="charts">'
        f'<img id="altitude-chart" alt="altitude of the scheduled pairs through the night" src="{alt_img}">'
        f'<img id="sky-chart" alt="sky positions of the scheduled pairs" src="{sky_img}"></div></section>',
    ]
    parts += [_scope_section(plan, sp) for sp in plan.scopes]
    parts.append(_calibration(plan))
    parts.append(_targets(plan))
    parts.append(_matrix(plan))
    if diagrams:
        parts.append('<section class="card"><h2>The pairs as seen</h2><p class="sub">North up, east left '
                     "(as in the sky; a star diagonal mirrors east and west). Discs: the Airy disc of the "
                     "scope to the same scale as the separation.</p>"
                     f'<div class="diagrams">{diagrams}</div></section>')
    parts.append("<footer>Made with splitplan "
                 f"{E(plan.version)}. Catalogue data: Washington Double Star Catalog and Sixth Catalog of "
                 "Orbits of Visual Binary Stars, U.S. Naval Observatory. Times on the site's clock, in its time zone (shown with the night).</footer>")
    parts.append("</main></body></html>")
    return "\n".join(parts)
