"""``splitplan log``: your observation log, and your own split limit fitted to it.

Commands: ``add``, ``list``, ``edit``, ``remove``, ``undo``, ``mark`` (walk a saved plan),
``export``, ``import``, ``backup``, ``fit``.  The log is one SQLite file in the user data
folder (:mod:`planner.config.logbook`); the work lives in :mod:`planner.plan.observations`
and :mod:`planner.plan.calibration`, reached through :mod:`planner.api`.  docs/log.md
describes everything.  Heavy imports (sqlite3, pandas, scipy) happen inside the functions.
"""

from __future__ import annotations

import json
import sys
from pathlib import Path

from planner.cli import options as opt
from planner.cli.parser import Command, Group

RESULT_KEYS = {"c": "clean", "s": "split", "n": "notched", "e": "elongated", "r": "round", "u": "unseen"}
RESULTS = tuple(RESULT_KEYS.values())


def _log_file(p) -> None:
    p.add_argument("--log-file", type=opt.path, metavar="FILE",
                   help="Use this log file instead of the one in your data folder.")


def _open(a, create: bool = True):
    from planner.config.logbook import Logbook

    return Logbook(getattr(a, "log_file", None), create=create)


def _result_arg(p, required: bool) -> None:
    p.add_argument("--result", required=required, metavar="RESULT",
                   help="clean (dark gap), split (touching), notched, elongated, round (not split) or "
                        "unseen (companion not seen).")


def _check_result(value: str | None) -> str | None:
    from planner.errors import InputError

    if value is not None and value not in RESULTS:
        raise InputError(f"--result {value!r} is not one of {', '.join(RESULTS)}")
    return value


def _pair_label(e: dict) -> str:
    name = f"{e.get('discoverer') or ''} {e.get('components') or ''}".strip()
    return f"{e['wds_id']} {name}".strip()


def _local(e: dict) -> str:
    import datetime as dt
    from zoneinfo import ZoneInfo

    t = dt.datetime.strptime(e["when_utc"], "%Y-%m-%dT%H:%M:%SZ").replace(tzinfo=dt.timezone.utc)
    return t.astimezone(ZoneInfo(e["tz"])).strftime("%Y-%m-%d %H:%M %Z")


def _scope_text(e: dict) -> str:
    return e.get("scope") or f"{e['aperture_mm']:g} mm"


def _num(v, spec: str) -> str:
    return "-" if v is None else format(v, spec)


def entry_line(e: dict) -> str:
    from planner.report.safe import terminal_text

    note = f"  {e['note']}" if e.get("note") else ""
    return terminal_text(f"{e['id']:>4} {_local(e):<22} {_pair_label(e):<24.24} {e['result']:<9} "
                         f"{_scope_text(e):<18.18} {_num(e.get('rho_arcsec'), '6.2f')} "
                         f"{_num(e.get('margin'), '5.2f')} {_num(e.get('chance') and 100 * e['chance'], '4.0f')}"
                         f"{note}", one_line=True)


HEADER = f"{'id':>4} {'when (local)':<22} {'pair':<24} {'result':<9} {'scope':<18} {'rho':>6} {'margin':>5} {'ch%':>4}"


# -- add --------------------------------------------------------------------------------


def add_arguments(p) -> None:
    p.add_argument("pair", help="The pair, any name the planner knows (WDS id, designation, star name).")
    _result_arg(p, required=True)
    p.add_argument("--when", metavar="TIME",
                   help="Local date and time at the site, e.g. '2026-07-01 22:30', or 'now' (default).")
    p.add_argument("--power", type=float, metavar="X", help="Magnification used.")
    p.add_argument("--note", default="", metavar="TEXT", help="A note.")
    opt.catalog(p)
    _log_file(p)
    opt.site(p.add_argument_group("Site"))
    t = p.add_argument_group("Telescope")
    t.add_argument("--scope", metavar="NAME", help="Saved telescope.")
    t.add_argument("--aperture", type=float, metavar="MM", help="Clear aperture, mm.")
    t.add_argument("--obstruction", type=float, metavar="RATIO", help="Central obstruction, diameter ratio 0-0.9.")
    opt.add(p.add_argument_group("Air"), "seeing", "steadiness")


