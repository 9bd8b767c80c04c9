"""Build the offline star-name index and the BSC5 bright pairs from open catalogues.

Run by ``python scripts/build_name_index.py BSC5 IAU`` (the repository's build
script); the results ship in the package (``planner.catalogs_sample``):

* ``star_index.npz`` -- one row per star of the Yale Bright Star Catalogue
  (BSC5) plus the IAU-named stars that are not in it, with every catalogue
  number, the Bayer/Flamsteed name, the IAU proper name, the WDS id where
  known and how each cross-identification was made; and the look-up keys
  (one row per key and star).  Written with ``numpy.savez_compressed`` from
  plain number and text arrays: read back with ``allow_pickle=False``.
* ``bsc5_pairs.csv`` -- the bright pairs taken from BSC5 alone, in the pair
  table's columns (see :func:`bsc5_pairs`).

Sources (layouts in ``docs/names.md``):

* Hoffleit D., Warren W. H. Jr. (1991), *The Bright Star Catalogue, 5th
  Revised Ed. (Preliminary Version)*, NASA ADC / CDS catalogue V/50; fields
  read by the byte ranges of the CDS byte-by-byte description of file
  ``catalog``.
* IAU Division C Working Group on Star Names (WGSN), *IAU Catalog of Star
  Names*, edition 2022-04-04, CC BY 4.0.
* The bundled USNO ORB6 orbits and WDS rows, for the WDS ids of the BSC5
  pairs (HD and ADS numbers).

Joins: IAU name to BSC5 star by the HR number of its designation, else HD,
else position within :data:`POSITION_TOLERANCE_ARCSEC`; BSC5 star to WDS id by
the IAU WDS id, else the HD or ADS number of an ORB6 orbit, else the DM number
of a WDS row; a BSC5 pair whose system none of these reaches gets the WDS
designation computed from the primary's J2000 position (``HHMMm+DDMM``,
rounded), flagged ``position``.
"""

from __future__ import annotations

import re
from pathlib import Path

import numpy as np
import pandas as pd

from planner.catalogs.constellations import GREEK_KEYS, abbreviation, fold
from planner.catalogs.names import dm_zone_key, normalise_dm

#: IAU-name to BSC5 star by position when no catalogue number joins them [arcsec]
POSITION_TOLERANCE_ARCSEC = 10.0
#: BSC5 positions are given to 0.1 s of RA and 1" of Dec; a separation computed
#: from two entries is kept only from this value up (below it the rounding of the
#: positions, up to ~1.8", is a large part of the separation)
MIN_POSITION_SEP_ARCSEC = 10.0
BSC5_EPOCH_YR = 1991.0
BSC5_SOURCE = "bsc5"


# -- BSC5 ----------------------------------------------------------------------

def _int(s: str) -> int:
    s = s.strip()
    return int(s) if s.isdigit() else 0


def _float(s: str) -> float:
    s = s.strip()
    try:
        return float(s)
    except ValueError:
        return float("nan")


def read_bsc5(path) -> pd.DataFrame:
    """The BSC5 ``catalog`` file (V/50) as a table, one row per star.

    Byte ranges (1-based, from the CDS byte-by-byte description): HR 1-4,
    Name 5-14 (Flamsteed number 5-7, Bayer letter 8-10, superscript 11,
    constellation 12-14: sub-fields confirmed from the data), DM 15-25, HD
    26-31, SAO 32-37, Multiple code 44, ADS 45-49, ADScomp 50-51, J2000 RA
    76-83 (h, min, s to 0.1 s), Dec 84-90 (sign, deg, arcmin, arcsec), Vmag
    103-107, SpType 128-147, pmRA/pmDE 149-160 (arcsec/yr), Dmag 181-184, Sep
    185-190 (arcsec), MultID 191-194, MultCnt 195-196.  Rows with a blank
    J2000 position (objects removed from the catalogue) are dropped.
    """
    raw = Path(path).read_bytes().decode("latin-1").splitlines()
    rows = []
    for line in raw:
        if not line.strip():
            continue
        s = line.ljust(197)
        if not s[75:77].strip():
            continue
        ra = (int(s[75:77]) + int(s[77:79]) / 60.0 + float(s[79:83]) / 3600.0) * 15.0
        dec = int(s[84:86]) + int(s[86:88]) / 60.0 + int(s[88:90]) / 3600.0
        dec = -dec if s[83] == "-" else dec
        bayer_raw = s[7:10].strip()
        bayer = GREEK_KEYS.get(fold(bayer_raw), "") if bayer_raw else ""
        const = abbreviation(s[11:14]) or ""
        rows.append({
            "hr": int(s[0:4]), "flamsteed": _int(s[4:7]), "bayer": bayer,
            "bayer_sup": _int(s[10:11]), "const": const,
            "dm": normalise_dm(s[14:25]), "hd": _int(s[25:31]), "sao": _int(s[31:37]),
            "multiple_code": s[43].strip(), "ads": _int(s[44:49]), "ads_comp": s[49:51].strip(),
            "ra_deg": ra, "dec_deg": dec, "vmag": _float(s[102:107]),
            "spectral_type": s[127:147].strip(),
            "pm_ra_arcsec_yr": _float(s[148:154]), "pm_dec_arcsec_yr": _float(s[154:160]),
            "dmag": _float(s[180:184]), "sep_arcsec": _float(s[184:190]),
            "mult_id": s[190:194].strip(), "mult_count": _int(s[194:196]),
        })
    return pd.DataFrame(rows)


