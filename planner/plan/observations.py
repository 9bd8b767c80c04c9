"""The plan layer's work with the observation log.

* :func:`record` -- one attempt: the pair resolved in the catalogue, the moment
  read in the site's time zone, the circumstances computed
  (:mod:`planner.plan.observed`), the entry written to the log
  (:class:`planner.config.logbook.Logbook`);
* :func:`fit_and_store` -- the personal calibration (:mod:`planner.plan.calibration`)
  fitted per scope and pooled, and kept in the log;
* :func:`calibration_for` -- the stored calibration that applies to a telescope
  (its own, else the pooled one);
* :func:`history` -- what the log says about pairs: attempts, the last ones,
  and which pairs a telescope has already split ("done").

The storage and the fit know nothing of catalogues or sites; this module joins
them.  ``sqlite3`` and scipy are imported only by the functions that need them.
"""

from __future__ import annotations

import datetime as _dt

from planner.errors import InputError

#: a logged moment may lie this far in the future (clock differences), no more
FUTURE_SLACK = _dt.timedelta(hours=1)


def parse_when(text: str | None, tz: str, now: _dt.datetime | None = None) -> str:
    """A moment typed by the observer as UTC text ``YYYY-MM-DDTHH:MM:SSZ``.

    ``now`` (or None), a local date-time in the site's zone (``2026-07-01 22:30``,
    ``2026-07-01T22:30:15``), or a time with its own offset (``...Z``, ``...+02:00``).
    A local time that does not exist (the hour skipped when clocks go forward) is
    refused; one that happens twice (clocks go back) is taken at its first occurrence."""
    from zoneinfo import ZoneInfo

    utc = _dt.timezone.utc
    now = now or _dt.datetime.now(utc)
    zone = ZoneInfo(tz)
    s = "now" if text is None else str(text).strip()
    if s.lower() == "now":
        t = now
    else:
        try:
            t = _dt.datetime.fromisoformat(s.replace(" ", "T", 1) if " " in s else s)
        except ValueError:
            raise InputError(f"--when {text!r} is not a date and time; use 'now' or a local time such as "
                             "2026-07-01 22:30 (the site's zone)") from None
        if t.tzinfo is None:
            local = t.replace(tzinfo=zone)
            back = local.astimezone(utc).astimezone(zone).replace(tzinfo=None)
            if back != t:
                raise InputError(f"--when {text!r} does not exist in {tz} (the clocks skipped it)")
            t = local
    t = t.astimezone(utc)
    if t - now > FUTURE_SLACK:
        raise InputError(f"--when {text!r} is in the future ({t:%Y-%m-%d %H:%M} UTC)")
    if t.year < 1800:
        raise InputError(f"--when {text!r} is before 1800")
    return t.strftime("%Y-%m-%dT%H:%M:%SZ")


def resolve_seeing(seeing_arcsec=None, steadiness=None) -> tuple[float, str]:
    """The seeing FWHM the model uses, and where it came from (the night plan's rule)."""
    from planner.plan.model import NightRequest
    from planner.plan.session import resolve_seeing as _resolve

    req = NightRequest(site={}, scopes=[], seeing_arcsec=seeing_arcsec, steadiness=steadiness)
    return _resolve(req)


def record(logbook, *, query: str, site: dict, telescope: dict, when: str | None = None,
           seeing_arcsec: float | None = None, steadiness: float | None = None, power: float | None = None,
           result: str, note: str = "", site_name: str = "", scope_name: str = "",
           catalog="sample") -> dict:
    """Resolve, compute and add one attempt; returns the entry as stored (with ``id``).

    ``site``: dict (lat_deg, lon_deg, elevation_m, tz); ``telescope``: dict
    (aperture_mm, obstruction); ``catalog``: a spec or a loaded Catalog."""
    items = [{"query": query, "result": result, "note": note, "when": when, "power": power}]
    return record_many(logbook, items, site=site, telescope=telescope, seeing_arcsec=seeing_arcsec,
                       steadiness=steadiness, site_name=site_name, scope_name=scope_name, catalog=catalog)[0]