def _site_scope(a):
    """(site dict, site name, scope dict, scope profile name) from the site and telescope options."""
    from planner.cli.night_cmd import build_request
    from planner.errors import InputError

    if a.scope and a.aperture is not None:
        raise InputError("give either --scope NAME or --aperture MM, not both")
    req = build_request(site=a.site, lat=a.lat, lon=a.lon, elevation=a.elevation, tz=a.tz, min_alt=a.min_alt,
                        scope=[a.scope] if a.scope else None,
                        aperture=[a.aperture] if a.aperture is not None else None,
                        obstruction=[a.obstruction] if a.obstruction is not None else None)
    sd = dict(req.scopes[0])
    return dict(req.site), req.site_name, sd, (a.scope or "")


def add_run(a) -> None:
    """Record one attempt."""
    from planner.api import record_observation

    _check_result(a.result)
    site, site_name, scope, scope_name = _site_scope(a)
    with _open(a) as log:
        e = record_observation(log, a.pair, site=site, telescope=scope, when=a.when, seeing_arcsec=a.seeing,
                               steadiness=a.steadiness, power=a.power, result=a.result, note=a.note,
                               site_name=site_name, scope_name=scope_name, catalog=a.catalog or "sample")
    print(f"added entry {e['id']}: {_pair_label(e)}, {e['result']}, {_local(e)}, {_scope_text(e)}; "
          f"margin {_num(e['margin'], '.2f')}, model chance {_num(e['chance'] and 100 * e['chance'], '.0f')} %")
    if e["alt_deg"] is not None and e["alt_deg"] < 0:
        print(f"splitplan: note: the pair was below the horizon then (altitude {e['alt_deg']:.0f} deg); "
              "check --when and the site (correct with 'splitplan log remove' and add again)", file=sys.stderr)


ADD = Command("add", arguments=add_arguments, run=add_run, usage="PAIR --result RESULT",
              help="Record one attempt at a pair: the result on a fixed scale, when, with which telescope "
                   "and in what air. The planner's view of that moment (separation, altitude, limit, margin, "
                   "chance) is stored with it.")


# -- list -------------------------------------------------------------------------------


def list_arguments(p) -> None:
    p.add_argument("--pair", metavar="NAME", help="Only this pair (any name the planner knows).")
    p.add_argument("--scope", metavar="NAME", help="Only this telescope (saved name, or e.g. '102 mm').")
    p.add_argument("--result", action="append", metavar="RESULT", help="Only these results (repeatable).")
    p.add_argument("--from", dest="date_from", metavar="YYYY-MM-DD", help="From this date (UTC) on.")
    p.add_argument("--to", dest="date_to", metavar="YYYY-MM-DD", help="Up to this date (UTC), included.")
    opt.catalog(p)
    p.add_argument("--json", dest="as_json", action="store_true", help="Print the entries as JSON.")
    _log_file(p)


def _utc_day(text: str, what: str, shift_days: int = 0) -> str:
    import datetime as dt

    from planner.errors import InputError

    try:
        d = dt.date.fromisoformat(text.strip())
    except ValueError:
        raise InputError(f"{what} {text!r} is not a date; use YYYY-MM-DD") from None
    return (d + dt.timedelta(days=shift_days)).strftime("%Y-%m-%dT00:00:00Z")


