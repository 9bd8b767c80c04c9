"""The catalogue cache and the VizieR snapshot pointer: safe against damage and forgery.

What is checked (issue 13 items 6 and 8, issue 14 item 5):

* a cache entry holds no pickle and cannot make the tool run code: forged entries that declare
  object arrays, wrong dtypes for schema columns, codes outside their values or arrays outside
  the file are quarantined and rebuilt with one warning line -- no traceback, no internal error;
* a cache folder that cannot be created is one warning, and the run goes on;
* a ``current.json`` pointer of the wrong shape, or naming a folder or file outside the
  snapshot folder, is moved aside and the bundled sample is used (docs/robustness.md);
* the cached catalogue equals the freshly parsed one, on the bundled sample and on a
  generated catalogue with missing text values.
"""

from __future__ import annotations

import json
from pathlib import Path

import pandas as pd
import pytest

from planner.catalogs import cache, load_catalog, vizier
from planner.catalogs.catalog import load_files
from planner.catalogs.sample import sample_paths
from planner.config.storage import user_dir


@pytest.fixture
def wds_file(tmp_path):
    stack, wds, orb = sample_paths()
    with stack:
        o = tmp_path / "orb6.txt"
        o.write_bytes(Path(orb).read_bytes())
    return o


def _entry():
    [e] = sorted((user_dir("cache") / "catalogs").glob("files-*" + cache.SUFFIX))
    return e


def _forge(entry: Path, change) -> None:
    """Rewrite the entry's header with ``change(head)`` applied, keeping the payload (and its checksum)."""
    raw = entry.read_bytes()
    nl = raw.index(b"\n")
    head = json.loads(raw[:nl])
    change(head)
    entry.write_bytes(json.dumps(head).encode() + b"\n" + raw[nl + 1:])


def _col(head, table, name):
    t = head["tables"][table]
    for c in t["texts"]:
        if c["name"] == name:
            return c
    for b in t["numbers"]:
        if name in b["names"]:
            return b
    raise KeyError(name)


FORGERIES = {
    "object-dtype": lambda h: _col(h, "pairs", "mag1")["data"].update(dtype="|O"),
    "pickle-dtype": lambda h: _col(h, "pairs", "wds_id")["codes"].update(dtype="|V8"),
    "text-as-numbers": lambda h: _col(h, "pairs", "ra_deg").update(dtype="str"),
    "float-as-int": lambda h: _col(h, "pairs", "mag1")["data"].update(dtype="<i8"),
    "codes-beyond-values": lambda h: _col(h, "pairs", "wds_id").update(n_values=1),
    "outside-the-file": lambda h: _col(h, "orbits", "period_yr")["data"].update(offset=10 ** 12),
    "wrong-shape": lambda h: _col(h, "orbits", "period_yr")["data"].update(shape=[3]),
    "tables-a-list": lambda h: h.update(tables=[1, 2]),
    "problems-wrong-shape": lambda h: h["catalog"].update(problems=[[1, 2]]),
}


@pytest.mark.parametrize("forgery", sorted(FORGERIES))
def test_forged_cache_entry_is_quarantined_and_rebuilt(wds_file, forgery, capsys):
    first = load_files(wds_file)
    entry = _entry()
    _forge(entry, FORGERIES[forgery])
    capsys.readouterr()
    again = load_files(wds_file)
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "damaged" in err and "rebuilding" in err, err
    assert list(entry.parent.glob(entry.name + ".corrupt-*"))
    pd.testing.assert_frame_equal(first.pairs, again.pairs)
    pd.testing.assert_frame_equal(first.orbits, again.orbits)


def test_cache_file_holds_no_pickle(wds_file):
    load_files(wds_file)
    raw = _entry().read_bytes()
    head = json.loads(raw[: raw.index(b"\n")])
    dtypes = {d["dtype"] for t in head["tables"].values() for b in t["numbers"] for d in [b["data"]]}
    dtypes |= {c[k]["dtype"] for t in head["tables"].values() for c in t["texts"] for k in ("codes", "values")}
    assert dtypes <= {"<f8", "|b1", "<i4", "|u1"}, dtypes
    assert b"\x80\x05\x95" not in raw[:64] and not raw.startswith(b"\x80")  # no pickle stream


