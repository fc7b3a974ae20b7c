"""Property tests (hypothesis) of the readers and the writer.

- Any valid sweep survives write_touchstone → read_sweep bit for bit (issue 2: "a
  parse → write → parse round trip is exact"; repr() of a float64 reads back exactly,
  Python language reference, float.__repr__).
- Random bytes, random text and random near-miss files never raise anything but
  SweepFormatError, and a reported line lies inside the file.
"""

from __future__ import annotations

import numpy as np
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from mastwatch.rf.errors import SweepFormatError
from mastwatch.rf.parse import read_sweep
from mastwatch.rf.sweep import Sweep
from mastwatch.rf.touchstone import write_touchstone

SETTINGS = settings(max_examples=200, deadline=None,
                    suppress_health_check=[HealthCheck.too_slow])
LIGHT = settings(SETTINGS, max_examples=100)  # the CSV extras: keep the suite quick
NAMES = st.sampled_from(["a.s1p", "a.s2p", "a.ts", "a.csv", "a.txt", "a.dat", None])

# |re|, |im| ≤ 0.74 keeps |Γ| ≤ 1.047 < MAX_PASSIVE_GAMMA; subnormals and −0.0 included.
PART = st.floats(min_value=-0.74, max_value=0.74, allow_nan=False, allow_subnormal=True)


@st.composite
def sweeps(draw: st.DrawFn) -> Sweep:
    freqs = draw(st.lists(st.floats(min_value=0.0, max_value=1e12, allow_nan=False),
                          min_size=1, max_size=40, unique=True))
    f = np.array(sorted(freqs), dtype=np.float64)
    n = f.size
    re_part = np.array(draw(st.lists(PART, min_size=n, max_size=n)), dtype=np.float64)
    im_part = np.array(draw(st.lists(PART, min_size=n, max_size=n)), dtype=np.float64)
    g = np.empty(n, dtype=np.complex128)
    g.real, g.imag = re_part, im_part
    z0 = draw(st.floats(min_value=1e-3, max_value=1e4, allow_nan=False))
    return Sweep(f, g, z0)


COMMENT = st.text(st.characters(blacklist_categories=["Cs"], blacklist_characters="\x00"),
                  max_size=30)


@SETTINGS
@given(sweep=sweeps(), comments=st.lists(COMMENT, max_size=3))
def test_write_then_read_is_bit_exact(sweep: Sweep, comments: list[str]) -> None:
    text = write_touchstone(sweep, comments)
    back = read_sweep(text.encode(), "back.s1p")
    assert back.freq_hz.tobytes() == sweep.freq_hz.tobytes()
    assert back.gamma.tobytes() == sweep.gamma.tobytes()
    assert back.z0 == sweep.z0
    # and once more: write → read → write gives the same text
    assert write_touchstone(back, comments) == text


def _only_format_errors(data: bytes, name: str | None) -> None:
    try:
        sweep = read_sweep(data, name)
    except SweepFormatError as e:
        lines = data.count(b"\n") + data.count(b"\r") + 1
        assert e.line is None or 1 <= e.line <= lines, (e.line, lines)
        assert e.message
    else:
        assert sweep.points >= 1


@SETTINGS
@given(data=st.binary(max_size=300), name=NAMES)
def test_random_bytes(data: bytes, name: str | None) -> None:
    _only_format_errors(data, name)


@SETTINGS
@given(text=st.text(max_size=300), name=NAMES)
def test_random_text(text: str, name: str | None) -> None:
    _only_format_errors(text.encode("utf-8", "surrogatepass"), name)


TOKENS = st.sampled_from([
    "1", "2.5", "-3", "0", "1e3", "1e400", "nan", "inf", "-0.0", "0.5", "1.2", "7.1", "x",
    "#", "# MHz S RI R 50", "# GHz Z MA", "# Hz Y DB R 75", "# kHz S", "R", "50", "!", "! c",
    "[Version] 2.0", "[Version] 2.1", "[Number of Ports] 1", "[Number of Ports] 2",
    "[Number of Frequencies] 2", "[Reference] 50", "[Reference]", "[Network Data]",
    "[Noise Data]", "[End]", "[Two-Port Data Order] 12_21", "[Matrix Format] Lower",
    "[Begin Information]", "[End Information]", ",", ";", "\t", " ", "Frequency (MHz)",
    "Re", "Im", "SWR", "R", "X", "S11 dB", "Phase", "Return loss", "freq_hz", "\ufeff",
    "2025-03-14T09:30:00Z", "2025-13-40T99:99", '"', "|Γ| dB",
])
LINE = st.lists(TOKENS, max_size=10).map(" ".join)


@SETTINGS
@given(lines=st.lists(LINE, max_size=15), name=NAMES,
       newline=st.sampled_from(["\n", "\r\n", "\r"]))
def test_near_miss_files(lines: list[str], name: str | None, newline: str) -> None:
    _only_format_errors(newline.join(lines).encode(), name)


@SETTINGS
@given(sweep=sweeps(), k=st.integers(min_value=0, max_value=50), junk=LINE)
def test_one_damaged_line(sweep: Sweep, k: int, junk: str) -> None:
    lines = write_touchstone(sweep).split("\n")
    lines[k % len(lines)] = junk
    _only_format_errors("\n".join(lines).encode(), "damaged.s1p")


@LIGHT
@given(sweep=sweeps(), delim=st.sampled_from([",", ";", "\t"]))
def test_csv_of_re_im_reads_back_exactly(sweep: Sweep, delim: str) -> None:
    rows = [delim.join(["Frequency (Hz)", "Re", "Im"])]
    rows += [delim.join(repr(v) for v in (f, g.real, g.imag))
             for f, g in zip(sweep.freq_hz.tolist(), sweep.gamma.tolist(), strict=True)]
    back = read_sweep(("\n".join(rows) + "\n").encode(), "sweep.csv")
    assert back.freq_hz.tobytes() == sweep.freq_hz.tobytes()
    assert back.gamma.tobytes() == sweep.gamma.tobytes()


SPEC_ITEMS = st.sampled_from(["freq", "freq:MHz", "freq:hz", "freq:THz", "re", "im", "db",
                              "rl", "mag", "deg", "rad", "r", "x", "swr", "skip", "z0=75",
                              "z0=-1", "z0=x", "", " ", "bogus", ":", "freq:"])


@LIGHT
@given(lines=st.lists(LINE, max_size=8),
       spec=st.lists(SPEC_ITEMS, max_size=5).map(",".join),
       name=st.sampled_from(["a.csv", "a.txt", None]))
def test_near_miss_csv_with_column_specs(lines: list[str], spec: str, name: str | None) -> None:
    try:
        sweep = read_sweep("\n".join(lines).encode(), name, columns=spec)
    except SweepFormatError as e:
        assert e.line is None or 1 <= e.line <= len(lines) + 1
    else:
        assert sweep.source.format == "csv"