def select(a, log) -> list[dict]:
    """The entries the list filters select."""
    from planner.api import scope_key

    for r in a.result or []:
        _check_result(r)
    wds = None
    comps = None
    if a.pair:
        from planner.api import find_pair, load_catalog

        cat = load_catalog(a.catalog or "sample")
        row = cat.pairs.loc[find_pair(cat, a.pair)]
        wds, comps = [str(row["wds_id"])], str(row.get("components") or "").strip()
    rows = log.entries(wds_ids=wds, result=a.result or None,
                       since_utc=_utc_day(a.date_from, "--from") if a.date_from else None,
                       until_utc=_utc_day(a.date_to, "--to", 1) if a.date_to else None)
    if comps is not None:
        rows = [e for e in rows if (e["components"] or "") == comps]
    if a.scope:
        rows = [e for e in rows if scope_key(e) == a.scope or e.get("scope") == a.scope]
    return rows


def list_run(a) -> None:
    """The entries of the log, oldest first."""
    with _open(a) as log:
        rows = select(a, log)
        total = log.count()
    if a.as_json:
        sys.stdout.write(json.dumps(rows, indent=1, ensure_ascii=False) + "\n")
        return
    if not rows:
        print(f"no entries{' match' if total else ' yet'} ({total} in the log)")
        return
    print(HEADER)
    for e in rows:
        print(entry_line(e))
    print(f"{len(rows)} of {total} entries")


LIST = Command("list", arguments=list_arguments, run=list_run,
               help="List the log's entries, oldest first, with filters by pair, telescope, result and dates.")


# -- edit, remove, undo --------------------------------------------------------------------


def _id_argument(p) -> None:
    p.add_argument("id", type=int, help="Entry number (see 'splitplan log list').")
    _log_file(p)


def edit_arguments(p) -> None:
    _id_argument(p)
    _result_arg(p, required=False)
    p.add_argument("--note", metavar="TEXT", help="Replace the note.")
    p.add_argument("--power", type=float, metavar="X", help="Magnification used.")


def edit_run(a) -> None:
    """Correct the result, note or power of an entry."""
    changes = {k: v for k, v in (("result", _check_result(a.result)), ("note", a.note), ("power", a.power))
               if v is not None}
    with _open(a, create=False) as log:
        e = log.edit(a.id, changes)
    print(f"changed entry {e['id']}: " + ", ".join(f"{k} = {e[k]!r}" for k in changes))


EDIT = Command("edit", arguments=edit_arguments, run=edit_run, usage="ID",
               help="Correct the result, note or power of an entry. To change the pair, time, telescope or "
                    "air, remove the entry and add it again (the planner recomputes the circumstances).")


def remove_run(a) -> None:
    """Remove an entry."""
    with _open(a, create=False) as log:
        e = log.remove(a.id)
    print(f"removed entry {e['id']}: {_pair_label(e)}, {e['result']}, {_local(e)} "
          "('splitplan log undo' brings it back)")


REMOVE = Command("remove", arguments=_id_argument, run=remove_run, usage="ID",
                 help="Remove an entry (undo brings it back).")


def undo_run(a) -> None:
    """Undo the last change."""
    with _open(a, create=False) as log:
        what = log.undo()
    print("nothing to undo" if what is None else f"undone: {what}")


UNDO = Command("undo", arguments=_log_file, run=undo_run,
               help="Undo the last change to the log (an add, edit, remove or import); repeat to go further back.")


# -- mark -----------------------------------------------------------------------------------


def mark_arguments(p) -> None:
    p.add_argument("planfile", type=opt.path, help="A plan file saved with 'splitplan night --save-plan'.")
    p.add_argument("--scope", metavar="NAME", help="Your telescope in a club plan (its name in the plan).")
    p.add_argument("--results", metavar="LIST",
                   help="Results without a terminal: slot=result pairs, e.g. '1=clean,2=round,4=unseen'.")
    _log_file(p)


