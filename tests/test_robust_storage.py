"""No data loss: atomic writes, damaged files kept aside, a failed write keeps the old file.

What is checked (issue 7, item 3), for the catalogue cache, the VizieR snapshot,
saved profiles and plan files:

* a write that fails half-way (``os.fsync`` or ``os.replace`` raising, as on a
  full disk or a pulled USB stick) leaves the previous file byte-for-byte
  intact, leaves no temporary file behind, and is reported in one line;
* a damaged file is detected, reported in one line, and moved aside with its
  bytes intact (``NAME.corrupt-STAMP``); it is never silently overwritten;
* the catalogue cache is rebuilt after damage and gives the same table as a
  fresh parse.

The reference is the file content itself (bytes compared before and after);
no outside source is involved.
"""

from __future__ import annotations

import errno
import json
import os
from pathlib import Path

import pytest

from planner.config import storage
from planner.errors import PlannerError

DEMO = ["--lat", "52.1873", "--lon", "-2.4127", "--tz", "Europe/London", "--date", "2026-12-05",
        "--seeing", "1.5", "--catalog", "sample", "--aperture", "102", "--limit", "3"]


def _one_line(err: str) -> str:
    lines = [ln for ln in err.splitlines() if ln.strip()]
    assert len(lines) == 1 and "Traceback" not in err, lines
    return lines[0]


def _fail_replace_onto(monkeypatch, target: Path):
    """Make os.replace fail (ENOSPC) only when it would land on ``target``."""
    real = os.replace
    target = Path(target).resolve()

    def replace(src, dst, *a, **k):
        if Path(dst).resolve() == target:
            raise OSError(errno.ENOSPC, "No space left on device")
        return real(src, dst, *a, **k)

    monkeypatch.setattr(os, "replace", replace)


def _leftover_temps(folder: Path) -> list[str]:
    return [p.name for p in folder.iterdir() if p.name.endswith(".tmp")]


# -- the storage helpers themselves --------------------------------------------------------


