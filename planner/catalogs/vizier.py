"""The WDS and ORB6 catalogues from CDS VizieR, kept as a local snapshot.

``fetch()`` downloads the whole of ``B/wds/wds`` and the orbit table of
``B/orb6`` with astroquery (``Vizier(columns=["**"], row_limit=-1)``: every
column, no silent 50-row default), checks that each reply is a complete
VOTable (it must parse; VizieR's ``QUERY_STATUS = OVERFLOW`` or fewer rows
than the table announces means truncated), maps the columns to our schema,
and only then stores the raw VOTables as a new versioned snapshot in
``user_dir('data')/vizier/<stamp>/`` with a ``current.json`` pointer (source,
download date, row counts), written atomically.  A failed update leaves the
previous snapshot in place.  Later runs read the snapshot (through the
parse cache of :mod:`planner.catalogs.cache`); they never go online on their
own.

No network (connection error, time-out, HTTP error, truncated VOTable) is
one line, :class:`planner.errors.NetworkError`; :func:`load_vizier` then
falls back to the snapshot or to the bundled sample and says which on
stderr.

VizieR column labels of ``B/wds/wds`` are checked against the CDS
byte-by-byte description of the file ``wds.dat`` of B/wds (:data:`CDS_WDS_LABELS`;
docs/catalogs.md): WDS, Disc, Comp, Obs1, Obs2, Nobs, pa1, pa2, sep1, sep2,
mag1, mag2, SpType, pmRA1, pmDE1, pmRA2, pmDE2, DM, Notes, n_RAh ('!' = position
derived from the WDS id) and the J2000 position, which VizieR serves as
``RAJ2000``/``DEJ2000`` (its computed ``_RAJ2000``/``_DEJ2000`` also accepted).
The DM numbers are kept (``dm_id``) for the name index.  The labels of the
``B/orb6`` orbit table are **unconfirmed** (no CDS description of B/orb6 was
found): each ORB6 field has a list of candidate labels; a field none of them
matches stays empty, and :func:`fetch` reports which fields were missing.  The
live test checks the labels against the service.

Downloads go through astroquery's public API only
(``Vizier.get_catalogs_async``, with astroquery's cache switched off through
``astroquery.cache_conf``); while they run, a progress line on stderr (only
when stderr is a terminal) shows the stage and the time elapsed.

Acknowledgement: this uses the VizieR catalogue access tool, CDS,
Strasbourg, France, and the WDS and ORB6 catalogues maintained at the US
Naval Observatory.
"""

from __future__ import annotations

import io
import json
import sys
import warnings
from datetime import datetime, timezone
from pathlib import Path

import numpy as np
import pandas as pd

from planner.catalogs.catalog import Catalog, empty_table, merge, note
from planner.catalogs.orb6 import AXIS_FACTORS, PERIOD_FACTORS, mark_preferred, split_designation
from planner.utc import TROPICAL_YEAR_D, besselian_year_from_jd
from planner.config.storage import atomic_write_bytes, atomic_write_text, user_dir
from planner.catalogs._fixed import user_path as _user_path
from planner.errors import CatalogError, NetworkError
from planner.schema import ORBIT_COLUMNS, PAIR_COLUMNS

WDS_CATALOG = "B/wds"
WDS_TABLE = "B/wds/wds"
ORB6_CATALOG = "B/orb6"
SNAPSHOT_VERSION = 1
#: smallest plausible full downloads (the WDS holds ~157,000 pairs, ORB6 ~3,000 orbits)
MIN_ROWS = {"wds": 100_000, "orb6": 2_000}
TIMEOUT_S = 120

#: our field -> candidate VizieR labels (first present wins); see the module notes
#: the labels of the CDS byte-by-byte description of B/wds file wds.dat (docs/catalogs.md)
CDS_WDS_LABELS = ("WDS", "Disc", "Comp", "Obs1", "Obs2", "Nobs", "pa1", "pa2", "sep1", "sep2",
                  "mag1", "mag2", "SpType", "pmRA1", "pmDE1", "pmRA2", "pmDE2", "DM", "Notes",
                  "n_RAh", "RAh", "RAm", "RAs", "DE-", "DEd", "DEm", "DEs")
