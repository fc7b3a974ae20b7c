"""``mastwatch dtf`` and ``mastwatch match`` end to end on files from the Touchstone writer."""

from __future__ import annotations

import importlib.util
import json
import re
from pathlib import Path

import numpy as np
import pytest
from typer.testing import CliRunner

from mastwatch.cli import app
from mastwatch.rf.lines import CABLES, Feedline, embed
from mastwatch.rf.sweep import Sweep
from mastwatch.rf.touchstone import write_touchstone

runner = CliRunner()


@pytest.fixture
def line_file(tmp_path: Path) -> Path:
    """150 Ω load at the end of 23.4 m of RG-58, swept 1–401 MHz at the radio end."""
    f = np.linspace(1e6, 401e6, 401)
    feed = Sweep.from_impedance(f, np.full(f.size, 150.0 + 0j))
    p = tmp_path / "line.s1p"
    p.write_text(write_touchstone(embed(feed, Feedline(CABLES["RG-58"], 23.4))))
    return p


@pytest.fixture
def rlc_file(tmp_path: Path) -> Path:
    f = np.linspace(6.5e6, 7.7e6, 241)
    w = 2 * np.pi * f
    p = tmp_path / "rlc.s1p"
    z = 18 + 1j * (w * 4e-6 - 1 / (w * 130e-12))  # series RLC near 7.1 MHz
    p.write_text(write_touchstone(Sweep.from_impedance(f, z)))
    return p


def test_dtf_prints_resolution_range_and_the_end(line_file: Path) -> None:
    r = runner.invoke(app, ["dtf", str(line_file), "--cable", "RG-58"])
    assert r.exit_code == 0, r.output
    assert "resolution 0.247 m" in r.output and "range 98.93 m" in r.output
    assert "23.40" in r.output
    assert "Never climb alone" in r.output


def test_dtf_json_and_vf_override(line_file: Path) -> None:
    r = runner.invoke(app, ["dtf", str(line_file), "--vf", "0.66", "--window", "rect", "--json"])
    assert r.exit_code == 0, r.output
    doc = json.loads(r.output)
    assert doc["window"] == "rect" and doc["loss_compensated"] is False
    assert any(abs(p["distance_m"] - 23.4) < doc["resolution_m"] for p in doc["peaks"])


def test_dtf_html_plot(line_file: Path, tmp_path: Path) -> None:
    out = tmp_path / "dtf.html"
    r = runner.invoke(app, ["dtf", str(line_file), "--cable", "RG-58", "--plot", str(out)])
    assert r.exit_code == 0, r.output
    text = out.read_text()
    assert "<html" in text and "plotly" in text.lower() and "distance along the line" in text


def test_dtf_png_without_kaleido_says_use_html(line_file: Path, tmp_path: Path) -> None:
    if importlib.util.find_spec("kaleido") is not None:
        pytest.skip("kaleido is installed here; the PNG path is exercised for real")
    r = runner.invoke(app, ["dtf", str(line_file), "--cable", "RG-58",
                            "--plot", str(tmp_path / "x.png")])
    assert r.exit_code == 1
    assert "kaleido" in r.output and ".html" in r.output


def test_dtf_errors(line_file: Path, tmp_path: Path) -> None:
    r = runner.invoke(app, ["dtf", str(line_file)])
    assert r.exit_code == 2 and "--cable or --vf" in r.output
    r = runner.invoke(app, ["dtf", str(line_file), "--cable", "RG-999"])
    assert r.exit_code == 2 and "unknown cable type" in r.output
    svg = str(tmp_path / "a.svg")
    r = runner.invoke(app, ["dtf", str(line_file), "--vf", "0.66", "--plot", svg])
    assert r.exit_code == 1 and ".html or .png" in r.output
    f = np.linspace(14.0e6, 14.35e6, 101)
    narrow = tmp_path / "narrow.s1p"
    narrow.write_text(write_touchstone(Sweep.from_impedance(f, np.full(f.size, 60 + 0j))))
    r = runner.invoke(app, ["dtf", str(narrow), "--cable", "RG-213"])
    assert r.exit_code == 1 and f"error: {narrow}: the sweep spans 0.35 MHz" in r.output


def test_match_prints_networks_and_bandwidth(rlc_file: Path) -> None:
    r = runner.invoke(app, ["match", str(rlc_file), "--at", "7.1MHz"])
    assert r.exit_code == 0, r.output
    assert "inductive" in r.output and "kHz" in r.output and "series at load" in r.output


