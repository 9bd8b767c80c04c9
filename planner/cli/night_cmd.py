"""``splitplan night``: tonight's plan of pairs this telescope (or these telescopes) can split.

The option parsing that ``apertures`` shares (site, date, seeing, filters,
catalogue) lives here in :func:`build_request`.  Heavy imports happen inside
the functions.
"""

from __future__ import annotations

import sys
from pathlib import Path
from typing import List, Optional

import typer

from planner.cli import app
from planner.cli import options as opt


def build_request(*, site=None, lat=None, lon=None, elevation=None, tz=None, min_alt=None, date=None,
                  scope=None, aperture=None, obstruction=None, session=None, seeing=None, steadiness=None,
                  darkness=None, mag_max=None, mag2_max=None, dm_max=None, sep_min=None, sep_max=None,
                  constellation=None, ra_from=None, ra_to=None, orbits_only=False, targets=None,
                  catalog=None, minutes=None, limit=None, challenges=False, start=None, end=None,
                  share_margin=None):
    """Turn command-line values into a :class:`planner.plan.model.NightRequest`."""
    from planner.config import profiles
    from planner.errors import InputError
    from planner.plan.model import NightRequest

    site_d, site_name = None, ""
    scopes: list[dict] = []
    if session:
        from planner.config.planfile import read_plan_file

        data = read_plan_file(session, what="session file")
        if isinstance(data.get("site"), dict):
            site_d, site_name = dict(data["site"]), str(data.get("site_name", ""))
        elif isinstance(data.get("site"), str):
            site_d, site_name = profiles.get("site", data["site"]), data["site"]
        for sc in list(data.get("scopes", [])) + list(data.get("scope", [])):
            if not isinstance(sc, dict):
                raise InputError(f"session file {session}: each [[scope]] must be a table")
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
            print("splitplan: note: no --tz given; local times are shown in UTC", file=sys.stderr)
        site_d = {"lat_deg": lat, "lon_deg": lon, "elevation_m": elevation or 0.0,
                  "tz": "UTC" if tz is None else tz}
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
    for k in ("ra_from_h", "ra_to_h"):
        if k in filters and not 0 <= filters[k] <= 24:
            raise InputError(f"--{k[:-2].replace('_', '-')} {filters[k]} must be an hour of RA, 0-24")
    check_filters(filters)
    if share_margin is not None and not 0.5 <= share_margin <= 10:
        raise InputError(f"--share-margin {share_margin:g} must be a margin between 0.5 and 10 (default 1.5)")
    if "targets" in filters and not Path(filters["targets"]).is_file():
        raise InputError(f"target list {targets} does not exist or is not a file")
    req = NightRequest(site=site_d, scopes=scopes, site_name=site_name, date=date,
                       seeing_arcsec=seeing, steadiness=steadiness, darkness=darkness or "nautical",
                       catalog=catalog or "sample", minutes=10.0 if minutes is None else minutes, limit=limit,
                       challenges=bool(challenges), start_local=start, end_local=end, filters=filters)
    if share_margin is not None:
        req.share_margin = share_margin
    return req


def check_filters(filters: dict) -> None:
    """One-line usage errors for filters that could only ever select nothing."""
    import math

    from planner.errors import InputError

    for key, opt_name in (("sep_min_arcsec", "--sep-min"), ("sep_max_arcsec", "--sep-max"), ("dm_max", "--dm-max")):
        v = filters.get(key)
        if v is not None and (not math.isfinite(v) or v < 0):
            raise InputError(f"{opt_name} {v:g} must be 0 or more")
    lo, hi = filters.get("sep_min_arcsec"), filters.get("sep_max_arcsec")
    if lo is not None and hi is not None and lo > hi:
        raise InputError(f"--sep-min {lo:g} is larger than --sep-max {hi:g}")
    if filters.get("constellations"):
        from planner.plan.night import constellation_abbreviations

        known = constellation_abbreviations()
        bad = [c for c in filters["constellations"] if c.lower() not in known]
        if bad:
            raise InputError(f"--constellation {bad[0]!r} is not an IAU constellation abbreviation "
                             "(e.g. Cyg, UMa, Boo)")


OUT_FORMATS = (".csv", ".json", ".xml", ".vot", ".html", ".htm", ".pdf", ".txt")


def check_out(out: Optional[Path]) -> None:
    """Refuse an unknown --out extension before any work is done."""
    from planner.errors import InputError

    if out is not None and Path(out).suffix.lower() not in OUT_FORMATS:
        raise InputError(f"--out {out}: unknown format {Path(out).suffix or '(none)'}; "
                         f"use one of {', '.join(OUT_FORMATS)}")


def emit(plan, as_json: bool, out: Optional[Path]) -> None:
    from planner.report import write_report
    from planner.report.exports import plan_json, render_text

    if as_json:
        sys.stdout.write(plan_json(plan) + "\n")
    else:
        sys.stdout.write(render_text(plan))
    if out is not None:
        fmt = write_report(plan, out)
        print(f"splitplan: wrote {fmt} plan to {out}", file=sys.stderr)