#: how VizieR serves the sexagesimal J2000 position (RAh..DEs) and its own computed position
VIZIER_POSITION_LABELS = ("RAJ2000", "DEJ2000", "_RAJ2000", "_DEJ2000")

WDS_LABELS = {
    "wds_id": ["WDS"], "discoverer": ["Disc"], "components": ["Comp"],
    "year_first": ["Obs1"], "year_last": ["Obs2"],
    "n_obs": ["Nobs"], "pa_first_deg": ["pa1"], "pa_last_deg": ["pa2"],
    "sep_first_arcsec": ["sep1"], "sep_last_arcsec": ["sep2"],
    "mag1": ["mag1"], "mag2": ["mag2"],
    "mag1_flag": [], "mag2_flag": [],  # no magnitude-flag column in the CDS description: left empty
    "spectral_type": ["SpType"],
    "pm1_ra_masyr": ["pmRA1"], "pm1_dec_masyr": ["pmDE1"],
    "pm2_ra_masyr": ["pmRA2"], "pm2_dec_masyr": ["pmDE2"],
    "dm_id": ["DM"], "note_flags": ["Notes"], "coord_flag": ["n_RAh"],
    "ra": ["RAJ2000", "_RAJ2000"], "dec": ["DEJ2000", "_DEJ2000"],
}
ORB6_LABELS = {
    "wds_id": ["WDS"], "name": ["Disc", "DD", "Name"], "components": ["Comp"],
    "ads": ["ADS"], "hd": ["HD"], "hip": ["HIP"],
    "mag1": ["mag1", "V1"], "mag2": ["mag2", "V2"],
    "mag1_flag": ["n_mag1", "f_mag1"], "mag2_flag": ["n_mag2", "f_mag2"],
    "period": ["Per", "P"], "period_unit": ["u_Per", "n_Per", "x_Per"], "period_err": ["e_Per", "e_P"],
    "a": ["Axis", "a"], "a_unit": ["u_Axis", "n_Axis", "x_Axis"], "a_err": ["e_Axis", "e_a"],
    "incl": ["Incl", "i"], "incl_err": ["e_Incl", "e_i"],
    "node": ["Node", "Omega"], "node_flag": ["n_Node", "f_Node"], "node_err": ["e_Node", "e_Omega"],
    "t_peri": ["T0", "T"], "t_peri_unit": ["u_T0", "n_T0", "x_T0"], "t_peri_err": ["e_T0", "e_T"],
    "ecc": ["e", "Ecc"], "ecc_err": ["e_e", "e_Ecc"],
    "omega": ["omega", "w", "Omeg"], "omega_flag": ["n_omega", "f_omega"],
    "omega_err": ["e_omega", "e_w"],
    "equinox": ["Eq", "Equinox", "Eqnx"], "year_last_obs": ["Last", "LastObs", "Obs"],
    "grade": ["Grade", "Gr"], "notes_flag": ["n_WDS", "Note"], "reference": ["Ref", "Reference"],
    "plot_file": ["Png", "File"],
    "ra": ["RAJ2000", "_RAJ2000"], "dec": ["DEJ2000", "_DEJ2000"],
}


# -- column helpers -------------------------------------------------------------


def _pick(table, labels):
    for lab in labels:
        if lab in table.colnames:
            return table[lab]
    return None


def _num(table, labels, n) -> np.ndarray:
    col = _pick(table, labels)
    if col is None:
        return np.full(n, np.nan)
    try:
        data = np.ma.filled(np.ma.asarray(col).astype(float), np.nan)
    except (TypeError, ValueError):
        data = pd.to_numeric(pd.Series(_txt(table, labels, n)), errors="coerce").to_numpy(float)
    return np.asarray(data, dtype=float)


def _txt(table, labels, n, collapse: bool = True) -> np.ndarray:
    col = _pick(table, labels)
    if col is None:
        return np.full(n, "", dtype=object)
    vals = np.ma.asarray(col)
    if vals.dtype.kind in "fiu":
        out = np.where(np.ma.getmaskarray(vals), "", vals.astype(str))
        return out.astype(object)
    filled = np.ma.filled(vals.astype(str), "")
    s = pd.Series(filled).str.rstrip()
    if collapse:
        s = s.str.strip().str.replace(r"\s+", " ", regex=True)
    return s.to_numpy(object)


