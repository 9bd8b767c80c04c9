"""``splitplan profile``: save, list and remove sites and telescopes."""

from __future__ import annotations

import json
import sys
from typing import Optional

import typer

from planner.cli import app

profile_app = typer.Typer(help="Saved sites and telescopes (TOML in your config folder).",
                          no_args_is_help=True)
site_app = typer.Typer(help="Observing sites: add, list, remove.", no_args_is_help=True)
scope_app = typer.Typer(help="Telescopes: add, list, remove.", no_args_is_help=True)
profile_app.add_typer(site_app, name="site")
profile_app.add_typer(scope_app, name="scope")
app.add_typer(profile_app, name="profile")


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


@site_app.command("add")
def site_add(name: str = typer.Argument(..., help="A name for the site."),
             lat: float = typer.Option(..., "--lat", help="Latitude, deg (north +)."),
             lon: float = typer.Option(..., "--lon", help="Longitude, deg (east +)."),
             elevation: float = typer.Option(0.0, "--elevation", help="Height above sea level, m."),
             tz: str = typer.Option(..., "--tz", help="IANA time zone, e.g. Europe/Berlin."),
             min_alt: Optional[float] = typer.Option(None, "--min-alt", help="Lowest useful altitude, deg."),
             horizon: Optional[str] = typer.Option(None, "--horizon", help="Horizon profile file (azimuth altitude lines)."),
             replace: bool = typer.Option(False, "--replace", help="Overwrite a site of the same name.")):
    """Save a site."""
    from planner.config import profiles

    profiles.add("site", name, {"lat_deg": lat, "lon_deg": lon, "elevation_m": elevation, "tz": tz,
                                "min_alt_deg": min_alt, "horizon_file": horizon}, replace=replace)
    print(f"saved site {name!r} in {profiles.profile_path('site')}")


@site_app.command("list")
def site_list(as_json: bool = typer.Option(False, "--json", help="Print JSON.")):
    """List saved sites."""
    _show("site", as_json)


@site_app.command("remove")
def site_remove(name: str = typer.Argument(..., help="Name of the saved site.")):
    """Forget a saved site."""
    from planner.config import profiles

    profiles.remove("site", name)
    print(f"removed site {name!r}")


@scope_app.command("add")
def scope_add(name: str = typer.Argument(..., help="A name for the telescope."),
              aperture: float = typer.Option(..., "--aperture", help="Clear aperture, mm."),
              obstruction: float = typer.Option(0.0, "--obstruction", help="Central obstruction, diameter ratio."),
              kind: Optional[str] = typer.Option(None, "--kind", help="refractor, newtonian, sct, maksutov, cassegrain, binocular, other."),
              focal: Optional[float] = typer.Option(None, "--focal", help="Focal length, mm."),
              replace: bool = typer.Option(False, "--replace", help="Overwrite a telescope of the same name.")):
    """Save a telescope."""
    from planner.config import profiles

    profiles.add("scope", name, {"aperture_mm": aperture, "obstruction": obstruction, "kind": kind,
                                 "focal_mm": focal}, replace=replace)
    print(f"saved telescope {name!r} in {profiles.profile_path('scope')}")


@scope_app.command("list")
def scope_list(as_json: bool = typer.Option(False, "--json", help="Print JSON.")):
    """List saved telescopes."""
    _show("scope", as_json)


@scope_app.command("remove")
def scope_remove(name: str = typer.Argument(..., help="Name of the saved telescope.")):
    """Forget a saved telescope."""
    from planner.config import profiles

    profiles.remove("scope", name)
    print(f"removed telescope {name!r}")


@profile_app.command("paths")
def paths():
    """Where profiles and the steadiness table live."""
    from planner.config import profiles
    from planner.config.seeing_scale import scale_path

    print(f"sites:            {profiles.profile_path('site')}")
    print(f"telescopes:       {profiles.profile_path('scope')}")
    print(f"steadiness table: {scale_path()}")
