"""The bundled real sample: every ORB6 orbit of the late-2008 USNO snapshot,
the genuine WDS summary rows and the bright pairs of the Yale Bright Star
Catalogue (BSC5; built by ``scripts/build_name_index.py``), shipped in the package
``planner.catalogs_sample`` (top-level ``catalogs_sample/`` in the source
tree, installed as package data so a plain ``pip install .`` finds it).

Parsed files are cached (:mod:`planner.catalogs.cache`), so a second call
only reads the cached columns.
"""

from __future__ import annotations

from contextlib import ExitStack
from importlib import resources

from planner.catalogs.catalog import Catalog, merge

PACKAGE = "planner.catalogs_sample"
WDS_FILE = "wds_summary_rows.txt"
ORB6_FILE = "orb6_orbits.txt"
BSC5_FILE = "bsc5_pairs.csv"
SOURCE = ("bundled sample: USNO ORB6 orbits (late-2008 snapshot) + 3 USNO WDS summary rows "
          "+ BSC5 bright pairs (epoch ~1991)")
#: the newest ORB6 references are from November 2008; the WDS rows have last
#: measures up to 2015 (see catalogs_sample/README.md)
RETRIEVED = "2008-11"


def sample_paths():
    """Context-managed real paths of the two sample files (works from a wheel or a zip)."""
    stack = ExitStack()
    try:
        root = resources.files(PACKAGE)
    except ModuleNotFoundError:
        # Running from a source checkout that shadows the installed package
        # (e.g. ``python -m pytest`` in the repository): use the folder itself.
        from pathlib import Path

        root = Path(__file__).resolve().parents[2] / "catalogs_sample"
        if not (root / ORB6_FILE).exists():
            from planner.errors import CatalogError

            raise CatalogError("the bundled sample is missing from this installation; "
                               "reinstall splitplan (pip install splitplan) or give --catalog PATH") from None
    wds = stack.enter_context(resources.as_file(root / WDS_FILE))
    orb = stack.enter_context(resources.as_file(root / ORB6_FILE))
    stack.bsc5 = stack.enter_context(resources.as_file(root / BSC5_FILE))
    return stack, wds, orb


def read_bsc5_pairs(path):
    """The BSC5 bright pairs file (``bsc5_pairs.csv``) as pair-table rows:
    ``source`` = 'bsc5', ``year_last`` = 1991 (the catalogue's edition), separations
    and angles as built (angles only where both stars are separate BSC5 entries,
    see docs/names.md), ``coord_precise`` True (positions to 0.1 s and 1")."""
    import numpy as np
    import pandas as pd

    from planner.catalogs.catalog import empty_table
    from planner.schema import PAIR_COLUMNS

    text_cols = {c.name: str for c in PAIR_COLUMNS if c.dtype == "str"}
    raw = pd.read_csv(path, dtype=text_cols, keep_default_na=False, na_values={
        c.name: [""] for c in PAIR_COLUMNS if c.dtype == "float"})
    n = len(raw)
    out = empty_table(PAIR_COLUMNS).reindex(range(n))
    for c in PAIR_COLUMNS:
        if c.name in raw.columns:
            out[c.name] = raw[c.name].to_numpy()
    out["coord_precise"] = np.ones(n, bool)
    out["has_orbit"] = np.zeros(n, bool)
    out["source"] = np.full(n, "bsc5")
    out["line_no"] = np.arange(2, n + 2, dtype=float)
    for c in PAIR_COLUMNS:
        if c.dtype == "str":
            out[c.name] = out[c.name].fillna("").astype(str)
        elif c.dtype == "bool":
            out[c.name] = out[c.name].fillna(False).astype(bool)
        else:
            out[c.name] = out[c.name].astype(float)
    return out


def load_sample(use_cache: bool = True) -> Catalog:
    """The bundled real sample as a :class:`~planner.catalogs.catalog.Catalog`
    (3 WDS pairs, one pair per ORB6 system without a WDS row, and the BSC5
    bright pairs that neither has); the merged catalogue is cached
    (:mod:`planner.catalogs.cache`)."""
    from planner.catalogs.cache import cached_catalog

    stack, wds_path, orb_path = sample_paths()
    bsc5_path = stack.bsc5
    with stack:
        return cached_catalog("sample", [wds_path, orb_path, bsc5_path],
                              lambda: _parse(wds_path, orb_path, bsc5_path), use_cache)


def _parse(wds_path, orb_path, bsc5_path) -> Catalog:
    from planner.catalogs.orb6 import read_orb6
    from planner.catalogs.wds import read_wds

    wds = read_wds(wds_path)
    orb = read_orb6(orb_path)
    bright = read_bsc5_pairs(bsc5_path)
    problems = [(WDS_FILE, ln, why) for ln, why in wds.attrs.get("problems", [])]
    problems += [(ORB6_FILE, ln, why) for ln, why in orb.attrs.get("problems", [])]
    return merge(wds, orb, source=SOURCE, retrieved=RETRIEVED, problems=problems, bright_pairs=bright)
