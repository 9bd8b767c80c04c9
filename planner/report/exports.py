"""Table exports of a night plan: terminal text, CSV, JSON, VOTable; HTML and PDF delegate.

Machine formats carry UTC times (ISO 8601, ``Z``); the text and HTML views
show the site's local clock.  Every file is written atomically.
"""

from __future__ import annotations

import json
import math

import numpy as np
import pandas as pd

from planner.config.storage import write_output
from planner.report.angles import dec_text, ra_text
from planner.report.safe import csv_cell, plain_text, terminal_text
from planner.schema import plain_value
from planner.utc import iso_utc

#: the fields every JSON object carries (the stable contract) -- all of them
#: are columns of the schedule table.
CONTRACT_FIELDS = ("wds_id", "discoverer", "components", "slot_start_utc", "slot_end_utc",
                   "ra_deg", "dec_deg", "rho_arcsec", "theta_deg", "mag1", "mag2",
                   "alt_deg", "airmass", "limit_arcsec", "margin", "chance")

def _text_safe(v):
    """Text values without control, bidi or zero-width characters (report.safe.plain_text)."""
    return plain_text(v) if isinstance(v, str) else v


_TIME_COLS = ("slot_start_utc", "slot_end_utc", "best_utc")


def records(schedule: pd.DataFrame) -> list[dict]:
    """One JSON-ready dict per scheduled pair (contract fields first)."""
    cols = list(CONTRACT_FIELDS) + [c for c in schedule.columns if c not in CONTRACT_FIELDS]
    out = []
    for row in schedule[cols].itertuples(index=False, name=None):
        d = {}
        for c, v in zip(cols, row):
            d[c] = iso_utc(v) if c in _TIME_COLS else _text_safe(plain_value(v, 6))
        out.append(d)
    return out


def plan_json(plan) -> str:
    """The ``--json`` output of ``night``: a JSON array, one object per scheduled pair."""
    return json.dumps(records(plan.schedule), indent=1, ensure_ascii=False)


def write_json(plan, path, force: bool = False) -> None:
    write_output(path, (plan_json(plan) + "\n").encode("utf-8"), force=force)


def _machine_frame(schedule: pd.DataFrame) -> pd.DataFrame:
    df = schedule.copy()
    for c in _TIME_COLS:
        if c in df:
            df[c] = [iso_utc(v) for v in df[c]]
    return df


def with_sexagesimal(df: pd.DataFrame) -> pd.DataFrame:
    """``df`` with ``ra_hms`` and ``dec_dms`` (``18:05:27.24``, ``+02:30:09.1``) after ``dec_deg``."""
    if "ra_deg" not in df or "dec_deg" not in df:
        return df
    df = df.copy()
    at = list(df.columns).index("dec_deg") + 1
    df.insert(at, "ra_hms", [ra_text(v, precision=2, sep=":") for v in df["ra_deg"]])
    df.insert(at + 1, "dec_dms", [dec_text(v, precision=1, sep=":") for v in df["dec_deg"]])
    return df


def csv_text(plan) -> str:
    """The schedule as CSV: UTC times in ISO 8601, numbers at full precision (the shortest
    text that reads back to the same float), RA and Dec also sexagesimal.  Like every text
    cell, a declination starting with a sign gets the spreadsheet text mark ``'``
    (:func:`planner.report.safe.csv_cell`), so no spreadsheet reads it as a formula."""
    df = with_sexagesimal(_machine_frame(plan.schedule))
    for c in df.columns:
        if df[c].dtype == object or pd.api.types.is_string_dtype(df[c]):
            df[c] = [csv_cell(v) if isinstance(v, str) else v for v in df[c]]
    return df.to_csv(index=False)


def write_csv(plan, path, force: bool = False) -> None:
    write_output(path, csv_text(plan).encode("utf-8"), force=force)


def write_votable(plan, path, force: bool = False) -> None:
    """VOTable (IVOA standard) via astropy, with units and the plan's inputs as PARAMs."""
    write_output(path, votable_bytes(plan), force=force)