@pytest.mark.parametrize("where", ["fsync", "replace", "write"])
def test_failed_write_keeps_old_file_and_no_temp(tmp_path, monkeypatch, where):
    p = tmp_path / "keep.toml"
    p.write_bytes(b"old = 1\n")
    if where == "fsync":
        monkeypatch.setattr(os, "fsync", lambda fd: (_ for _ in ()).throw(OSError(errno.EIO, "I/O error")))
    elif where == "replace":
        _fail_replace_onto(monkeypatch, p)
    else:  # the disk fills up half-way through the data
        real_fdopen = os.fdopen

        class HalfFull:
            def __init__(self, fh):
                self.fh = fh

            def __enter__(self):
                return self

            def __exit__(self, *exc):
                self.fh.close()

            def write(self, data):
                self.fh.write(data[: len(data) // 2])
                raise OSError(errno.ENOSPC, "No space left on device")

            def __getattr__(self, name):
                return getattr(self.fh, name)

        monkeypatch.setattr(os, "fdopen", lambda fd, mode="r", *a, **k: HalfFull(real_fdopen(fd, mode, *a, **k)))
    with pytest.raises(PlannerError, match="cannot write .*keep.toml"):
        storage.atomic_write_text(p, "new = 2\n" * 1000)
    assert p.read_bytes() == b"old = 1\n"
    assert _leftover_temps(tmp_path) == []


def test_successful_write_replaces_whole_file(tmp_path):
    p = tmp_path / "f.txt"
    p.write_text("x" * 10_000)
    storage.atomic_write_text(p, "short\n")
    assert p.read_text() == "short\n" and _leftover_temps(tmp_path) == []


def test_quarantine_never_overwrites_an_earlier_quarantine(tmp_path):
    """Two damaged copies moved aside in the same second both survive."""
    p = tmp_path / "sites.toml"
    names = []
    for k in range(3):
        p.write_bytes(f"damaged {k} [[[".encode())
        names.append(storage.quarantine(p))
    assert len(set(names)) == 3
    assert sorted(n.read_bytes() for n in names) == [b"damaged 0 [[[", b"damaged 1 [[[", b"damaged 2 [[["]


# -- catalogue cache -----------------------------------------------------------------------


@pytest.fixture
def wds_copy(tmp_path):
    """A private copy of the bundled WDS rows + ORB6 file, so the cache entries are ours."""
    from planner.catalogs.sample import sample_paths

    stack, wds, orb = sample_paths()
    with stack:
        w = tmp_path / "wds.txt"
        o = tmp_path / "orb6.txt"
        w.write_bytes(Path(wds).read_bytes())
        o.write_bytes(Path(orb).read_bytes())
    return o  # the ORB6 file alone is a full catalogue (one pair per system)


def _cache_entries():
    return sorted((storage.user_dir("cache") / "catalogs").glob("files-*.cols"))


@pytest.mark.parametrize("damage", ["flip-byte", "truncate", "garbage", "empty"])
def test_damaged_cache_via_cli_is_quarantined_and_rebuilt(cli, wds_copy, damage):
    code, first, err = cli("catalog", "show", "--catalog", str(wds_copy), "--json")
    assert code == 0, err
    [entry] = _cache_entries()
    raw = entry.read_bytes()
    bad = {"flip-byte": raw[:-50] + bytes([raw[-50] ^ 0xFF]) + raw[-49:],
           "truncate": raw[: len(raw) // 2],
           "garbage": os.urandom(4096).replace(b"\n", b" "),
           "empty": b""}[damage]
    entry.write_bytes(bad)
    code, again, err = cli("catalog", "show", "--catalog", str(wds_copy), "--json")
    assert code == 0
    line = _one_line(err)
    assert "warning" in line and "damaged" in line and "rebuilding" in line and entry.name in line
    assert again == first  # the same catalogue as before the damage
    kept = list(entry.parent.glob(entry.name + ".corrupt-*"))
    assert len(kept) == 1 and kept[0].read_bytes() == bad  # kept aside, bytes intact
    assert entry.exists() and entry.read_bytes() != bad  # rebuilt
    code, _, err = cli("catalog", "show", "--catalog", str(wds_copy))
    assert code == 0 and err == ""  # the rebuilt entry is used quietly


def test_cache_write_failure_warns_and_loads(cli, wds_copy, monkeypatch):
    """The cache is an optimisation: a failed write is one warning; the run succeeds."""
    monkeypatch.setattr(os, "replace", lambda *a, **k: (_ for _ in ()).throw(OSError(errno.EROFS, "Read-only file system")))
    code, out, err = cli("catalog", "show", "--catalog", str(wds_copy))
    assert code == 0 and "pairs:" in out
    line = _one_line(err)
    assert "cannot write the catalogue cache" in line and "Read-only" in line
    assert not _cache_entries() and _leftover_temps(storage.user_dir("cache") / "catalogs") == []


def test_stale_cache_is_rebuilt_quietly(cli, wds_copy):
    """A changed source file (size and mtime) is a stale entry, not a damaged one."""
    code, _, _ = cli("catalog", "show", "--catalog", str(wds_copy), "--json")
    text = wds_copy.read_text("latin-1").splitlines(keepends=True)
    wds_copy.write_text("".join(text[: len(text) // 2]), "latin-1")
    code, out, err = cli("catalog", "show", "--catalog", str(wds_copy), "--json")
    assert code == 0 and err == ""
    assert not list((storage.user_dir("cache") / "catalogs").glob("*.corrupt-*"))


# -- VizieR snapshot -----------------------------------------------------------------------


def test_snapshot_switch_failing_keeps_the_previous_snapshot(tmp_path, monkeypatch):
    """A new snapshot is written first and switched to last; if the switch fails
    the previous snapshot stays current and loads as before."""
    from planner.catalogs import load_catalog, vizier
    from planner.catalogs.sample import sample_paths

    stack, wds, orb = sample_paths()
    with stack:
        first = vizier.import_files(wds, orbits=orb)
        before = (vizier.snapshot_root() / "current.json").read_bytes()
        n_pairs = len(load_catalog("vizier").pairs)
        with monkeypatch.context() as m:
            _fail_replace_onto(m, vizier.snapshot_root() / "current.json")
            with pytest.raises(PlannerError, match="cannot write .*current.json"):
                vizier.import_files(orb)
    assert (vizier.snapshot_root() / "current.json").read_bytes() == before
    assert vizier.current_snapshot()["source"] == first["source"]
    assert len(load_catalog("vizier").pairs) == n_pairs
    assert _leftover_temps(vizier.snapshot_root()) == []
    # and the half-written new snapshot folder is gone: only the first one is left
    dirs = sorted(p.name for p in vizier.snapshot_root().iterdir() if p.is_dir())
    assert dirs == [vizier.current_snapshot()["directory"]]


def test_snapshot_import_via_cli_failing_is_one_line(cli, monkeypatch):
    from planner.catalogs import vizier
    from planner.catalogs.sample import sample_paths

    stack, wds, orb = sample_paths()
    with stack:
        code, _, err = cli("catalog", "import", str(orb))
        assert code == 0, err
        before = (vizier.snapshot_root() / "current.json").read_bytes()
        _fail_replace_onto(monkeypatch, vizier.snapshot_root() / "current.json")
        code, _, err = cli("catalog", "import", str(wds), "--orbits", str(orb))
    assert code == 1 and "No space left" in _one_line(err)
    assert (vizier.snapshot_root() / "current.json").read_bytes() == before


# -- profiles (through the command line as it stands) --------------------------------------


def test_damaged_profile_file_via_cli(cli):
    from planner.config import profiles

    code, _, err = cli("profile", "site", "add", "home", "--lat", "47", "--lon", "8", "--tz", "Europe/Zurich")
    assert code == 0, err
    path = profiles.profile_path("site")
    damaged = path.read_bytes()[:-7] + b"\x00\xff = = ["
    path.write_bytes(damaged)
    code, out, err = cli("profile", "site", "list")
    line = _one_line(err)
    assert code == 1 and "damaged" in line and "moved aside" in line and str(path.name) in line
    kept = list(path.parent.glob(path.name + ".corrupt-*"))
    assert len(kept) == 1 and kept[0].read_bytes() == damaged
    # a new profile starts a fresh file; the damaged one stays where it was put
    code, _, err = cli("profile", "site", "add", "field", "--lat", "46", "--lon", "7", "--tz", "Europe/Zurich")
    assert code == 0, err
    assert kept[0].read_bytes() == damaged
    code, out, _ = cli("profile", "site", "list")
    assert "field:" in out and "home:" not in out


def test_profile_write_failure_keeps_old_profiles(cli, monkeypatch):
    from planner.config import profiles

    code, _, err = cli("profile", "scope", "add", "refractor", "--aperture", "102")
    assert code == 0, err
    path = profiles.profile_path("scope")
    before = path.read_bytes()
    _fail_replace_onto(monkeypatch, path)
    code, _, err = cli("profile", "scope", "add", "dob", "--aperture", "254", "--obstruction", "0.2")
    line = _one_line(err)
    assert code == 1 and "cannot write" in line and "No space left" in line
    assert path.read_bytes() == before and _leftover_temps(path.parent) == []


# -- plan files ------------------------------------------------------------------------------


def test_plan_file_write_failure_keeps_old_plan(cli, tmp_path, monkeypatch):
    plan = tmp_path / "tonight.toml"
    code, _, err = cli("night", *DEMO, "--save-plan", str(plan))
    assert code == 0, err
    before = plan.read_bytes()
    _fail_replace_onto(monkeypatch, plan)
    code, _, err = cli("night", *DEMO[:-4], "--aperture", "254", "--limit", "3", "--save-plan", str(plan))
    line = _one_line(err)
    assert code == 1 and "cannot write" in line and "tonight.toml" in line
    assert plan.read_bytes() == before and _leftover_temps(tmp_path) == []


def test_damaged_plan_file_via_cli(cli, tmp_path):
    plan = tmp_path / "club.toml"
    code, _, err = cli("night", *DEMO, "--save-plan", str(plan))
    assert code == 0, err
    damaged = plan.read_bytes().replace(b"=", b"", 3)
    plan.write_bytes(damaged)
    code, out, err = cli("night", "--plan", str(plan))
    line = _one_line(err)
    # the file handed in is the user's own: reported and left exactly as it is
    assert code == 1 and "damaged" in line and "left as it is" in line
    assert plan.read_bytes() == damaged and not list(tmp_path.glob("club.toml.corrupt-*"))


@pytest.mark.parametrize("failure", ["timeout", "http503", "truncated"])
def test_failed_fetch_via_cli_keeps_the_local_copy(cli, monkeypatch, failure):
    """'catalog fetch' failing (time-out, HTTP error, half a reply): one line, exit 1, and
    the local copy imported before stays current, byte for byte."""
    import requests

    from planner.catalogs import vizier
    from planner.catalogs.sample import sample_paths

    stack, wds, orb = sample_paths()
    with stack:
        code, _, err = cli("catalog", "import", str(wds), "--orbits", str(orb))
    assert code == 0, err
    pointer = vizier.snapshot_root() / "current.json"
    before = pointer.read_bytes()

    def broken(self, method, url, *args, **kwargs):
        if failure == "timeout":
            raise requests.exceptions.ReadTimeout("read timed out")
        r = requests.models.Response()
        r.status_code = 503 if failure == "http503" else 200
        r._content = b"<html>busy</html>" if failure == "http503" else b'<?xml version="1.0"?><VOTABLE><RESOURCE><TABLE>'
        r.url = url
        return r

    monkeypatch.setattr(requests.Session, "request", broken)
    code, out, err = cli("catalog", "fetch")
    line = _one_line(err)
    assert code == 1 and line.startswith("splitplan: error:") and ("VizieR" in line or "download" in line)
    assert pointer.read_bytes() == before
    code, out, err = cli("catalog", "show", "--catalog", "vizier", "--json")
    assert code == 0 and err == "" and json.loads(out)["source"].startswith("imported")
