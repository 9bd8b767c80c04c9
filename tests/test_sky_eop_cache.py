"""Earth orientation (UT1-UTC, polar motion) from the cached arrays.

Reference: astropy's own interpolation of its bundled IERS table
(``IERS_Auto.ut1_utc`` / ``pm_xy``), which the sky engine used directly before
the arrays were cached.  Tolerance 1e-9 s and 1e-9 arcsec: the same numbers,
interpolated the same way (UT1-UTC across leap seconds included).
"""

import numpy as np
import pytest

from planner.sky import _astrometry as A


@pytest.fixture
def fresh(monkeypatch):
    monkeypatch.setattr(A, "_eop", None)
    yield


def _jd(n=3000, seed=5):
    rng = np.random.default_rng(seed)
    jd = 2451545.0 + rng.uniform(-9500, 9700, n)  # 1974 .. 2026, across many leap seconds
    jd1 = np.floor(jd) + 0.5
    return jd1, jd - jd1


def test_matches_astropy_interpolation(fresh):
    from astropy.utils import iers

    iers.conf.auto_download = False
    t = iers.earth_orientation_table.get()
    jd1, jd2 = _jd()
    dut1, xp, yp = A.earth_orientation(jd1, jd2)
    d_ref, _ = t.ut1_utc(jd1, jd2, return_status=True)
    x_ref, y_ref, _ = t.pm_xy(jd1, jd2, return_status=True)
    rad = np.pi / (180 * 3600)
    assert np.max(np.abs(dut1 - d_ref.to_value("s"))) < 1e-9
    assert np.max(np.abs(xp / rad - x_ref.to_value("arcsec"))) < 1e-9
    assert np.max(np.abs(yp / rad - y_ref.to_value("arcsec"))) < 1e-9


def test_second_process_reads_the_cache(fresh, monkeypatch):
    jd1, jd2 = _jd(10)
    first = A.earth_orientation(jd1, jd2)
    assert A._eop_cache_path().exists()
    monkeypatch.setattr(A, "_eop", None)

    def boom():
        raise AssertionError("astropy's IERS table read again although the cache exists")

    monkeypatch.setattr(A, "_eop_from_astropy", boom)
    again = A.earth_orientation(jd1, jd2)
    for a, b in zip(first, again):
        np.testing.assert_array_equal(a, b)


def test_damaged_cache_is_kept_aside_and_rebuilt(fresh, capsys):
    jd1, jd2 = _jd(10)
    ref = A.earth_orientation(jd1, jd2)
    path = A._eop_cache_path()
    path.write_bytes(b"not an npz file")
    A._eop = None
    again = A.earth_orientation(jd1, jd2)
    np.testing.assert_allclose(again[0], ref[0], rtol=0, atol=1e-12)
    err = capsys.readouterr().err
    assert "damaged" in err and err.count("\n") == 1
    kept = [p for p in path.parent.iterdir() if ".corrupt-" in p.name]
    assert len(kept) == 1 and kept[0].read_bytes() == b"not an npz file"
    assert path.exists()
