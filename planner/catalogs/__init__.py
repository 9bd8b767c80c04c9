"""Catalogue readers: USNO WDS and ORB6 text files, CDS VizieR, the bundled
sample and a user's own target list.  All return pandas DataFrames in the
schemas of :mod:`planner.schema`.

Public entry points (stable): :func:`read_wds`, :func:`read_orb6`,
:func:`load_sample`; also :func:`load_catalog`, :func:`find_pair`, :func:`find_pairs`,
:func:`pair_names`,
:func:`read_target_list`, :func:`restrict`.  pandas is imported only when one
of them is called.
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


def load_catalog(spec="sample", orbits=None):
    """A :class:`~planner.catalogs.catalog.Catalog` from 'sample', 'vizier' or a file path;
    see :func:`planner.catalogs.catalog.load_catalog`."""
    from planner.catalogs.catalog import load_catalog as _load

    return _load(spec, orbits=orbits)


def find_pair(catalog, query):
    """Row label of the pair named ``query``; see :func:`planner.catalogs.catalog.find_pair`."""
    from planner.catalogs.catalog import find_pair as _find

    return _find(catalog, query)


def find_pairs(catalog, text, limit_arcsec=None):
    """Row labels of every pair named ``text`` (star name, catalogue number, WDS id
    or designation), closest-to-splittable first; see
    :func:`planner.catalogs.resolve.find_pairs`."""
    from planner.catalogs.resolve import find_pairs as _find

    return _find(catalog, text, limit_arcsec=limit_arcsec)


def describe_name(catalog, text, online=False, limit_arcsec=None):
    """What a name is (stars of the offline index, pairs of ``catalog``; with ``online``,
    the CDS SIMBAD answer when the index has none); see :func:`planner.catalogs.resolve.describe`."""
    from planner.catalogs.resolve import describe as _describe

    return _describe(catalog, text, online=online, limit_arcsec=limit_arcsec)


def pair_names(catalog, labels=None, rows=None):
    """Common name and constellation of pair rows; see :func:`planner.catalogs.resolve.pair_names`."""
    from planner.catalogs.resolve import pair_names as _names

    return _names(catalog, labels, rows=rows)


def read_target_list(path):
    """A user's CSV list of pairs; see :func:`planner.catalogs.userlist.read_target_list`."""
    from planner.catalogs.userlist import read_target_list as _read

    return _read(path)


def restrict(catalog, targets):
    """The catalogue cut to a target list; see :func:`planner.catalogs.userlist.restrict`."""
    from planner.catalogs.userlist import restrict as _restrict

    return _restrict(catalog, targets)


__all__ = ["read_wds", "read_orb6", "load_sample", "load_catalog", "find_pair", "find_pairs", "pair_names", "describe_name",
           "read_target_list", "restrict"]
