"""Tables to standard output for pipes (``--out -`` with ``--format``), and RA/Dec shown
sexagesimal as well as in degrees, at full precision in CSV (issue 12, item 16).

Sexagesimal text is checked against astropy's ``Angle.to_string`` (the reference library).
"""

from __future__ import annotations

import csv
import io
import json

import numpy as np
import pytest
from astropy import units as u
from astropy.coordinates import Angle

DEMO = ["--lat", "52.1873", "--lon", "-2.4127", "--tz", "Europe/London", "--date", "2026-12-05",
        "--seeing", "1.5", "--aperture", "102", "--catalog", "sample"]
NIGHT = ["night", *DEMO, "--limit", "6"]


def _rows(text: str) -> list[dict]:
    return list(csv.DictReader(io.StringIO(text)))


# -- sexagesimal text --------------------------------------------------------------------


def test_ra_dec_text_matches_astropy():
    from planner.report.angles import dec_text, ra_text

    rng = np.random.default_rng(16)
    for ra in np.concatenate([rng.uniform(0, 360, 2000), [0.0, 271.3634, 15 * (1 + 59 / 60 + 59.96 / 3600)]]):
        assert ra_text(ra) == Angle(ra, u.deg).to_string(unit=u.hour, sep="hms", precision=1, pad=True)
        assert ra_text(ra, 2, ":") == Angle(ra, u.deg).to_string(unit=u.hour, sep=":", precision=2, pad=True)
    for dec in np.concatenate([rng.uniform(-90, 90, 2000), [0.0, -0.3, 89.99999, -(1 + 59 / 60 + 59.6 / 3600)]]):
        assert dec_text(dec) == Angle(dec, u.deg).to_string(unit=u.deg, sep="dms", precision=0, pad=True,
                                                            alwayssign=True)
        assert dec_text(dec, 1, ":") == Angle(dec, u.deg).to_string(unit=u.deg, sep=":", precision=1, pad=True,
                                                                    alwayssign=True)
    # where astropy writes 24h00m00.0s and -00d00m00s we wrap to 0 h and drop the sign of a zero
    assert ra_text(359.99999) == "00h00m00.0s" and dec_text(-0.0001) == "+00d00m00s"
    assert ra_text(float("nan")) == "" and dec_text(None) == ""


def test_pair_text_shows_sexagesimal_and_degrees(cli):
    code, out, _ = cli("pair", "STF2272AB", "--date", "2026-12-05", "--json")
    rep = json.loads(out)
    code, out, _ = cli("pair", "STF2272AB", "--date", "2026-12-05")
    ra = Angle(rep["ra_date_deg"], u.deg).to_string(unit=u.hour, sep="hms", precision=1, pad=True)
    dec = Angle(rep["dec_date_deg"], u.deg).to_string(unit=u.deg, sep="dms", precision=0, pad=True, alwayssign=True)
    line = next(ln for ln in out.splitlines() if ln.startswith("position"))
    assert f"RA {ra} = {rep['ra_date_deg']:.4f} deg" in line and f"Dec {dec} = {rep['dec_date_deg']:+.4f} deg" in line


# -- CSV at full precision ------------------------------------------------------------------


@pytest.fixture(scope="module")
def demo_plan():
    from planner.api import plan_night

    return plan_night(site={"lat_deg": 52.1873, "lon_deg": -2.4127, "elevation_m": 95, "tz": "Europe/London"},
                      scopes=[{"name": "102 mm", "aperture_mm": 102}], date="2026-12-05", seeing_arcsec=1.5,
                      limit=8)


def test_csv_numbers_read_back_exactly(demo_plan):
    """RA was cut to 6 significant digits (296.39 for 296.3897) by '%.6g'."""
    from planner.report.exports import csv_text

    rows = _rows(csv_text(demo_plan))
    sched = demo_plan.schedule
    assert len(rows) == len(sched) > 0
    for row, ra, dec, rho in zip(rows, sched["ra_deg"], sched["dec_deg"], sched["rho_arcsec"]):
        assert float(row["ra_deg"]) == ra and float(row["dec_deg"]) == dec and float(row["rho_arcsec"]) == rho


