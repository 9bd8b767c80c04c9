"""Plan files: the TOML writer and the plan-file format.

The writer is checked against the standard library's TOML reader (tomllib,
Python 3.11+): whatever we write must parse back to the same values,
including hostile text (quotes, backslashes, newlines, control characters).
"""

from __future__ import annotations

import tomllib

import pytest

from planner.config.planfile import dump_toml, read_plan_file, write_plan_file
from planner.errors import CorruptFileError, InputError

HOSTILE = ['say "hi"', "back\\slash", "line\nbreak", "tab\there", "ctrl\x01\x7f", "=cmd|' /C calc'!A0",
           "<script>alert(1)</script>", "ünïcødé ★"]


def test_writer_round_trips_through_tomllib():
    doc = {"a": 1, "b": 2.5, "c": True, "d": "x", "lst": [1.0, 2.0], "names": HOSTILE,
           "table": {"k y": "v", "n": -3.25e-7, "inner": {"z": False}},
           "scopes": [{"name": n, "aperture_mm": 100.0 + i} for i, n in enumerate(HOSTILE)]}
    back = tomllib.loads(dump_toml(doc, header="a header\nsecond line"))
    assert back == doc


def test_none_values_are_left_out():
    assert tomllib.loads(dump_toml({"a": None, "b": 1})) == {"b": 1}


def test_plan_file_carries_version_and_source(tmp_path):
    p = write_plan_file(tmp_path / "p.toml", {"site": {"lat_deg": 1.0}, "scopes": [{"aperture_mm": 80.0}]},
                        "9.9.9", "bundled sample")
    d = read_plan_file(p)
    assert d["splitplan_version"] == "9.9.9" and d["catalog_source"] == "bundled sample"
    assert d["format"] == "splitplan-plan" and d["scopes"] == [{"aperture_mm": 80.0}]


def test_damaged_plan_file_is_reported_and_left_alone(tmp_path):
    # a plan file handed in with --plan is the user's: reported, never moved or rewritten
    p = tmp_path / "club.toml"
    p.write_bytes(b"# splitplan plan file\n\xff\xfe not text")
    with pytest.raises(CorruptFileError, match="left as it is"):
        read_plan_file(p)
    assert p.read_bytes() == b"# splitplan plan file\n\xff\xfe not text"
    assert list(tmp_path.iterdir()) == [p]
    other = tmp_path / "notes.txt"
    other.write_bytes(b"\xff\xfe not text")
    with pytest.raises(InputError, match="not a readable TOML file"):
        read_plan_file(other)


def test_save_plan_never_destroys_another_file(tmp_path):
    from planner.config.planfile import write_plan_file

    essay = tmp_path / "essay.toml"
    essay.write_text("title = 'my essay'\n")
    with pytest.raises(InputError, match="not a splitplan plan file"):
        write_plan_file(essay, {"site": {}, "scopes": []}, "0.1.0", "test")
    assert essay.read_text() == "title = 'my essay'\n"
    # a damaged plan file of ours is moved aside (kept), then the new one is written
    plan = tmp_path / "club.toml"
    plan.write_bytes(b"# splitplan plan file\nbroken = = =\n")
    write_plan_file(plan, {"site": {}, "scopes": []}, "0.1.0", "test")
    kept = list(tmp_path.glob("club.toml.corrupt-*"))
    assert len(kept) == 1 and kept[0].read_bytes() == b"# splitplan plan file\nbroken = = =\n"
    assert read_plan_file(plan)["format"] == "splitplan-plan"


def test_missing_or_directory_plan_file(tmp_path):
    with pytest.raises(InputError, match="does not exist"):
        read_plan_file(tmp_path / "nope.toml")
    with pytest.raises(InputError, match="directory"):
        read_plan_file(tmp_path)


def test_newer_format_is_refused(tmp_path):
    p = tmp_path / "new.toml"
    p.write_text('format = "splitplan-plan"\nformat_version = 99\n', "utf-8")
    with pytest.raises(InputError, match="newer"):
        read_plan_file(p)