def test_match_prints_every_negative_number_with_a_minus_sign(rlc_file: Path) -> None:
    # Below resonance the series RLC is capacitive: X = ωL − 1/(ωC) (any circuits
    # textbook, e.g. Pozar, Microwave Engineering, 4th ed., §6.1) = −14.3 Ω at 6.7 MHz.
    w = 2 * np.pi * 6.7e6
    x = w * 4e-6 - 1 / (w * 130e-12)
    assert x < 0
    r = runner.invoke(app, ["match", str(rlc_file), "--at", "6.7MHz"])
    assert r.exit_code == 0, r.output
    assert f"Z = 18.00 \u2212 j{-x:.2f} Ω" in r.output
    assert f"(X = \u2212{-x:.3g} Ω)" in r.output
    # One network of each pair has a negative X and B (both signs are solutions);
    # the table prints them with U+2212 too, and no number anywhere with a hyphen.
    assert any(cell.strip().startswith("\u2212") for cell in r.output.split("│"))
    assert re.search(r"(?<![\w.])-\d", r.output) is None, r.output


def test_match_json_each_network_matches(rlc_file: Path) -> None:
    r = runner.invoke(app, ["match", str(rlc_file), "--at", "7100kHz", "--json"])
    assert r.exit_code == 0, r.output
    doc = json.loads(r.output)
    assert doc["at_hz"] == 7.1e6 and len(doc["networks"]) == 2
    for n in doc["networks"]:
        bw = n["swr_bandwidth_2"]
        assert bw["low_hz"] < 7.1e6 < bw["high_hz"]


def test_match_through_feedline_and_errors(line_file: Path, rlc_file: Path) -> None:
    r = runner.invoke(app, ["match", str(line_file), "--at", "14.2MHz",
                            "--feedline", "RG-58:23.4m", "--json"])
    assert r.exit_code == 0, r.output
    doc = json.loads(r.output)
    # de-embedded back to the 150 Ω load (round trip through the Touchstone file)
    assert doc["load_r_ohm"] == pytest.approx(150.0, rel=1e-3)
    assert doc["feedline"]["cable"] == "RG-58"
    r = runner.invoke(app, ["match", str(rlc_file), "--at", "9MHz"])
    assert r.exit_code == 1 and "error:" in r.output
    r = runner.invoke(app, ["match", str(rlc_file), "--at", "fast"])
    assert r.exit_code == 2 and "not a frequency" in r.output


def test_analyze_with_feedline_reports_the_feedpoint(line_file: Path) -> None:
    r = runner.invoke(app, ["analyze", str(line_file), "--feedline", "RG-58:23.4m",
                            "--band", "20m", "--at", "14.2MHz", "--json"])
    assert r.exit_code == 0, r.output
    doc = json.loads(r.output)[0]
    feed = doc["feedpoint"]
    assert set(feed) == set(doc) - {"file", "feedpoint", "feedline"}
    # the 150 Ω load is SWR 3 at the feedpoint; the line's loss flatters it at the radio
    assert feed["at"][0]["swr"] == pytest.approx(3.0, rel=1e-3)
    assert doc["at"][0]["swr"] < 2.8
    assert doc["feedline"]["cable"] == "RG-58" and doc["feedline"]["length_m"] == 23.4
    assert doc["feedline"]["matched_loss_db_stop"] > doc["feedline"]["matched_loss_db_start"]
    text = runner.invoke(app, ["analyze", str(line_file), "--cable", "RG-58",
                               "--length", "76.77ft", "--band", "20m"])
    assert text.exit_code == 0, text.output
    assert "at the feedpoint (through RG-58, 23.3995 m)" in text.output


def test_analyze_feedline_option_errors(line_file: Path) -> None:
    r = runner.invoke(app, ["analyze", str(line_file), "--cable", "RG-58"])
    assert r.exit_code == 2 and "--cable and --length go together" in r.output
    r = runner.invoke(app, ["analyze", str(line_file), "--feedline", "RG-58"])
    assert r.exit_code == 2 and "CABLE:LENGTH" in r.output
    r = runner.invoke(app, ["analyze", str(line_file), "--feedline", "RG-58:3m",
                            "--cable", "RG-58", "--length", "3m"])
    assert r.exit_code == 2 and "not both" in r.output
    # far too much assumed loss: the feedpoint would look active, and the report says so
    r = runner.invoke(app, ["analyze", str(line_file), "--feedline", "RG-174:200m"])
    assert r.exit_code == 0 and "|Γ| exceeds 1" in r.output