def parse_results(spec: str, slots: list[int]) -> dict[int, str]:
    """'1=clean,2=round' -> {1: 'clean', 2: 'round'} (slots must be in the plan)."""
    from planner.errors import InputError

    out = {}
    for part in [x for x in spec.replace(";", ",").split(",") if x.strip()]:
        k, sep, v = part.partition("=")
        v = v.strip().lower()
        v = RESULT_KEYS.get(v, v)
        try:
            slot = int(k)
        except ValueError:
            slot = None
        if not sep or slot is None or v not in RESULTS:
            raise InputError(f"--results: {part.strip()!r} is not SLOT=RESULT, e.g. 1=clean "
                             f"(results: {', '.join(RESULTS)})")
        if slot not in slots:
            raise InputError(f"--results: the plan has no slot {slot} (slots {slots[0]}-{slots[-1]})"
                             if slots else "--results: the plan has no scheduled slot")
        if slot in out:
            raise InputError(f"--results: slot {slot} is given twice")
        out[slot] = v
    return out


def _read_key() -> str:
    """One key press from the terminal (no Enter needed)."""
    try:
        import termios
        import tty
    except ImportError:  # Windows
        import msvcrt

        return msvcrt.getwch()
    fd = sys.stdin.fileno()
    old = termios.tcgetattr(fd)
    try:
        tty.setraw(fd)
        ch = sys.stdin.read(1)
    finally:
        termios.tcsetattr(fd, termios.TCSADRAIN, old)
    if ch == "\x03":
        raise KeyboardInterrupt
    return ch


def mark_run(a) -> None:
    """Record the results of a night by walking the slots of its saved plan."""
    from planner.api import record_observations
    from planner.cli.night_cmd import request_from_plan
    from planner.errors import InputError
    from planner.api import plan_request as plan_night
    from planner.report.exports import iso_utc

    req = request_from_plan(a.planfile)
    names = [s.get("name") or f"{float(s['aperture_mm']):g} mm" for s in req.scopes]
    if a.scope is None and len(req.scopes) > 1:
        raise InputError(f"the plan has {len(names)} telescopes; choose yours with --scope "
                         f"({', '.join(repr(n) for n in names)})")
    k = 0 if a.scope is None else (names.index(a.scope) if a.scope in names else -1)
    if k < 0:
        raise InputError(f"--scope {a.scope!r} is not in the plan; its telescopes: "
                         f"{', '.join(repr(n) for n in names)}")
    plan = plan_night(req)
    sp = plan.scopes[k]
    sched = sp.schedule
    if sched is None or not len(sched):
        raise InputError(f"the plan {a.planfile} schedules nothing for {names[k]}")
    slots = [int(s) for s in sched["slot"]]
    sd = dict(req.scopes[k])
    scope_name = "" if names[k] == f"{float(sd['aperture_mm']):g} mm" else names[k]
    common = dict(site=dict(req.site), telescope=sd, seeing_arcsec=req.seeing_arcsec, steadiness=req.steadiness,
                  site_name=req.site_name, scope_name=scope_name, catalog=req.catalog)

    def item(row, result):
        comp = str(row.components or "").strip()
        return {"query": f"{row.wds_id} {comp}".strip(), "result": result, "when": iso_utc(row.slot_start_utc),
                "name": f"{row.discoverer} {comp}".strip()}

    rows = list(sched.itertuples(index=False))
    if a.results is not None:
        given = parse_results(a.results, slots)
        items = [item(r, given[int(r.slot)]) for r in rows if int(r.slot) in given]
        with _open(a) as log:
            done = record_observations(log, items, **common)
        for e in done:
            print(f"added entry {e['id']}: {_pair_label(e)}, {e['result']}")
        print(f"{len(done)} entries added from {len(rows)} slots")
        return
    if not sys.stdin.isatty():
        raise InputError("log mark needs a terminal to read keys; give the results with --results "
                         "'1=clean,2=round,...'")
    from planner.report.safe import terminal_text

    print("keys: c clean, s split, n notched, e elongated, r round, u unseen; space skip, q stop")
    n = 0
    with _open(a) as log:
        for r in rows:
            sys.stdout.write(terminal_text(f"{int(r.slot):>2} {r.slot_local:5} {r.discoverer} {r.components} "
                                           f"rho {r.rho_arcsec:.2f}\" margin {r.margin:.2f} ? ", one_line=True))
            sys.stdout.flush()
            while True:
                key = _read_key().lower()
                if key in RESULT_KEYS or key in (" ", "\r", "\n", "q", "-"):
                    break
            if key == "q":
                print("stop")
                break
            if key not in RESULT_KEYS:
                print("skipped")
                continue
            e = record_observations(log, [item(r, RESULT_KEYS[key])], **common)[0]
            n += 1
            print(f"{e['result']} (entry {e['id']})")
    print(f"{n} entries added")