def _angles(table, ra_labels, dec_labels, n):
    """RA/Dec in degrees from VizieR columns given in degrees or as sexagesimal text."""
    ra_c, dec_c = _pick(table, ra_labels), _pick(table, dec_labels)
    if ra_c is None or dec_c is None:
        return np.full(n, np.nan), np.full(n, np.nan)
    if np.ma.asarray(ra_c).dtype.kind in "fiu":
        ra = _num(table, ra_labels, n)
        dec = _num(table, dec_labels, n)
        unit = str(getattr(ra_c, "unit", "") or "")
        if unit.startswith("h"):
            ra = ra * 15.0
        return ra, dec
    from astropy.coordinates import Angle

    rs = pd.Series(np.ma.filled(np.ma.asarray(ra_c).astype(str), "")).str.strip()
    ds = pd.Series(np.ma.filled(np.ma.asarray(dec_c).astype(str), "")).str.strip()
    ok = (rs != "") & (ds != "")
    ra, dec = np.full(n, np.nan), np.full(n, np.nan)
    if ok.any():
        ra[ok.to_numpy()] = Angle(rs[ok].tolist(), unit="hourangle").deg
        dec[ok.to_numpy()] = Angle(ds[ok].tolist(), unit="deg").deg
    return ra, dec


def _missing(table, labels: dict) -> list[str]:
    return [k for k, labs in labels.items() if labs and not any(lab in table.colnames for lab in labs)]


# -- mapping --------------------------------------------------------------------


def wds_from_table(table) -> pd.DataFrame:
    """The pair table from a VizieR B/wds/wds table (``source`` = 'vizier-wds')."""
    from planner.catalogs import _fixed as fx

    n = len(table)
    out = {}
    for c in PAIR_COLUMNS:
        if c.name in WDS_LABELS:
            out[c.name] = (_num(table, WDS_LABELS[c.name], n) if c.dtype == "float"
                           else _txt(table, WDS_LABELS[c.name], n))
    ids = pd.Series(out["wds_id"]).astype(str)
    ok = ids.str.fullmatch(r"\d{5}[+-]\d{4}").to_numpy(bool)
    arr = fx.to_array([s.encode("ascii", "replace") for s in ids.where(ok, "00000+0000")], 10)
    ok = ok & fx.wds_id_ok(arr)
    ra_id, dec_id = fx.wds_id_coords(arr)
    # an id that is not a real position gives no position (never 0h +0 deg, never Dec > 90)
    ra_id, dec_id = np.where(ok, ra_id, np.nan), np.where(ok, dec_id, np.nan)
    ra, dec = _angles(table, WDS_LABELS["ra"], WDS_LABELS["dec"], n)
    # n_RAh = '!': the catalogue's position was itself derived from the WDS id
    from_id = pd.Series(_txt(table, WDS_LABELS["coord_flag"], n)).astype(str).str.strip() == "!"
    precise = np.isfinite(ra) & np.isfinite(dec) & ~from_id.to_numpy(bool)
    out["ra_deg"] = np.where(precise, ra, ra_id)
    out["dec_deg"] = np.where(precise, dec, dec_id)
    out["coord_precise"] = precise
    out["discoverer"] = pd.Series(out["discoverer"]).astype(str).str.replace(
        r"^([A-Za-z]{1,4}) ?(\d+)$", r"\1 \2", regex=True).to_numpy(object)
    out["components"] = pd.Series(out["components"]).astype(str).str.replace(" ", "").to_numpy(object)
    out["has_orbit"] = np.zeros(n, bool)
    out["source"] = np.full(n, "vizier-wds", dtype=object)
    out["line_no"] = np.arange(1, n + 1, dtype=float)  # row number in the VizieR table
    df = pd.DataFrame({c.name: out.get(c.name, np.full(n, np.nan)) for c in PAIR_COLUMNS})
    for c in PAIR_COLUMNS:
        if c.dtype == "str":
            df[c.name] = df[c.name].astype(str)
    df = df[ok].reset_index(drop=True)
    df.attrs["problems"] = [(int(i) + 1, "WDS id is not HHMMm+DDMM") for i in np.flatnonzero(~ok)]
    return df