@app.command("night", no_args_is_help=True)
def night(
    site: Optional[str] = opt.site("Site"),
    lat: Optional[float] = opt.lat("Site"),
    lon: Optional[float] = opt.lon("Site"),
    elevation: Optional[float] = opt.elevation("Site"),
    tz: Optional[str] = opt.tz("Site"),
    min_alt: Optional[float] = opt.min_alt("Site"),
    date: Optional[str] = typer.Option(None, "--date", help="Local date of the evening, YYYY-MM-DD (default tonight)."),
    scope: Optional[List[str]] = opt.scope("Telescope"),
    aperture: Optional[List[float]] = opt.aperture("Telescope"),
    obstruction: Optional[List[float]] = opt.obstruction("Telescope"),
    session: Optional[Path] = typer.Option(None, "--session", help="Club session file (TOML: the site and a list of scope tables).", rich_help_panel="Telescope"),
    seeing: Optional[float] = opt.seeing("Air"),
    steadiness: Optional[float] = opt.steadiness("Air"),
    darkness: Optional[str] = opt.darkness("Air"),
    mag_max: Optional[float] = typer.Option(None, "--mag-max", help="Primary no fainter than this.", rich_help_panel="Filters"),
    mag2_max: Optional[float] = typer.Option(None, "--mag2-max", help="Companion no fainter than this.", rich_help_panel="Filters"),
    dm_max: Optional[float] = typer.Option(None, "--dm-max", help="Largest magnitude difference.", rich_help_panel="Filters"),
    sep_min: Optional[float] = typer.Option(None, "--sep-min", help="Smallest separation tonight, arcsec.", rich_help_panel="Filters"),
    sep_max: Optional[float] = typer.Option(None, "--sep-max", help="Largest separation tonight, arcsec.", rich_help_panel="Filters"),
    constellation: Optional[List[str]] = typer.Option(None, "--constellation", help="IAU abbreviation, e.g. Cyg (repeatable).", rich_help_panel="Filters"),
    ra_from: Optional[float] = typer.Option(None, "--ra-from", help="RA window start, hours.", rich_help_panel="Filters"),
    ra_to: Optional[float] = typer.Option(None, "--ra-to", help="RA window end, hours (may wrap past 0h).", rich_help_panel="Filters"),
    orbits_only: bool = typer.Option(False, "--orbits-only", help="Only pairs whose position comes from an orbit.", rich_help_panel="Filters"),
    targets: Optional[Path] = typer.Option(None, "--targets", help="Your own list (CSV of WDS ids or designations).", rich_help_panel="Filters"),
    catalog: Optional[str] = opt.catalog(),
    minutes: Optional[float] = typer.Option(None, "--minutes", help="Minutes per target (default 10).", rich_help_panel="Schedule"),
    limit: Optional[int] = typer.Option(None, "--limit", help="At most this many pairs per scope (default: as many as the night holds).", rich_help_panel="Schedule"),
    challenges: bool = typer.Option(False, "--challenges", help="Add near misses in their own section.", rich_help_panel="Schedule"),
    start: Optional[str] = typer.Option(None, "--start", help="Start no earlier than HH:MM local.", rich_help_panel="Schedule"),
    end: Optional[str] = typer.Option(None, "--end", help="Finish by HH:MM local.", rich_help_panel="Schedule"),
    share_margin: Optional[float] = typer.Option(None, "--share-margin", help="Club sharing: margin counted as comfortable (default 1.5).", rich_help_panel="Schedule"),
    as_json: bool = typer.Option(False, "--json", help="Print a JSON array, one object per scheduled pair.", rich_help_panel="Output"),
    out: Optional[Path] = typer.Option(None, "--out", help="Also write the plan: .csv .json .xml/.vot .html .pdf .txt", rich_help_panel="Output"),
    save_plan: Optional[Path] = typer.Option(None, "--save-plan", help="Record every input in a plan file (TOML).", rich_help_panel="Output"),
    plan_file: Optional[Path] = typer.Option(None, "--plan", help="Rerun the inputs recorded in a plan file.", rich_help_panel="Output"),
):
    """Pairs your telescope can split tonight, ranked and ordered through the night."""
    from planner.errors import InputError
    from planner.plan.night import plan_night

    given = dict(site=site, lat=lat, lon=lon, elevation=elevation, tz=tz, min_alt=min_alt, date=date,
                 scope=scope, aperture=aperture, obstruction=obstruction, session=session, seeing=seeing,
                 steadiness=steadiness, darkness=darkness, mag_max=mag_max, mag2_max=mag2_max, dm_max=dm_max,
                 sep_min=sep_min, sep_max=sep_max, constellation=constellation, ra_from=ra_from, ra_to=ra_to,
                 orbits_only=orbits_only, targets=targets, catalog=catalog, minutes=minutes, limit=limit,
                 challenges=challenges, start=start, end=end, share_margin=share_margin)
    opt.check_darkness(darkness)
    check_out(out)
    if plan_file is not None:
        extra = [k for k, v in given.items() if v not in (None, False, [])]
        if extra:
            raise InputError(f"--plan {plan_file} fixes every input; drop --{extra[0].replace('_', '-')}")
        req = request_from_plan(plan_file)
    else:
        req = build_request(**given)
    plan = plan_night(req)
    if save_plan is not None:
        from planner.config.planfile import write_plan_file

        write_plan_file(save_plan, plan.request.to_dict(), plan.version, plan.catalog_source)
        print(f"splitplan: saved the inputs to {save_plan} (rerun with --plan {save_plan})", file=sys.stderr)
    emit(plan, as_json, out)


def request_from_plan(path):
    from planner import __version__
    from planner.config.planfile import read_plan_file
    from planner.plan.model import NightRequest

    data = read_plan_file(path)
    v = data.get("splitplan_version")
    if v and v != __version__:
        print(f"splitplan: note: {path} was written by splitplan {v}; this is {__version__}", file=sys.stderr)
    return NightRequest.from_dict(data)
