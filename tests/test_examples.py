"""examples/ stays true to the code: the API example runs as shipped (in a temporary
folder, network blocked by pytest-socket in this process and unused by the child)."""

import os
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def test_api_example_runs(tmp_path):
    env = dict(os.environ, SPLITPLAN_HOME=str(tmp_path / "home"), MPLBACKEND="Agg")
    res = subprocess.run([sys.executable, str(ROOT / "examples" / "api_tonight.py")], cwd=tmp_path, env=env,
                         capture_output=True, text=True, timeout=300)
    assert res.returncode == 0, res.stderr
    assert "Castor:" in res.stdout and (tmp_path / "api-plan.html").stat().st_size > 10_000
