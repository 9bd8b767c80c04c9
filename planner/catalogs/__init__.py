"""Catalogue readers: USNO WDS and ORB6 text files, CDS VizieR, the bundled
sample and a user's own target list.  All return pandas DataFrames in the
schemas of :mod:`planner.schema`.

Public entry points (stable): :func:`read_wds`, :func:`read_orb6`,
:func:`load_sample`.  pandas is imported only when a reader is called.
"""

from __future__ import annotations


def read_wds(path):
    """Read a USNO WDS summary text file into a pair table; see :mod:`planner.catalogs.wds`."""
    from planner.catalogs.wds import read_wds as _read

    return _read(path)


def read_orb6(path):
    """Read a USNO ORB6 orbits text file into an orbit table; see :mod:`planner.catalogs.orb6`."""
    from planner.catalogs.orb6 import read_orb6 as _read

    return _read(path)


def load_sample():
    """The bundled real sample as a :class:`planner.catalogs.catalog.Catalog`."""
    from planner.catalogs.sample import load_sample as _load

    return _load()


__all__ = ["read_wds", "read_orb6", "load_sample"]