def orb6_from_table(table) -> pd.DataFrame:
    """The orbit table from a VizieR B/orb6 orbit table (labels unconfirmed, see notes)."""
    n = len(table)
    L = ORB6_LABELS

    def num(k):
        return _num(table, L[k], n)

    def txt(k):
        return pd.Series(_txt(table, L[k], n)).astype(str)

    def col_unit(k):
        c = _pick(table, L[k])
        return str(getattr(c, "unit", "") or "") if c is not None else ""

    p_unit, a_unit, t_unit = txt("period_unit"), txt("a_unit"), txt("t_peri_unit")
    # factors from the unit code when VizieR carries it, else from the column's unit
    from astropy import units as u

    def unit_factor(k, target):
        un = col_unit(k)
        try:
            return u.Unit(un).to(target) if un else 1.0
        except Exception:
            return 1.0

    pf = p_unit.map(PERIOD_FACTORS).to_numpy(float)
    pf = np.where(np.isnan(pf), unit_factor("period", u.yr) * (365.25 / TROPICAL_YEAR_D
                                                               if col_unit("period") == "d" else 1.0), pf)
    af = a_unit.map(AXIS_FACTORS).to_numpy(float)
    af = np.where(np.isnan(af), unit_factor("a", u.arcsec), af)
    t_raw, t_err = num("t_peri"), num("t_peri_err")
    t_code = t_unit.to_numpy(str)
    t_col_unit = col_unit("t_peri")
    if not (t_code != "").any() and t_col_unit in ("d", "JD"):
        t_code = np.full(n, "d")
    jd = np.where(t_raw > 1e6, t_raw, t_raw + 2400000.0)
    t_yr = np.select([t_code == "d", t_code == "m", t_code == "c"],
                     [besselian_year_from_jd(jd), besselian_year_from_jd(t_raw + 2400000.5), t_raw * 100.0],
                     default=t_raw)
    t_ef = np.select([(t_code == "d") | (t_code == "m"), t_code == "c"],
                     [1.0 / TROPICAL_YEAR_D, 100.0], default=1.0)
    names = pd.Series(_txt(table, L["name"], n, collapse=False)).astype(str)
    comp = txt("components")
    if not (comp != "").any():  # the designation carries the components, as in the text file
        raw = names.str.ljust(14)
        c37 = np.array([ord(s[6]) if len(s) > 6 else 32 for s in raw], dtype=np.uint8)
        c38 = np.array([ord(s[7]) if len(s) > 7 else 32 for s in raw], dtype=np.uint8)
        disc, comp = split_designation(raw.str.rstrip(), c37, c38, raw.str.slice(7).str.strip())
    else:
        disc = names.str.strip().str.replace(r"\s+", " ", regex=True).str.replace(
            r"^([A-Za-z]{1,4}) ?(\d+)$", r"\1 \2", regex=True)
    ra, dec = _angles(table, L["ra"], L["dec"], n)
    df = pd.DataFrame({
        "wds_id": txt("wds_id"), "discoverer": disc.to_numpy(str),
        "components": comp.str.replace(" ", "").to_numpy(str), "reference": txt("reference"),
        "grade": num("grade"), "period_yr": num("period") * pf, "a_arcsec": num("a") * af,
        "incl_deg": num("incl"), "node_deg": num("node"), "t_peri_yr": t_yr, "ecc": num("ecc"),
        "omega_deg": num("omega"), "equinox": num("equinox"), "ra_deg": ra, "dec_deg": dec,
        "mag1": num("mag1"), "mag2": num("mag2"), "mag1_flag": txt("mag1_flag"),
        "mag2_flag": txt("mag2_flag"), "ads": num("ads"), "hd": txt("hd"), "hip": txt("hip"),
        "period_unit": p_unit, "a_unit": a_unit, "t_peri_unit": pd.Series(t_code),
        "node_flag": txt("node_flag"), "omega_flag": txt("omega_flag"),
        "period_err_yr": num("period_err") * pf, "a_err_arcsec": num("a_err") * af,
        "incl_err_deg": num("incl_err"), "node_err_deg": num("node_err"),
        "t_peri_err_yr": t_err * t_ef, "ecc_err": num("ecc_err"), "omega_err_deg": num("omega_err"),
        "year_last_obs": num("year_last_obs"), "notes_flag": txt("notes_flag"),
        "plot_file": txt("plot_file"),
    })
    elems = df[["period_yr", "a_arcsec", "incl_deg", "node_deg", "t_peri_yr", "ecc", "omega_deg"]]
    df["complete"] = (elems.notna().all(axis=1) & (df["period_yr"] > 0) & (df["ecc"] >= 0)
                      & (df["ecc"] < 1)).astype(bool)
    df["line_no"] = np.arange(1, n + 1, dtype=float)
    ok = df["wds_id"].str.fullmatch(r"\d{5}[+-]\d{4}").to_numpy(bool)
    from planner.catalogs import _fixed as fx

    ok = ok & fx.wds_id_ok(fx.to_array([s.encode("ascii", "replace") for s in df["wds_id"].where(ok, "00000+0000")], 10))
    problems = [(int(i) + 1, "WDS id is not HHMMm+DDMM") for i in np.flatnonzero(~ok)]
    df = df[ok].reset_index(drop=True)
    df["preferred"] = mark_preferred(df)
    df = df[[c.name for c in ORBIT_COLUMNS]]
    for c in ORBIT_COLUMNS:
        if c.dtype == "str":
            df[c.name] = df[c.name].astype(str)
    df.attrs["problems"] = problems
    return df