def record_many(logbook, items: list[dict], *, site: dict, telescope: dict, seeing_arcsec=None,
                steadiness=None, site_name: str = "", scope_name: str = "", catalog="sample") -> list[dict]:
    """Several attempts with one telescope at one site (``log mark``): each item has ``query``
    (or ``label``), ``result``, ``when`` (text or UTC text), optional ``note`` and ``power``.
    All are checked before any is written; each is its own change in the log."""
    import numpy as np

    from planner.catalogs import load_catalog
    from planner.config.logbook import RESULTS, check_utc_text, clean_entry
    from planner.optics.telescope import Telescope
    from planner.plan.observed import circumstances
    from planner.sky.site import Site

    for it in items:
        if it["result"] not in RESULTS:
            raise InputError(f"--result {it['result']!r} is not one of {', '.join(RESULTS)}")
    cat = load_catalog(catalog) if isinstance(catalog, str) else catalog
    site_obj = Site.from_mapping(site, site_name)
    tel = Telescope.from_mapping(telescope, scope_name)
    seeing, _origin = resolve_seeing(seeing_arcsec, steadiness)
    labels, whens = [], []
    for it in items:
        if "label" in it:
            labels.append(it["label"])
        else:
            labels.append(find(cat, it["query"]))
        w = it.get("when")
        if isinstance(w, str) and w.endswith("Z") and len(w) == 20:
            whens.append(check_utc_text(w, "--when"))
        else:
            whens.append(parse_when(w, site_obj.tz))
    when64 = np.array([w[:-1] for w in whens], "datetime64[ns]")
    circ = circumstances(cat, labels, site_obj, tel, when64, seeing)
    entries = []
    for it, w, c in zip(items, whens, circ):
        e = dict(c, name_typed=str(it.get("query") or it.get("name") or c["discoverer"] or c["wds_id"]),
                 when_utc=w, tz=site_obj.tz, scope=scope_name or None,
                 aperture_mm=float(tel.aperture_mm), obstruction=float(tel.obstruction),
                 site=site_name or None, lat_deg=float(site_obj.lat_deg), lon_deg=float(site_obj.lon_deg),
                 elevation_m=float(site_obj.elevation_m), seeing_arcsec=seeing_arcsec, steadiness=steadiness,
                 power=it.get("power"), result=it["result"], note=it.get("note") or "")
        entries.append(clean_entry(e))
    out = []
    for e in entries:
        new_id = logbook.add(e)
        out.append(logbook.get(new_id))
    return out


def find(catalog, query: str):
    """The catalogue row of a typed name (every form the planner accepts)."""
    from planner.catalogs import find_pair

    return find_pair(catalog, query)


def fit_and_store(logbook, per_scope: bool = True, store: bool = True) -> list:
    """Fit the calibrations (one per scope and a pooled one) and keep them in the log."""
    from planner.plan.calibration import fit_log

    entries = logbook.entries()
    if not entries:
        raise InputError("the observation log is empty; add attempts with 'splitplan log add' first")
    cals = (fit_log(entries, per_scope=True) if per_scope else []) + fit_log(entries, per_scope=False)
    if store:
        for c in cals:
            logbook.save_fit(c.scope, c.to_dict())
    return cals


def scope_key(telescope: dict, scope_name: str = "") -> str:
    """The key a telescope's calibration is stored under (see :func:`planner.plan.calibration.scope_key`)."""
    from planner.plan.calibration import scope_key as _key

    return _key({"scope": scope_name or None, "aperture_mm": telescope["aperture_mm"],
                 "obstruction": telescope.get("obstruction", 0.0)})


def calibration_for(logbook, telescope: dict, scope_name: str = ""):
    """The newest stored calibration for this telescope, else the pooled one; None if never fitted."""
    from planner.plan.calibration import Calibration

    for key in (scope_key(telescope, scope_name), ""):
        body = logbook.latest_fit(key)
        if body is not None:
            return Calibration.from_dict(body)
    return None


#: values of ``--calibration`` (and ``NightRequest.calibration``)
from planner.config.fields import CALIBRATIONS  # noqa: E402  (the field table is its home)


def calibrate(telescopes, mode: str | None, logbook=None):
    """The telescopes with the observer's calibration attached, and the calibrations used.

    ``mode``: 'published' (or None: nothing changes) or 'mine' (the newest fit in
    the log for each telescope, by its name, else the pooled fit).  Returns
    (telescopes, ((name, Calibration), ...)).  No fit stored: an error that says
    how to make one."""
    import dataclasses

    if mode in (None, "published"):
        return tuple(telescopes), ()
    if mode != "mine":
        raise InputError(f"--calibration {mode!r} is not one of {', '.join(CALIBRATIONS)}")
    if logbook is None:
        from planner.config.logbook import Logbook
        from planner.config.storage import log_path

        if not log_path().exists():
            raise InputError("--calibration mine: there is no observation log yet; record attempts with "
                             "'splitplan log add' and fit them with 'splitplan log fit'")
        with Logbook() as log:
            return calibrate(telescopes, mode, log)
    out, used = [], []
    for tel in telescopes:
        cal = calibration_for(logbook, {"aperture_mm": tel.aperture_mm}, tel.name)
        if cal is None:
            raise InputError("--calibration mine: no calibration in the log yet; run 'splitplan log fit'")
        params = tuple(sorted(cal.chance_params().items()))
        out.append(dataclasses.replace(tel, chance_params=params))
        used.append((tel.name, cal))
    return tuple(out), tuple(used)


