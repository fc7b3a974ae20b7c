"""``mastwatch analyze``: tables, the --json contract, --at, --band, --region, errors.

The sweeps are series RLC circuits (circuit theory: resonance at 1/(2π√(LC)),
Q = ω0L/R) written as Touchstone or CSV files, so the printed numbers are known.
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import numpy as np
import pytest
from typer.testing import CliRunner

from mastwatch.cli import app
from mastwatch.cli.analyze import parse_frequency
from mastwatch.rf.sweep import Sweep
from mastwatch.rf.touchstone import write_touchstone

runner = CliRunner()

F0, Q, R = 7.1e6, 10.0, 50.0
W0 = 2 * math.pi * F0
L = Q * R / W0
C = 1 / (W0**2 * L)

# docs/analyze-json.md: the keys every consumer may rely on
FILE_KEYS = {
    "file", "points", "z0_ohm", "f_start_hz", "f_stop_hz", "has_phase", "region",
    "min_swr", "min_swr_hz", "resonances", "swr_bandwidths", "bands", "at", "unavailable",
}  # fmt: skip
RESONANCE_KEYS = {"hz", "kind", "r_ohm", "q"}
BANDWIDTH_KEYS = {"threshold", "low_hz", "high_hz", "width_hz", "open_low", "open_high"}
BAND_KEYS = {
    "band", "low_hz", "high_hz", "coverage", "min_swr", "min_swr_hz", "swr_center",
    "r_center_ohm", "x_center_ohm", "return_loss_center_db", "usable_fraction_2",
    "resonance_hz", "resonance_kind", "q", "bandwidth_2_hz",
}  # fmt: skip
AT_KEYS = {"hz", "r_ohm", "x_ohm", "swr", "return_loss_db", "mismatch_loss_db"}


def rlc_sweep(f_start: float = 6.5e6, f_stop: float = 7.7e6, points: int = 241) -> Sweep:
    f = np.linspace(f_start, f_stop, points)
    w = 2 * np.pi * f
    return Sweep.from_impedance(f, R + 1j * (w * L - 1 / (w * C)))


@pytest.fixture
def s1p(tmp_path: Path) -> Path:
    p = tmp_path / "dipole.s1p"
    p.write_text(write_touchstone(rlc_sweep(), ["invented test antenna, Q0HRS club"]))
    return p


@pytest.fixture
def swr_csv(tmp_path: Path) -> Path:
    s = rlc_sweep()
    rows = [f"{f!r},{w!r}" for f, w in zip(s.freq_hz.tolist(), s.swr.tolist(), strict=True)]
    p = tmp_path / "swr_only.csv"
    p.write_text("Frequency (Hz),SWR\n" + "\n".join(rows) + "\n")
    return p


def run(*args: str | Path):  # type: ignore[no-untyped-def]
    return runner.invoke(app, ["analyze", *map(str, args)])


def test_table_output(s1p: Path) -> None:
    res = run(s1p)
    assert res.exit_code == 0, res.output
    out = res.stdout
    assert str(s1p) in out
    assert "241 points, 6.5000–7.7000 MHz, z0 50 Ω, ITU Region 1" in out
    assert "min SWR 1.00 at 7.1000 MHz" in out
    assert "series" in out and "10.0" in out  # the resonance and its Q
    assert "Bands (ITU Region 1)" in out and "40m" in out
    assert "Min SWR" in out and "Resonance (MHz)" in out  # headers from the metric table


def test_json_contract(s1p: Path) -> None:
    res = run(s1p, "--json", "--at", "7.1MHz", "--at", "7000kHz")
    assert res.exit_code == 0, res.output
    (doc,) = json.loads(res.stdout)
    assert set(doc) == FILE_KEYS
    assert doc["file"] == str(s1p)
    assert doc["points"] == 241 and doc["z0_ohm"] == 50.0 and doc["has_phase"] is True
    assert doc["f_start_hz"] == 6.5e6 and doc["f_stop_hz"] == 7.7e6
    (res0,) = doc["resonances"]
    assert set(res0) == RESONANCE_KEYS
    assert res0["kind"] == "series"
    assert res0["hz"] == pytest.approx(F0, rel=1e-6)
    assert res0["q"] == pytest.approx(Q, rel=0.01)  # Q = ω0L/R (circuit theory)
    assert [b["threshold"] for b in doc["swr_bandwidths"]] == [1.5, 2.0, 3.0]
    assert all(set(b) == BANDWIDTH_KEYS for b in doc["swr_bandwidths"])
    bw2 = doc["swr_bandwidths"][1]["width_hz"]
    # R = Z0: SWR≤2 fractional bandwidth 1/(Q√2) (Yaghjian & Best 2005, exact for RLC)
    assert bw2 / F0 == pytest.approx(1 / (Q * math.sqrt(2)), rel=2e-3)
    (band,) = doc["bands"]  # 6.5–7.7 MHz overlaps only 40 m in Region 1
    assert set(band) == BAND_KEYS and band["band"] == "40m"
    assert band["low_hz"] == 7.0e6 and band["high_hz"] == 7.2e6
    assert [set(a) for a in doc["at"]] == [AT_KEYS, AT_KEYS]
    assert doc["at"][0]["hz"] == 7.1e6 and doc["at"][1]["hz"] == 7.0e6
    assert doc["at"][0]["r_ohm"] == pytest.approx(R, rel=1e-3)
    w = 2 * math.pi * 7.0e6
    assert doc["at"][1]["x_ohm"] == pytest.approx(w * L - 1 / (w * C), rel=1e-3)
    assert doc["unavailable"] == []


def test_json_nulls_for_infinite_swr_and_swr_only(swr_csv: Path, tmp_path: Path) -> None:
    res = run(swr_csv, "--json", "--band", "40m")
    assert res.exit_code == 0, res.output
    (doc,) = json.loads(res.stdout)
    assert doc["has_phase"] is False
    assert doc["resonances"] == []
    assert "q" in doc["unavailable"] and "r_center_ohm" in doc["unavailable"]
    band = doc["bands"][0]
    assert band["r_center_ohm"] is None and band["q"] is None
    assert band["swr_center"] == pytest.approx(1.0, abs=1e-3)
    short = tmp_path / "short.s1p"
    f = np.linspace(7.0e6, 7.2e6, 11)
    short.write_text(write_touchstone(Sweep(f, np.full(11, -1 + 0j))))
    (d,) = json.loads(run(short, "--json").stdout)
    assert d["min_swr"] is None and d["bands"][0]["swr_center"] is None
    assert d["swr_bandwidths"][0]["width_hz"] is None


def test_band_and_region_options(tmp_path: Path) -> None:
    p = tmp_path / "wide.s1p"
    p.write_text(write_touchstone(rlc_sweep(6.9e6, 7.4e6, 101)))
    (r1,) = json.loads(run(p, "--json").stdout)
    (r2,) = json.loads(run(p, "--json", "--region", "2").stdout)
    assert r1["bands"][0]["high_hz"] == 7.2e6 and r1["region"] == 1
    assert r2["bands"][0]["high_hz"] == 7.3e6 and r2["region"] == 2
    (two,) = json.loads(run(p, "--json", "--band", "40m", "--band", "20m").stdout)
    assert [b["band"] for b in two["bands"]] == ["40m", "20m"]
    assert two["bands"][1]["coverage"] == 0.0 and two["bands"][1]["min_swr"] is None
    bad = run(p, "--band", "4m")
    assert bad.exit_code == 2
    assert "unknown band '4m'" in bad.output and "valid bands" in bad.output
    assert run(p, "--region", "4").exit_code == 2


def test_at_outside_the_sweep_is_an_error_for_that_file(s1p: Path) -> None:
    res = run(s1p, "--at", "14.2MHz")
    assert res.exit_code == 1
    assert res.stderr.strip() == f"error: {s1p}: 14.2 MHz is outside the sweep (6.5–7.7 MHz)"


def test_bad_at_value_is_a_usage_error(s1p: Path) -> None:
    res = run(s1p, "--at", "7.1 furlongs")
    assert res.exit_code == 2
    assert "not a frequency" in res.output


def test_bad_file_one_error_line_and_exit_1_others_still_analysed(
    s1p: Path, tmp_path: Path
) -> None:
    bad = tmp_path / "bad.s1p"
    bad.write_text("! a comment\n# MHz S RI R 50\n7.0 0.1 0.0\n7.1 0.1\n")
    missing = tmp_path / "missing.s1p"
    res = run(bad, s1p, missing, "--json")
    assert res.exit_code == 1
    lines = res.stderr.strip().splitlines()
    assert len(lines) == 2
    assert lines[0].startswith(f"error: {bad}: line 4: ")
    assert lines[1] == f"error: {missing}: cannot read the file: No such file or directory"
    docs = json.loads(res.stdout)
    assert [d["file"] for d in docs] == [str(s1p)]


def test_columns_option_reaches_the_csv_reader(tmp_path: Path) -> None:
    s = rlc_sweep()
    rows = [
        f"{f / 1e6!r};{z.real!r};{z.imag!r}"
        for f, z in zip(s.freq_hz.tolist(), s.z.tolist(), strict=True)
    ]
    p = tmp_path / "rx.csv"
    p.write_text("a;b;c\n" + "\n".join(rows) + "\n")
    res = run(p, "--json", "--columns", "freq:MHz,r,x")
    assert res.exit_code == 0, res.output
    (doc,) = json.loads(res.stdout)
    assert doc["resonances"][0]["hz"] == pytest.approx(F0, rel=1e-6)


def test_touchstone_2_and_two_port_files(tmp_path: Path) -> None:
    # TS 2.0 keyword file (IBIS Open Forum, Touchstone 2.0 spec) and a v1 two-port whose
    # S11 is the RLC's; the analysis is the same as for the one-port file
    s = rlc_sweep(points=61)
    rows = [
        f"{f!r} {g.real!r} {g.imag!r}"
        for f, g in zip(s.freq_hz.tolist(), s.gamma.tolist(), strict=True)
    ]
    v2 = tmp_path / "v2.ts"
    v2.write_text(
        "[Version] 2.0\n# Hz S RI R 50\n[Number of Ports] 1\n"
        f"[Number of Frequencies] {len(rows)}\n[Network Data]\n" + "\n".join(rows) + "\n[End]\n"
    )
    two = tmp_path / "two.s2p"
    two.write_text(
        "# Hz S RI R 50\n" + "\n".join(f"{r} 0.5 0.0 0.5 0.0 0.0 0.0" for r in rows) + "\n"
    )
    res = run(v2, two, "--json")
    assert res.exit_code == 0, res.output
    docs = json.loads(res.stdout)
    assert [d["points"] for d in docs] == [61, 61]
    for d in docs:
        assert d["resonances"][0]["hz"] == pytest.approx(F0, rel=1e-5)


@pytest.mark.parametrize(
    ("text", "hz"),
    [
        ("7.1MHz", 7.1e6), ("7100kHz", 7.1e6), ("7100000", 7.1e6), ("7.1M", 7.1e6),
        ("7.1mhz", 7.1e6), ("1.2 GHz", 1.2e9), ("7100000Hz", 7.1e6), ("7.1e6", 7.1e6),
        ("136k", 136e3), (".5MHz", 0.5e6),
    ],
)  # fmt: skip
def test_parse_frequency(text: str, hz: float) -> None:
    assert parse_frequency(text) == pytest.approx(hz, rel=1e-15)


@pytest.mark.parametrize("text", ["", "MHz", "7.1 MHz x", "-7MHz", "7.1THz", "1e999", "7,1MHz"])
def test_parse_frequency_rejects(text: str) -> None:
    with pytest.raises(ValueError, match="frequency"):
        parse_frequency(text)


def test_every_json_key_is_documented(s1p: Path) -> None:
    doc_text = (Path(__file__).parents[2] / "docs" / "analyze-json.md").read_text()
    (doc,) = json.loads(run(s1p, "--json", "--at", "7.1MHz").stdout)
    keys = set(doc) | RESONANCE_KEYS | BANDWIDTH_KEYS | BAND_KEYS | AT_KEYS
    missing = sorted(k for k in keys if f"`{k}`" not in doc_text)
    assert missing == []


def test_table_output_for_an_swr_only_file(swr_csv: Path, s1p: Path) -> None:
    res = run(swr_csv, s1p)
    assert res.exit_code == 0, res.output
    out = res.stdout
    assert "SWR only (no phase)" in out
    assert "unavailable without phase: resonances, r_center_ohm" in out
    assert out.index(str(swr_csv)) < out.index(str(s1p))  # files in the order given
