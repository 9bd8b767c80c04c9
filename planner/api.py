"""The small public Python API of splitplan.

The four job-level functions are defined here; the main function of each layer
(``read_wds``, ``orbit_positions``, ``visibility``, ``required_separation_arcsec``,
``judge`` ...) can be imported from here as well.

Everything heavy is imported inside the functions, so ``import planner.api``
is cheap.  Example::

    from planner.api import plan_night, write_report
    plan = plan_night(site={"lat_deg": 47.1, "lon_deg": 8.2, "elevation_m": 600, "tz": "Europe/Zurich"},
                      scopes=[{"name": "4-inch", "aperture_mm": 102}], date="2026-12-02", seeing_arcsec=1.5)
    print(plan.schedule[["slot_local", "discoverer", "rho_arcsec", "margin"]])
    write_report(plan, "tonight.html")
"""

from __future__ import annotations

from planner import __version__
from planner.config.fields import DEFAULT_DARKNESS, DEFAULT_MINUTES, DEFAULT_SEEING_ARCSEC


def _site_mapping(site, tz=None) -> dict:
    """The site as the plan's mapping (``lat_deg``, ``lon_deg``, ``elevation_m``, ``tz`` ...) from a
    dict (astropy Quantity values converted by their key), an astropy ``EarthLocation`` (give
    ``tz``; UTC otherwise) or a :class:`planner.sky.Site`."""
    from planner.units import mapping_values

    if hasattr(site, "to_geodetic") and hasattr(site, "geodetic"):  # astropy EarthLocation
        g = site.to_geodetic()
        return {"lat_deg": float(g.lat.deg), "lon_deg": float(g.lon.deg),
                "elevation_m": float(g.height.to_value("m")), "tz": tz or "UTC"}
    if hasattr(site, "lat_deg") and hasattr(site, "tz"):  # a Site
        d = {k: getattr(site, k) for k in ("lat_deg", "lon_deg", "elevation_m", "tz", "min_alt_deg")}
        return dict(d, tz=tz or d["tz"])
    d = mapping_values(site)
    if tz:
        d["tz"] = tz
    return d


def _evening_date(date, tz):
    """The evening's local date (ISO text) from text, a ``datetime.date``/``datetime`` or an astropy
    ``Time``: an instant is taken in the site's zone, and before local noon it belongs to the
    previous evening (as the command line's "tonight")."""
    import datetime as dt

    if date is None or isinstance(date, str):
        return date
    if hasattr(date, "to_datetime") and hasattr(date, "jd"):  # astropy Time
        if getattr(date, "shape", ()) != ():
            from planner.errors import InputError

            raise InputError("date: give one astropy Time (the evening), not an array of them")
        date = date.utc.to_datetime(timezone=dt.timezone.utc)
    if isinstance(date, dt.datetime):
        from zoneinfo import ZoneInfo

        local = (date if date.tzinfo else date.replace(tzinfo=dt.timezone.utc)).astimezone(ZoneInfo(tz or "UTC"))
        if local.hour < 12:
            local = local - dt.timedelta(days=1)
        return local.date().isoformat()
    if isinstance(date, dt.date):
        return date.isoformat()
    return date


def plan_night(site, scopes, date=None, *, seeing_arcsec=None, steadiness=None, darkness=DEFAULT_DARKNESS,
               catalog="sample", minutes=DEFAULT_MINUTES, limit=None, challenges=False, filters=None, site_name="",
               start_local=None, end_local=None, min_alt_deg=None, share_margin=1.5, tz=None):
    """The night plan (a :class:`planner.plan.model.NightPlan`); see :mod:`planner.plan.night`.

    ``site``: dict with ``lat_deg``, ``lon_deg``, ``elevation_m``, ``tz`` (and
    optionally ``min_alt_deg``), or an astropy ``EarthLocation`` (with ``tz=``, else UTC);
    ``scopes``: a list of dicts with ``name``, ``aperture_mm``, ``obstruction``;
    ``date``: the evening (``YYYY-MM-DD``, a ``datetime.date``, or an astropy ``Time``/``datetime``
    instant, read in the site's zone; before noon: the previous evening); ``catalog``: a spec
    string or a loaded Catalog; ``limit``: pairs per scope (None: as many as the night holds).
    Numbers may be astropy Quantities (``aperture_mm=4 * u.imperial.inch``, ``seeing_arcsec=1.5 * u.arcsec``):
    converted to the unit of their name, or refused with one clear error.
    """
    from planner.plan.model import NightRequest
    from planner.plan.night import plan_night as _plan
    from planner.units import mapping_values, value_in

    cat = None
    spec = catalog
    if not isinstance(catalog, str):
        cat, spec = catalog, str(getattr(catalog, "source", "catalog object"))
    if isinstance(scopes, dict):
        scopes = [scopes]
    site = _site_mapping(site, tz)
    date = _evening_date(date, site.get("tz"))
    seeing_arcsec = value_in(seeing_arcsec, "arcsec", "seeing_arcsec")
    minutes = value_in(minutes, "min", "minutes")
    min_alt_deg = value_in(min_alt_deg, "deg", "min_alt_deg")
    filters = mapping_values(filters or {})
    req = NightRequest(site=dict(site), scopes=[mapping_values(s) for s in scopes], site_name=site_name, date=date,
                       seeing_arcsec=seeing_arcsec, steadiness=steadiness, darkness=darkness, catalog=spec,
                       minutes=minutes, limit=limit, challenges=challenges, filters=dict(filters or {}),
                       start_local=start_local, end_local=end_local, min_alt_deg=min_alt_deg,
                       share_margin=share_margin)
    return _plan(req, catalog=cat)