# -- IAU Catalog of Star Names ------------------------------------------------

def read_iau_names(path) -> pd.DataFrame:
    """The IAU-CSN text file: one row per name.

    Fixed width in characters (UTF-8; names with diacritics are padded to the
    same width): ASCII name 1-18, name with diacritics 19-36, designation
    37-49, Bayer id (ASCII) 50-55, Bayer id (Greek) 56-61, constellation
    62-65, component 66-70, WDS id 71-80; then, blank-separated: V, band,
    HIP, HD, RA and Dec (J2000, degrees), date adopted, note flag.  ``_``
    means no value; lines starting with ``#`` or ``$`` are comments.
    """
    out = []
    for line in Path(path).read_text(encoding="utf-8").splitlines():
        if not line.strip() or line[0] in "#$":
            continue
        rest = line[80:].split()
        if len(rest) < 7:
            continue
        vmag, _band, hip, hd, ra, dec = rest[:6]

        def field(a, b):
            v = line[a:b].strip()
            return "" if v == "_" else v

        out.append({
            "iau_ascii": field(0, 18), "iau_name": field(18, 36), "designation": field(36, 49),
            "iau_bayer": field(49, 55), "iau_const": field(61, 65), "iau_comp": field(65, 70),
            "iau_wds": field(70, 80), "iau_vmag": _float(vmag), "iau_hip": _int(hip),
            "iau_hd": _int(hd) if _int(hd) != 999999 else 0,  # 999999 = no HD (Proxima)
            "iau_ra_deg": _float(ra), "iau_dec_deg": _float(dec),
        })
    return pd.DataFrame(out)


def _iau_bayer(text: str) -> tuple[str, int, int]:
    """IAU Bayer field ('tet01', 'alf', '80') -> (Greek key, superscript, Flamsteed number)."""
    m = re.fullmatch(r"([a-z]+)(\d*)", text)
    if m and m.group(1) in GREEK_KEYS:
        return GREEK_KEYS[m.group(1)], int(m.group(2) or 0), 0
    if text.isdigit():
        return "", 0, int(text)
    return "", 0, 0


def _sep_arcsec(ra1, dec1, ra2, dec2):
    """Angular separation [arcsec] (haversine) and position angle of 2 from 1 [deg, N through E]."""
    r1, d1, r2, d2 = (np.radians(np.asarray(v, float)) for v in (ra1, dec1, ra2, dec2))
    dra = r2 - r1
    h = np.sin((d2 - d1) / 2) ** 2 + np.cos(d1) * np.cos(d2) * np.sin(dra / 2) ** 2
    sep = 2 * np.degrees(np.arcsin(np.sqrt(np.clip(h, 0, 1)))) * 3600.0
    pa = np.degrees(np.arctan2(np.sin(dra) * np.cos(d2),
                               np.cos(d1) * np.sin(d2) - np.sin(d1) * np.cos(d2) * np.cos(dra)))
    return sep, np.mod(pa, 360.0)


