"""The small sample files in tests/rf/data: good ones read to known values, broken ones
fail with the error their first line announces ("expect: line N: words").

All scenarios are invented (Q-prefix call signs have no real holder).
"""

from __future__ import annotations

import re
from pathlib import Path

import numpy as np
import pytest

from mastwatch.rf.errors import SweepFormatError
from mastwatch.rf.parse import read_sweep

DATA = Path(__file__).parent / "data"
BAD = sorted(DATA.glob("bad_*"))


def test_there_are_sample_files() -> None:
    assert len(BAD) >= 4 and len(list(DATA.glob("good_*"))) >= 3


@pytest.mark.parametrize("path", BAD, ids=[p.name for p in BAD])
def test_broken_file(path: Path) -> None:
    data = path.read_bytes()
    m = re.match(rb"[!#] expect: line (\d+): (.*)", data)
    assert m, f"{path.name} must start with '! expect: line N: words'"
    with pytest.raises(SweepFormatError) as e:
        read_sweep(data, path.name)
    assert e.value.line == int(m.group(1))
    assert m.group(2).decode().strip() in e.value.message


def test_cable_two_port_v1_with_noise() -> None:
    s = read_sweep((DATA / "good_cable_v1.s2p").read_bytes(), "good_cable_v1.s2p")
    np.testing.assert_array_equal(s.freq_hz, [1e6, 10e6, 30e6])
    np.testing.assert_allclose(s.gamma_mag, [0.05, 0.06, 0.08], rtol=1e-15)
    assert s.s21 is not None
    np.testing.assert_allclose(np.abs(s.s21), [0.99, 0.98, 0.97], rtol=1e-15)
    np.testing.assert_allclose(np.angle(s.s21, deg=True), [-5, -50, -150], rtol=1e-13)
    assert s.source.measured_at is not None and s.source.measured_at.year == 2025


def test_dipole_v2_wrapped_z_in_ohms() -> None:
    # TS 2.0 p. 7: v2 Z in ohms, not normalised; [Reference] on the next line.
    s = read_sweep((DATA / "good_dipole_v2.ts").read_bytes(), "good_dipole_v2.ts")
    np.testing.assert_array_equal(s.freq_hz, [7e6, 7.1e6, 7.2e6])
    np.testing.assert_allclose(s.z, [40.5 - 12.25j, 49.75 + 0.5j, 61 + 14j], rtol=1e-13)
    assert s.z0 == 50.0 and s.source.format == "touchstone-2"


def test_analyzer_export_semicolons_decimal_commas_crlf() -> None:
    s = read_sweep((DATA / "good_analyzer_export.csv").read_bytes(), "good_analyzer_export.csv")
    np.testing.assert_array_equal(s.freq_hz, [7e6, 7.1e6, 7.2e6])
    np.testing.assert_allclose(s.z, [40.5 - 12.25j, 49.75 + 0.5j, 61 + 14j], rtol=1e-13)
    assert s.source.data_format == "freq:MHz,r,x,swr"
    assert s.source.comments[:2] == ("Instrument export", "Points: 3")