# -- VOTable bytes ----------------------------------------------------------------


def parse_votable(data: bytes, what: str):
    """Tables of a VizieR VOTable reply as ``{name: astropy Table}``; a reply that
    does not parse, reports an overflow or holds fewer rows than it announces
    raises :class:`NetworkError` (a truncated download)."""
    from astropy.io import votable

    if not data.lstrip()[:5] == b"<?xml" and b"<VOTABLE" not in data[:2000]:
        raise NetworkError(f"VizieR reply for {what} is not a VOTable (got {data[:40]!r}...)")
    if b'name="QUERY_STATUS" value="OVERFLOW"' in data:
        raise NetworkError(f"VizieR reply for {what} was cut at the row limit (OVERFLOW)")
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            tree = votable.parse(io.BytesIO(data), verify="ignore", invalid="exception")
    except Exception as exc:
        raise NetworkError(f"VizieR reply for {what} is incomplete or damaged "
                           f"({type(exc).__name__}: {str(exc).splitlines()[0][:120]})") from None
    out = {}
    for t in tree.iter_tables():
        nrows = getattr(t, "nrows", None)
        if nrows is not None and len(t.array) < int(nrows):
            raise NetworkError(f"VizieR reply for {what} holds {len(t.array)} of {nrows} rows "
                               "(truncated download)")
        out[t.name or t.ID] = t.to_table(use_names_over_ids=True)
    if not out:
        raise NetworkError(f"VizieR reply for {what} holds no table")
    return out


def _choose_orb6(tables: dict):
    """The orbit table among the tables of B/orb6: a name ending in 'orb6' or
    holding 'orbit', else the largest table with a period-like column."""
    names = list(tables)
    for nm in names:
        base = nm.rsplit("/", 1)[-1].lower()
        if base == "orb6" or "orbit" in base:
            return nm
    cands = [nm for nm in names if any(lab in tables[nm].colnames for lab in ORB6_LABELS["period"])]
    if not cands:
        raise CatalogError(f"no orbit table found in VizieR {ORB6_CATALOG} (tables: {', '.join(names)})")
    return max(cands, key=lambda nm: len(tables[nm]))


# -- network ----------------------------------------------------------------------


def _progress(msg: str) -> None:
    if sys.stderr.isatty():
        print(f"splitplan: {msg}", file=sys.stderr, flush=True)


