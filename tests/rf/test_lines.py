"""Line transformations against scikit-rf (test-only oracle) and their own inverses."""

from __future__ import annotations

import warnings

import numpy as np
import pytest
import skrf
from hypothesis import given, settings
from hypothesis import strategies as st

from mastwatch.rf.errors import AnalysisError
from mastwatch.rf.lines import (
    CABLES,
    Feedline,
    additional_loss_db,
    arrl_total_loss_db,
    deembed,
    embed,
    fit_cable,
    get_cable,
    input_impedance,
    matched_loss_db,
    parse_feedline,
    parse_length,
    propagation_constant,
    radio_swr,
    rereference,
    total_loss_db,
    total_loss_db_general,
)
from mastwatch.rf.sweep import Sweep

F = np.linspace(1e6, 60e6, 301)


def _load_z(f: np.ndarray) -> np.ndarray:
    """A dipole-like series RLC load plus a shunt capacitance: varied R and X over F."""
    w = 2 * np.pi * f
    zs = 35 + 1j * (w * 2.2e-6 - 1 / (w * 160e-12))
    return 1 / (1 / zs + 1j * w * 8e-12)


def _skrf_line(cable, length_m: float, z_port: float):
    freq = skrf.Frequency.from_f(F, unit="Hz")
    media = skrf.media.DefinedGammaZ0(
        freq, z0_port=z_port, z0=cable.z0_ohm, gamma=propagation_constant(cable, F)
    )
    return media.line(length_m, unit="m")


@pytest.mark.parametrize("name", ["RG-58", "RG-6", "window-450", "RG-174"])
@pytest.mark.parametrize("length_m", [1.0, 3.7, 23.4, 61.0])
def test_input_impedance_matches_skrf(name: str, length_m: float) -> None:
    # scikit-rf 2.2 DefinedGammaZ0 (z0 = line Z0, z0_port = 50 Ω) with the same γ:
    # line ** load (REFERENCES §9)
    cable = CABLES[name]
    zl = _load_z(F)
    load = skrf.Network(frequency=skrf.Frequency.from_f(F, unit="Hz"),
                        s=((zl - 50) / (zl + 50)).reshape(-1, 1, 1), z0=50)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # skrf's own deprecation chatter is not ours
        ref = (_skrf_line(cable, length_m, 50.0) ** load).z[:, 0, 0]
    ours = input_impedance(zl, cable, length_m, F)
    np.testing.assert_allclose(ours, ref, rtol=1e-9)


def test_zero_length_line_is_the_load() -> None:
    zl = _load_z(F)
    np.testing.assert_allclose(input_impedance(zl, CABLES["RG-6"], 0.0, F), zl, rtol=1e-13)


@pytest.mark.parametrize("name", ["RG-213", "RG-59", "twinlead-300"])
def test_deembed_matches_skrf_inverse(name: str) -> None:
    # scikit-rf de-embedding: line.inv ** measured (REFERENCES §9)
    cable = CABLES[name]
    fl = Feedline(cable, 27.3)
    measured_z = input_impedance(_load_z(F), cable, 27.3, F)
    measured = Sweep.from_impedance(F, measured_z, 50.0)
    ntwk = skrf.Network(frequency=skrf.Frequency.from_f(F, unit="Hz"),
                        s=measured.gamma.reshape(-1, 1, 1), z0=50)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        ref = (_skrf_line(cable, 27.3, 50.0).inv ** ntwk).s[:, 0, 0]
    ours = deembed(measured, fl).gamma
    np.testing.assert_allclose(ours, ref, rtol=1e-9, atol=1e-12)
    np.testing.assert_allclose(deembed(measured, fl).z, _load_z(F), rtol=1e-9)


@pytest.mark.parametrize("name", sorted(CABLES))
def test_deembed_undoes_embed(name: str) -> None:
    fl = Feedline(CABLES[name], 41.0, connectors=2)
    sweep = Sweep.from_impedance(F, _load_z(F), 50.0)
    back = deembed(embed(sweep, fl), fl)
    np.testing.assert_allclose(back.gamma, sweep.gamma, rtol=1e-9, atol=1e-12)
    assert back.z0 == 50.0


