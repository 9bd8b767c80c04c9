"""The inputs and the result of a night plan, as plain dataclasses.

:class:`NightRequest` holds every input of a run; it round-trips through a
plan file (:meth:`NightRequest.to_dict` / :meth:`NightRequest.from_dict`).
:class:`NightPlan` holds the result: the night (dark window, Moon), and per
telescope a :class:`ScopePlan` with the ranked candidates, the schedule and
the challenges.  The report layer reads only these.
"""

from __future__ import annotations

from dataclasses import asdict, dataclass, field, fields

from planner.config.fields import DARKNESS, DEFAULT_DARKNESS, DEFAULT_MINUTES
from planner.errors import InputError

__all__ = ["NightRequest", "NightPlan", "ScopePlan", "SCHEDULE_COLUMNS", "DARKNESS"]

#: Columns of a schedule table (one row per scheduled pair), in display order.
SCHEDULE_COLUMNS = (
    "section", "slot", "slot_start_utc", "slot_end_utc", "slot_local", "scope",
    "wds_id", "discoverer", "components", "name", "constellation", "ra_deg", "dec_deg",
    "rho_arcsec", "theta_deg", "method", "mag1", "mag2", "dm",
    "alt_deg", "az_deg", "airmass", "limit_arcsec", "margin", "chance", "verdict",
    "reason", "power_min", "power_max", "score", "best_utc", "sun_alt_deg", "flag", "user_note",
)


@dataclass
class NightRequest:
    """Every input of one night plan (what a plan file records)."""

    site: dict                       # lat_deg, lon_deg, elevation_m, tz, [min_alt_deg]
    scopes: list[dict]               # each: name, aperture_mm, obstruction, [kind, focal_mm]
    site_name: str = ""
    date: str | None = None          # local date YYYY-MM-DD of the evening; None = tonight
    seeing_arcsec: float | None = None
    steadiness: float | None = None
    darkness: str = DEFAULT_DARKNESS
    catalog: str = "sample"
    minutes: float = DEFAULT_MINUTES
    limit: int | None = None         # pairs per scope; None = as many as the window holds
    challenges: bool = False
    start_local: str | None = None   # HH:MM, cut the window
    end_local: str | None = None
    min_alt_deg: float | None = None  # overrides the site's
    filters: dict = field(default_factory=dict)
    share_margin: float = 1.5         # club sharing: "comfortable" margin
    wide_factor: float | None = None  # close-double ceiling in Dawes limits (None: default 40, 0: none)
    calibration: str | None = None    # "mine": the chance curve fitted to the observation log
    skip_done: bool | None = None     # leave out pairs the log says this scope has split
    prefer_new: bool | None = None    # rank pairs never tried with this scope first

    def to_dict(self) -> dict:
        d = asdict(self)
        return {k: v for k, v in d.items() if v is not None and v != {}}

    @classmethod
    def from_dict(cls, d: dict) -> "NightRequest":
        """The request recorded in a plan file (a dict read from TOML).

        Every field is checked for its *shape* (a table, a list of tables, a
        number, a text, a true/false) before use, so a hand-edited file gives
        one line naming the field; values are then checked by the objects
        built from them."""
        from planner.errors import InputError

        if not isinstance(d, dict):
            raise InputError("a plan file must be a TOML document of key = value lines and tables")
        names = {f.name for f in fields(cls)}
        kw = {k: v for k, v in d.items() if k in names}
        if "site" not in kw or "scopes" not in kw:
            raise InputError("a plan file needs a [site] table and at least one [[scopes]] table")
        for k, v in kw.items():
            kw[k] = _shaped(k, v)
        return cls(**kw)


_SHAPE_TEXT = {"number": "a number", "integer": "a whole number, e.g. 20",
               "text": "a quoted text", "true/false": "true or false"}
_FIELD_SHAPES = {"site_name": "text", "date": "text", "seeing_arcsec": "number",
                 "steadiness": "number", "darkness": "text", "catalog": "text", "minutes": "number",
                 "limit": "integer", "challenges": "true/false", "start_local": "text",
                 "end_local": "text", "min_alt_deg": "number", "share_margin": "number"}