def check_pair(catalog, query, site, local_date=None, telescope=102.0, seeing_arcsec=DEFAULT_SEEING_ARCSEC, **kw):
    """Verdict, best time tonight and best dates of the year for one pair; see
    :func:`planner.plan.single.check_pair`."""
    from planner.plan.single import check_pair as _check
    from planner.units import mapping_values, value_in

    if not hasattr(site, "min_alt_deg") or hasattr(site, "to_geodetic"):
        site = _site_mapping(site, kw.pop("tz", None))
    local_date = _evening_date(local_date, site.get("tz") if isinstance(site, dict) else site.tz)
    if isinstance(telescope, dict):
        telescope = mapping_values(telescope)
    else:
        telescope = value_in(telescope, "mm", "telescope")
    return _check(catalog, query, site, local_date, telescope, value_in(seeing_arcsec, "arcsec", "seeing_arcsec"),
                  **kw)


def compare_apertures(site, apertures_mm, date=None, *, date_to=None, nights=4, obstruction=0.0,
                      seeing_arcsec=None, steadiness=None, darkness=DEFAULT_DARKNESS, catalog="sample",
                      minutes=DEFAULT_MINUTES, filters=None):
    """Pairs split per aperture (and what each step adds); see :mod:`planner.plan.apertures`."""
    from planner.plan.apertures import compare_apertures as _cmp
    from planner.plan.model import NightRequest

    from planner.units import value_in

    cat = None if isinstance(catalog, str) else catalog
    site = _site_mapping(site)
    date = _evening_date(date, site.get("tz"))
    apertures_mm = [value_in(a, "mm", "apertures_mm") for a in
                    (apertures_mm if not hasattr(apertures_mm, "unit") else value_in(apertures_mm, "mm", "apertures_mm"))]
    seeing_arcsec = value_in(seeing_arcsec, "arcsec", "seeing_arcsec")
    req = NightRequest(site=dict(site), scopes=[{"aperture_mm": float(min(apertures_mm)),
                                                 "obstruction": obstruction}], date=date,
                       seeing_arcsec=seeing_arcsec, steadiness=steadiness, darkness=darkness,
                       catalog=catalog if isinstance(catalog, str) else "object", minutes=minutes,
                       filters=dict(filters or {}))
    return _cmp(req, apertures_mm, date_to=date_to, nights=nights, catalog=cat)


def write_report(plan, path):
    """Write a plan as CSV, JSON, VOTable (.xml/.vot), HTML, PDF or text by the extension of ``path``."""
    from planner.report import write_report as _write

    return _write(plan, path)


# -- the observation log (docs/log.md) ------------------------------------------------------

def record_observation(logbook, query, *, site, telescope, when=None, seeing_arcsec=None, steadiness=None,
                       power=None, result, note="", site_name="", scope_name="", catalog="sample"):
    """Add one attempt to ``logbook`` (a :class:`planner.config.logbook.Logbook`) with the
    circumstances computed for that moment; see :func:`planner.plan.observations.record`."""
    from planner.plan.observations import record

    return record(logbook, query=query, site=site, telescope=telescope, when=when, seeing_arcsec=seeing_arcsec,
                  steadiness=steadiness, power=power, result=result, note=note, site_name=site_name,
                  scope_name=scope_name, catalog=catalog)


def record_observations(logbook, items, **kw):
    """Several attempts with one telescope at one site; see :func:`planner.plan.observations.record_many`."""
    from planner.plan.observations import record_many

    return record_many(logbook, items, **kw)


def fit_observations(logbook, per_scope=True, store=True):
    """Fit the split curve to the log (per telescope and pooled) and keep the fits in it;
    see :mod:`planner.plan.calibration`."""
    from planner.plan.observations import fit_and_store

    return fit_and_store(logbook, per_scope=per_scope, store=store)


