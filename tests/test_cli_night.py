"""The ``night``, ``apertures`` and plan-file command line, end to end (in-process).

Checks: the fixed command-line contract (issue 6 item 8: option names, JSON
array with the contract fields, ISO 8601 UTC slot times); a plan file saved
with ``--save-plan`` reproduces the same plan with ``--plan``; profiles and
session files feed the same machinery; bad input gives one line and exit 2.
"""

from __future__ import annotations

import json
import re
from pathlib import Path

import pandas as pd
import pytest

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"
DEMO = ["--lat", "52.1873", "--lon", "-2.4127", "--elevation", "95", "--tz", "Europe/London",
        "--date", "2026-12-05", "--seeing", "1.5", "--catalog", "sample"]
CONTRACT = ("wds_id", "discoverer", "components", "slot_start_utc", "slot_end_utc", "ra_deg", "dec_deg",
            "rho_arcsec", "theta_deg", "mag1", "mag2", "alt_deg", "airmass", "limit_arcsec", "margin", "chance")


def _rows(out: str) -> list[dict]:
    data = json.loads(out)
    assert isinstance(data, list)
    return data


def test_json_contract(cli):
    code, out, err = cli("night", *DEMO, "--aperture", "102", "--obstruction", "0", "--json")
    assert code == 0, err
    rows = _rows(out)
    # default: fill the nautical-dark window (17:22-06:38, 796 min) with 10-min slots, at most 79
    assert 20 < len(rows) <= 79
    for r in rows:
        assert set(CONTRACT) <= set(r)
        for k in ("slot_start_utc", "slot_end_utc"):
            assert r[k].endswith("Z")
            pd.Timestamp(r[k])  # ISO 8601, parses
        assert 0.0 <= r["chance"] <= 1.0 and r["margin"] > 0
        assert 0 <= r["ra_deg"] < 360 and -90 <= r["dec_deg"] <= 90


def test_text_output_has_the_schedule_and_cautions(cli):
    code, out, err = cli("night", *DEMO, "--aperture", "102", "--limit", "5", "--minutes", "15")
    assert code == 0, err
    assert "dark (nautical)" in out and "Never point" in out and "local rules" in out
    # --limit 5: exactly five numbered schedule rows, each with its time and a verdict note
    rows = [ln for ln in out.splitlines() if re.match(r"^\s+\d+ \d\d:\d\d ", ln)]
    assert [int(r.split()[0]) for r in rows] == [1, 2, 3, 4, 5]
    assert all(r.rstrip().endswith(("should split cleanly", "at the edge: needs steady moments",
                                     "companion near the faintness limit")) for r in rows), rows


def test_plan_file_round_trip_reproduces_the_plan(cli, tmp_path):
    pf = tmp_path / "night.plan.toml"
    code, out1, err = cli("night", *DEMO, "--aperture", "127", "--obstruction", "0.0", "--challenges",
                          "--limit", "8", "--save-plan", str(pf), "--json")
    assert code == 0, err
    text = pf.read_text("utf-8")
    assert 'splitplan_version = "' in text and "catalog_source" in text
    code, out2, err = cli("night", "--plan", str(pf), "--json")
    assert code == 0, err
    assert json.loads(out1) == json.loads(out2)


def test_plan_with_other_inputs_is_refused(cli, tmp_path):
    pf = tmp_path / "p.toml"
    cli("night", *DEMO, "--aperture", "80", "--save-plan", str(pf), "--limit", "1")
    code, out, err = cli("night", "--plan", str(pf), "--aperture", "100")
    assert code == 2 and "--plan" in err and "\n" == err[-1] and err.count("\n") == 1


def test_example_plan_files_run(cli):
    for name in ("brackenfold-102mm.plan.toml", "brackenfold-club.plan.toml"):
        code, out, err = cli("night", "--plan", str(EXAMPLES / name), "--json")
        assert code == 0, err
        assert len(_rows(out)) > 0