class _Progress:
    """A progress line on stderr while a download runs, redrawn every half second:
    the stage bar (``[##--] 1/2``), what is being fetched and the seconds elapsed.
    Nothing is printed when stderr is not a terminal."""

    def __init__(self, stage: int, stages: int, what: str, stream=None):
        self.stage, self.stages, self.what = stage, stages, what
        self.stream = stream or sys.stderr
        self.active = bool(getattr(self.stream, "isatty", lambda: False)())
        self._stop = None
        self._thread = None

    def _line(self, elapsed: float, done: bool = False) -> str:
        width = 20
        filled = int(width * (self.stage - (0 if done else 1)) / self.stages)
        bar = "#" * filled + "-" * (width - filled)
        state = "done" if done else "downloading"
        return f"\rsplitplan: [{bar}] {self.stage}/{self.stages} {state} {self.what} {elapsed:5.0f} s"

    def __enter__(self):
        if not self.active:
            return self
        import threading
        import time

        self._t0 = time.monotonic()
        self._stop = threading.Event()

        def run():
            while not self._stop.wait(0.5):
                self.stream.write(self._line(time.monotonic() - self._t0))
                self.stream.flush()

        self._thread = threading.Thread(target=run, daemon=True)
        self._thread.start()
        return self

    def __exit__(self, *exc):
        if not self.active:
            return False
        import time

        self._stop.set()
        self._thread.join()
        self.stream.write(self._line(time.monotonic() - self._t0, done=exc[0] is None) + "\n")
        self.stream.flush()
        return False


def download(catalog: str, stage: int = 1, stages: int = 1) -> bytes:
    """Raw VOTable bytes of every row and column of a VizieR catalogue, through
    astroquery's public ``Vizier.get_catalogs_async`` (astroquery's cache off)."""
    try:
        from contextlib import nullcontext

        from astroquery.vizier import Vizier

        try:
            from astroquery import cache_conf

            no_cache = cache_conf.set_temp("cache_active", False)
        except ImportError:  # astroquery before cache_conf: the call below does not cache
            no_cache = nullcontext()
        viz = Vizier(columns=["**"], row_limit=-1, catalog=catalog)
        viz.TIMEOUT = TIMEOUT_S
        with no_cache, _Progress(stage, stages, catalog):
            resp = viz.get_catalogs_async(catalog)
        resp.raise_for_status()
        return resp.content
    except NetworkError:
        raise
    except Exception as exc:  # connection refused, time-out, DNS, HTTP status, blocked socket
        raise NetworkError(f"cannot reach CDS VizieR for {catalog} ({_why(exc)}); "
                           "check the connection, or use the bundled sample") from None


def _why(exc: Exception) -> str:
    """A short reason for a failed request: the HTTP status, or the error's kind."""
    resp = getattr(exc, "response", None)
    status = getattr(resp, "status_code", None)
    if status is not None:
        return f"HTTP {status}"
    first = (str(exc).splitlines() or [""])[0]
    name = type(exc).__name__
    return f"{name}: {first}" if first and len(first) <= 80 else name


def fetch(store: bool = True) -> Catalog:
    """Download B/wds/wds and the B/orb6 orbit table, check them, store them as a
    new snapshot (the previous one stays if anything fails) and return the catalogue."""
    _progress(f"downloading {WDS_TABLE} from CDS VizieR (all rows; about 20 MB)...")
    wds_bytes = download(WDS_CATALOG, 1, 2)
    wds_tables = parse_votable(wds_bytes, WDS_TABLE)
    wname = WDS_TABLE if WDS_TABLE in wds_tables else max(wds_tables, key=lambda k: len(wds_tables[k]))
    _progress(f"{len(wds_tables[wname])} rows of {wname}; downloading {ORB6_CATALOG}...")
    orb_bytes = download(ORB6_CATALOG, 2, 2)
    orb_tables = parse_votable(orb_bytes, ORB6_CATALOG)
    oname = _choose_orb6(orb_tables)
    counts = {"wds": len(wds_tables[wname]), "orb6": len(orb_tables[oname])}
    for k, nmin in MIN_ROWS.items():
        if counts[k] < nmin:
            raise NetworkError(f"VizieR gave only {counts[k]} rows for {k.upper()} (expected at "
                               f"least {nmin}); the download looks incomplete, snapshot not updated")
    wds = wds_from_table(wds_tables[wname])
    orb = orb6_from_table(orb_tables[oname])
    missing = {"wds": _missing(wds_tables[wname], WDS_LABELS),
               "orb6": _missing(orb_tables[oname], ORB6_LABELS)}
    today = datetime.now(timezone.utc).date().isoformat()
    meta = {"version": SNAPSHOT_VERSION, "source": f"CDS VizieR {wname} + {oname}",
            "retrieved": today, "rows": counts, "tables": {"wds": wname, "orb6": oname},
            "missing_fields": missing,
            "files": {"wds": {"name": "wds.vot", "format": "votable", "table": wname},
                      "orb6": {"name": "orb6.vot", "format": "votable", "table": oname}}}
    if store:
        write_snapshot(meta, {"wds.vot": wds_bytes, "orb6.vot": orb_bytes})
    _progress(f"{counts['orb6']} orbits of {oname}; done")
    return merge(wds, orb, source=meta["source"], retrieved=today)