def join_iau(bsc: pd.DataFrame, iau: pd.DataFrame) -> pd.DataFrame:
    """Star table: BSC5 rows with the IAU name joined, plus IAU rows not in BSC5.

    ``name_join``: 'hr' (designation HR n), 'hd', 'position' (within
    :data:`POSITION_TOLERANCE_ARCSEC`), 'iau-only' (not a BSC5 star)."""
    stars = bsc.copy()
    for c, v in (("iau_ascii", ""), ("iau_name", ""), ("iau_comp", ""), ("iau_wds", ""),
                 ("hip", 0), ("name_join", "")):
        stars[c] = v
    by_hr = {h: i for i, h in zip(stars.index, stars["hr"])}
    by_hd = {h: i for i, h in zip(stars.index, stars["hd"]) if h}
    extra = []
    for _, r in iau.iterrows():
        m = re.fullmatch(r"HR\s+(\d+)", r["designation"])
        i, how = None, ""
        if m and int(m.group(1)) in by_hr:
            i, how = by_hr[int(m.group(1))], "hr"
        elif r["iau_hd"] and r["iau_hd"] in by_hd:
            i, how = by_hd[r["iau_hd"]], "hd"
        else:
            sep, _ = _sep_arcsec(stars["ra_deg"], stars["dec_deg"], r["iau_ra_deg"], r["iau_dec_deg"])
            k = int(np.argmin(sep))
            if sep[k] <= POSITION_TOLERANCE_ARCSEC:
                i, how = stars.index[k], "position"
        if i is not None and not stars.at[i, "iau_name"]:
            for c in ("iau_ascii", "iau_name", "iau_comp", "iau_wds"):
                stars.at[i, c] = r[c]
            stars.at[i, "hip"] = r["iau_hip"]
            stars.at[i, "name_join"] = how
            continue
        g, sup, fl = _iau_bayer(r["iau_bayer"])
        extra.append({
            "hr": 0, "flamsteed": fl, "bayer": g, "bayer_sup": sup,
            "const": abbreviation(r["iau_const"]) or "", "dm": "", "hd": r["iau_hd"], "sao": 0,
            "multiple_code": "", "ads": 0, "ads_comp": "", "ra_deg": r["iau_ra_deg"],
            "dec_deg": r["iau_dec_deg"], "vmag": r["iau_vmag"], "spectral_type": "",
            "pm_ra_arcsec_yr": np.nan, "pm_dec_arcsec_yr": np.nan, "dmag": np.nan, "sep_arcsec": np.nan,
            "mult_id": "", "mult_count": 0, "iau_ascii": r["iau_ascii"], "iau_name": r["iau_name"],
            "iau_comp": r["iau_comp"], "iau_wds": r["iau_wds"], "hip": r["iau_hip"],
            "name_join": "iau-only",
        })
    if extra:
        stars = pd.concat([stars, pd.DataFrame(extra)], ignore_index=True)
    return stars.reset_index(drop=True)


# -- WDS ids -------------------------------------------------------------------

def wds_id_from_position(ra_deg, dec_deg) -> np.ndarray:
    """WDS-style designation HHMMm+DDMM from a J2000 position, rounded to 0.1 min of
    RA and 1' of Dec (the rule that reproduces the known ids best: see docs/names.md)."""
    ra_min = np.rint(np.asarray(ra_deg, float) / 15.0 * 600.0).astype(int) % (24 * 600)  # tenths of a minute
    hh, mm = ra_min // 600, ra_min % 600
    dec = np.asarray(dec_deg, float)
    sign = np.where(dec < 0, "-", "+")
    dm = np.rint(np.abs(dec) * 60.0).astype(int)
    return np.array([f"{h:02d}{m:03d}{s}{d // 60:02d}{d % 60:02d}"
                     for h, m, s, d in zip(hh, mm, sign, dm)], dtype=object)


def assign_wds_ids(stars: pd.DataFrame, orbits: pd.DataFrame | None, wds_pairs: pd.DataFrame | None) -> pd.DataFrame:
    """Add ``wds_id`` and ``wds_join`` to the star table: the IAU WDS id ('iau'),
    else the ORB6 system with the star's HD ('orb6-hd') or ADS ('orb6-ads')
    number, else the WDS row with its DM ('wds-dm'); else empty."""
    stars = stars.copy()
    wid = stars["iau_wds"].astype(str).to_numpy(object).copy()
    how = np.where(wid != "", "iau", "").astype(object)
    if orbits is not None and len(orbits):
        hd_num = pd.to_numeric(orbits["hd"].astype(str).str.extract(r"(\d+)", expand=False),
                               errors="coerce")
        by_hd = dict(zip(hd_num.dropna().astype(int), orbits.loc[hd_num.notna(), "wds_id"]))
        ads = orbits["ads"]
        by_ads = dict(zip(ads.dropna().astype(int), orbits.loc[ads.notna(), "wds_id"]))
        for i, (hd, ad) in enumerate(zip(stars["hd"], stars["ads"])):
            if wid[i]:
                continue
            if hd and hd in by_hd:
                wid[i], how[i] = by_hd[hd], "orb6-hd"
            elif ad and ad in by_ads:
                wid[i], how[i] = by_ads[ad], "orb6-ads"
    if wds_pairs is not None and len(wds_pairs):
        by_dm = {dm_zone_key(d): w for d, w in zip(wds_pairs["dm_id"], wds_pairs["wds_id"]) if dm_zone_key(d)}
        for i, dm in enumerate(stars["dm"]):
            if not wid[i] and dm_zone_key(dm) in by_dm:
                wid[i], how[i] = by_dm[dm_zone_key(dm)], "wds-dm"
    stars["wds_id"] = wid
    stars["wds_join"] = how
    return stars