def reliability_table(entries, calibration):
    """Observed split fraction against the chance given beforehand; see
    :func:`planner.plan.calibration.reliability_table`."""
    from planner.plan.calibration import reliability_table as _table

    return _table(entries, calibration)


def pair_report(query, catalog="sample", epoch_yr=None, *, precession="j2000", years=None, request=None,
                others=()):
    """Everything known about one pair at one epoch, as a
    :class:`~planner.plan.pair_report.PairReport` (see :mod:`planner.plan.pair_report`).

    ``query``: a star name, designation or WDS id (``"Albireo"``, ``"STF2272AB"``;
    docs/names.md), or a row label of ``catalog.pairs``; ``others``: row labels of the
    other pairs of the same name (listed in the report); ``catalog``: a spec string or a loaded Catalog; ``epoch_yr``: a
    Besselian year (None: now); ``years``: epochs for a table, or ``"FROM:TO[:STEP]"``;
    ``request``: a :class:`NightRequest` with the site, one telescope and the evening,
    for the verdict.  ``report.to_dict()`` is the JSON of ``splitplan pair --json``;
    :mod:`planner.report.pair` draws the text and the orbit plot.
    """
    from planner.catalogs import find_pair as _find
    from planner.catalogs import load_catalog as _load
    from planner.plan import pair_report as _pr

    cat = _load(catalog) if isinstance(catalog, str) else catalog
    label = query if not isinstance(query, str) and query in cat.pairs.index else _find(cat, str(query))
    epoch = _pr.resolve_epoch() if epoch_yr is None else float(epoch_yr)
    if isinstance(years, str):
        years = _pr.parse_years(years)
    return _pr.pair_report(cat, label, epoch, precession=precession, years=years, request=request,
                           others=others)


#: the layers underneath, importable from here too (loaded on first use)
_LAYERS = {
    "read_wds": "planner.catalogs", "read_orb6": "planner.catalogs", "load_sample": "planner.catalogs",
    "load_catalog": "planner.catalogs", "find_pair": "planner.catalogs",
    "orbit_positions": "planner.motion", "pair_geometry": "planner.motion",
    "Site": "planner.sky", "computer_tz": "planner.sky.site", "night_for": "planner.sky", "visibility": "planner.sky", "altaz": "planner.sky",
    "airmass": "planner.sky",
    "Telescope": "planner.optics", "rayleigh_limit_arcsec": "planner.optics",
    "dawes_limit_arcsec": "planner.optics", "sparrow_limit_arcsec": "planner.optics",
    "required_separation_arcsec": "planner.optics",
    "judge": "planner.verdict",
    # the night's inputs as the command line and plan files give them, and the jobs that take them
    "NightRequest": "planner.plan.model",
    "plan_request": "planner.plan.night:plan_night",
    "compare_request": "planner.plan.apertures:compare_apertures",
    "plot_aperture_counts": "planner.plan.apertures:plot_counts",
    "constellation_abbreviations": "planner.sky.constellations",
    "constellation_abbreviation": "planner.catalogs.constellations:constellation",
    # names (offline index; CDS SIMBAD only when asked)
    "find_pairs": "planner.catalogs", "pair_names": "planner.catalogs", "describe_name": "planner.catalogs",
    "find_pairs_online": "planner.catalogs.resolve",
    # one pair
    "PairReport": "planner.plan.pair_report", "resolve_epoch": "planner.plan.pair_report",
    "parse_years": "planner.plan.pair_report",
    # the observation log (docs/log.md)
    "scope_key": "planner.plan.calibration", "Calibration": "planner.plan.calibration",
    "last_attempts": "planner.plan.observations",
    # the local copy of the full catalogues (CDS VizieR)
    "fetch_vizier": "planner.catalogs.vizier:fetch", "import_catalog_files": "planner.catalogs.vizier:import_files",
    "vizier_snapshot": "planner.catalogs.vizier:current_snapshot",
    "vizier_folder": "planner.catalogs.vizier:snapshot_root",
}


def __getattr__(name):
    """``_LAYERS[name]`` is ``"module"`` (same name there) or ``"module:attribute"``."""
    spec = _LAYERS.get(name)
    if spec is None:
        raise AttributeError(f"module 'planner.api' has no attribute {name!r}")
    import importlib

    mod, _, attr = spec.partition(":")
    return getattr(importlib.import_module(mod), attr or name)


__all__ = ["plan_night", "check_pair", "compare_apertures", "write_report", "pair_report", "record_observation",
           "record_observations", "fit_observations", "reliability_table", *_LAYERS]
