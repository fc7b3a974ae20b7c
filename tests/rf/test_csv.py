"""CSV sweep files: header recognition for each naming style, explicit column specs,
delimiters, and the conversions from each column pair to Γ.

Conversions are checked against the textbook definitions (Pozar, Microwave Engineering,
4th ed., §2.3, REFERENCES.md §2): Γ = (Z − Z0)/(Z + Z0), |Γ| = (SWR − 1)/(SWR + 1),
RL = −20·log10|Γ| (positive), |Γ| dB = 20·log10|Γ| (negative).
"""

from __future__ import annotations

import numpy as np
import pytest

from mastwatch.rf.csvfile import classify_header, parse_column_spec
from mastwatch.rf.parse import read_sweep

F_MHZ = np.array([7.0, 7.1, 7.2])
Z = np.array([40 - 10j, 50 + 5j, 65 + 20j])
G = (Z - 50) / (Z + 50)  # Pozar (2.35)


def csv_text(header: list[str], cols: list[np.ndarray], delim: str = ",") -> bytes:
    rows = [delim.join(header)]
    rows += [delim.join(repr(float(c[i])) for c in cols) for i in range(len(cols[0]))]
    return ("\n".join(rows) + "\n").encode()


@pytest.mark.parametrize(
    ("name", "role", "unit"),
    [
        ("Frequency (MHz)", "freq", "mhz"),
        ("freq_hz", "freq", "hz"),
        ("Freq [kHz]", "freq", "khz"),
        ("FREQUENCY GHZ", "freq", "ghz"),
        ("Frequency", "freq", None),
        ("Re", "re", None),
        ("real", "re", None),
        ("Re(S11)", "re", None),
        ("Im", "im", None),
        ("imag", "im", None),
        ("Im(Γ)", "im", None),
        ("S11 dB", "db", None),
        ("|Γ| dB", "db", None),
        ("S11 (dB)", "db", None),
        ("Mag (dB)", "db", None),
        ("return loss", "rl", None),
        ("Return Loss (dB)", "rl", None),
        ("RL", "rl", None),
        ("phase", "deg", None),
        ("angle (deg)", "deg", "deg"),
        ("Phase [°]", "deg", "deg"),
        ("Phase (rad)", "rad", None),
        ("R", "r", None),
        ("resistance", "r", None),
        ("R (Ω)", "r", "ohm"),
        ("Re(Z)", "r", None),
        ("X", "x", None),
        ("Reactance (ohms)", "x", "ohm"),
        ("SWR", "swr", None),
        ("VSWR", "swr", None),
        ("|S11|", "mag", None),
        ("S11", None, None),
        ("Marker", None, None),
    ],
)
def test_header_names(name: str, role: str | None, unit: str | None) -> None:
    assert classify_header(name) == (role, unit)


def test_re_im_mhz() -> None:
    s = read_sweep(csv_text(["Frequency (MHz)", "Re", "Im"], [F_MHZ, G.real, G.imag]), "a.csv")
    np.testing.assert_array_equal(s.freq_hz, F_MHZ * 1e6)
    np.testing.assert_array_equal(s.gamma, G)
    assert s.has_phase and s.z0 == 50.0
    assert s.source.format == "csv" and s.source.data_format == "freq:MHz,re,im"
    assert s.source.parameter == "S"


def test_r_x_semicolon_hz() -> None:
    s = read_sweep(csv_text(["freq_hz", "R", "X"], [F_MHZ * 1e6, Z.real, Z.imag], ";"), "a.csv")
    np.testing.assert_allclose(s.gamma, G, rtol=1e-15)
    np.testing.assert_allclose(s.z, Z, rtol=1e-13)
    assert s.source.parameter == "Z"


def test_db_phase_tab_khz() -> None:
    db = 20 * np.log10(np.abs(G))
    deg = np.degrees(np.angle(G))
    s = read_sweep(csv_text(["Freq [kHz]", "S11 dB", "Phase (deg)"], [F_MHZ * 1e3, db, deg],
                            "\t"), "a.csv")
    np.testing.assert_allclose(s.freq_hz, F_MHZ * 1e6, rtol=1e-15)
    np.testing.assert_allclose(s.gamma, G, rtol=1e-12, atol=1e-15)


def test_return_loss_phase() -> None:
    # RL is positive: RL = −20·log10|Γ| (Bird 2009, REFERENCES.md §2)
    rl = -20 * np.log10(np.abs(G))
    deg = np.degrees(np.angle(G))
    s = read_sweep(csv_text(["Frequency (MHz)", "Return loss (dB)", "angle (deg)"],
                            [F_MHZ, rl, deg]), "a.csv")
    np.testing.assert_allclose(s.gamma, G, rtol=1e-12, atol=1e-15)
    np.testing.assert_allclose(s.return_loss_db, rl, rtol=1e-12)


