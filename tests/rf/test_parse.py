"""read_sweep: limits, text handling and dispatch by extension or content (issue 2)."""

from __future__ import annotations

import numpy as np
import pytest

from mastwatch.rf.errors import SweepFormatError
from mastwatch.rf.limits import MAX_FILE_BYTES, MAX_POINTS
from mastwatch.rf.parse import decode_text, read_sweep, sniff_kind

S1P = "! sweep\n# MHz S RI R 50\n7.0 0.1 0.2\n7.1 0.1 0.3\n"


def test_bom_crlf_cr_are_accepted() -> None:
    plain = read_sweep(S1P.encode(), "a.s1p")
    for variant in ("\ufeff" + S1P, S1P.replace("\n", "\r\n"), S1P.replace("\n", "\r")):
        s = read_sweep(variant.encode(), "a.s1p")
        np.testing.assert_array_equal(s.gamma, plain.gamma)


def test_exactly_max_points_is_accepted() -> None:
    body = "\n".join(f"{k} 0.1 0" for k in range(1, MAX_POINTS + 1))
    s = read_sweep(("# Hz S RI R 50\n" + body).encode(), "big.s1p")
    assert s.points == MAX_POINTS


def test_exactly_max_bytes_passes_the_size_check() -> None:
    data = b"!" * (MAX_FILE_BYTES - 1) + b"\n"
    assert len(decode_text(data)) == MAX_FILE_BYTES
    with pytest.raises(SweepFormatError, match="limit"):
        decode_text(data + b"!")


def test_extension_decides_and_is_case_blind() -> None:
    s = read_sweep(S1P.encode(), "A.S1P")
    assert s.source.format == "touchstone-1" and s.source.filename == "A.S1P"
    with pytest.raises(SweepFormatError, match="header"):
        read_sweep(b"7.0,1.5\n", "a.csv")


@pytest.mark.parametrize(
    ("text", "kind"),
    [
        (S1P, "touchstone"),
        ("# MHz S RI\n7 0.1 0.1\n", "touchstone"),
        ("[Version] 2.0\n", "touchstone"),
        ("7 0.1 0.1\n", "touchstone"),
        ("Frequency (MHz),SWR\n7,1.5\n", "csv"),
        ("# export, club\nFreq;SWR\n", "csv"),
        ("# exported by the club laptop\nFreq (MHz)\tSWR\n7\t1.5\n", "csv"),
        ("#\n7 0.1 0.1\n", "touchstone"),
        ("Freq\tSWR\n7\t1.5\n", "csv"),
    ],
)
def test_sniffing(text: str, kind: str) -> None:
    assert sniff_kind(text) == kind


def test_unknown_extension_is_sniffed() -> None:
    assert read_sweep(S1P.encode(), "sweep.dat").source.format == "touchstone-1"
    assert read_sweep(b"Freq (MHz),SWR\n7,1.5\n", "sweep.dat").source.format == "csv"


def test_columns_imply_csv_for_unknown_extensions() -> None:
    s = read_sweep(b"7 1.5\n7.1 1.4\n", "sweep.txt", columns="freq:MHz,swr")
    assert s.source.format == "csv" and not s.has_phase


def test_columns_are_ignored_for_touchstone() -> None:
    s = read_sweep(S1P.encode(), "a.s1p", columns="freq:Hz,swr")
    assert s.has_phase and s.freq_hz[0] == 7e6


def test_pure_core_imports() -> None:
    # STYLE.md habit 1: mastwatch.rf imports numpy/scipy only.
    import subprocess
    import sys

    code = ("import sys, mastwatch.rf.parse; "
            "bad = [m for m in ('fastapi', 'sqlalchemy', 'plotly', 'skrf') if m in sys.modules]; "
            "print(bad); sys.exit(1 if bad else 0)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=False)
    assert out.returncode == 0, out.stdout + out.stderr


def test_file_formats_doc_names_every_role_and_limit() -> None:
    # STYLE.md (datasette habit): a test fails when a setting or option is undocumented.
    from pathlib import Path

    from mastwatch.rf.csvfile import ROLES

    doc = (Path(__file__).parents[2] / "docs" / "file-formats.md").read_text()
    for role in ROLES:
        assert f"`{role}" in doc, role
    assert f"{MAX_POINTS:,}" in doc
    assert f"{MAX_FILE_BYTES:,}" in doc
    assert "1.05" in doc