def done_pairs(logbook, telescope: dict, scope_name: str = "") -> set:
    """(wds_id, components) of the pairs logged as split (clean or split) with this telescope."""
    from planner.plan.calibration import SUCCESS

    key = scope_key(telescope, scope_name)
    from planner.plan.calibration import scope_key as entry_key

    return {(e["wds_id"], e["components"] or "") for e in logbook.entries(result=list(SUCCESS))
            if entry_key(e) == key}


def tried_pairs(logbook) -> set:
    """(wds_id, components) of every pair in the log, whatever the result."""
    return {(e["wds_id"], e["components"] or "") for e in logbook.entries()}


def apply_log(judged: list, request, notes: list) -> list:
    """The night plan reads the log: per telescope, mark the pairs already split with it
    (column ``done``), leave them out (``request.skip_done``) or halve the score of every pair
    already tried with it, so never-tried pairs come first (``request.prefer_new``).

    Without a log nothing changes (and sqlite3 is not imported).  A log that cannot be read
    is reported in ``notes`` and ignored, unless an option asked for it."""
    import dataclasses

    import numpy as np

    from planner.config.storage import log_path
    from planner.errors import PlannerError

    asked = bool(getattr(request, "skip_done", None) or getattr(request, "prefer_new", None))
    if not log_path().exists():
        if asked:
            notes.append("no observation log yet: nothing is done or tried (record attempts with 'splitplan log add')")
        return judged
    from planner.config.logbook import Logbook

    try:
        log = Logbook(create=False)
    except PlannerError as exc:
        if asked:
            raise
        notes.append(f"the observation log was not read: {exc}")
        return judged
    out = []
    with log:
        for js in judged:
            tel = js.telescope
            t = js.table
            keys = list(zip(t["wds_id"].astype(str), t["components"].fillna("").astype(str).str.strip()))
            spec = {"aperture_mm": tel.aperture_mm}
            done = done_pairs(log, spec, tel.name)
            is_done = np.array([k in done for k in keys], bool)
            t = t.assign(done=is_done)
            if request.prefer_new:
                tried = {(e["wds_id"], e["components"] or "") for e in log.entries()
                         if _entry_scope(e) == scope_key(spec, tel.name)}
                was = np.array([k in tried for k in keys], bool)
                t = t.assign(score=np.where(was, 0.5, 1.0) * t["score"].to_numpy(float))
            n_done = int((is_done & t["up"].to_numpy(bool)).sum()) if "up" in t else int(is_done.sum())
            if request.skip_done:
                t = t[~is_done]
            if n_done:
                notes.append(f"{tel.name}: {n_done} pairs up tonight are already split in your log"
                             + (" (left out)" if request.skip_done else " (marked done)"))
            out.append(dataclasses.replace(js, table=t))
    return out


def _entry_scope(e: dict) -> str:
    from planner.plan.calibration import scope_key as entry_key

    return entry_key(e)


def flag_done(sched, table):
    """Add 'done' to the flag of scheduled pairs marked done in ``table`` (see :func:`apply_log`)."""
    import numpy as np

    if "done" not in table or sched is None or not len(sched):
        return sched
    done = {(str(w), str(c or "").strip()) for w, c in
            zip(table.loc[table["done"], "wds_id"], table.loc[table["done"], "components"].fillna(""))}
    if not done:
        return sched
    hit = np.array([(str(w), str(c or "").strip()) in done for w, c in
                    zip(sched["wds_id"], sched["components"].fillna(""))], bool)
    flag = sched["flag"].fillna("").astype(str).to_numpy()
    new = np.where(hit, np.where(flag == "", "done", np.char.add(flag.astype(str), "; done")), flag)
    return sched.assign(flag=new)


def last_attempts(logbook, wds_id: str, components: str | None = None, n: int = 5) -> list[dict]:
    """The latest ``n`` entries of one pair, newest first."""
    rows = [e for e in logbook.entries(wds_ids=[wds_id])
            if components is None or (e["components"] or "") == (components or "")]
    return rows[::-1][:n]