def test_swr_only() -> None:
    # SWR 1.5 ↔ |Γ| = 0.2; SWR 2 ↔ 1/3 (REFERENCES.md §2 table, computed)
    s = read_sweep(b"Frequency (MHz),VSWR\n7.0,1.5\n7.1,2.0\n7.2,1.0\n", "a.csv")
    assert not s.has_phase
    np.testing.assert_allclose(s.gamma_mag, [0.2, 1 / 3, 0.0], rtol=1e-15)
    np.testing.assert_allclose(s.swr, [1.5, 2.0, 1.0], rtol=1e-14)
    assert s.source.parameter == "SWR"


def test_db_only_has_no_phase() -> None:
    s = read_sweep(b"Frequency (MHz),|G| dB\n7.0,-20\n", "a.csv", columns="freq:MHz,db")
    assert not s.has_phase
    # RL 20 dB ↔ |Γ| = 0.1 (REFERENCES.md §2, common practice)
    assert s.gamma_mag[0] == pytest.approx(0.1, rel=1e-15)


def test_prefers_re_im_over_other_columns() -> None:
    data = csv_text(["Frequency (MHz)", "SWR", "R", "X", "Re", "Im"],
                    [F_MHZ, np.full(3, 9.0), Z.real + 5, Z.imag, G.real, G.imag])
    s = read_sweep(data, "a.csv")
    np.testing.assert_array_equal(s.gamma, G)
    assert s.source.data_format == "freq:MHz,swr,r,x,re,im"


def test_unknown_columns_are_skipped() -> None:
    s = read_sweep(b"Marker,Freq (MHz),R,X\nm1,7.0,50,0\n,7.1,40,10\n", "a.csv")
    assert s.points == 2
    assert s.source.data_format == "freq:MHz,r,x".join(["skip,", ""])


def test_explicit_spec_without_header() -> None:
    data = b"7.0,40,-10,x\n7.1,50,5,y\n7.2,65,20,z\n"
    s = read_sweep(data, "a.csv", columns="freq:MHz,r,x,skip")
    np.testing.assert_allclose(s.z, Z, rtol=1e-13)


def test_explicit_spec_overrides_header_and_sets_z0() -> None:
    data = b"F,A,B\n7.0,75,0\n7.1,150,0\n"
    s = read_sweep(data, "a.csv", columns="freq:MHz,r,x,z0=75")
    assert s.z0 == 75.0
    # a resistive load R on Z0 gives SWR = max(R/Z0, Z0/R) (common practice)
    np.testing.assert_allclose(s.swr, [1.0, 2.0], rtol=1e-14)


def test_explicit_spec_freq_unit_from_header() -> None:
    s = read_sweep(b"Frequency (kHz),SWR\n7000,1.5\n", "a.csv", columns="freq,swr")
    assert s.freq_hz[0] == 7e6


def test_unitless_frequency_read_as_hz_when_large() -> None:
    s = read_sweep(b"Frequency,SWR\n7000000,1.5\n7100000,1.2\n", "a.csv")
    np.testing.assert_array_equal(s.freq_hz, [7e6, 7.1e6])
    assert any("read as Hz" in c for c in s.source.comments)


def test_decimal_comma_with_semicolons() -> None:
    s = read_sweep(b"Frequenz (MHz);SWR\n7,05;1,5\n7,15;2,0\n", "a.csv",
                   columns="freq:MHz,swr")
    np.testing.assert_allclose(s.freq_hz, [7.05e6, 7.15e6])
    np.testing.assert_allclose(s.swr, [1.5, 2.0], rtol=1e-14)


def test_quoted_header_and_preamble_and_comments() -> None:
    data = (b"Instrument export\nDate: 2025-03-14 09:30\n"
            b'"Frequency (MHz)","Re","Im"\n# a comment row\n7.0,0.1,0.1\n\n7.1,0.2,0.1\n')
    s = read_sweep(data, "a.csv")
    assert s.points == 2
    assert "Instrument export" in s.source.comments
    assert s.source.measured_at is not None and s.source.measured_at.hour == 9


def test_txt_csv_and_sniffing() -> None:
    data = csv_text(["Frequency (MHz)", "Re", "Im"], [F_MHZ, G.real, G.imag])
    for name in ("a.txt", "export.dat", None):
        assert read_sweep(data, name).source.format == "csv"


def test_column_spec_parser() -> None:
    spec = parse_column_spec(" Freq:kHz , R, X , skip, z0=75 ")
    assert spec.roles == ("freq", "r", "x", "skip")
    assert spec.freq_unit == "khz" and spec.z0 == 75.0
