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
        names = {f.name for f in fields(cls)}
        kw = {k: v for k, v in d.items() if k in names}
        if "site" not in kw or "scopes" not in kw:
            raise InputError("a plan file needs a [site] table and at least one [[scopes]] table")
        if not isinstance(kw["site"], dict):
            raise InputError(f"a plan file's site must be a [site] table, not {kw['site']!r}")
        if not isinstance(kw["scopes"], list) or not all(isinstance(s, dict) for s in kw["scopes"]):
            raise InputError("a plan file's telescopes must be [[scopes]] tables")
        if not isinstance(kw.get("filters", {}), dict):
            raise InputError("a plan file's filters must be a [filters] table")
        return cls(**kw)



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