# -- snapshot store -----------------------------------------------------------------


def snapshot_root() -> Path:
    return user_dir("data") / "vizier"


def write_snapshot(meta: dict, files: dict[str, bytes]) -> Path:
    """Write a new snapshot directory, then switch ``current.json`` to it (atomically).

    If anything fails before the switch, the half-written new directory is
    removed and the previous snapshot stays current."""
    import shutil

    root = snapshot_root()
    stamp = datetime.now(timezone.utc).strftime("%Y%m%dT%H%M%S%f")
    d = root / f"snapshot-{stamp}"
    meta = dict(meta, directory=d.name)
    try:
        for name, data in files.items():
            atomic_write_bytes(d / name, data)
        atomic_write_text(d / "meta.json", json.dumps(meta, indent=1))
        atomic_write_text(root / "current.json", json.dumps(meta, indent=1))
    except BaseException:
        shutil.rmtree(d, ignore_errors=True)
        raise
    return d


def current_snapshot() -> dict | None:
    """The metadata of the current snapshot, or None when there is none.

    A pointer that does not parse, has the wrong shape, or names a folder or
    file outside the snapshot folder is moved aside (one line on stderr) and
    treated as no snapshot, so the bundled sample is used."""
    p = snapshot_root() / "current.json"
    if not p.exists():
        return None
    try:
        meta = json.loads(p.read_text("utf-8"))
        _check_pointer(meta)
        return meta
    except (ValueError, OSError) as exc:
        from planner.config.storage import quarantine

        moved = quarantine(p)
        note(f"warning: the VizieR snapshot pointer was damaged ({exc}); moved to {moved.name}")
        return None


def _inside(name, what: str) -> str:
    """``name`` as one plain path component (no folders, no '..', not absolute)."""
    if not isinstance(name, str) or not name or name in (".", "..") or "/" in name or "\\" in name \
            or "\0" in name or Path(name).is_absolute():
        raise ValueError(f"{what} {name!r} is not a name inside the snapshot folder")
    return name


def _check_pointer(meta) -> None:
    """Raise ValueError unless ``meta`` is a pointer of the expected shape, its paths inside the folder."""
    if not isinstance(meta, dict):
        raise ValueError("not a JSON object")
    if meta.get("version") != SNAPSHOT_VERSION:
        raise ValueError(f"snapshot version {meta.get('version')}")
    for key in ("source", "retrieved"):
        if not isinstance(meta.get(key), str):
            raise ValueError(f"{key} is not text")
    _inside(meta.get("directory"), "directory")
    files = meta.get("files", {})
    if not isinstance(files, dict):
        raise ValueError("files is not an object")
    for kind, info in files.items():
        if kind not in ("wds", "orb6") or not isinstance(info, dict):
            raise ValueError(f"file entry {kind!r} has the wrong shape")
        _inside(info.get("name"), "file")
        if info.get("format") not in ("votable", "text"):
            raise ValueError(f"file format {info.get('format')!r}")


def _read_vot(kind):
    def reader(path):
        from planner.config.storage import read_user_file

        tables = parse_votable(read_user_file(path, "VizieR snapshot file", "catalogue"), kind)
        if kind == "wds":
            name = WDS_TABLE if WDS_TABLE in tables else max(tables, key=lambda k: len(tables[k]))
            return wds_from_table(tables[name])
        return orb6_from_table(tables[_choose_orb6(tables)])
    return reader


