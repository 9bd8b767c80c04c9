"""planner.config.storage: atomic writes keep the usual file mode.

Checked against POSIX semantics (common practice, no source): a new file gets
0o666 minus the process umask, as open(..., "w") would give it; rewriting an
existing file keeps that file's mode.  Exported plans are meant to be shared,
so they must not come out owner-only (mkstemp's 0o600).
"""

import os
import stat

from planner.config.storage import atomic_write_text


def test_new_file_gets_the_umask_mode(tmp_path):
    p = tmp_path / "plan.html"
    atomic_write_text(p, "x")
    umask = os.umask(0)
    os.umask(umask)
    assert stat.S_IMODE(p.stat().st_mode) == 0o666 & ~umask


def test_rewrite_keeps_existing_mode(tmp_path):
    p = tmp_path / "site.toml"
    atomic_write_text(p, "x")
    os.chmod(p, 0o640)
    atomic_write_text(p, "y")
    assert stat.S_IMODE(p.stat().st_mode) == 0o640
    assert p.read_text() == "y"
    assert [q.name for q in tmp_path.iterdir()] == ["site.toml"]  # no temporary left behind
