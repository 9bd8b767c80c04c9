"""The circumstances of one observation: what the planner computes for a pair at a given moment.

A log entry (:mod:`planner.config.logbook`) keeps, beside what the observer
saw, what the model said at that very instant, so that a later model can be
scored against the same log and the calibration (:mod:`planner.plan.calibration`)
can be fitted on ln(rho / limit):

* rho and theta at the instant (:func:`planner.motion.pair_geometry`);
* the pair's altitude there and then (:func:`planner.sky.placement.alt_az_at`,
  geometric) and its airmass (Pickering 2002, the sky engine's default);
* the verdict (:func:`planner.verdict.judge`) with that airmass and the
  seeing given: limit, margin, chance, the faintest visible magnitude.  The sky
  brightness is the site's moonless zenith value (twilight and moonlight are
  not taken into account for a logged moment).

Several entries at once (``log mark``) are computed in one vectorised call.
"""

from __future__ import annotations

import numpy as np
import pandas as pd


def model_version() -> str:
    """Which code computed the circumstances (stored with each entry)."""
    from planner import __version__

    return f"splitplan {__version__}; physical limit, dawes"


def circumstances(catalog, labels, site, telescope, when_utc, seeing_arcsec) -> list[dict]:
    """Per pair (index labels of ``catalog.pairs``): identity and the model's view at ``when_utc``.

    ``when_utc``: one instant or one per pair (numpy datetime64, UTC);
    ``seeing_arcsec``: FWHM at the zenith, one value or one per pair.
    Returns dicts with the identity (``wds_id``, ``components``, ``discoverer``)
    and the circumstance columns of :data:`planner.config.logbook.CIRCUMSTANCE_COLUMNS`
    (None where not known)."""
    from types import SimpleNamespace

    from planner.motion import pair_geometry
    from planner.motion.epochs import to_epoch_yr
    from planner.sky.atmosphere import airmass
    from planner.sky.placement import alt_az_at
    from planner.verdict import judge

    labels = list(labels)
    n = len(labels)
    rows = catalog.pairs.loc[labels].reset_index(drop=True)
    when = np.broadcast_to(np.asarray(when_utc, "datetime64[ns]"), (n,))
    seeing = np.broadcast_to(np.asarray(seeing_arcsec, float), (n,))
    orbits = getattr(catalog, "orbits", None)
    if orbits is not None and len(orbits):
        orbits = orbits[orbits["wds_id"].isin(set(rows["wds_id"]))]
    small = SimpleNamespace(pairs=rows, orbits=orbits, source=getattr(catalog, "source", ""))
    geo = pair_geometry(small, np.asarray(to_epoch_yr(when), float))
    geo = geo.reset_index(drop=True)
    ra = rows["ra_deg"].to_numpy(float)
    dec = rows["dec_deg"].to_numpy(float)
    alt, _az = alt_az_at(ra, dec, site, when)
    alt = np.asarray(alt, float)
    up = alt > 0
    x = np.full(n, np.nan)
    x[up] = airmass(alt[up])
    table = pd.DataFrame({"rho_arcsec": geo["rho_arcsec"].to_numpy(float),
                          "mag1": rows["mag1"].to_numpy(float), "mag2": rows["mag2"].to_numpy(float)})
    v = judge(table["rho_arcsec"].to_numpy(), table["mag1"].to_numpy(), table["mag2"].to_numpy(), x,
              telescope, seeing, sky_mag_arcsec2=float(getattr(site, "sky_mag_zenith", 21.0)))

    def num(val):
        try:
            f = float(val)
        except (TypeError, ValueError):
            return None
        return f if np.isfinite(f) else None

    m1, m2 = table["mag1"].to_numpy(), table["mag2"].to_numpy()
    faint = np.where(np.isfinite(m1) & np.isfinite(m2), np.fmax(m1, m2), m2)
    out = []
    version = model_version()
    for i in range(n):
        r = rows.iloc[i]
        comp = str(r.get("components") or "").strip()
        out.append({
            "wds_id": str(r["wds_id"]), "components": comp or None,
            "discoverer": str(r.get("discoverer") or "").strip() or None,
            "rho_arcsec": num(geo["rho_arcsec"].iat[i]), "theta_deg": num(geo["theta_deg"].iat[i]),
            "alt_deg": num(alt[i]), "airmass": num(x[i]), "seeing_used_arcsec": num(seeing[i]),
            "limit_arcsec": num(v["limit_arcsec"].iat[i]) if up[i] else None,
            "margin": num(v["margin"].iat[i]) if up[i] else None,
            "chance": num(v["chance"].iat[i]) if up[i] else None,
            "mag_limit": num(v["mag_limit"].iat[i]) if up[i] else None,
            "mag_faint": num(faint[i]),
            "model_version": version,
        })
    return out