def votable_bytes(plan) -> bytes:
    """The schedule as a VOTable document (bytes), with units."""
    import io

    from astropy.io.votable import from_table
    from astropy.table import Table

    df = _machine_frame(plan.schedule)
    units = {"ra_deg": "deg", "dec_deg": "deg", "rho_arcsec": "arcsec", "theta_deg": "deg",
             "mag1": "mag", "mag2": "mag", "dm": "mag", "alt_deg": "deg", "az_deg": "deg",
             "limit_arcsec": "arcsec", "sun_alt_deg": "deg"}
    cols = {}
    for c in df.columns:
        s = df[c]
        if pd.api.types.is_numeric_dtype(s) and not pd.api.types.is_bool_dtype(s):
            cols[c] = s.to_numpy(float)
        else:
            # XML 1.0 cannot carry most control characters: filter them.
            cols[c] = np.array(["" if v is None or (not isinstance(v, str) and pd.isna(v))
                                else plain_text(v) for v in s], dtype=str)
    t = Table(cols)
    for c, u in units.items():
        if c in t.colnames:
            t[c].unit = u
    t.meta["description"] = "splitplan night plan"
    vot = from_table(t)
    res = vot.resources[0]
    res.description = plain_text(f"splitplan {plan.version} night plan for "
                                 f"{plan.night.get('local_date', '')}; catalogue: {plan.catalog_source}")
    buf = io.BytesIO()
    vot.to_xml(buf)
    return buf.getvalue()


def write_html(plan, path, force: bool = False) -> None:
    from planner.report.html import render_html

    write_output(path, render_html(plan).encode("utf-8"), force=force)


def write_pdf(plan, path, force: bool = False) -> None:
    from planner.report.pdf import render_pdf

    write_output(path, render_pdf(plan), force=force)


def write_text(plan, path, force: bool = False) -> None:
    write_output(path, render_text(plan).encode("utf-8"), force=force)


# -- terminal ----------------------------------------------------------------------

def fmt_num(v, spec: str, dash: str = "-") -> str:
    """``v`` formatted with ``spec``, or ``dash`` when it is missing or not a number."""
    try:
        f = float(v)
    except (TypeError, ValueError):
        return dash
    return dash if math.isnan(f) else format(f, spec)


def local_hm(plan, t) -> str:
    if t is None or pd.isna(t):
        return "-"
    ts = pd.Timestamp(t)
    ts = ts.tz_localize("UTC") if ts.tzinfo is None else ts
    return ts.tz_convert(plan.night.get("tz", "UTC")).strftime("%H:%M")


def scope_label(sc: dict) -> str:
    """'Club Dob (203 mm, obstruction 0.22)', or '102 mm, obstruction 0.00' when the
    telescope has no name of its own."""
    ap = float(sc.get("aperture_mm") or 0)
    spec = f"{ap:g} mm, obstruction {float(sc.get('obstruction') or 0):.2f}"
    name = str(sc.get("name") or "").strip()
    return f"{name} ({spec})" if name and name != f"{ap:g} mm" else spec


def header_lines(plan) -> list[str]:
    r = plan.request
    n = plan.night
    s = plan.session.site
    out = [f"Night plan {n.get('local_date', r.date)}  site {r.site_name or ''} "
           f"({s.lat_deg:.4f}, {s.lon_deg:.4f}, {s.elevation_m:g} m, {s.tz})".replace("  site  (", "  site ("),
           (f"dark ({r.darkness}): {local_hm(plan, n.get('dark_start_utc'))} - {local_hm(plan, n.get('dark_end_utc'))} {s.tz}"
            if n.get("dark_start_utc") is not None and not pd.isna(n.get("dark_start_utc"))
            else f"dark ({r.darkness}): none on this date")
           + (f"   Moon at most {100 * float(n['moon_illumination']):.0f}% lit" if n.get("moon_illumination") is not None else ""),
           f"seeing: {plan.seeing_origin}",
           f"catalogue: {plan.catalog_source}"]
    return out


def pair_label(wds_id, discoverer, components) -> str:
    """'WDS id discoverer components', never cut: identifiers are shown whole in every output."""
    return f"{wds_id} {f'{discoverer} {components}'.strip()}".strip()


def _clock_marks(sched: pd.DataFrame, tz) -> dict:
    """Row position -> a line marking a daylight-saving change of the site's clock just before it
    (the slot times jump by the change)."""
    if tz is None or len(sched) < 2 or "slot_start_utc" not in sched:
        return {}
    from zoneinfo import ZoneInfo

    zone = ZoneInfo(str(tz))
    t = pd.to_datetime(sched["slot_start_utc"])
    if getattr(t.dt, "tz", None) is None:
        t = t.dt.tz_localize("UTC")
    local = [x.to_pydatetime().astimezone(zone) for x in t]
    marks = {}
    for i in range(1, len(local)):
        a, b = local[i - 1], local[i]
        if a.utcoffset() != b.utcoffset():
            shift = (b.utcoffset() - a.utcoffset()).total_seconds() / 3600.0
            how = "forward" if shift > 0 else "back"
            marks[i] = (f"-- clocks go {how} {abs(shift):g} h here ({a.tzname()} -> {b.tzname()}): "
                        "the times below are on the new clock --")
    return marks