MARK = Command("mark", arguments=mark_arguments, run=mark_run, usage="PLANFILE",
               help="After a night: walk the slots of a saved plan and record each result with one key "
                    "(c s n e r u; space skips, q stops), or give them all with --results.")


# -- export, import, backup -------------------------------------------------------------------


def _format(path: Path | None, fmt: str | None, what: str) -> str:
    from planner.errors import InputError

    if fmt is None:
        if path is None or str(path) == "-":
            raise InputError(f"{what} to standard output needs --format csv or json")
        fmt = path.suffix.lower().lstrip(".")
    if fmt not in ("csv", "json"):
        raise InputError(f"{what}: format {fmt!r} is not csv or json (use a .csv or .json file or --format)")
    return fmt


def export_arguments(p) -> None:
    p.add_argument("file", type=opt.path, help="Output file (.csv or .json), or - for standard output.")
    p.add_argument("--format", choices=("csv", "json"), help="csv or json (default: by the file's extension).")
    _log_file(p)


def export_run(a) -> None:
    """Write every entry to a CSV or JSON file."""
    from planner.config.logbook import export_text
    from planner.config.storage import atomic_write_text

    fmt = _format(a.file, a.format, "export")
    with _open(a, create=False) as log:
        text = export_text(log.entries(), fmt)
        n = log.count()
    if str(a.file) == "-":
        sys.stdout.write(text)
        return
    atomic_write_text(a.file, text)
    print(f"wrote {n} entries to {a.file}", file=sys.stderr)


EXPORT = Command("export", arguments=export_arguments, run=export_run, usage="FILE",
                 help="Write every entry, with every column, to a CSV or JSON file (docs/log.md lists the "
                      "columns); 'log import' reads it back exactly.")


def import_arguments(p) -> None:
    p.add_argument("file", type=opt.path, help="A file written by 'splitplan log export' (.csv or .json).")
    p.add_argument("--format", choices=("csv", "json"), help="csv or json (default: by the file's extension).")
    _log_file(p)


def import_run(a) -> None:
    """Add the entries of an export file (those already in the log are skipped)."""
    from planner.config.logbook import parse_export
    from planner.errors import InputError

    fmt = _format(a.file, a.format, "import")
    try:
        text = Path(a.file).read_text(encoding="utf-8")
    except FileNotFoundError:
        raise InputError(f"{a.file} does not exist") from None
    except IsADirectoryError:
        raise InputError(f"{a.file} is a folder; give an export file") from None
    except UnicodeDecodeError:
        raise InputError(f"{a.file} is not UTF-8 text; give a file written by 'splitplan log export'") from None
    entries = parse_export(text, fmt)
    with _open(a) as log:
        added, skipped = log.import_entries(entries)
    print(f"imported {added} entries" + (f"; {skipped} were already in the log" if skipped else ""))


IMPORT = Command("import", arguments=import_arguments, run=import_run, usage="FILE",
                 help="Add the entries of a CSV or JSON export; entries already in the log are skipped, so "
                      "importing twice is harmless (undo removes the whole import).")


def backup_arguments(p) -> None:
    p.add_argument("file", type=opt.path, help="The copy to write (must not exist yet).")
    _log_file(p)


def backup_run(a) -> None:
    """A complete copy of the log."""
    with _open(a, create=False) as log:
        dest = log.backup(a.file)
        n = log.count()
    print(f"wrote a copy of the log ({n} entries) to {dest}")


