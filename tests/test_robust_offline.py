"""Every command works offline on the bundled sample, and nothing tries to download.

What is checked (issue 7, item 4):

* the suite itself runs with sockets disabled (pytest-socket, ``--disable-socket``
  in pyproject addopts); :func:`test_sockets_really_are_blocked` proves the
  block is active, so the command runs below are truly offline;
* on top of that, astropy's ``conf.allow_internet`` is False and every download
  entry point the stack has is replaced by a recorder that raises:
  ``urllib.request.urlopen``, ``astropy.utils.data.download_file``,
  ``requests.Session.request`` (astroquery's transport) and skyfield's
  ``Loader.download``; each command must succeed and the recorder must stay
  empty (no attempt at all, not merely a caught failure);
* a fresh interpreter (no astropy/skyfield state from earlier tests) runs
  ``night`` with ``socket.socket.connect`` disabled and prints no warning about
  IERS tables or downloads.

The reference is the behaviour of the download functions themselves: any
call is recorded.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
import textwrap

import pytest

DEMO = ["--lat", "52.1873", "--lon", "-2.4127", "--elevation", "95", "--tz", "Europe/London",
        "--date", "2026-12-05", "--seeing", "1.5", "--catalog", "sample"]


@pytest.fixture
def no_downloads(monkeypatch):
    """astropy told not to use the internet; every download function records and raises."""
    import urllib.request

    import astropy.utils.data as aud
    import requests
    import skyfield.iokit

    attempts: list[str] = []

    def recorder(name):
        def refuse(*args, **kwargs):
            attempts.append(f"{name}{args[:2]!r}")
            raise OSError(f"download attempted offline: {name}")
        return refuse

    monkeypatch.setattr(aud.conf, "allow_internet", False)
    monkeypatch.setattr(urllib.request, "urlopen", recorder("urllib.request.urlopen"))
    monkeypatch.setattr(aud, "download_file", recorder("astropy download_file"))
    monkeypatch.setattr(requests.Session, "request", recorder("requests"))
    monkeypatch.setattr(skyfield.iokit.Loader, "download", recorder("skyfield Loader.download"))
    return attempts


def test_sockets_really_are_blocked():
    import socket

    with pytest.raises(Exception, match="(?i)socket"):
        socket.create_connection(("vizier.cds.unistra.fr", 80), timeout=1)


@pytest.mark.parametrize("args, expect", [
    (["catalog", "show"], "pairs:"),
    (["catalog", "show", "--json"], '"pairs"'),
    (["pair", "STF2272AB", "--date", "2026-12-05"], "separation"),
    (["pair", "STF 2272", "--years", "2020:2030:5", "--json"], '"table"'),
    (["night", *DEMO, "--aperture", "102", "--limit", "5"], "Never point"),
    (["night", *DEMO, "--aperture", "102", "--obstruction", "0.3", "--json", "--limit", "5"], '"wds_id"'),
    (["apertures", "60", "80", "102", "127", "152", "203", "254", "305", *DEMO], "305 mm"),
    (["profile", "site", "list"], "no saved site"),
])
def test_command_works_offline(cli, no_downloads, args, expect):
    code, out, err = cli(*args)
    assert code == 0, err
    assert expect in out
    assert no_downloads == []
    assert "download" not in err.lower() and "Traceback" not in err


@pytest.mark.parametrize("ext, magic", [(".html", b"<!DOCTYPE html"), (".pdf", b"%PDF-"), (".csv", b"slot"),
                                        (".vot", b"<?xml")])
def test_reports_are_written_offline(cli, no_downloads, tmp_path, ext, magic):
    out = tmp_path / f"plan{ext}"
    code, _, err = cli("night", *DEMO, "--aperture", "102", "--limit", "4", "--out", str(out))
    assert code == 0, err
    assert out.read_bytes()[:200].lstrip().lower().startswith(magic.lower()) or magic in out.read_bytes()[:400]
    assert no_downloads == []


def test_orbit_plot_and_aperture_plot_offline(cli, no_downloads, tmp_path):
    code, _, err = cli("pair", "STF2272", "--plot", str(tmp_path / "o.svg"))
    assert code == 0, err
    code, _, err = cli("apertures", "60", "102", "203", *DEMO, "--plot", str(tmp_path / "a.png"))
    assert code == 0, err
    assert (tmp_path / "o.svg").stat().st_size > 1000 and (tmp_path / "a.png").stat().st_size > 1000
    assert no_downloads == []


def test_vizier_catalogue_without_network_uses_the_sample(cli, no_downloads):
    """'--catalog vizier' with no snapshot says so in one line and uses the sample."""
    code, out, err = cli("catalog", "show", "--catalog", "vizier", "--json")
    assert code == 0
    assert json.loads(out)["source"].startswith("bundled sample")
    lines = [ln for ln in err.splitlines() if ln.strip()]
    assert len(lines) == 1 and "bundled sample" in lines[0]
    assert no_downloads == []


def test_fetch_offline_is_one_line_and_exit_1(cli):
    """'catalog fetch' with the network down: one line, exit 1, nothing stored."""
    from planner.catalogs import vizier

    code, out, err = cli("catalog", "fetch")
    lines = [ln for ln in err.splitlines() if ln.strip()]
    assert code == 1 and len(lines) == 1 and "cannot reach CDS VizieR" in lines[0]
    assert vizier.current_snapshot() is None


def test_fresh_process_without_network(tmp_path):
    """A new interpreter: sockets refuse to connect, astropy refuses the internet;
    the night plan runs and stderr is empty (no IERS or download warnings)."""
    code = textwrap.dedent(f"""
        import socket
        def refuse(*a, **k):
            raise OSError("network disabled for this test")
        socket.socket.connect = refuse
        socket.create_connection = refuse
        from astropy.utils.data import conf
        conf.allow_internet = False
        from planner.cli import main
        main({["night", *DEMO, "--aperture", "127", "--limit", "3", "--json"]!r})
    """)
    env = dict(os.environ, SPLITPLAN_HOME=str(tmp_path / "home"), XDG_CACHE_HOME=str(tmp_path / "xdg"),
               HOME=str(tmp_path))
    r = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, env=env, timeout=300,
                       cwd=str(tmp_path))
    assert r.returncode == 0, r.stderr
    assert len(json.loads(r.stdout)) >= 3
    assert r.stderr.strip() == ""