def test_open_short_and_lossless_half_wave_raise_no_warnings() -> None:
    # filterwarnings=error: a warning here fails the test
    lossless = fit_cable("ideal", 50.0, 1.0, [(1e6, 0.0), (2e6, 0.0)])
    f = np.array([299_792_458.0 / 20.0])  # λ = 20 m: 10 m of VF 1 line is a half wave
    for g in (1.0, -1.0):
        s = Sweep(f, np.array([g], dtype=complex))
        out = deembed(s, Feedline(lossless, 10.0))
        np.testing.assert_allclose(out.gamma, [g], atol=1e-12)
    z = input_impedance(np.array([np.inf]), lossless, 5.0, f)  # open, quarter wave
    assert abs(z[0]) < 1e-6  # an open a quarter wave away looks like a short
    z = input_impedance(np.array([np.inf]), lossless, 10.0, f)
    assert np.isinf(z[0].real) or abs(z[0]) > 1e9


def test_swr_only_sweep_moves_on_matching_line_only() -> None:
    fl = Feedline(CABLES["RG-213"], 30.0)
    full = Sweep.from_impedance(F, _load_z(F), 50.0)
    swr_only = Sweep(F, np.abs(full.gamma).astype(complex), has_phase=False)
    np.testing.assert_allclose(deembed(swr_only, fl).gamma_mag, deembed(full, fl).gamma_mag,
                               rtol=1e-12)
    with pytest.raises(AnalysisError, match="SWR only"):
        deembed(swr_only, Feedline(CABLES["RG-59"], 30.0))


def test_reference_impedance_kept_and_rereference_inverts() -> None:
    g = np.array([0.3 + 0.4j, -0.9, 1.0, -1.0, 0.0])
    np.testing.assert_allclose(rereference(rereference(g, 50, 450), 450, 50), g, atol=1e-15)
    # an open and a short are the same in every reference
    np.testing.assert_allclose(rereference(np.array([1.0, -1.0]), 50, 75), [1.0, -1.0])


def test_total_loss_forms_agree_with_skrf() -> None:
    # skrf.tlineFunctions.zl_2_total_loss (Stearns' general form, natural units)
    cable = CABLES["RG-58"]
    zl = _load_z(F)
    fl = Feedline(cable, 30.0)
    feed = Sweep.from_impedance(F, zl, 50.0)
    theta = propagation_constant(cable, F) * 30.0
    ref = 10 * np.log10(skrf.tlineFunctions.zl_2_total_loss(cable.z0_ohm, zl, theta))
    np.testing.assert_allclose(total_loss_db_general(zl, cable, 30.0, F), ref, rtol=1e-9)
    np.testing.assert_allclose(total_loss_db(fl, feed), ref, rtol=1e-9)
    swr_line = np.abs(rereference(feed.gamma, 50, cable.z0_ohm))
    swr_line = (1 + swr_line) / (1 - swr_line)
    np.testing.assert_allclose(arrl_total_loss_db(matched_loss_db(fl, F), swr_line), ref,
                               rtol=1e-9)


def test_total_loss_on_75_ohm_line_uses_line_z0() -> None:
    cable = CABLES["RG-6"]
    zl = np.full(F.size, 75.0 + 0j)  # matched to the line, not to the 50 Ω sweep
    feed = Sweep.from_impedance(F, zl, 50.0)
    fl = Feedline(cable, 20.0)
    np.testing.assert_allclose(total_loss_db(fl, feed), matched_loss_db(fl, F), rtol=1e-12)


def test_connectors_add_matched_loss_and_default_is_small() -> None:
    cable = CABLES["RG-213"]
    bare = matched_loss_db(Feedline(cable, 10.0), F)
    two = matched_loss_db(Feedline(cable, 10.0, connectors=2), F)
    np.testing.assert_allclose(two - bare, 0.1)  # 2 × 0.05 dB (common practice default)
    # on a matched load the radio sees the connectors' return loss as 2 × their loss
    feed = Sweep.from_impedance(F, np.full(F.size, 50.0 + 0j), 50.0)
    assert np.all(radio_swr(feed, Feedline(cable, 10.0, connectors=2)) == 1.0)