# -- BSC5 pairs ------------------------------------------------------------------

def _mult_label(text: str) -> str:
    """BSC5 MultID ('AB', 'AxBC', 'AC') as a WDS-style component label ('AB', 'A-BC')."""
    t = text.strip()
    if "x" in t:
        a, b = t.split("x", 1)
        return f"{a}-{b}" if len(a) > 1 or len(b) > 1 else a + b
    return t


def _pair_label(a: str, b: str) -> str:
    return a + b if len(a) == 1 and len(b) == 1 else f"{a}-{b}"


def bsc5_pairs(stars: pd.DataFrame) -> pd.DataFrame:
    """The bright pairs of BSC5, in the pair table's columns plus ``wds_join``,
    ``hr1``, ``hr2`` and ``rule``.

    Rule 'positions': two BSC5 entries of one system (same ADS number, or the
    same DM number where the ADS is blank, each with its own component
    letter): the primary (component A, else the first letter) paired with each
    other entry; separation and position angle from the two J2000 positions
    when the separation is at least :data:`MIN_POSITION_SEP_ARCSEC`, else the
    catalogued separation of the multiple-star fields when they name this
    pair, else no pair.  Rule 'multiple': the multiple-star fields (Dmag, Sep,
    MultID) of a system not covered above: separation as catalogued, no
    position angle, mag2 = V + Dmag.  Separations of 0 (occultation and
    spectroscopic companions) are skipped.  ``year_last`` = 1991 (the
    catalogue's edition); ``source`` = 'bsc5'.
    """
    s = stars[stars["hr"] > 0].copy()
    s["grp"] = np.where(s["ads"] > 0, "ADS " + s["ads"].astype(str),
                        np.where((s["ads_comp"] != "") & (s["dm"] != ""), "DM " + s["dm"], ""))
    rows = []
    done_groups = set()
    for grp, g in s[(s["grp"] != "") & (s["ads_comp"] != "")].groupby("grp", sort=False):
        if len(g) < 2:
            continue
        g = g.sort_values(["ads_comp", "hr"])
        prim = g[g["ads_comp"].str.startswith("A")]
        p = (prim if len(prim) else g).iloc[0]
        mult = {_mult_label(m): (sep, dm) for m, sep, dm in zip(g["mult_id"], g["sep_arcsec"], g["dmag"]) if m}
        made = set()
        paired: list = []  # entries already paired with the primary
        for _, o in g.iterrows():
            if o["hr"] == p["hr"] or o["ads_comp"] == p["ads_comp"]:
                continue
            # an entry at the place of one already paired (eps2 Lyr C and D) adds no new pair
            if any(float(_sep_arcsec(q["ra_deg"], q["dec_deg"], o["ra_deg"], o["dec_deg"])[0])
                   < MIN_POSITION_SEP_ARCSEC for q in paired):
                continue
            label = _pair_label(p["ads_comp"], o["ads_comp"])
            sep, pa = _sep_arcsec(p["ra_deg"], p["dec_deg"], o["ra_deg"], o["dec_deg"])
            sep, pa = float(sep), float(pa)
            how = "positions"
            if sep < MIN_POSITION_SEP_ARCSEC:
                cat = mult.get(label)
                if cat is None or not np.isfinite(cat[0]) or cat[0] <= 0:
                    continue
                sep, pa, how = float(cat[0]), np.nan, "multiple"
            rows.append(_pair_row(p, label, sep, pa, o["vmag"], grp, how, o["hr"]))
            made.add(label)
            paired.append(o)
        for label, (sep, dm) in mult.items():
            if label not in made and np.isfinite(sep) and sep > 0:
                rows.append(_pair_row(p, label, float(sep), np.nan, p["vmag"] + dm if np.isfinite(dm) else np.nan,
                                      grp, "multiple", 0))
        done_groups.add(grp)
    single = s[~s["grp"].isin(done_groups) & (s["mult_id"] != "") & (s["sep_arcsec"] > 0)]
    for _, p in single.iterrows():
        label = _mult_label(p["mult_id"])
        mag2 = p["vmag"] + p["dmag"] if np.isfinite(p["dmag"]) else np.nan
        rows.append(_pair_row(p, label, float(p["sep_arcsec"]), np.nan, mag2, p["grp"], "multiple", 0))
    out = pd.DataFrame(rows)
    # one row per system and label (several entries may repeat the same multiple-star fields)
    out = out.drop_duplicates(["system", "components"]).reset_index(drop=True)
    miss = out["wds_id"] == ""
    out.loc[miss, "wds_id"] = wds_id_from_position(out.loc[miss, "ra_deg"], out.loc[miss, "dec_deg"])
    out.loc[miss, "wds_join"] = "position"
    # the same pair described by two systems' entries (e.g. HR 5999 and HR 6000 each giving
    # the other at 44.1"): one row per WDS id and component label
    out = out.drop_duplicates(["wds_id", "components"]).reset_index(drop=True)
    return out


