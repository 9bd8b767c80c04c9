"""``splitplan pair``: the command checked in-process on the bundled sample.

Numbers printed by the command are compared with the library
(``planner.motion.pair_geometry`` / ``orbit_positions``, themselves validated
against Meeus and the ORB6 ephemeris in tests/test_motion_*.py), so these
tests check the command's wiring, look-up, options and error handling.
"""

from __future__ import annotations

import json

import pytest


def test_current_position_of_70_oph_by_designation_variants(cli):
    # issue 3: look-up by WDS id or designation, with or without spaces and components
    outs = [cli("pair", q, "--epoch", "2031.5", "--json") for q in
            ("STF2272AB", "STF 2272 AB", "STF2272", "18055+0230")]
    for code, out, err in outs:
        assert code == 0, err
    reps = [json.loads(out) for _, out, _ in outs]
    assert {r["wds_id"] for r in reps} == {"18055+0230"}
    assert len({(round(r["rho_arcsec"], 9), round(r["theta_deg"], 9)) for r in reps}) == 1
    r = reps[0]
    assert r["method"] == "orbit" and r["grade"] == 1
    assert r["epoch_yr"] == 2031.5


def test_json_agrees_with_the_library(cli):
    from planner.catalogs import find_pair, load_sample
    from planner.motion import pair_geometry

    code, out, _ = cli("pair", "STF1937AB", "--epoch", "2030.25", "--json")
    assert code == 0
    rep = json.loads(out)
    cat = load_sample()
    g = pair_geometry(cat, 2030.25).loc[find_pair(cat, "STF1937AB")]
    for c in ("rho_arcsec", "theta_deg", "rho_unc_arcsec", "theta_unc_deg"):
        assert rep[c] == pytest.approx(float(g[c]), abs=1e-12)
    assert rep["orbit"]["reference"] == g["orbit_reference"]


def test_text_output_states_method_grade_and_uncertainty(cli):
    code, out, err = cli("pair", "STF2272AB", "--date", "2031-07-02")
    assert code == 0, err
    assert "2031-07-02" in out
    assert "separation" in out and "+/-" in out and "north through east" in out
    assert "grade 1" in out and "orbit" in out


def test_pair_without_orbit_says_last_measure_and_its_age(cli):
    # WDS row A 1248 (00000+7530), bundled sample: no orbit, measured 1904 and 1982
    code, out, _ = cli("pair", "00000+7530", "--epoch", "2032.0")
    assert code == 0
    assert "last catalogued measure" in out
    assert "1982" in out and "(50 yr ago)" in out


def test_years_table_rows_and_values(cli):
    code, out, _ = cli("pair", "STF2272AB", "--years", "2020:2030:2", "--json")
    assert code == 0
    rep = json.loads(out)
    table = rep["table"]
    assert [r["epoch_yr"] for r in table] == [2020.0, 2022.0, 2024.0, 2026.0, 2028.0, 2030.0]
    assert all(r["method"] == "orbit" for r in table)
    code, out2, _ = cli("pair", "STF2272AB", "--epoch", "2024", "--json")
    assert table[2]["theta_deg"] == pytest.approx(json.loads(out2)["theta_deg"], abs=1e-9)
    code, text, _ = cli("pair", "STF2272AB", "--years", "2020:2021:0.5")
    assert code == 0 and "2020.50" in text and "2021.00" in text


@pytest.mark.parametrize("suffix, magic", [(".png", b"\x89PNG"), (".svg", b"<?xml")])
def test_plot_writes_a_figure_with_orientation(cli, tmp_path, suffix, magic):
    f = tmp_path / f"orbit{suffix}"
    code, _, err = cli("pair", "STF1937AB", "--plot", str(f))
    assert code == 0, err
    data = f.read_bytes()
    assert data.startswith(magic)
    if suffix == ".svg":
        text = data.decode("utf-8")
        assert "E left" in text and "N up" in text  # orientation stated on the plot


def test_plot_of_a_pair_without_orbit(cli, tmp_path):
    f = tmp_path / "a.png"
    code, _, err = cli("pair", "00000+7530", "--plot", str(f))
    assert code == 0, err
    assert f.read_bytes().startswith(b"\x89PNG")


@pytest.mark.parametrize("args, words", [
    (("pair", "XYZ999"), "no pair matches"),
    (("pair", "STF2272", "--years", "2040:2020"), "--years"),
    (("pair", "STF2272", "--years", "2020:2040:0"), "--years"),
    (("pair", "STF2272", "--years", "soon"), "--years"),
    (("pair", "STF2272", "--date", "2020-13-01"), "--date"),
    (("pair", "STF2272", "--date", "2020-01-01", "--epoch", "2020"), "either --date or --epoch"),
    (("pair", "STF2272", "--plot", "orbit.gif"), ".png or .svg"),
    (("pair", "STF2272", "--precession", "rigorous"), "precession"),
])
def test_bad_input_is_one_line_and_exit_2(cli, args, words):
    code, out, err = cli(*args)
    assert code == 2
    lines = [ln for ln in err.splitlines() if ln.strip()]
    assert len(lines) == 1 and words in lines[0]
    assert "Traceback" not in err


def test_unknown_pair_suggests_close_names(cli):
    code, _, err = cli("pair", "STF2273")
    assert code == 2 and "closest:" in err
