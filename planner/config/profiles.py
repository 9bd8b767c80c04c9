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

Every entry is validated on the way in, field by field, by the field table
of :mod:`planner.config.fields` (the same checks as the command line and plan
files).  Writes are atomic; a file that fails to parse
is moved aside (quarantined) and reported, never overwritten.
"""

from __future__ import annotations

from pathlib import Path

from planner.config.fields import SCOPE_FIELDS, SITE_FIELDS, check_mapping, existing_file
from planner.errors import InputError, PlannerError

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
    return check_mapping(kind, fields, _KINDS[kind][1])


def _check_name(name: str) -> str:
    """A profile name: 1-80 characters, none of them a control character (C0,
    DEL, C1), a format character (bidirectional overrides, zero-width marks),
    a line or paragraph separator, or an undecodable byte from the command
    line (``\\udcXX``), so a name can always be shown as it was typed."""
    from planner.config.text import hidden_characters

    name = str(name).strip()
    bad = hidden_characters(name)
    if bad:
        shown = ", ".join(f"U+{ord(c):04X}" for c in sorted(set(bad)))
        raise InputError(f"profile name {ascii(name)} contains invisible or control characters "
                         f"({shown}); use 1-80 printable characters")
    if not name or len(name) > 80:
        raise InputError(f"profile name {ascii(name)} must be 1-80 printable characters")
    return name


def validate(kind: str, fields: dict) -> dict:
    """Check a profile entry field by field; returns the cleaned dict."""
    if kind == "site":
        clean = check_mapping("site", fields, SITE_FIELDS, required=("lat_deg", "lon_deg", "tz"))
        if "horizon_file" in clean:
            existing_file(clean["horizon_file"], "horizon file")
    else:
        clean = check_mapping("scope", fields, SCOPE_FIELDS, required=("aperture_mm",))
    return clean


def add(kind: str, name: str, fields: dict, replace: bool = False) -> dict:
    """Save (or with ``replace`` overwrite) a site or scope profile."""
    from planner.config.storage import locked

    name = _check_name(name)
    clean = validate(kind, fields)
    with locked(profile_path(kind)):  # read-modify-write: concurrent adds all keep their entry
        entries = _load(kind)
        if name in entries and not replace:
            raise InputError(f"{kind} {name!r} already exists; use --replace to overwrite it")
        entries[name] = clean
        _save(kind, entries)
    return clean


def remove(kind: str, name: str) -> None:
    from planner.config.storage import locked

    with locked(profile_path(kind)):
        entries = _load(kind)
        if name not in entries:
            raise InputError(f"no saved {kind} called {ascii(name)}; saved: {', '.join(entries) or 'none'}")
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
