"""``splitplan log mark`` in a terminal: one key per pair (a real pseudo-terminal, POSIX only).

The keys are typed into a pseudo-terminal as an observer would: c (clean), space (skip),
r (round), q (stop).  The plan and the results are made up for the test.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
import time

import pytest

pty = pytest.importorskip("pty")
SITE = ["--lat", "47.1", "--lon", "8.2", "--elevation", "600", "--tz", "Europe/Zurich"]


def test_one_key_per_pair_in_a_terminal(cli, tmp_path, _isolated_user_dirs):
    plan = tmp_path / "night.plan.toml"
    code, out, err = cli("night", *SITE, "--aperture", "102", "--date", "2026-07-01", "--seeing", "1.5",
                         "--limit", "5", "--save-plan", str(plan))
    assert code == 0, err
    import select

    master, slave = pty.openpty()
    env = dict(os.environ, SPLITPLAN_HOME=str(_isolated_user_dirs))
    proc = subprocess.Popen([sys.executable, "-m", "planner", "log", "mark", str(plan)], stdin=slave,
                            stdout=slave, stderr=subprocess.PIPE, env=env, close_fds=True)
    os.close(slave)
    keys = [b"c", b" ", b"r", b"q"]   # clean, skip, round, stop
    seen = b""
    end = time.time() + 300
    while time.time() < end:
        ready, _, _ = select.select([master], [], [], 1.0)
        if ready:
            try:
                chunk = os.read(master, 4096)
            except OSError:  # the terminal closed: the process has ended
                break
            if not chunk:
                break
            seen += chunk
            if keys and seen.count(b"? ") > 4 - len(keys):   # a new prompt: type the next key
                os.write(master, keys.pop(0))
        elif proc.poll() is not None:
            break
    proc.wait(timeout=60)
    os.close(master)
    assert proc.returncode == 0, proc.stderr.read()
    text = seen.decode("utf-8", "replace")
    assert "clean (entry 1)" in text and "skipped" in text and "round (entry 2)" in text and "stop" in text
    rows = json.loads(cli("log", "list", "--json")[1])
    assert [r["result"] for r in rows] == ["clean", "round"]