def test_radio_swr_is_flattered_by_loss() -> None:
    feed = Sweep.from_impedance(F, np.full(F.size, 150.0 + 0j), 50.0)  # SWR 3 at the load
    swr = radio_swr(feed, Feedline(CABLES["RG-174"], 30.0))
    assert np.all(swr < 3.0) and np.all(np.diff(swr) < 0)  # more loss higher up


def test_fit_cable_validates_and_recovers_coefficients() -> None:
    pts = [(f, 0.5 * np.sqrt(f / 1e6) + 0.01 * f / 1e6) for f in (1e6, 10e6, 100e6, 400e6)]
    c = fit_cable("mine", 50.0, 0.8, pts)
    assert c.k1 == pytest.approx(0.5, rel=1e-9) and c.k2 == pytest.approx(0.01, rel=1e-9)
    c0 = fit_cable("mine", 50.0, 0.8, [(f, a + 0.2) for f, a in pts], with_k0=True)
    assert c0.k0 == pytest.approx(0.2, rel=1e-9)
    with pytest.raises(ValueError, match="at least 2 points"):
        fit_cable("x", 50, 0.66, [(10e6, 1.0)])
    with pytest.raises(ValueError, match="point 2 has loss -1"):
        fit_cable("x", 50, 0.66, [(10e6, 1.0), (20e6, -1.0)])
    with pytest.raises(ValueError, match="point 1 has frequency 0"):
        fit_cable("x", 50, 0.66, [(0.0, 1.0), (20e6, 1.0)])
    with pytest.raises(ValueError, match="distinct"):
        fit_cable("x", 50, 0.66, [(10e6, 1.0), (10e6, 1.1)])
    with pytest.raises(ValueError, match="velocity factor"):
        fit_cable("x", 50, 1.5, [(10e6, 1.0), (20e6, 1.1)])
    # a loss that falls with frequency cannot have k ≥ 0 both: nnls clamps, never negative
    c = fit_cable("odd", 50, 0.66, [(1e6, 3.0), (100e6, 0.5)])
    assert c.k1 >= 0 and c.k2 >= 0


def test_parse_feedline_and_length() -> None:
    fl = parse_feedline("rg-213:30m")
    assert fl.cable.name == "RG-213" and fl.length_m == 30.0 and fl.connectors == 0
    assert parse_feedline("RG-58:100ft:2").length_m == pytest.approx(30.48)
    assert parse_feedline("RG-58:100ft:2").connectors == 2
    assert parse_length("12.5") == 12.5
    with pytest.raises(ValueError, match=r"unknown cable type 'RG-999'.*RG-58"):
        parse_feedline("RG-999:30m")
    with pytest.raises(ValueError, match="cannot read the length '30 yards'"):
        parse_feedline("RG-58:30 yards")
    with pytest.raises(ValueError, match="CABLE:LENGTH"):
        parse_feedline("RG-58")
    with pytest.raises(ValueError, match="connector count 'two'"):
        parse_feedline("RG-58:3m:two")
    assert get_cable("Window 450").name == "window-450"


@settings(max_examples=150, deadline=None)
@given(
    r=st.floats(0.1, 5000.0),
    x=st.floats(-5000.0, 5000.0),
    length=st.floats(0.0, 300.0),
    name=st.sampled_from(sorted(CABLES)),
)
def test_loss_properties(r: float, x: float, length: float, name: str) -> None:
    # a passive load on a lossy line: total loss ≥ matched loss (additional loss ≥ 0),
    # and the radio sees a better SWR than the load (ARRL "Additional Loss Due to SWR")
    f = np.array([1.8e6, 14.2e6, 146e6])
    fl = Feedline(CABLES[name], length)
    feed = Sweep.from_impedance(f, np.full(3, complex(r, x)), 50.0)
    extra = additional_loss_db(fl, feed)
    assert np.all(extra >= -1e-9)
    line_swr = Sweep(f, rereference(feed.gamma, 50.0, fl.cable.z0_ohm)).swr
    radio = Sweep(f, rereference(embed(feed, fl).gamma, 50.0, fl.cable.z0_ohm)).swr
    assert np.all(radio <= line_swr * (1 + 1e-9))