def test_cache_equals_fresh_parse_with_missing_text(tmp_path):
    # generated WDS lines (benchmarks/bench_catalog.py) with blank components, spectral types,
    # proper motions and positions: every column, blanks included, must come back as parsed
    import sys

    sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "benchmarks"))
    from bench_catalog import synthetic_wds

    p = tmp_path / "w.txt"
    p.write_bytes(synthetic_wds(500) + b"junk line\n")
    fresh = load_files(p, use_cache=False)
    load_files(p)
    cached = load_files(p)
    assert fresh.pairs["components"].isna().any() or (fresh.pairs["components"] == "").any()
    pd.testing.assert_frame_equal(fresh.pairs, cached.pairs)
    pd.testing.assert_frame_equal(fresh.orbits, cached.orbits)
    assert fresh.problems == cached.problems and len(cached.problems) == 1


def test_cache_folder_that_cannot_be_made_is_a_warning(tmp_path, monkeypatch, capsys, wds_file):
    # issue 13 item 8: SPLITPLAN_HOME pointing below a plain file -- the cache cannot exist
    blocker = tmp_path / "not-a-folder"
    blocker.write_text("x")
    monkeypatch.setenv("SPLITPLAN_HOME", str(blocker / "home"))
    cat = load_files(wds_file)
    err = capsys.readouterr().err
    assert len(cat.pairs) > 100
    assert err.count("\n") == 1 and "warning" in err and "cache" in err


POINTERS = {
    "a-list": [1, 2, 3],
    "directory-escapes": {"version": 1, "source": "x", "retrieved": "2026-01-01", "directory": "../../..",
                          "files": {}},
    "absolute-directory": {"version": 1, "source": "x", "retrieved": "2026-01-01", "directory": "/etc",
                           "files": {}},
    "file-escapes": {"version": 1, "source": "x", "retrieved": "2026-01-01", "directory": "snap",
                     "files": {"wds": {"name": "../../../secret.txt", "format": "text"}}},
    "files-a-list": {"version": 1, "source": "x", "retrieved": "2026-01-01", "directory": "snap",
                     "files": ["wds"]},
    "source-a-number": {"version": 1, "source": 5, "retrieved": "2026-01-01", "directory": "snap", "files": {}},
    "no-directory": {"version": 1, "source": "x", "retrieved": "2026-01-01"},
}


@pytest.mark.parametrize("shape", sorted(POINTERS))
def test_wrong_shaped_pointer_is_moved_aside_and_the_sample_used(shape, cli):
    root = vizier.snapshot_root()
    (root / "snap").mkdir(parents=True, exist_ok=True)
    pointer = root / "current.json"
    pointer.write_text(json.dumps(POINTERS[shape]))
    code, out, err = cli("catalog", "show", "--catalog", "vizier")
    assert code == 0, err
    assert "bundled sample" in out
    assert "pointer was damaged" in err and "Traceback" not in err and "internal error" not in err
    assert not pointer.exists() and list(root.glob("current.json.corrupt-*"))
    assert load_catalog("vizier").source.startswith("bundled sample")


def test_program_version_comes_from_package_metadata():
    from importlib import metadata

    try:
        expected = metadata.version("splitplan")
    except metadata.PackageNotFoundError:  # running from a bare source tree
        from planner import __version__ as expected
    assert cache.program_version() == expected


def test_no_cache_switch(wds_file, monkeypatch):
    monkeypatch.setenv("SPLITPLAN_NO_CACHE", "1")
    load_files(wds_file)
    assert not (user_dir("cache") / "catalogs").exists() or not list((user_dir("cache") / "catalogs").iterdir())


def test_whole_plan_runs_when_the_cache_folder_cannot_be_made(tmp_path, monkeypatch, cli):
    # issue 13 item 8: every cache (catalogue, Earth orientation, separability tables) is optional
    import planner.sky._astrometry as astrometry

    home = tmp_path / "home"
    home.mkdir()
    (home / "cache").write_text("x")  # the cache folder's place is taken by a file
    monkeypatch.setenv("SPLITPLAN_HOME", str(home))
    monkeypatch.setattr(astrometry, "_eop", None)
    code, out, err = cli("night", "--lat", "52.1873", "--lon", "-2.4127", "--tz", "Europe/London",
                         "--date", "2026-12-05", "--aperture", "102", "--limit", "2")
    assert code == 0, err
    assert "Night plan 2026-12-05" in out
    assert "Traceback" not in err and "error" not in err.lower()
