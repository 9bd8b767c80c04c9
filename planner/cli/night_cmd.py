"""``splitplan night``: tonight's plan of pairs this telescope (or these telescopes) can split.

The option parsing that ``apertures`` shares (site, date, seeing, filters,
catalogue) lives here in :func:`build_request`.  Heavy imports happen inside
the functions.
"""

from __future__ import annotations

import sys
from pathlib import Path
from typing import Optional

from planner.cli import options as opt
from planner.cli.parser import Command


def build_request(*, site=None, lat=None, lon=None, elevation=None, tz=None, min_alt=None, date=None,
                  scope=None, aperture=None, obstruction=None, session=None, seeing=None, steadiness=None,
                  darkness=None, mag_max=None, mag2_max=None, dm_max=None, sep_min=None, sep_max=None,
                  constellation=None, ra_from=None, ra_to=None, orbits_only=False, targets=None,
                  catalog=None, minutes=None, limit=None, challenges=False, start=None, end=None,
                  share_margin=None, calibration=None, skip_done=False, prefer_new=False):
    """Turn command-line values into a :class:`planner.plan.model.NightRequest`."""
    from planner.config import fields, profiles
    from planner.errors import InputError
    from planner.api import NightRequest

    site_d, site_name = None, ""
    scopes: list[dict] = []
    if session:
        from planner.config.planfile import read_plan_file

        data = read_plan_file(session, what="session file")
        if isinstance(data.get("site"), dict):
            site_d, site_name = dict(data["site"]), str(data.get("site_name", ""))
        elif isinstance(data.get("site"), str):
            site_d, site_name = profiles.get("site", data["site"]), data["site"]
        for sc in list(data.get("scopes", [])):
            if not isinstance(sc, dict):
                raise InputError(f"session file {session}: each [[scopes]] must be a table")
            if "profile" in sc:
                d = profiles.get("scope", sc["profile"])
                d["name"] = sc.get("name", sc["profile"])
            else:
                d = dict(sc)
            scopes.append(d)
    if site:
        site_d, site_name = profiles.get("site", site), site
    if lat is not None or lon is not None:
        if lat is None or lon is None:
            raise InputError("give both --lat and --lon (degrees; east positive)")
        if site:
            raise InputError("give either --site NAME or --lat/--lon, not both")
        if tz is None:
            from planner.api import computer_tz

            tz = computer_tz()
            print(f"splitplan: note: no --tz given; times are shown in {tz} (this computer's time zone)",
                  file=sys.stderr)
        site_d = {"lat_deg": lat, "lon_deg": lon, "elevation_m": elevation or 0.0, "tz": tz}
        site_name = ""
    elif site_d is not None:
        if elevation is not None:
            site_d["elevation_m"] = elevation
        if tz is not None:
            site_d["tz"] = tz
    if site_d is None:
        raise InputError("no site: give --site NAME (a saved profile) or --lat, --lon and --tz")
    if min_alt is not None:
        site_d["min_alt_deg"] = min_alt
    for name in scope or []:
        d = profiles.get("scope", name)
        d["name"] = name
        scopes.append(d)
    aps = list(aperture or [])
    obs = list(obstruction or [])
    if obs and not aps and not scopes:
        raise InputError("--obstruction needs an --aperture (mm)")
    if len(obs) > 1 and len(obs) != len(aps):
        raise InputError(f"give one --obstruction for all apertures or one per --aperture ({len(aps)})")
    for k, a in enumerate(aps):
        o = obs[k] if len(obs) > 1 else (obs[0] if obs else 0.0)
        scopes.append({"name": f"{a:g} mm" + (f" ({k + 1})" if aps.count(a) > 1 else ""),
                       "aperture_mm": a, "obstruction": o})
    if not scopes:
        raise InputError("no telescope: give --aperture MM (and --obstruction), --scope NAME or --session FILE")
    filters = {"mag_max": mag_max, "mag2_max": mag2_max, "dm_max": dm_max, "sep_min_arcsec": sep_min,
               "sep_max_arcsec": sep_max, "constellations": list(constellation) if constellation else None,
               "ra_from_h": ra_from, "ra_to_h": ra_to, "orbits_only": True if orbits_only else None,
               "targets": str(Path(targets).resolve()) if targets else None}
    filters = {k: v for k, v in filters.items() if v is not None}
    check_filters(filters)
    if share_margin is not None:
        fields.check("share_margin", share_margin, "--share-margin")
    if "targets" in filters and not Path(filters["targets"]).is_file():
        raise InputError(f"target list {targets} does not exist or is not a file")
    req = NightRequest(site=site_d, scopes=scopes, site_name=site_name, date=date,
                       seeing_arcsec=seeing, steadiness=steadiness, darkness=darkness or fields.DEFAULT_DARKNESS,
                       catalog=catalog or "sample", minutes=fields.DEFAULT_MINUTES if minutes is None else minutes,
                       limit=limit,
                       challenges=bool(challenges), start_local=start, end_local=end, filters=filters)
    if share_margin is not None:
        req.share_margin = share_margin
    req.calibration = calibration
    req.skip_done = True if skip_done else None
    req.prefer_new = True if prefer_new else None
    return req


