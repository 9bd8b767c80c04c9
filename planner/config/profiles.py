"""Saved sites and telescopes ("profiles"), kept as TOML in the user config directory.

Two files in :func:`planner.config.storage.user_dir` ``('config')``:

``sites.toml``::

    [site."Hilltop field"]
    lat_deg = 47.1
    lon_deg = 8.2
    elevation_m = 620.0
    tz = "Europe/Zurich"
    min_alt_deg = 20.0          # optional

``scopes.toml``::

    [scope."club 8-inch"]
    aperture_mm = 203.0
    obstruction = 0.33
    kind = "newtonian"          # optional: refractor, newtonian, sct, maksutov, ...
    focal_mm = 1200.0           # optional

Every entry is validated on the way in (by building the sky engine's site and
the optics telescope from it).  Writes are atomic; a file that fails to parse
is moved aside (quarantined) and reported, never overwritten.
"""

from __future__ import annotations

from pathlib import Path

from planner.errors import InputError, PlannerError

SITE_FIELDS = {"lat_deg": float, "lon_deg": float, "elevation_m": float, "tz": str,
               "min_alt_deg": float, "horizon_file": str, "note": str}
SCOPE_FIELDS = {"aperture_mm": float, "obstruction": float, "kind": str,
                "focal_mm": float, "wavelength_nm": float, "note": str}

_KINDS = {"site": ("sites.toml", SITE_FIELDS), "scope": ("scopes.toml", SCOPE_FIELDS)}


def profile_path(kind: str) -> Path:
    from planner.config.storage import user_dir

    return user_dir("config") / _KINDS[kind][0]


def _load(kind: str) -> dict[str, dict]:
    from planner.config.planfile import read_toml

    p = profile_path(kind)
    if not p.exists():
        return {}
    data = read_toml(p, what=f"{kind} profile file")
    table = data.get(kind, {})
    if not isinstance(table, dict):
        raise PlannerError(f"{p}: expected [{kind}.NAME] tables")
    return {str(k): dict(v) for k, v in table.items() if isinstance(v, dict)}


def _save(kind: str, entries: dict[str, dict]) -> Path:
    from planner.config.planfile import dump_toml
    from planner.config.storage import atomic_write_text

    header = f"splitplan saved {kind}s; edit with 'splitplan profile {kind} add|remove'"
    return atomic_write_text(profile_path(kind), dump_toml({kind: entries}, header=header))


def _clean(kind: str, fields: dict) -> dict:
    allowed = _KINDS[kind][1]
    out = {}
    for k, v in fields.items():
        if v is None:
            continue
        if k not in allowed:
            raise InputError(f"unknown {kind} field {k!r}; allowed: {', '.join(allowed)}")
        try:
            out[k] = allowed[k](v)
        except (TypeError, ValueError):
            raise InputError(f"{kind} field {k}={v!r} is not a {allowed[k].__name__}") from None
    return out


def _check_name(name: str) -> str:
    name = str(name).strip()
    if not name or len(name) > 80 or any(ord(c) < 32 for c in name):
        raise InputError(f"profile name {name!r} must be 1-80 printable characters")
    return name


def validate(kind: str, fields: dict) -> dict:
    """Check a profile entry by building the real object from it; returns the cleaned dict."""
    from planner.optics.telescope import Telescope
    from planner.sky.site import Site

    clean = _clean(kind, fields)
    if kind == "site":
        for req in ("lat_deg", "lon_deg", "tz"):
            if req not in clean:
                raise InputError(f"a site needs {req}")
        Site.from_mapping(clean)
    else:
        if "aperture_mm" not in clean:
            raise InputError("a telescope needs aperture_mm")
        Telescope.from_mapping(clean)
    return clean


def add(kind: str, name: str, fields: dict, replace: bool = False) -> dict:
    """Save (or with ``replace`` overwrite) a site or scope profile."""
    name = _check_name(name)
    clean = validate(kind, fields)
    entries = _load(kind)
    if name in entries and not replace:
        raise InputError(f"{kind} {name!r} already exists; use --replace to overwrite it")
    entries[name] = clean
    _save(kind, entries)
    return clean


def remove(kind: str, name: str) -> None:
    entries = _load(kind)
    if name not in entries:
        raise InputError(f"no saved {kind} called {name!r}; saved: {', '.join(entries) or 'none'}")
    del entries[name]
    _save(kind, entries)


def list_profiles(kind: str) -> dict[str, dict]:
    return _load(kind)


def get(kind: str, name: str) -> dict:
    entries = _load(kind)
    if name not in entries:
        raise InputError(f"no saved {kind} called {name!r}; saved: {', '.join(entries) or 'none'} "
                         f"(add one with 'splitplan profile {kind} add')")
    return _clean(kind, entries[name])
