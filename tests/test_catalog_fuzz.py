"""Fuzzing the WDS and ORB6 line parsers with hypothesis.

Inputs: random byte lines drawn by hypothesis, and real catalogue lines
(the USNO ORB6 orbit lines of the bundled sample, the three genuine WDS rows
and well-formed WDS lines built in the USNO layout) mutated at random:
characters replaced by any byte, spans deleted or inserted, lines cut short,
fields overwritten with letters, blanks or signs.  Each hypothesis example
parses one batch of about 200 lines, so a run of 60 examples feeds each
parser more than 10,000 lines (issue 7 item 2).

Properties checked for every batch (the readers' documented contract):
* parsing never raises (one pristine line per batch keeps the file valid);
* every line is accounted for exactly once: read (``line_no`` in the table),
  rejected (``(line_no, reason)`` in ``attrs["problems"]``) or skipped as a
  blank / '#' comment / ORB6 header line;
* untouched real lines are always read;
* what is read is sane: a valid WDS id, RA in [0, 360), Dec in [-90, 90].
"""

from __future__ import annotations

import random
import re

import numpy as np
import pytest
from hypothesis import HealthCheck, example, given, settings
from hypothesis import strategies as st

from conftest import reference_file
from planner.catalogs.orb6 import parse_orb6_lines
from planner.catalogs.wds import parse_wds_lines

BATCH = 200
EXAMPLES = 60  # 60 x ~200 lines > 10,000 lines per parser per run
FUZZ = settings(max_examples=EXAMPLES, deadline=None,
                suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])

WDS_ROWS = [ln.encode()[:130] for ln in reference_file("wds_rows_found.txt").read_text().splitlines()
            if not ln.startswith("#")]
ORB6_ROWS = [ln.encode() for ln in reference_file("orb6_orbits.txt").read_text().splitlines()[7:]
             if ln.strip()]
ID_RE = re.compile(r"^\d{5}[+-]\d{4}$")


def wds_row(rng: random.Random) -> bytes:
    """A well-formed WDS summary line in the USNO layout (FORMATS.md A)."""
    h, m, t = rng.randrange(24), rng.randrange(60), rng.randrange(10)
    sign = rng.choice("+-")
    d, am = rng.randrange(90), rng.randrange(60)
    buf = [" "] * 130

    def put(col, text):
        buf[col - 1:col - 1 + len(text)] = list(text)

    put(1, f"{h:02d}{m:02d}{t}{sign}{d:02d}{am:02d}")
    put(11, rng.choice(["STF", "BU ", "A  ", "HU "]) + f"{rng.randrange(1, 9999):4d}")
    put(18, rng.choice(["AB", "", "Aa,Ab", "BC"]))
    put(24, f"{rng.randrange(1780, 2025):4d}")
    put(29, f"{rng.randrange(1780, 2025):4d}")
    put(34, f"{rng.randrange(1, 999):4d}")
    put(39, f"{rng.randrange(360):3d}")
    put(47, f"{rng.uniform(0, 99):5.1f}")
    put(59, f"{rng.uniform(0, 15):5.2f}")
    put(81, f"{rng.randrange(-999, 999):+04d}{rng.randrange(-999, 999):+04d}")
    put(113, f"{h:02d}{m:02d}{rng.uniform(0, 59.99):05.2f}{sign}{d:02d}{am:02d}{rng.uniform(0, 59.9):04.1f}")
    return "".join(buf).encode()


def mutate(line: bytes, rng: random.Random) -> bytes:
    """One to three random edits of a line (never a line break)."""
    b = bytearray(line)
    for _ in range(rng.randint(1, 3)):
        op = rng.randrange(8)
        n = len(b)
        pos = rng.randrange(n) if n else 0
        if op == 0 and n:  # replace with any byte but line ends
            b[pos] = rng.choice([c for c in range(256) if c not in (10, 13)])
        elif op == 1 and n:  # printable replacement
            b[pos] = rng.randrange(32, 127)
        elif op == 2:  # delete a span
            del b[pos:pos + rng.randint(1, 12)]
        elif op == 3:  # insert a span
            b[pos:pos] = bytes(rng.randrange(32, 127) for _ in range(rng.randint(1, 6)))
        elif op == 4:  # cut short
            del b[rng.randrange(n + 1):]
        elif op == 5 and n:  # letters over a field
            b[pos:pos + 4] = b"XyZ!"[: max(0, min(4, n - pos))]
        elif op == 6 and n:  # blank a field
            b[pos:pos + 6] = b" " * min(6, n - pos)
        else:  # signs, points, digits
            if n:
                b[pos] = rng.choice(b"+-.0123456789 ")
    return bytes(b).replace(b"\n", b" ").replace(b"\r", b" ")


random_line = st.binary(min_size=0, max_size=300).map(lambda s: s.replace(b"\n", b"").replace(b"\r", b""))


def check_partition(df, lines, skipped):
    n = len(lines)
    read = df["line_no"].astype(int).tolist()
    rejected = [ln for ln, _ in df.attrs["problems"]]
    assert len(set(read)) == len(read) and len(set(rejected)) == len(rejected)
    assert not set(read) & set(rejected)
    assert not (set(read) | set(rejected)) & skipped
    assert set(read) | set(rejected) | skipped == set(range(1, n + 1))
    assert all(isinstance(r, str) and r for _, r in df.attrs["problems"])
    assert all(ID_RE.match(w) for w in df["wds_id"])
    ra, dec = df["ra_deg"].to_numpy(float), df["dec_deg"].to_numpy(float)
    assert np.all((ra >= 0) & (ra < 360) | np.isnan(ra))
    assert np.all((dec >= -90) & (dec <= 90) | np.isnan(dec))


