"""Shared test fixtures.

Network: pytest-socket blocks every socket for the whole suite (see
``addopts`` in pyproject.toml).  Tests that need the live CDS VizieR service
carry ``@pytest.mark.live`` and run only with ``--run-live``.
"""

from __future__ import annotations

import contextlib
import io
import os
from pathlib import Path

import pytest
from hypothesis import settings

# Hypothesis profiles (issue 16 item 6).  "ci" -- the default -- is derandomised: the
# examples are a fixed function of each test, so every run (CI, a colleague's machine,
# a mutation run) draws the same inputs and a failure is reproducible.  "random" draws
# fresh inputs on every run and keeps failures in the local example database; use it
# locally to look for new bugs:  HYPOTHESIS_PROFILE=random python -m pytest tests/...
# A failing input found that way is kept as an explicit @example in its test.
settings.register_profile("ci", derandomize=True, database=None, deadline=None,
                          print_blob=True)
settings.register_profile("random", derandomize=False, deadline=None, print_blob=True)
settings.load_profile(os.environ.get("HYPOTHESIS_PROFILE", "ci"))

#: The shared reference folder (USNO data), present beside the checkout.
SHARED = Path(__file__).resolve().parents[2] / "shared"
REFERENCE = SHARED / "reference"
DATA = Path(__file__).resolve().parent / "data"


def pytest_addoption(parser):
    parser.addoption("--run-live", action="store_true", default=False,
                     help="run tests that need the live CDS VizieR service")


def pytest_collection_modifyitems(config, items):
    if config.getoption("--run-live"):
        return
    skip = pytest.mark.skip(reason="needs the live VizieR service; run with --run-live")
    for item in items:
        if "live" in item.keywords:
            item.add_marker(skip)


@pytest.fixture(autouse=True)
def _isolated_user_dirs(tmp_path_factory, monkeypatch):
    """Point the user config/cache/data directories at a temporary folder so
    tests never read or write the real ones."""
    base = tmp_path_factory.mktemp("userdirs")
    monkeypatch.setenv("SPLITPLAN_HOME", str(base))
    monkeypatch.setenv("MPLBACKEND", "Agg")
    yield base


#: Byte-for-byte copies of the USNO reference files kept with the tests, so the
#: suite does not depend on ../shared being present (see tests/data/README.md).
#: The ORB6 orbits file itself is the bundled sample.
_COPIES = (DATA / "usno", Path(__file__).resolve().parents[1] / "catalogs_sample")


def reference_file(name: str) -> Path:
    """A USNO reference file: the copy shipped in tests/data/usno or catalogs_sample;
    a file too big to ship is read from ../shared/reference, and the test (the
    whole module if called at import) is skipped, saying so, when it is absent."""
    for folder in (*_COPIES, REFERENCE):
        p = folder / name
        if p.exists():
            return p
    pytest.skip(f"reference file {name} is not shipped with the tests and ../shared/reference/{name} "
                "is absent", allow_module_level=True)


@pytest.fixture
def cli():
    """Run the command line in-process: ``code, out, err = cli("catalog", "show")``."""
    from planner.cli import main

    def run(*args: str):
        out, err = io.StringIO(), io.StringIO()
        code = 0
        with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
            try:
                main(list(args))
            except SystemExit as exc:
                code = exc.code if isinstance(exc.code, int) else (0 if exc.code is None else 1)
        return code, out.getvalue(), err.getvalue()

    return run
