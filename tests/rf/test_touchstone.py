"""Touchstone reading rules and the writer.

Rules from the Touchstone specifications (TS 1.1, 2002; TS 2.0, 2009; REFERENCES.md §1):
option line defaults GHz S MA R 50, a bare "#" means exactly those, only the first
option line counts, keywords and options are case-insensitive, "!" comments anywhere,
two-port v1 order N11 N21 N12 N22, v1 noise data start where the frequency is not above
the last network frequency, [Reference] may wrap, [Begin Information] blocks are ignored.
"""

from __future__ import annotations

import cmath

import numpy as np
import pytest

from mastwatch.rf.errors import AnalysisError
from mastwatch.rf.parse import read_sweep
from mastwatch.rf.sweep import Sweep
from mastwatch.rf.touchstone import write_touchstone


def read(text: str, name: str = "a.s1p") -> Sweep:
    return read_sweep(text.encode(), name)


def test_missing_option_line_means_defaults() -> None:
    # TS 2.0, Option Line, p. 7: GHz, S, MA, R 50
    s = read("1.5 0.5 90\n")
    assert s.freq_hz[0] == 1.5e9
    assert s.gamma[0] == pytest.approx(0.5j, abs=1e-16)
    assert s.z0 == 50.0 and s.source.data_format == "MA" and s.source.parameter == "S"


def test_bare_hash_means_defaults() -> None:
    assert read("#\n1.5 0.5 90\n").freq_hz[0] == 1.5e9


def test_only_the_first_option_line_counts() -> None:
    s = read("# MHz S RI R 50\n7 0.1 0.2\n# GHz Z MA R 75\n8 0.1 0.2\n")
    np.testing.assert_array_equal(s.freq_hz, [7e6, 8e6])
    assert s.gamma[1] == complex(0.1, 0.2) and s.z0 == 50.0


def test_options_any_case_and_order() -> None:
    s = read("# r 75 ri mhz s\n7 0.1 0.2\n")
    assert s.z0 == 75.0 and s.freq_hz[0] == 7e6 and s.gamma[0] == complex(0.1, 0.2)


def test_db_format() -> None:
    # DB = 20·log10|x| (TS 2.0, Option Line): −20 dB ↔ |Γ| = 0.1
    s = read("# MHz S DB R 50\n7 -20 -45\n")
    assert s.gamma[0] == pytest.approx(cmath.rect(0.1, np.deg2rad(-45)), rel=1e-14)


def test_comments_blank_lines_tabs_everywhere() -> None:
    text = ("! head\n\n#\tMHz  S\tRI R 50 ! trailing\n\n"
            "7.0\t0.1  0.2 ! first\n   \n! mid\n7.1 0.1\t0.2\n\n! tail\n")
    s = read(text)
    np.testing.assert_array_equal(s.freq_hz, [7e6, 7.1e6])
    assert s.source.comments[:2] == ("head", "trailing")


def test_measured_at_from_a_comment() -> None:
    s = read("! Measured: 2025-03-14 09:30:15 +01:00 by Q0HRS\n# MHz S RI\n7 0.1 0.1\n")
    assert s.source.measured_at is not None
    assert s.source.measured_at.isoformat() == "2025-03-14T09:30:15+01:00"


def test_no_measured_at_from_a_bare_date() -> None:
    assert read("! 2025-03-14\n# MHz S RI\n7 0.1 0.1\n").source.measured_at is None


def test_two_port_v1_keeps_s21_and_skips_noise() -> None:
    # TS 1.1: N11 N21 N12 N22; noise lines start where freq ≤ the last network frequency.
    text = ("# MHz S RI R 50\n"
            "1 0.1 0.0 0.9 0.0 0.8 0.0 0.2 0.0\n"
            "2 0.2 0.0 0.7 0.0 0.6 0.0 0.3 0.0\n"
            "! noise\n1 1.5 0.3 45 0.2\n2 1.6 0.3 50 0.2\n")
    s = read(text, "cable.s2p")
    np.testing.assert_array_equal(s.gamma, [0.1, 0.2])
    assert s.s21 is not None
    np.testing.assert_array_equal(s.s21, [0.9, 0.7])
    assert s.source.ports == 2