BACKUP = Command("backup", arguments=backup_arguments, run=backup_run, usage="FILE",
                 summary="Write a complete, consistent copy of the log (SQLite backup).",
                 help="Write a complete, consistent copy of the log (SQLite backup), e.g. to move it to "
                      "another computer.")


# -- fit -----------------------------------------------------------------------------------------


def fit_arguments(p) -> None:
    p.add_argument("--scope", metavar="NAME", help="Report only this telescope (saved name, or e.g. '102 mm').")
    p.add_argument("--pooled", action="store_true", help="Report only the fit of all telescopes together.")
    p.add_argument("--plot", type=opt.path, metavar="FILE", help="Draw the fitted curve (PNG).")
    p.add_argument("--json", dest="as_json", action="store_true", help="Print the fits as JSON.")
    _log_file(p)


def fit_run(a) -> None:
    """Fit your split curve to the log."""
    from planner.api import fit_observations, reliability_table, scope_key
    from planner.errors import InputError

    if a.scope and a.pooled:
        raise InputError("give either --scope NAME or --pooled, not both")
    if a.plot is not None and a.plot.suffix.lower() != ".png":
        raise InputError(f"--plot {a.plot}: give a .png file name")
    with _open(a, create=False) as log:
        cals = fit_observations(log)
        entries = log.entries()
    if a.pooled:
        cals = [c for c in cals if c.scope == ""]
    elif a.scope:
        cals = [c for c in cals if c.scope == a.scope]
        if not cals:
            raise InputError(f"--scope {a.scope!r}: no entries with that telescope; the log has "
                             + ", ".join(sorted({scope_key(e) for e in entries})))
    if a.as_json:
        sys.stdout.write(json.dumps([dict(c.to_dict(), m50=c.m50, m50_interval=list(c.m50_interval()),
                                          sentence=c.sentence()) for c in cals], indent=1) + "\n")
    else:
        for c in cals:
            mine = [e for e in entries if c.scope == "" or scope_key(e) == c.scope]
            _print_fit(c, reliability_table(mine, c))
    if a.plot is not None:
        from planner.report.calibration_chart import write_calibration_png

        c = cals[0]
        write_calibration_png(c, [e for e in entries if c.scope == "" or scope_key(e) == c.scope], a.plot)
        print(f"splitplan: wrote the chart of {c.label} to {a.plot}", file=sys.stderr)


def _print_fit(c, table) -> None:
    from planner.report.safe import terminal_text

    print(terminal_text(f"== {c.label}: {c.split.n} attempts bear on the split, {c.visibility.n} on seeing "
                        "the companion", one_line=True))
    print(terminal_text(c.sentence()[0].upper() + c.sentence()[1:] + ".", one_line=True))
    a = c.visibility.a
    print(f"Steepness {c.split.k:.3g} (published model {_prior_k(c):.3g}); the companion is seen half the "
          f"time when it is {abs(a):.2f} mag {'brighter' if a >= 0 else 'fainter'} than the model's faintest "
          "visible star.")
    if table:
        print(f"{'chance band':<12} {'attempts':>8} {'fitted':>7} {'published':>9} {'split':>6}")
        for r in table:
            print(f"{r['band']:<12} {r['n']:>8} {r['fitted']:>7.0%} {r['published']:>9.0%} {r['observed']:>6.0%}")
    print()


def _prior_k(c) -> float:
    import math

    return math.exp(c.split.prior["ln_k"])


FIT = Command("fit", arguments=fit_arguments, run=fit_run,
              help="Fit your own split curve to the log: where you split half the time, in units of the "
                   "model's limit, per telescope and pooled, with a reliability table (docs/log.md). "
                   "Plans use it with --calibration mine.")


GROUP = Group("log", help="Your observation log: record what you split, list and correct it, move it, and "
                          "fit your own split limit to it (docs/log.md).",
              children=[ADD, LIST, EDIT, REMOVE, UNDO, MARK, EXPORT, IMPORT, BACKUP, FIT])