def load_snapshot() -> Catalog:
    """The catalogue of the current snapshot; CatalogError when there is none.
    The merged catalogue is cached (:mod:`planner.catalogs.cache`)."""
    from planner.catalogs.cache import cached_catalog

    meta = current_snapshot()
    if meta is None:
        raise CatalogError("no VizieR snapshot yet; run 'splitplan catalog fetch' or "
                           "'splitplan catalog import PATH'")
    d = snapshot_root() / meta["directory"]
    files = meta.get("files", {})
    for info in files.values():
        if not (d / info["name"]).exists():
            raise CatalogError(f"VizieR snapshot file {d / info['name']} is missing; fetch or import again")
    return cached_catalog("snapshot", [d / info["name"] for info in files.values()],
                          lambda: _parse_snapshot(meta, d))


def _parse_snapshot(meta: dict, d: Path) -> Catalog:
    from planner.catalogs.orb6 import read_orb6
    from planner.catalogs.wds import read_wds

    parts, problems = {}, []
    for kind, info in meta.get("files", {}).items():
        path = d / info["name"]
        try:
            if info["format"] == "votable":
                df = _read_vot(kind)(path)
            else:
                df = (read_wds if kind == "wds" else read_orb6)(path)
        except (NetworkError, CatalogError) as exc:
            raise CatalogError(f"the VizieR snapshot file {path.name} cannot be read ({exc}); "
                               "fetch or import again") from None
        parts[kind] = df
        problems += [(info["name"], ln, why) for ln, why in df.attrs.get("problems", [])]
    return merge(parts.get("wds"), parts.get("orb6"), source=meta["source"],
                 retrieved=meta["retrieved"], problems=problems)


def load_snapshot_or_fallback() -> Catalog:
    """The snapshot if there is one, else the bundled sample (said on stderr)."""
    try:
        return load_snapshot()
    except CatalogError as exc:
        from planner.catalogs.sample import load_sample

        note(f"{exc}; using the bundled sample")
        return load_sample()


def load_vizier(update: bool = False) -> Catalog:
    """The VizieR catalogue: downloaded now when ``update``, else the snapshot.
    When the download fails: one line on stderr, then the snapshot or the
    bundled sample, saying which."""
    if update:
        try:
            return fetch()
        except NetworkError as exc:
            note(f"error: {exc}")
            meta = current_snapshot()
            if meta is not None:
                note(f"using the VizieR snapshot of {meta['retrieved']}")
                return load_snapshot()
            from planner.catalogs.sample import load_sample

            note("no VizieR snapshot yet; using the bundled sample")
            return load_sample()
    return load_snapshot_or_fallback()


def import_files(path, orbits=None) -> dict:
    """Parse a local WDS or ORB6 text file (and optional ORB6 orbits file) and,
    when it parses, store a copy as the current snapshot."""
    from planner.catalogs.catalog import detect_kind, load_files
    from planner.config.storage import read_user_file

    path = _user_path(path)
    cat = load_files(path, orbits=orbits, use_cache=False)  # raises if nothing parses
    files, info = {}, {}
    kind = detect_kind(path)
    files[f"{kind}.txt"] = read_user_file(path, "catalogue file", "catalogue")
    info[kind] = {"name": f"{kind}.txt", "format": "text", "original": str(path)}
    if orbits is not None:
        op = _user_path(orbits)
        files["orb6.txt"] = read_user_file(op, "ORB6 file", "catalogue")
        info["orb6"] = {"name": "orb6.txt", "format": "text", "original": str(op)}
    today = datetime.now(timezone.utc).date().isoformat()
    src = "imported " + " + ".join(f"{k.upper()} file {v['original']}" for k, v in info.items())
    meta = {"version": SNAPSHOT_VERSION, "source": src, "retrieved": today,
            "rows": {"pairs": int(len(cat.pairs)), "orbits": int(len(cat.orbits))}, "files": info}
    write_snapshot(meta, files)
    return meta


def empty_pairs() -> pd.DataFrame:
    return empty_table(PAIR_COLUMNS)