def test_two_port_ports_inferred_without_extension() -> None:
    s = read("# MHz S RI R 50\n1 0.1 0.0 0.9 0.0 0.8 0.0 0.2 0.0\n", "cable.ts")
    assert s.source.ports == 2
    s = read_sweep(b"# MHz S RI R 50\n1 0.1 0.0 0.9 0.0 0.8 0.0 0.2 0.0\n", None)
    assert s.s21 is not None and s.s21[0] == 0.9


def test_v2_reference_wraps_and_information_is_ignored() -> None:
    text = """! v2 two-port
[Version] 2.1
# MHz S RI R 50
[Number of Ports] 2
[Two-Port Data Order] 12_21
[Number of Frequencies] 2
[Reference] 75
  75
[Begin Information]
anything 1 2 3
[End Information]
[Network Data]
1 0.1 0.0 0.8 0.0
  0.9 0.0 0.2 0.0
2 0.2 0.0 0.6 0.0 0.7 0.0 0.3 0.0
[Noise Data]
1 1.5 0.3 45 20
[End]
trailing text is ignored
"""
    s = read(text, "cable.s2p")
    assert s.z0 == 75.0 and s.source.format == "touchstone-2"
    np.testing.assert_array_equal(s.gamma, [0.1, 0.2])
    np.testing.assert_array_equal(s.s21, [0.9, 0.7])  # 12_21: S12 comes first


def test_v2_matrix_format_lower() -> None:
    # [Matrix Format] Lower: N11, N21, N22 (symmetric network, S12 = S21)
    text = ("[Version] 2.0\n# MHz S RI\n[Number of Ports] 2\n[Number of Frequencies] 1\n"
            "[Matrix Format] Lower\n[Network Data]\n1 0.1 0 0.9 0 0.2 0\n")
    s = read(text, "cable.s2p")
    assert s.gamma[0] == 0.1 and s.s21 is not None and s.s21[0] == 0.9


def test_two_port_z_conversion_matches_closed_form() -> None:
    # A series resistor R between the ports: Z11 = Z22 = Z12 = Z21 would be singular, so
    # use a shunt resistor Rsh to ground: Z = Rsh everywhere; S11 = −Z0/(2Rsh + Z0)
    # (Pozar §4.3, two-port networks, from memory).
    rsh = 100.0
    text = f"[Version] 2.0\n# MHz Z RI\n[Number of Ports] 2\n[Two-Port Data Order] 21_12\n" \
           f"[Number of Frequencies] 1\n[Reference] 50 50\n[Network Data]\n" \
           f"1 {rsh} 0 {rsh} 0 {rsh} 0 {rsh} 0\n"
    s = read(text, "shunt.s2p")
    assert s.gamma[0] == pytest.approx(-50 / (2 * rsh + 50), rel=1e-14)
    assert s.s21 is not None
    assert s.s21[0] == pytest.approx(2 * rsh / (2 * rsh + 50), rel=1e-14)


def test_writer_format() -> None:
    s = Sweep(np.array([7e6, 7.1e6]), np.array([0.1 - 0.2j, complex(-0.0, 0.5)]), 50.0)
    text = write_touchstone(s, ["Q0HRS 40 m dipole", "two\nlines"])
    assert text.splitlines() == [
        "! Q0HRS 40 m dipole", "! two", "! lines", "# Hz S RI R 50.0",
        "7000000.0 0.1 -0.2", "7100000.0 -0.0 0.5",
    ]


def test_writer_refuses_swr_only() -> None:
    s = Sweep(np.array([7e6]), np.array([0.2]), has_phase=False)
    with pytest.raises(AnalysisError, match="SWR only"):
        write_touchstone(s)


def test_round_trip_of_an_instrument_file() -> None:
    s = read("# MHz S MA R 50\n7 0.5 -30\n7.1 0.2 10\n")
    back = read(write_touchstone(s))
    assert back.freq_hz.tobytes() == s.freq_hz.tobytes()
    assert back.gamma.tobytes() == s.gamma.tobytes()