def test_csv_has_sexagesimal_columns_after_the_degrees(demo_plan):
    from planner.report.exports import csv_text

    text = csv_text(demo_plan)
    header = text.splitlines()[0].split(",")
    i = header.index("dec_deg")
    assert header[i + 1: i + 3] == ["ra_hms", "dec_dms"]
    for row in _rows(text):
        assert abs(Angle(row["ra_hms"], u.hourangle).deg - float(row["ra_deg"])) < 0.006 * 15 / 3600 + 1e-9
        assert row["dec_dms"][0] == "'"  # the spreadsheet text mark before a sign (report/safe.py)
        assert abs(Angle(row["dec_dms"][1:], u.deg).deg - float(row["dec_deg"])) < 0.051 / 3600


def test_html_shows_sexagesimal_and_degrees(demo_plan):
    from planner.report.html import render_html

    html = render_html(demo_plan)
    r = demo_plan.schedule.iloc[0]
    ra = Angle(r["ra_deg"], u.deg).to_string(unit=u.hour, sep="hms", precision=1, pad=True)
    dec = Angle(r["dec_deg"], u.deg).to_string(unit=u.deg, sep="dms", precision=0, pad=True, alwayssign=True)
    dec = dec.replace("d", "°").replace("m", "′").replace("s", "″")
    assert f"{ra} {dec} ({r['ra_deg']:.4f}°, {r['dec_deg']:+.4f}°)" in html


# -- --out - ----------------------------------------------------------------------------------


def test_night_csv_to_stdout_is_the_table_alone(cli):
    code, out, err = cli(*NIGHT, "--out", "-", "--format", "csv")
    assert code == 0
    rows = _rows(out)
    assert len(rows) >= 6 and {"wds_id", "ra_deg", "ra_hms", "slot_start_utc"} <= set(rows[0])
    assert "Night plan" not in out and "wrote" not in err
    code, js, _ = cli(*NIGHT, "--json")
    assert [r["wds_id"] for r in rows] == [d["wds_id"] for d in json.loads(js)]


def test_notes_stay_on_stderr(cli):
    """Without --tz the command notes that times are UTC: on stderr, never in the table."""
    args = ["night", "--lat", "52.1873", "--lon", "-2.4127", "--date", "2026-12-05", "--aperture", "102",
            "--limit", "3", "--out", "-", "--format", "csv"]
    code, out, err = cli(*args)
    assert code == 0 and "note" in err and "note:" not in out
    assert out.splitlines()[0].startswith("section,")


def test_night_json_and_votable_to_stdout(cli):
    from astropy.io.votable import parse_single_table

    code, out, _ = cli(*NIGHT, "--out", "-", "--format", "json")
    code2, js, _ = cli(*NIGHT, "--json")
    assert code == code2 == 0 and json.loads(out) == json.loads(js)
    code, out, _ = cli(*NIGHT, "--out", "-", "--format", "votable")
    assert code == 0 and out.startswith("<?xml")
    t = parse_single_table(io.BytesIO(out.encode("utf-8"))).to_table()
    assert len(t) == len(json.loads(js)) and str(t["ra_deg"].unit) == "deg"


def test_apertures_table_to_stdout(cli):
    code, out, err = cli("apertures", "60", "102", *DEMO[:-4], "--out", "-", "--format", "csv")
    assert code == 0 and "wrote" not in err
    rows = _rows(out)
    assert [float(r["aperture_mm"]) for r in rows] == [60.0, 102.0]
    code, out, _ = cli("apertures", "60", "102", *DEMO[:-4], "--out", "-", "--format", "json")
    assert [a["aperture_mm"] for a in json.loads(out)["apertures"]] == [60.0, 102.0]


@pytest.mark.parametrize("extra, words", [
    (["--out", "-"], ["--out -", "--format", "csv"]),
    (["--format", "csv"], ["--format", "--out -"]),
    (["--out", "-", "--format", "csv", "--json"], ["--json", "--out -"]),
    (["--out", "-", "--format", "xlsx"], ["--format", "'xlsx'", "csv"]),
])
def test_stdout_option_mistakes_are_one_line(cli, extra, words):
    code, out, err = cli(*NIGHT, *extra)
    lines = [ln for ln in err.splitlines() if ln.strip()]
    assert code == 2 and out == "" and len(lines) == 1 and lines[0].startswith("splitplan: error:")
    for w in words:
        assert w in lines[0], (w, lines[0])
