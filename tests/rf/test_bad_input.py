"""Every class of bad sweep file gets a SweepFormatError saying what is wrong and where.

Line numbers are 1-based lines of the file as given, counting comment and blank lines
(issue 2). Each case asserts the error type, words of the message and the line.
"""

from __future__ import annotations

import numpy as np
import pytest

from mastwatch.rf.errors import SweepFormatError
from mastwatch.rf.limits import MAX_FILE_BYTES, MAX_POINTS
from mastwatch.rf.parse import read_sweep

HEAD = "! club sweep\n\n# MHz S RI R 50\n! freq re im\n"  # 4 lines before the data
GOOD = ["7.000 0.10 -0.20", "7.100 0.05 -0.10", "7.200 0.12 0.15"]


def failure(data: bytes | str, filename: str | None = "ant.s1p", **kw: str) -> SweepFormatError:
    raw = data.encode() if isinstance(data, str) else data
    with pytest.raises(SweepFormatError) as info:
        read_sweep(raw, filename, **kw)
    return info.value


def s1p(*rows: str) -> str:
    return HEAD + "\n".join(rows) + "\n"


# -- Touchstone data lines -------------------------------------------------------------------


def test_wrong_column_count_names_the_line() -> None:
    e = failure(s1p(GOOD[0], "7.100 0.05 -0.10 0.3", GOOD[2]))
    assert e.line == 6
    assert "expected 3 numbers" in e.message and "found 4" in e.message


def test_too_few_columns() -> None:
    e = failure(s1p(GOOD[0], GOOD[1], "7.200 0.12"))
    assert e.line == 7
    assert "found 2" in e.message


def test_non_number_is_quoted() -> None:
    e = failure(s1p(GOOD[0], "7.100 0.05 -O.10", GOOD[2]))
    assert e.line == 6
    assert "'-O.10' is not a number" in e.message
    assert str(e).startswith("line 6: ")


def test_decreasing_frequency_names_the_previous_one() -> None:
    e = failure(s1p(GOOD[0], GOOD[1], "7.050 0.12 0.15"))
    assert e.line == 7
    assert "7.05 MHz" in e.message and "7.1 MHz on line 6" in e.message
    assert "must increase" in e.message


def test_duplicate_frequency() -> None:
    e = failure(s1p(GOOD[0], GOOD[1], "7.100 0.12 0.15"))
    assert e.line == 7
    assert "duplicate frequency 7.1 MHz" in e.message and "line 6" in e.message


def test_negative_frequency() -> None:
    e = failure(s1p("-7.0 0.1 0.1", GOOD[1]))
    assert e.line == 5
    assert "negative frequency" in e.message


@pytest.mark.parametrize("token", ["nan", "NaN", "inf", "-Infinity", "1e999"])
def test_nan_and_infinity(token: str) -> None:
    e = failure(s1p(GOOD[0], f"7.100 {token} -0.10", GOOD[2]))
    assert e.line == 6
    assert "not a finite number" in e.message


def test_gamma_above_passive_limit() -> None:
    # |Γ| = 1.2 > rf.limits.MAX_PASSIVE_GAMMA (1.05)
    e = failure(s1p(GOOD[0], GOOD[1], "7.200 1.2 0.0"))
    assert e.line == 7
    assert "|S11| = 1.2" in e.message and "1.05" in e.message and "passive" in e.message


def test_z_file_with_negative_resistance_is_not_passive() -> None:
    e = failure("# MHz Z RI R 50\n7.0 1.0 0.0\n7.1 -0.5 0.0\n")
    assert e.line == 3
    assert "|S11| = 3" in e.message


def test_z_equal_to_minus_r_cannot_be_converted() -> None:
    e = failure("# MHz Z RI R 50\n7.0 1.0 0.0\n7.1 -1.0 0.0\n")
    assert e.line == 3
    assert "cannot be converted" in e.message


@pytest.mark.parametrize(
    "text",
    ["", "\n\n", "! only a comment\n", "# MHz S RI R 50\n", "! a\n# MHz S RI R 50\n! b\n\n"],
)
def test_empty_data(text: str) -> None:
    e = failure(text)
    assert e.line is None
    assert "no data" in e.message


# -- option line -----------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("option", "words"),
    [
        ("# THz S RI R 50", "unknown 'THz'"),
        ("# MHz Q RI R 50", "unknown 'Q'"),
        ("# MHz S XY R 50", "unknown 'XY'"),
        ("# MHz S RI R", "R must be followed"),
        ("# MHz S RI R -50", "not a positive number"),
        ("# MHz GHz S RI", "unit is given twice"),
        ("# MHz H RI R 50", "H-parameters are not supported"),
    ],
)
def test_bad_option_line(option: str, words: str) -> None:
    e = failure(f"! header\n{option}\n7.0 0.1 0.1\n")
    assert e.line == 2
    assert words in e.message


# -- limits and text -------------------------------------------------------------------------