#: the command-line option of each filter field, for messages
FILTER_OPTIONS = {"mag_max": "--mag-max", "mag2_max": "--mag2-max", "dm_max": "--dm-max", "sep_min_arcsec": "--sep-min",
                  "sep_max_arcsec": "--sep-max", "ra_from_h": "--ra-from", "ra_to_h": "--ra-to",
                  "constellations": "--constellation"}


def check_filters(filters: dict) -> None:
    """One-line usage errors, from the field table (planner.config.fields), for filter values out of
    range or that could only ever select nothing (constellation names are checked by the plan)."""
    from planner.config import fields
    from planner.errors import InputError

    for key, value in filters.items():
        if key in FILTER_OPTIONS:
            fields.check(key, value, FILTER_OPTIONS[key])
    lo, hi = filters.get("sep_min_arcsec"), filters.get("sep_max_arcsec")
    if lo is not None and hi is not None and lo > hi:
        raise InputError(f"--sep-min {lo:g} is larger than --sep-max {hi:g}")
    if filters.get("constellations"):
        from planner.api import constellation_abbreviation

        bad = [c for c in filters["constellations"] if constellation_abbreviation(c) is None]
        if bad:
            raise InputError(f"--constellation {bad[0]!r} is not an IAU constellation (abbreviation "
                             "or Latin name, e.g. Cyg, Cygnus, Cygni, UMa, Ursae Majoris)")


OUT_FORMATS = (".csv", ".json", ".xml", ".vot", ".html", ".htm", ".pdf", ".txt")


#: what ``--out -`` can write
STREAM_FORMATS = ("csv", "json", "votable")


def check_out(out: Optional[Path]) -> None:
    """Refuse an unknown --out extension before any work is done."""
    from planner.errors import InputError

    if out is not None and not opt.to_stdout(out) and Path(out).suffix.lower() not in OUT_FORMATS:
        raise InputError(f"--out {out}: unknown format {Path(out).suffix or '(none)'}; "
                         f"use one of {', '.join(OUT_FORMATS)}")


def emit(plan, as_json: bool, out: Optional[Path], out_format: Optional[str] = None,
         force: bool = False) -> None:
    from planner.report import report_text, write_report
    from planner.report.exports import plan_json, render_text

    if opt.to_stdout(out):  # the table alone on stdout, for a pipe
        sys.stdout.write(report_text(plan, out_format))
        return
    if as_json:
        sys.stdout.write(plan_json(plan) + "\n")
    else:
        sys.stdout.write(render_text(plan))
    if out is not None:
        fmt = write_report(plan, out, force=force)
        print(f"splitplan: wrote {fmt} plan to {out}", file=sys.stderr)


def skipped_lines_note(n: int, catalog) -> None:
    """One stderr line when ``n`` catalogue lines were skipped, and how to see them."""
    if n:
        spec = catalog or "sample"
        print(f"splitplan: note: {n} catalogue line(s) could not be read and were skipped; "
              f"'splitplan catalog show --catalog {spec}' lists them", file=sys.stderr)