def wds_skipped(lines):
    # documented: blank lines (only blanks, not longer than 130) and '#' comments are skipped
    return {i + 1 for i, ln in enumerate(lines)
            if (ln.strip(b" ") == b"" and len(ln) <= 130) or ln[:1] == b"#"}


def orb6_skipped(lines):
    # documented: blank lines, '#' comments, and the USNO header lines (title, ruler, labels)
    out = set()
    for i, ln in enumerate(lines):
        body = ln[:264]
        if (body.strip(b" ") == b"" and len(ln) <= 264) or ln[:1] == b"#":
            out.add(i + 1)
        elif re.fullmatch(rb"[0-9 ]*", body) and len(body.replace(b" ", b"")) > 60:
            out.add(i + 1)
        elif not ID_RE.match(body[19:29].decode("latin-1")) and (
                ln.startswith(b"RA,Dec") or b"Catalog of Orbits" in ln):
            out.add(i + 1)
    return out


@FUZZ
@given(seed=st.integers(0, 2**32 - 1), drawn=st.lists(random_line, min_size=0, max_size=10))
@example(seed=268377606, drawn=[])  # drew the id 12345+9004 (Dec 90 deg 04'), read as Dec +90.07 (issue 12)
def test_fuzz_wds(seed, drawn):
    rng = random.Random(seed)

    def source(r):
        return r.choice(WDS_ROWS) if r.random() < 0.3 else wds_row(r)

    lines = [source(rng)]
    untouched = {1}
    for _ in range(BATCH - 1 - len(drawn)):
        s = source(rng)
        if rng.random() < 0.2:
            lines.append(s)
            untouched.add(len(lines))
        else:
            lines.append(mutate(s, rng))
    lines += drawn
    df = parse_wds_lines(lines)
    check_partition(df, lines, wds_skipped(lines))
    assert untouched <= set(df["line_no"].astype(int))


@FUZZ
@given(seed=st.integers(0, 2**32 - 1), drawn=st.lists(random_line, min_size=0, max_size=10))
def test_fuzz_orb6(seed, drawn):
    rng = random.Random(seed)
    lines = [rng.choice(ORB6_ROWS)]
    untouched = {1}
    for _ in range(BATCH - 1 - len(drawn)):
        s = rng.choice(ORB6_ROWS)
        if rng.random() < 0.2:
            lines.append(s)
            untouched.add(len(lines))
        else:
            lines.append(mutate(s, rng))
    lines += drawn
    df = parse_orb6_lines(lines)
    check_partition(df, lines, orb6_skipped(lines))
    assert untouched <= set(df["line_no"].astype(int))
    # exactly one preferred orbit per (wds_id, components) whatever was damaged
    assert (df.groupby(["wds_id", "components"])["preferred"].sum() == 1).all()
    e = df["ecc"].to_numpy(float)
    assert not np.any(df["complete"].to_numpy(bool) & ~((e >= 0) & (e < 1)))


def test_fuzz_volume():
    # the settings above feed each parser at least 10,000 lines per run
    assert EXAMPLES * (BATCH - 10) >= 10_000


@pytest.mark.parametrize("parser, rows", [(parse_wds_lines, WDS_ROWS), (parse_orb6_lines, ORB6_ROWS[:50])])
def test_every_single_byte_replacement(parser, rows):
    # Deterministic sweep: each column of a real line replaced by 'x', one line per column;
    # all lines are accounted for and the untouched first line is read.
    base = rows[0]
    lines = [base] + [base[:i] + b"x" + base[i + 1:] for i in range(len(base))]
    df = parser(lines)
    read = set(df["line_no"].astype(int))
    rej = {ln for ln, _ in df.attrs["problems"]}
    assert 1 in read and read | rej == set(range(1, len(lines) + 1)) and not read & rej


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(content=st.binary(max_size=3000), kind=st.sampled_from(["wds", "orb6", "any"]))
def test_fuzz_whole_files(tmp_path_factory, content, kind):
    # Whole files of arbitrary bytes (line ends included): a reader returns a table or raises a
    # PlannerError with one line -- never another exception, never a traceback for the user.
    from planner.catalogs.catalog import load_catalog
    from planner.catalogs.orb6 import read_orb6
    from planner.catalogs.wds import read_wds
    from planner.errors import PlannerError

    p = tmp_path_factory.mktemp("fz") / "cat.txt"
    p.write_bytes(content)
    reader = {"wds": read_wds, "orb6": read_orb6, "any": lambda x: load_catalog(str(x)).pairs}[kind]
    try:
        df = reader(p)
    except PlannerError as exc:
        assert "\n" not in str(exc)
    else:
        # a reader that returns without error has read at least one row (an empty result
        # raises CatalogError, see read_wds/read_orb6), and every row points at a real line
        assert len(df) > 0
        if kind != "any":
            n_lines = len(content.replace(b"\r\n", b"\n").replace(b"\r", b"\n").split(b"\n"))
            assert df["line_no"].between(1, n_lines).all()