def test_too_many_points() -> None:
    n = MAX_POINTS + 1
    f = np.arange(1, n + 1, dtype=float)
    body = "\n".join(f"{x:.0f} 0.1 0.0" for x in f)
    e = failure("# Hz S RI R 50\n" + body + "\n")
    assert e.line == MAX_POINTS + 2  # point MAX_POINTS + 1 is on that line
    assert f"more than {MAX_POINTS}" in e.message


def test_too_large_is_refused_before_decoding() -> None:
    # Not UTF-8 either: the size is checked first, before any decoding work.
    e = failure(b"\xff" * (MAX_FILE_BYTES + 1))
    assert e.line is None
    assert "limit is 20 MB" in e.message
    assert str(MAX_FILE_BYTES) in e.message


def test_nul_bytes_mean_not_text() -> None:
    e = failure(b"# MHz S RI R 50\n7.0 0.1 0.1\n\x00\x01\x02")
    assert e.line == 3
    # The offset counts from 0: 16 bytes of option line + 12 of data line come first.
    assert e.message == "not a text file: byte 0x00 at offset 28 (a NUL byte; is it a binary file?)"


def test_invalid_utf8_means_not_text() -> None:
    e = failure(b"! ok\n! caf\xe9\n7.0 0.1 0.1\n")
    assert e.line == 2
    # Latin-1 "é" (0xE9) opens a 3-byte UTF-8 sequence but "\n" follows, so it is invalid
    # (RFC 3629 §3); it sits at offset 10 counting from 0 ("! ok\n" is 5 bytes, "! caf" 5).
    assert e.message == (
        "not a text file: byte 0xE9 at offset 10 is not valid UTF-8 "
        "(save the file as UTF-8 text)"
    )


@pytest.mark.parametrize("newline", ["\r\n", "\r"])
def test_line_numbers_with_windows_and_old_mac_newlines(newline: str) -> None:
    text = s1p(GOOD[0], GOOD[1], "7.100 0.12 0.15").replace("\n", newline)
    e = failure(text)
    assert e.line == 7


def test_line_numbers_after_a_bom() -> None:
    e = failure("\ufeff" + s1p(GOOD[0], "x 0.05 -0.10"))
    assert e.line == 6
    assert "'x' is not a number" in e.message


def test_too_many_ports() -> None:
    e = failure(s1p(*GOOD), "switch.s4p")
    assert "4-port" in e.message and ".s1p, .s2p" in e.message


# -- Touchstone version 2 and two-ports -------------------------------------------------------

V2 = """[Version] 2.0
# MHz S MA R 50
[Number of Ports] 1
[Number of Frequencies] {n}
[Network Data]
{rows}
[End]
"""


def test_v2_number_of_frequencies_mismatch() -> None:
    e = failure(V2.format(n=4, rows="1 0.5 10\n2 0.5 20\n3 0.5 30"))
    assert e.line == 4
    assert "[Number of Frequencies] is 4" in e.message and "holds 3" in e.message


def test_v2_incomplete_last_frequency() -> None:
    e = failure(V2.format(n=3, rows="1 0.5 10\n2 0.5 20\n3 0.5"))
    assert e.line == 8
    assert "incomplete" in e.message and "2 of 3" in e.message


def test_v2_unsupported_version() -> None:
    e = failure("! x\n[Version] 3.0\n")
    assert e.line == 2
    assert "version '3.0' is not supported" in e.message


def test_v2_without_network_data() -> None:
    e = failure("[Version] 2.0\n# MHz S MA\n[Number of Ports] 1\n[Number of Frequencies] 1\n")
    assert "[Network Data]" in e.message


def test_v2_two_port_needs_data_order() -> None:
    text = ("[Version] 2.0\n# MHz S MA\n[Number of Ports] 2\n[Number of Frequencies] 1\n"
            "[Network Data]\n1 0.1 0 0.9 0 0.9 0 0.1 0\n")
    e = failure(text, "cable.s2p")
    assert e.line == 5
    assert "[Two-Port Data Order]" in e.message


def test_v2_ports_disagree_with_file_name() -> None:
    e = failure(V2.format(n=1, rows="1 0.5 10"), "cable.s2p")
    assert e.line == 3
    assert "[Number of Ports] is 1" in e.message and ".s2p" in e.message


def test_keyword_in_a_version_1_file() -> None:
    e = failure(s1p(GOOD[0], "[End]"))
    assert e.line == 6
    assert "version 1 file" in e.message


def test_two_port_wrong_count() -> None:
    e = failure("# MHz S RI R 50\n1 0.1 0 0.9 0 0.9 0 0.1 0\n2 0.1 0 0.9 0 0.9 0 0.1\n",
                "cable.s2p")
    assert e.line == 3
    assert "expected 9 numbers" in e.message and "found 8" in e.message


# -- CSV -------------------------------------------------------------------------------------

CSV_HEAD = "# exported sweep\nFrequency (MHz),Re,Im\n"  # data from line 3