def arguments(p) -> None:
    g = p  # the general options
    g.add_argument("--date", metavar="YYYY-MM-DD", help="Local date of the evening (default tonight).")
    opt.catalog(g)
    opt.site(p.add_argument_group("Site"))
    t = p.add_argument_group("Telescope")
    opt.telescope(t)
    t.add_argument("--session", type=opt.path, metavar="FILE",
                   help="Club session file (TOML: the site and a list of scope tables).")
    opt.air(p.add_argument_group("Air"))
    f = p.add_argument_group("Filters")
    f.add_argument("--mag-max", type=float, metavar="MAG", help="Primary no fainter than this.")
    f.add_argument("--mag2-max", type=float, metavar="MAG", help="Companion no fainter than this.")
    f.add_argument("--dm-max", type=float, metavar="MAG", help="Largest magnitude difference.")
    f.add_argument("--sep-min", type=float, metavar="ARCSEC", help="Smallest separation tonight, arcsec.")
    f.add_argument("--sep-max", type=float, metavar="ARCSEC", help="Largest separation tonight, arcsec.")
    f.add_argument("--constellation", action="append", metavar="ABBR",
                   help="IAU abbreviation, e.g. Cyg (repeatable).")
    f.add_argument("--ra-from", type=float, metavar="HOURS", help="RA window start, hours.")
    f.add_argument("--ra-to", type=float, metavar="HOURS", help="RA window end, hours (may wrap past 0h).")
    f.add_argument("--orbits-only", action="store_true", help="Only pairs whose position comes from an orbit.")
    f.add_argument("--targets", type=opt.path, metavar="FILE",
                   help="Your own list (CSV of WDS ids or designations).")
    s = p.add_argument_group("Schedule")
    s.add_argument("--minutes", type=float, metavar="MIN", help="Minutes per target (default 10).")
    s.add_argument("--limit", type=int, metavar="N",
                   help="At most this many pairs per scope (default: as many as the night holds).")
    s.add_argument("--challenges", action="store_true", help="Add near misses in their own section.")
    s.add_argument("--start", metavar="HH:MM", help="Start no earlier than this local time (or 'now').")
    s.add_argument("--end", metavar="HH:MM", help="Finish by this local time.")
    s.add_argument("--share-margin", type=float, metavar="MARGIN",
                   help="Club sharing: margin counted as comfortable (default 1.5).")
    lg = p.add_argument_group("Your log")
    opt.add(lg, "calibration")
    lg.add_argument("--skip-done", action="store_true",
                    help="Leave out pairs your observation log says this telescope has split.")
    lg.add_argument("--prefer-new", action="store_true",
                    help="Rank pairs never tried with this telescope first (tried ones score half).")
    o = p.add_argument_group("Output")
    o.add_argument("--json", dest="as_json", action="store_true",
                   help="Print a JSON array, one object per scheduled pair.")
    o.add_argument("--out", type=opt.path, metavar="FILE",
                   help="Also write the plan: .csv .json .xml/.vot .html .pdf .txt, or - for "
                        "standard output (with --format).")
    opt.stream_format(o, STREAM_FORMATS)
    opt.force(o)
    o.add_argument("--save-plan", type=opt.path, metavar="FILE", help="Record every input in a plan file (TOML).")
    o.add_argument("--plan", dest="plan_file", type=opt.path, metavar="FILE",
                   help="Rerun the inputs recorded in a plan file.")


#: the night options that build the request (everything but the output options)
REQUEST_OPTIONS = ("site", "lat", "lon", "elevation", "tz", "min_alt", "date", "scope", "aperture",
                   "obstruction", "session", "seeing", "steadiness", "darkness", "mag_max", "mag2_max",
                   "dm_max", "sep_min", "sep_max", "constellation", "ra_from", "ra_to", "orbits_only",
                   "targets", "catalog", "minutes", "limit", "challenges", "start", "end", "share_margin",
                   "calibration", "skip_done", "prefer_new")


def run(a) -> None:
    """Pairs your telescope can split tonight, ranked and ordered through the night."""
    darkness, out, plan_file, save_plan, as_json = a.darkness, a.out, a.plan_file, a.save_plan, a.as_json
    given = {k: getattr(a, k) for k in REQUEST_OPTIONS}
    from planner.errors import InputError
    from planner.api import plan_request

    opt.check_darkness(darkness)
    check_out(out)
    if not opt.to_stdout(out):
        (out,) = opt.check_outputs(a.force, out=out)
    opt.check_stream(out, a.out_format, as_json, STREAM_FORMATS)
    if plan_file is not None:
        extra = [k for k, v in given.items() if v not in (None, False, [])]
        if extra:
            raise InputError(f"--plan {plan_file} fixes every input; drop --{extra[0].replace('_', '-')}")
        req = request_from_plan(plan_file)
    else:
        req = build_request(**given)
    plan = plan_request(req)
    skipped_lines_note(plan.catalog_skipped, req.catalog)
    if save_plan is not None:
        from planner.config.planfile import write_plan_file

        write_plan_file(save_plan, plan.request.to_dict(), plan.version, plan.catalog_source)
        print(f"splitplan: saved the inputs to {save_plan} (rerun with --plan {save_plan})", file=sys.stderr)
    emit(plan, as_json, out, a.out_format, a.force)


def request_from_plan(path):
    from planner.api import NightRequest, __version__
    from planner.config.planfile import read_plan_file

    data = read_plan_file(path)
    v = data.get("splitplan_version")
    if v and v != __version__:
        print(f"splitplan: note: {path} was written by splitplan {v}; this is {__version__}", file=sys.stderr)
    return NightRequest.from_dict(data)


COMMAND = Command("night", arguments=arguments, run=run, no_args_is_help=True,
                  help="Pairs your telescope can split tonight, ranked and ordered through the night.")