_FILTER_SHAPES = {"mag_max": "number", "mag2_max": "number", "dm_max": "number",
                  "sep_min_arcsec": "number", "sep_max_arcsec": "number", "ra_from_h": "number",
                  "ra_to_h": "number", "orbits_only": "true/false", "targets": "text"}


def _has_shape(v, shape: str) -> bool:
    if shape == "number":
        return isinstance(v, (int, float)) and not isinstance(v, bool)
    if shape == "integer":
        return isinstance(v, int) and not isinstance(v, bool)
    if shape == "true/false":
        return isinstance(v, bool)
    return isinstance(v, str)


def _shaped(key: str, v):
    """``v`` if it has the shape plan-file field ``key`` needs; a TOML date
    literal for ``date`` becomes its ISO text; else a one-line InputError."""
    import datetime as dt

    from planner.errors import InputError

    def bad(what: str):
        return InputError(f"plan file: {key} = {v!r} must be {what}")

    if v is None:
        return v
    if key == "site":
        if not isinstance(v, dict):
            raise bad("a [site] table with lat_deg, lon_deg, elevation_m and tz")
        return dict(v)
    if key == "scopes":
        if not isinstance(v, list) or not v or not all(isinstance(x, dict) for x in v):
            raise InputError(f"plan file: scopes must be one or more [[scopes]] tables "
                             f"(name, aperture_mm, obstruction), not {type(v).__name__} {v!r}"[:300])
        return [dict(x) for x in v]
    if key == "filters":
        if not isinstance(v, dict):
            raise bad("a [filters] table")
        out = {}
        for fk, fv in v.items():
            if fk == "constellations":
                if not (isinstance(fv, list) and all(isinstance(x, str) for x in fv)):
                    raise InputError(f"plan file: filters.constellations = {fv!r} must be a list of "
                                     'abbreviations, e.g. ["Oph", "Her"]')
            elif fk in _FILTER_SHAPES and fv is not None and not _has_shape(fv, _FILTER_SHAPES[fk]):
                raise InputError(f"plan file: filters.{fk} = {fv!r} must be {_SHAPE_TEXT[_FILTER_SHAPES[fk]]}")
            out[fk] = fv
        return out
    if key == "date" and isinstance(v, dt.date) and not isinstance(v, dt.datetime):
        return v.isoformat()
    shape = _FIELD_SHAPES.get(key)
    if shape is not None and not _has_shape(v, shape):
        raise bad(_SHAPE_TEXT[shape])
    return v


FILTER_KEYS = ("mag_max", "mag2_max", "dm_max", "sep_min_arcsec", "sep_max_arcsec",
               "constellations", "ra_from_h", "ra_to_h", "orbits_only", "targets")


@dataclass
class ScopePlan:
    name: str
    telescope: dict
    candidates: object = None        # DataFrame: every pair judged for this scope
    schedule: object = None          # DataFrame with SCHEDULE_COLUMNS
    n_split: int = 0
    n_challenge: int = 0
    summary: str = ""                # one line: what this scope splits / was given


@dataclass
class NightPlan:
    request: NightRequest
    version: str
    catalog_source: str
    catalog_retrieved: str
    night: dict                      # dark_start_utc, dark_end_utc, tz, moon_*, ...
    seeing_arcsec: float
    seeing_origin: str
    scopes: list[ScopePlan]
    matrix: object = None            # club matrix DataFrame (pairs x scopes) or None
    cautions: list[str] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)
    catalog_skipped: int = 0         # catalogue lines that could not be read
    targets: object = None           # with a target list: every listed name and what became of it
    session: object = None           # the resolved planner.plan.session.Session (site, telescopes, night)

    @property
    def schedule(self):
        """All scheduled rows of all scopes, in one table."""
        import pandas as pd

        parts = [s.schedule for s in self.scopes if s.schedule is not None and len(s.schedule)]
        if not parts:
            from planner.plan.night import empty_schedule

            return empty_schedule()
        return pd.concat(parts, ignore_index=True)