def _pair_row(p, label, sep, pa, mag2, grp, rule, hr2) -> dict:
    disc = f"ADS {int(p['ads'])}" if p["ads"] else f"HR {int(p['hr'])}"
    return {
        "wds_id": p["wds_id"], "wds_join": p["wds_join"], "discoverer": disc, "components": label,
        "ra_deg": p["ra_deg"], "dec_deg": p["dec_deg"], "mag1": p["vmag"], "mag2": mag2,
        "sep_last_arcsec": round(sep, 1), "pa_last_deg": round(pa, 0) if np.isfinite(pa) else np.nan,
        "year_last": BSC5_EPOCH_YR, "spectral_type": p["spectral_type"], "dm_id": p["dm"],
        "pm1_ra_masyr": p["pm_ra_arcsec_yr"] * 1000.0, "pm1_dec_masyr": p["pm_dec_arcsec_yr"] * 1000.0,
        "hr1": int(p["hr"]), "hr2": int(hr2), "rule": rule, "system": grp or f"HR {int(p['hr'])}",
    }


def propagate_group_ids(stars: pd.DataFrame, pairs: pd.DataFrame) -> pd.DataFrame:
    """Give every star of a BSC5 system (same ADS number, or same DM where the ADS
    is blank) the system's WDS id when one of its stars has one ('ads-group'),
    else the id of the system's BSC5 pair ('position')."""
    stars = stars.copy()
    grp = np.where(stars["ads"] > 0, "ADS " + stars["ads"].astype(str),
                   np.where((stars["ads_comp"] != "") & (stars["dm"] != ""), "DM " + stars["dm"], ""))
    known = {}
    for g, w in zip(grp, stars["wds_id"]):
        if g and w and g not in known:
            known[g] = w
    by_system = dict(zip(pairs["system"], pairs["wds_id"]))
    wid = stars["wds_id"].to_numpy(object).copy()
    how = stars["wds_join"].to_numpy(object).copy()
    for i, g in enumerate(grp):
        if wid[i] or not g:
            continue
        if g in known:
            wid[i], how[i] = known[g], "ads-group" if g.startswith("ADS") else "dm-group"
        elif g in by_system:
            wid[i], how[i] = by_system[g], "position"
    by_hr = dict(zip(pairs["hr1"], pairs["wds_id"]))
    for i, hr in enumerate(stars["hr"]):
        if not wid[i] and hr in by_hr:
            wid[i], how[i] = by_hr[hr], "position"
    stars["wds_id"] = wid
    stars["wds_join"] = how
    return stars


def build(bsc5_path, iau_path, orbits: pd.DataFrame | None, wds_pairs: pd.DataFrame | None):
    """(star table, BSC5 pair table) from the two reference files and the bundled
    ORB6 orbits / WDS rows (for WDS ids)."""
    stars = join_iau(read_bsc5(bsc5_path), read_iau_names(iau_path))
    stars = assign_wds_ids(stars, orbits, wds_pairs)
    pairs = bsc5_pairs(stars)
    stars = propagate_group_ids(stars, pairs)
    return stars, pairs