def test_saved_profiles_give_the_same_plan(cli):
    assert cli("profile", "site", "add", "field", "--lat", "52.1873", "--lon", "-2.4127", "--elevation", "95",
               "--tz", "Europe/London")[0] == 0
    assert cli("profile", "scope", "add", "four", "--aperture", "102")[0] == 0
    c1, o1, e1 = cli("night", "--site", "field", "--scope", "four", "--date", "2026-12-05", "--seeing", "1.5",
                     "--json")
    c2, o2, e2 = cli("night", *DEMO, "--aperture", "102", "--json")
    assert c1 == 0 and c2 == 0, e1 + e2
    strip = lambda rows: [{k: v for k, v in r.items() if k != "scope"} for r in rows]  # noqa: E731
    assert strip(_rows(o1)) == strip(_rows(o2))


def test_steadiness_is_converted_by_the_table(cli):
    from planner.config.seeing_scale import steadiness_to_seeing

    code, out, err = cli("night", *[a for a in DEMO if a not in ("--seeing", "1.5")], "--aperture", "102",
                         "--steadiness", "6", "--limit", "3")
    assert code == 0, err
    assert f"-> {steadiness_to_seeing(6):.2f}\"" in out and "assumption" in out


@pytest.mark.parametrize("args, words", [
    (["--aperture", "0"], "aperture"),
    (["--aperture", "102", "--obstruction", "1.5"], "obstruction"),
    (["--aperture", "102", "--darkness", "dusk"], "darkness"),
    (["--aperture", "102", "--out", "plan.docx"], "unknown format"),
    (["--aperture", "102", "--ra-from", "25"], "hour"),
    (["--aperture", "102", "--start", "25:99"], "HH:MM"),
    (["--aperture", "102", "--targets", "/nonexistent/list.csv"], "target list"),
    (["--obstruction", "0.3"], "aperture"),
    (["--scope", "nosuch"], "no saved scope"),
])
def test_bad_input_one_line_exit_2(cli, args, words, tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    code, out, err = cli("night", *DEMO, *args)
    assert code == 2, (code, err)
    assert words in err and "Traceback" not in err and err.count("\n") == 1


def test_no_site_is_explained(cli):
    code, out, err = cli("night", "--aperture", "102", "--date", "2026-12-05")
    assert code == 2 and "no site" in err


def test_session_file_club_run(cli):
    code, out, err = cli("night", "--session", str(EXAMPLES / "brackenfold-session.toml"), "--date", "2026-12-05",
                         "--seeing", "1.8", "--limit", "6", "--json")
    assert code == 0, err
    rows = _rows(out)
    scopes = {r["scope"] for r in rows}
    assert len(scopes) == 4  # four club scopes, each with its own share
    keys = [(r["wds_id"], r["components"]) for r in rows if r["section"] == "plan"]
    assert len(keys) == len(set(keys))  # a pair is given to one scope only


def test_apertures_counts_never_decrease(cli, tmp_path):
    plot = tmp_path / "counts.png"
    code, out, err = cli("apertures", "60", "80", "102", "127", "152", "203", "254", "305", *DEMO,
                         "--json", "--plot", str(plot))
    assert code == 0, err
    doc = json.loads(out)
    n = [a["n_split"] for a in doc["apertures"]]
    assert n == sorted(n) and n[-1] > n[0]
    assert sum(a["n_added"] for a in doc["apertures"]) == n[-1]
    assert plot.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def test_apertures_over_a_date_range(cli):
    code, out, err = cli("apertures", "80", "150", "300", *DEMO, "--to", "2027-03-05", "--nights", "3", "--json")
    assert code == 0, err
    doc = json.loads(out)
    assert len(doc["dates"]) == 3 and doc["dates"][0] == "2026-12-05" and doc["dates"][-1] == "2027-03-05"
    n = [a["n_split"] for a in doc["apertures"]]
    assert n == sorted(n)
