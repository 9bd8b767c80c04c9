"""``splitplan profile``: save, list and remove sites and telescopes."""

from __future__ import annotations

import json
import sys

from planner.cli.parser import Command, Group


def _show(kind: str, as_json: bool) -> None:
    from planner.config import profiles

    entries = profiles.list_profiles(kind)
    if as_json:
        sys.stdout.write(json.dumps(entries, indent=1, ensure_ascii=False) + "\n")
        return
    if not entries:
        print(f"no saved {kind}s ({profiles.profile_path(kind)})")
        return
    for name, d in entries.items():
        print(f"{name}: " + ", ".join(f"{k}={v}" for k, v in d.items()))


def site_add_arguments(p) -> None:
    p.add_argument("name", help="A name for the site.")
    p.add_argument("--lat", type=float, required=True, metavar="DEG", help="Latitude, deg (north +).")
    p.add_argument("--lon", type=float, required=True, metavar="DEG", help="Longitude, deg (east +).")
    p.add_argument("--elevation", type=float, default=0.0, metavar="M",
                   help="Height above sea level, m (default 0).")
    p.add_argument("--tz", required=True, metavar="ZONE", help="IANA time zone, e.g. Europe/Berlin.")
    p.add_argument("--min-alt", type=float, metavar="DEG", help="Lowest useful altitude, deg.")
    p.add_argument("--horizon", metavar="FILE", help="Horizon profile file (azimuth altitude lines).")
    p.add_argument("--replace", action="store_true", help="Overwrite a site of the same name.")


def site_add(a) -> None:
    """Save a site."""
    from planner.config import profiles

    profiles.add("site", a.name, {"lat_deg": a.lat, "lon_deg": a.lon, "elevation_m": a.elevation, "tz": a.tz,
                                  "min_alt_deg": a.min_alt, "horizon_file": a.horizon}, replace=a.replace)
    print(f"saved site {a.name!r} in {profiles.profile_path('site')}")


def scope_add_arguments(p) -> None:
    p.add_argument("name", help="A name for the telescope.")
    p.add_argument("--aperture", type=float, required=True, metavar="MM", help="Clear aperture, mm.")
    p.add_argument("--obstruction", type=float, default=0.0, metavar="RATIO",
                   help="Central obstruction, diameter ratio (default 0).")
    p.add_argument("--kind", metavar="KIND",
                   help="refractor, newtonian, sct, maksutov, cassegrain, binocular, other.")
    p.add_argument("--focal", type=float, metavar="MM", help="Focal length, mm.")
    p.add_argument("--replace", action="store_true", help="Overwrite a telescope of the same name.")


def scope_add(a) -> None:
    """Save a telescope."""
    from planner.config import profiles

    profiles.add("scope", a.name, {"aperture_mm": a.aperture, "obstruction": a.obstruction, "kind": a.kind,
                                   "focal_mm": a.focal}, replace=a.replace)
    print(f"saved telescope {a.name!r} in {profiles.profile_path('scope')}")


def _json_flag(p) -> None:
    p.add_argument("--json", dest="as_json", action="store_true", help="Print JSON.")


def _name_argument(what: str):
    def arguments(p) -> None:
        p.add_argument("name", help=f"Name of the saved {what}.")
    return arguments


def _remove(kind: str, what: str):
    def run(a) -> None:
        from planner.config import profiles

        profiles.remove(kind, a.name)
        print(f"removed {what} {a.name!r}")
    return run


def paths(a) -> None:
    """Where profiles and the steadiness table live."""
    from planner.config import profiles
    from planner.config.seeing_scale import scale_path

    print(f"sites:            {profiles.profile_path('site')}")
    print(f"telescopes:       {profiles.profile_path('scope')}")
    print(f"steadiness table: {scale_path()}")


GROUP = Group("profile", help="Saved sites and telescopes (TOML in your config folder).", children=[
    Group("site", help="Observing sites: add, list, remove.", children=[
        Command("add", arguments=site_add_arguments, run=site_add, usage="name", help="Save a site."),
        Command("list", arguments=_json_flag, run=lambda a: _show("site", a.as_json), help="List saved sites."),
        Command("remove", arguments=_name_argument("site"), run=_remove("site", "site"), usage="name",
                help="Forget a saved site."),
    ]),
    Group("scope", help="Telescopes: add, list, remove.", children=[
        Command("add", arguments=scope_add_arguments, run=scope_add, usage="name", help="Save a telescope."),
        Command("list", arguments=_json_flag, run=lambda a: _show("scope", a.as_json),
                help="List saved telescopes."),
        Command("remove", arguments=_name_argument("telescope"), run=_remove("scope", "telescope"),
                usage="name", help="Forget a saved telescope."),
    ]),
    Command("paths", arguments=lambda p: None, run=paths, help="Where profiles and the steadiness table live."),
])