def test_csv_wrong_column_count() -> None:
    e = failure(CSV_HEAD + "7.0,0.1,0.1\n7.1,0.1\n", "a.csv")
    assert e.line == 4
    assert "expected 3 columns" in e.message and "header on line 2" in e.message


def test_csv_non_number() -> None:
    e = failure(CSV_HEAD + "7.0,0.1,0.1\n7.1,0.1,n/a\n", "a.csv")
    assert e.line == 4
    assert "'n/a' in column 'Im' is not a number" in e.message


def test_csv_non_monotonic() -> None:
    e = failure(CSV_HEAD + "7.0,0.1,0.1\n7.1,0.1,0.1\n7.05,0.1,0.1\n", "a.csv")
    assert e.line == 5
    assert "7.05 MHz" in e.message and "line 4" in e.message


def test_csv_nan() -> None:
    e = failure(CSV_HEAD + "7.0,0.1,0.1\n7.1,nan,0.1\n", "a.csv")
    assert e.line == 4
    assert "column 'Re' is nan: not a finite number" in e.message


def test_csv_not_passive() -> None:
    e = failure(CSV_HEAD + "7.0,0.1,0.1\n7.1,1.1,0.2\n", "a.csv")
    assert e.line == 4
    assert "|Γ| = 1.1" in e.message


def test_csv_without_header() -> None:
    e = failure("! x\n7.0,0.1,0.1\n", "a.csv")
    assert e.line == 2
    assert "no header row" in e.message and "--columns" in e.message


def test_csv_without_frequency_column() -> None:
    e = failure("Re,Im\n0.1,0.1\n", "a.csv")
    assert e.line == 1
    assert "no frequency column" in e.message


def test_csv_without_usable_pair() -> None:
    e = failure("Frequency (MHz),Re,Marker\n7.0,0.1,a\n", "a.csv")
    assert e.line == 1
    assert "no usable columns" in e.message and "Re → re" in e.message


def test_csv_frequency_unit_ambiguous() -> None:
    e = failure("Frequency,SWR\n7.0,1.5\n7.1,1.2\n", "a.csv")
    assert e.line == 1
    assert "gives no unit" in e.message and "Frequency (MHz)" in e.message


def test_csv_positive_db_hints_return_loss() -> None:
    e = failure("Freq (MHz),S11 dB\n7.0,-12\n7.1,15\n", "a.csv")
    assert e.line == 3
    assert "above 0 dB" in e.message and "return loss" in e.message.lower()


def test_csv_negative_return_loss_hints_db() -> None:
    e = failure("Freq (MHz),Return loss\n7.0,-12\n", "a.csv")
    assert e.line == 2
    assert "is negative" in e.message and "S11 dB" in e.message


def test_csv_swr_below_one() -> None:
    e = failure("Freq (MHz),SWR\n7.0,1.5\n7.1,0.9\n", "a.csv")
    assert e.line == 3
    assert "SWR 0.9 is below 1" in e.message


def test_csv_empty_after_header() -> None:
    e = failure("Freq (MHz),SWR\n\n", "a.csv")
    assert e.line is None
    assert "no data rows after the header on line 1" in e.message


@pytest.mark.parametrize(
    ("spec", "words"),
    [
        ("freq:MHz,re,imag", "unknown role 'imag'"),
        ("freq:THz,swr", "only freq takes a unit"),
        ("re,im", "one column must be freq"),
        ("freq,swr,swr", "'swr' is given twice"),
        ("freq,swr,z0=-5", "z0 must be a positive number"),
    ],
)
def test_bad_column_spec(spec: str, words: str) -> None:
    e = failure("7.0,1.5\n", "a.csv", columns=spec)
    assert e.line is None
    assert words in e.message


def test_column_spec_count_differs_from_header() -> None:
    e = failure("Freq (MHz),SWR,Note\n7.0,1.5,x\n", "a.csv", columns="freq:MHz,swr")
    assert e.line == 1
    assert "names 2 columns but the header has 3" in e.message


def test_two_port_five_numbers_above_last_frequency_is_not_noise() -> None:
    # TS 1.1: noise data start only where the frequency is ≤ the last network frequency.
    e = failure("# MHz S RI R 50\n1 0.1 0 0.9 0 0.9 0 0.1 0\n2 0.1 0 0.9 0 0.9 0 0.1 0\n"
                "3 1.5 0.3 45 0.2\n", "cable.s2p")
    assert e.line == 4
    assert "expected 9 numbers" in e.message and "found 5" in e.message


def test_option_line_after_the_data() -> None:
    e = failure("! x\n7.0 0.1 0.1\n# MHz S RI R 50\n7.1 0.1 0.1\n")
    assert e.line == 3
    assert "must come before the data" in e.message


def test_csv_empty_field() -> None:
    e = failure(CSV_HEAD + "7.0,0.1,0.1\n7.1,,0.1\n", "a.csv")
    assert e.line == 4
    assert "column 'Re' is empty: not a number" in e.message
