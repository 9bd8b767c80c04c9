"""Exports parse back, carry what they must, and neutralise hostile catalogue text.

Readers used as the outside reference: pandas ``read_csv`` (CSV), the json
module, astropy ``votable.parse`` (VOTable, IVOA standard), Python's
``html.parser`` (HTML structure), the PDF header/trailer and page objects.
Hostile strings (a script tag, a spreadsheet formula) are planted in the
bundled catalogue's discoverer and component fields before planning.
"""

from __future__ import annotations

import dataclasses
import html.parser
import json
import os
import re

import numpy as np
import pandas as pd
import pytest

from planner.plan.model import NightRequest

SITE = {"lat_deg": 52.1873, "lon_deg": -2.4127, "elevation_m": 95.0, "tz": "Europe/London"}
EVIL_NAME = "<script>alert('x')</script>"
EVIL_COMP = "=cmd|' /C calc'!A0"


@pytest.fixture(scope="module")
def plan(tmp_path_factory):
    old = os.environ.get("SPLITPLAN_HOME")
    os.environ["SPLITPLAN_HOME"] = str(tmp_path_factory.mktemp("home"))
    try:
        from planner.catalogs import load_catalog
        from planner.plan.night import plan_night

        cat = load_catalog("sample")
        pairs = cat.pairs.copy()
        # plant hostile text in every row that could be scheduled
        pairs["discoverer"] = pairs["discoverer"].astype(str) + " " + EVIL_NAME
        pairs["components"] = EVIL_COMP
        orbits = cat.orbits.copy()
        orbits["components"] = EVIL_COMP
        cat = dataclasses.replace(cat, pairs=pairs, orbits=orbits)
        req = NightRequest(site=dict(SITE), scopes=[{"name": "<b>club</b> =1+1", "aperture_mm": 102.0}],
                           site_name="Field <img src=x onerror=alert(1)>", date="2026-12-05",
                           seeing_arcsec=1.5, limit=6, challenges=True)
        yield plan_night(req, catalog=cat)
    finally:
        if old is None:
            os.environ.pop("SPLITPLAN_HOME", None)
        else:
            os.environ["SPLITPLAN_HOME"] = old


def test_hostile_text_reached_the_plan(plan):
    assert len(plan.schedule) >= 3
    assert plan.schedule["discoverer"].str.contains("<script>", regex=False).all()


def test_csv_parses_back_and_has_no_live_formulas(plan, tmp_path):
    from planner.report import write_report

    p = tmp_path / "plan.csv"
    assert write_report(plan, p) == "csv"
    df = pd.read_csv(p)
    assert len(df) == len(plan.schedule)
    for col in [c for c in df.columns if not pd.api.types.is_numeric_dtype(df[c])]:
        cells = df[col].dropna().astype(str)
        assert not cells.str.match(r"^[=+\-@\t\r]").any(), col
    assert (df["components"] == "'" + EVIL_COMP).all()
    np.testing.assert_allclose(df["rho_arcsec"], plan.schedule["rho_arcsec"], rtol=1e-5)
    # numbers stay numbers: numeric columns parse back as numbers with their values
    for col in ("dec_deg", "ra_deg", "margin", "limit_arcsec"):
        assert pd.api.types.is_numeric_dtype(df[col]), col
        np.testing.assert_allclose(df[col], plan.schedule[col], rtol=1e-5, atol=1e-9)
    pd.to_datetime(df["slot_start_utc"])


def test_json_file_parses_back(plan, tmp_path):
    from planner.report import write_report

    p = tmp_path / "plan.json"
    write_report(plan, p)
    rows = json.loads(p.read_text("utf-8"))
    assert [r["wds_id"] for r in rows] == list(plan.schedule["wds_id"])
    assert rows[0]["discoverer"].endswith(EVIL_NAME)  # JSON keeps the text as data


@pytest.mark.parametrize("ext", [".xml", ".vot"])
def test_votable_parses_with_astropy(plan, tmp_path, ext):
    from astropy.io.votable import parse_single_table

    from planner.report import write_report

    p = tmp_path / f"plan{ext}"
    assert write_report(plan, p) == "votable"
    t = parse_single_table(str(p)).to_table()
    assert len(t) == len(plan.schedule)
    assert str(t["rho_arcsec"].unit) == "arcsec" and str(t["ra_deg"].unit) == "deg"
    np.testing.assert_allclose(np.asarray(t["theta_deg"]), plan.schedule["theta_deg"], rtol=1e-9)
    assert str(t["discoverer"][0]).endswith(EVIL_NAME)


class _Collector(html.parser.HTMLParser):
    def __init__(self):
        super().__init__()
        self.tags: list[str] = []
        self.srcs: list[str] = []
        self.text: list[str] = []

    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)
        for k, v in attrs:
            if k in ("src", "href"):
                self.srcs.append(v or "")

    def handle_data(self, data):
        self.text.append(data)


def test_html_is_self_contained_and_escaped(plan, tmp_path):
    from planner.report import write_report

    p = tmp_path / "plan.html"
    assert write_report(plan, p) == "html"
    page = p.read_text("utf-8")
    c = _Collector()
    c.feed(page)
    assert "script" not in c.tags and "img" in c.tags and "svg" in c.tags and "table" in c.tags
    assert all(s.startswith("data:image/") for s in c.srcs)  # nothing fetched from outside
    assert not re.search(r"https?://(?!www\.w3\.org/2000/svg)", page)
    joined = "".join(c.text)
    assert EVIL_NAME in joined and "<img src=x onerror" in joined  # shown as text, not markup
    assert "Never point" in joined and "local rules" in joined  # cautions
    assert "dark window" in joined and "Moon" in joined


def test_pdf_is_a_pdf_with_pages(plan, tmp_path):
    from planner.report import write_report

    p = tmp_path / "plan.pdf"
    assert write_report(plan, p) == "pdf"
    data = p.read_bytes()
    assert data.startswith(b"%PDF-") and data.rstrip().endswith(b"%%EOF")
    assert len(re.findall(rb"/Type\s*/Page\b", data)) >= 3  # cover, table, diagrams


def test_text_export(plan, tmp_path):
    from planner.report import write_report

    p = tmp_path / "plan.txt"
    write_report(plan, p)
    assert "Challenges" in p.read_text("utf-8") or (plan.schedule["section"] == "plan").all()


def test_unknown_extension_is_refused(plan, tmp_path):
    from planner.errors import InputError
    from planner.report import write_report

    with pytest.raises(InputError, match="unknown extension"):
        write_report(plan, tmp_path / "plan.docx")


def test_pair_diagram_geometry():
    # theta 90 deg = east, drawn to the LEFT of the primary (north up, east left, as seen in the sky)
    from planner.report.charts import _pair_geometry, airy_radius_arcsec

    airy, half, dx, dy = _pair_geometry(2.0, 90.0, 100.0)
    assert dx == pytest.approx(-2.0) and dy == pytest.approx(0.0, abs=1e-12)
    _, _, dx, dy = _pair_geometry(2.0, 0.0, 100.0)
    assert dx == pytest.approx(0.0, abs=1e-12) and dy == pytest.approx(2.0)
    # Airy first dark ring 1.22 lambda/D: 138.4"/D[mm] at 550 nm (docs/methods.md section 1)
    assert airy_radius_arcsec(100.0) == pytest.approx(1.384, abs=0.001)
