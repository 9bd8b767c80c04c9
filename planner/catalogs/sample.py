"""The bundled real sample: every ORB6 orbit of the late-2008 USNO snapshot
and the genuine WDS summary rows, shipped in the package
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
SOURCE = ("bundled sample: USNO ORB6 orbits (late-2008 snapshot) + 3 USNO WDS summary rows")
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
    return stack, wds, orb


def load_sample(use_cache: bool = True) -> Catalog:
    """The bundled real sample as a :class:`~planner.catalogs.catalog.Catalog`
    (3 WDS pairs plus one pair per ORB6 system without a WDS row); the merged
    catalogue is cached (:mod:`planner.catalogs.cache`)."""
    from planner.catalogs.cache import cached_catalog

    stack, wds_path, orb_path = sample_paths()
    with stack:
        return cached_catalog("sample", [wds_path, orb_path], lambda: _parse(wds_path, orb_path), use_cache)


def _parse(wds_path, orb_path) -> Catalog:
    from planner.catalogs.orb6 import read_orb6
    from planner.catalogs.wds import read_wds

    wds = read_wds(wds_path)
    orb = read_orb6(orb_path)
    problems = [(WDS_FILE, ln, why) for ln, why in wds.attrs.get("problems", [])]
    problems += [(ORB6_FILE, ln, why) for ln, why in orb.attrs.get("problems", [])]
    return merge(wds, orb, source=SOURCE, retrieved=RETRIEVED, problems=problems)
