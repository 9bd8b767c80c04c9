"""Observing site and horizon profile.

A :class:`Site` is a frozen dataclass validated when it is made: every bad
value raises :class:`planner.errors.InputError` with one line naming the
value and what is allowed.

Conventions
-----------
* Latitude north positive, -90..+90 deg.
* Longitude EAST positive.  Both -180..+180 and 0..360 are accepted; values
  above 180 are folded to the -180..180 range (``lon_deg=350`` is stored
  as ``-10``).
* Elevation above sea level in metres, -500..9000 (the Dead Sea shore is
  -430 m; nobody observes above 9 km).
* ``tz``: an IANA zone name ("Europe/Paris", "America/Santiago", "UTC").
  The zone is used only to pick the night and to show local times;
  everything inside the package is UTC.
* ``min_alt_deg``: the lowest APPARENT altitude worth observing, 0..80 deg.
* ``pressure_hpa``: station pressure; if omitted it is derived from the
  elevation with the standard-atmosphere formula
  P = 1013.25 (1 - 2.25577e-5 h)^5.25588 hPa (ISO 2533 / U.S. Standard
  Atmosphere 1976; pvlib's ``alt2pres`` agrees to 1e-5).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from pathlib import Path

from planner.config.fields import DEFAULT_MIN_ALT_DEG, check, check_zone
from planner.errors import InputError
from planner.units import convert_fields

__all__ = ["Site", "Horizon"]


@dataclass(frozen=True)
class Horizon:
    """Local horizon profile: altitude (deg) of obstructions by azimuth (deg, N=0, E=90).

    Interpolated linearly and circularly in azimuth (the profile wraps from
    the last point back to the first through 360 deg).
    """

    az_deg: tuple[float, ...]
    alt_deg: tuple[float, ...]
    source: str = ""

    def __post_init__(self):
        if len(self.az_deg) != len(self.alt_deg) or len(self.az_deg) == 0:
            raise InputError("horizon profile needs at least one (azimuth, altitude) point")
        for a, h in zip(self.az_deg, self.alt_deg):
            if not (math.isfinite(a) and math.isfinite(h)) or not (-90.0 <= h <= 90.0):
                raise InputError(f"horizon point ({a}, {h}) is invalid; altitude must be -90 to 90 deg")

    @classmethod
    def from_points(cls, points, source: str = "") -> "Horizon":
        """Build from ``[(az_deg, alt_deg), ...]``; azimuths are taken modulo 360 and sorted."""
        pts = sorted(((float(a) % 360.0, float(h)) for a, h in points), key=lambda p: p[0])
        if not pts:
            raise InputError("horizon profile needs at least one (azimuth, altitude) point")
        return cls(tuple(p[0] for p in pts), tuple(p[1] for p in pts), source)

    @classmethod
    def read(cls, path) -> "Horizon":
        """Read a two-column text file: ``azimuth altitude`` per line, degrees.

        ``#`` starts a comment; blank lines are ignored; columns are split on
        white space or a comma.  A bad line raises InputError naming the file
        and line number.
        """
        from planner.config.storage import read_user_file, user_path

        p = user_path(path)
        try:
            text = read_user_file(p, "horizon file", "horizon").decode("utf-8-sig")
        except UnicodeDecodeError:
            raise InputError(f"horizon file {str(p)!r} is not UTF-8 text") from None
        points = []
        for no, raw in enumerate(text.splitlines(), start=1):
            line = raw.split("#", 1)[0].replace(",", " ").strip()
            if not line:
                continue
            parts = line.split()
            if len(parts) != 2:
                raise InputError(f"{p.name} line {no}: expected two numbers 'azimuth altitude', got {raw.strip()!r}")
            try:
                az, alt = float(parts[0]), float(parts[1])
            except ValueError:
                raise InputError(f"{p.name} line {no}: expected two numbers 'azimuth altitude', got {raw.strip()!r}") from None
            if not (math.isfinite(az) and -360.0 <= az <= 720.0):
                raise InputError(f"{p.name} line {no}: azimuth {parts[0]} must be 0 to 360 deg")
            if not (math.isfinite(alt) and -10.0 <= alt <= 90.0):
                raise InputError(f"{p.name} line {no}: altitude {parts[1]} must be -10 to 90 deg")
            points.append((az, alt))
        if not points:
            raise InputError(f"horizon file {p.name} has no 'azimuth altitude' lines")
        return cls.from_points(points, source=str(p))

    def alt_at(self, az_deg):
        """Obstruction altitude (deg) at azimuth(s) ``az_deg``, circular linear interpolation."""
        import numpy as np

        az = np.asarray(self.az_deg, dtype=float)
        alt = np.asarray(self.alt_deg, dtype=float)
        if az.size == 1:
            return np.full(np.shape(az_deg), alt[0])
        return np.interp(np.mod(np.asarray(az_deg, dtype=float), 360.0), az, alt, period=360.0)

    @property
    def max_alt_deg(self) -> float:
        return max(self.alt_deg)


@dataclass(frozen=True)
class Site:
    """An observing site.  See the module docstring for conventions."""

    lat_deg: float
    lon_deg: float
    elevation_m: float = 0.0
    tz: str = "UTC"
    min_alt_deg: float = DEFAULT_MIN_ALT_DEG
    horizon: Horizon | None = None
    pressure_hpa: float | None = None
    temperature_c: float = 10.0
    name: str = ""
    #: Zenith brightness of the moonless, dark sky at the site (V mag/arcsec^2).
    #: 21.0 is a typical rural amateur site (common practice, no source);
    #: measure it with a sky-quality meter and set it.
    sky_mag_zenith: float = 21.0
    #: V-band extinction coefficient (mag/airmass): 0.2 "good" (Schaefer 1985,
    #: quoted by Green 1992, ICQ 14, 55).
    extinction_k: float = 0.2
    _zone: object = field(default=None, init=False, repr=False, compare=False)

    def __post_init__(self):
        convert_fields(self)  # astropy Quantity fields (52 * u.deg, 95 * u.m) to the unit of their name
        set_ = object.__setattr__
        for key in ("lat_deg", "lon_deg", "elevation_m", "min_alt_deg", "temperature_c", "sky_mag_zenith",
                    "extinction_k"):
            set_(self, key, float(check(key, getattr(self, key))))
        if self.lon_deg > 180.0:
            set_(self, "lon_deg", self.lon_deg - 360.0)
        if self.pressure_hpa is None:
            from planner.sky.atmosphere import pressure_from_elevation_hpa

            set_(self, "pressure_hpa", float(pressure_from_elevation_hpa(self.elevation_m)))
        else:
            set_(self, "pressure_hpa", float(check("pressure_hpa", self.pressure_hpa)))
        if self.horizon is not None and not isinstance(self.horizon, Horizon):
            if isinstance(self.horizon, (str, Path)):
                set_(self, "horizon", Horizon.read(self.horizon))
            else:
                set_(self, "horizon", Horizon.from_points(self.horizon))
        set_(self, "_zone", _zone_for(self.tz))
        set_(self, "name", str(self.name))

    @classmethod
    def from_mapping(cls, d, name: str = "") -> "Site":
        """Build a site from a profile, plan-file or command-line mapping.

        Keys: ``lat_deg``, ``lon_deg``, ``elevation_m``, ``tz``, ``min_alt_deg``,
        ``horizon_file`` (path of a horizon profile) and optionally ``name``; other
        keys (``note``) are ignored.  ``name`` wins over ``d["name"]``."""
        kw = {k: d[k] for k in ("lat_deg", "lon_deg", "elevation_m", "tz", "min_alt_deg") if d.get(k) is not None}
        if d.get("horizon_file"):
            kw["horizon"] = d["horizon_file"]
        return cls(name=name or d.get("name", ""), **kw)

    @property
    def zone(self):
        """The :class:`zoneinfo.ZoneInfo` of ``tz``."""
        return self._zone

    def limit_alt_deg(self, az_deg):
        """Lowest usable apparent altitude at azimuth(s): max(min_alt, horizon profile)."""
        import numpy as np

        if self.horizon is None:
            return np.full(np.shape(az_deg), self.min_alt_deg)
        return np.maximum(self.min_alt_deg, self.horizon.alt_at(az_deg))

    def local_time(self, when_utc):
        """UTC instant(s) (datetime64, ISO text or pandas) as aware local times (pandas).

        Daylight saving follows the IANA zone.  Returns a ``pandas.Timestamp``
        for a scalar and a ``DatetimeIndex`` for arrays; NaT stays NaT.
        """
        import pandas as pd

        if pd.api.types.is_scalar(when_utc) or isinstance(when_utc, str):
            ts = pd.Timestamp(when_utc)
            if ts is pd.NaT:
                return ts
            return (ts.tz_localize("UTC") if ts.tzinfo is None else ts).tz_convert(self.tz)
        idx = pd.DatetimeIndex(when_utc)
        idx = idx.tz_localize("UTC") if idx.tz is None else idx
        return idx.tz_convert(self.tz)

    def format_local(self, when_utc, fmt: str = "%Y-%m-%d %H:%M %Z") -> str:
        """One UTC instant as local clock text, e.g. ``2026-03-29 03:10 CEST`` ('-' for NaT)."""
        ts = self.local_time(when_utc)
        import pandas as pd

        if ts is pd.NaT:
            return "-"
        return ts.strftime(fmt)


def computer_tz() -> str:
    """The IANA name of this computer's own time zone (the ``TZ`` variable, else the target of
    ``/etc/localtime``), or ``"UTC"`` when it cannot be told.  Used when no zone is given, so the
    times shown are the observer's clock and are labelled with the zone's name."""
    import os
    from zoneinfo import ZoneInfo

    cands = []
    tz = os.environ.get("TZ", "").strip().lstrip(":")
    if tz:
        cands.append(tz)
    try:
        real = os.path.realpath("/etc/localtime")
        if "zoneinfo/" in real:
            cands.append(real.split("zoneinfo/", 1)[1])
    except OSError:
        pass
    for c in cands:
        try:
            ZoneInfo(c)
            return c
        except Exception:  # not an IANA name (e.g. a POSIX TZ string)
            continue
    return "UTC"


def _zone_for(name):
    from zoneinfo import ZoneInfo

    return ZoneInfo(check_zone(name))