def table_lines(sched: pd.DataFrame, tz=None) -> list[str]:
    marks = _clock_marks(sched, tz)
    ids = [pair_label(r.wds_id, r.discoverer, r.components) for r in sched.itertuples(index=False)]
    w = max([22] + [len(x) for x in ids])  # the pair column widens; an identifier is never cut
    head = (f"{'#':>2} {'time':5} {'pair':<{w}} {'name':<14} {'rho':>6} {'theta':>5} {'how':<6} {'mags':<10} "
            f"{'alt':>3} {'X':>4} {'limit':>5} {'marg':>4} {'ch%':>3} {'power':>9}  note")
    lines = [head, "-" * len(head)]
    for k, (pid, r) in enumerate(zip(ids, sched.itertuples(index=False))):
        if k in marks:
            lines.append(marks[k])
        how = {"orbit": "orbit", "orbit-interferometric": "orb-if", "linear": "linear",
               "last": "last"}.get(str(r.method), str(r.method))[:6]
        mags = f"{fmt_num(r.mag1, '.1f')}/{fmt_num(r.mag2, '.1f')}"
        power = f"{fmt_num(r.power_min, '.0f')}-{fmt_num(r.power_max, '.0f')}x"
        note = str(r.reason)
        if r.flag:
            note = f"[{r.flag}] " + note
        if str(getattr(r, "user_note", "") or "").strip() and str(r.user_note) != "nan":
            note += f" - your note: {r.user_note}"
        star = str(getattr(r, "name", "") or "")[:14]
        lines.append(f"{r.slot:>2} {r.slot_local:5} {pid:<{w}} {star:<14} {fmt_num(r.rho_arcsec, '6.2f')}\" "
                     f"{fmt_num(r.theta_deg, '4.0f', '   -')} {how:<6} {mags:<10} {fmt_num(r.alt_deg, '3.0f')} "
                     f"{fmt_num(r.airmass, '4.2f')} {fmt_num(r.limit_arcsec, '5.2f')} {fmt_num(r.margin, '4.1f')} "
                     f"{fmt_num(100 * float(r.chance), '3.0f')} {power:>9}  {note}")
    return lines


def render_text(plan) -> str:
    out = header_lines(plan)
    for note in plan.notes:
        out.append(f"note: {note}")
    for sp in plan.scopes:
        t = sp.telescope
        out.append("")
        label = sp.name if sp.name == f"{float(t.get('aperture_mm', 0)):g} mm" else f"{sp.name}: {float(t.get('aperture_mm', 0)):g} mm"
        out.append(f"== {label}, obstruction {float(t.get('obstruction', 0)):.2f}"
                   + (f" - {sp.summary}" if sp.summary else ""))
        sched = sp.schedule
        if sched is None or len(sched) == 0:
            out.append("   nothing to schedule" + (" (no pair splits and stays up long enough in the dark window)"
                                                    if "not scheduled" not in sp.summary and "nothing" not in sp.summary
                                                    else ""))
            continue
        main = sched[sched["section"] == "plan"]
        chal = sched[sched["section"] == "challenge"]
        out += ["   " + x for x in table_lines(main, plan.session.site.tz)]
        if len(chal):
            out.append("")
            out.append("   Challenges (near misses - may not split tonight):")
            out += ["   " + x for x in table_lines(chal, plan.session.site.tz)]
    targets = getattr(plan, "targets", None)
    if targets is not None and len(targets):
        out.append("")
        out.append(f"== Your targets ({len(targets)} listed): scheduled, or why not")
        w = max(len(str(q)) for q in targets["query"])
        for t in targets.itertuples(index=False):
            line = f"   {str(t.query):<{w}}  {t.pair or '-'}: {t.status}"
            if str(t.user_note).strip():
                line += f"  (your note: {t.user_note})"
            out.append(line)
    if plan.matrix is not None and len(plan.matrix):
        out.append("")
        out.append("== Who splits what (split / near / -), and who takes it")
        names = [s.name for s in plan.scopes]
        shown = plan.matrix.head(40)
        labels = [pair_label(r["wds_id"], r["discoverer"], r["components"]) for _, r in shown.iterrows()]
        w = max([24] + [len(x) for x in labels])
        cw = [max(10, len(n)) + 1 for n in names]
        out.append(f"   {'pair':<{w}}" + "".join(f"{n:>{c}}" for n, c in zip(names, cw)) + "   assigned")
        for label, (idx, r) in zip(labels, shown.iterrows()):
            out.append(f"   {label:<{w}}" + "".join(f"{r[n]:>{c}}" for n, c in zip(names, cw)) + f"   {r['assigned']}")
        if len(plan.matrix) > 40:
            out.append(f"   ... {len(plan.matrix) - 40} more (use --out FILE.csv/.html for all)")
    out.append("")
    out += [f"! {c}" for c in plan.cautions]
    return terminal_text("\n".join(out) + "\n")
