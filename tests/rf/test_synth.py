"""The demo's sweep synthesis: antenna models, feedline embedding, damage and noise.

Outside checks used here:
- Series RLC: resonance at 1/(2π√(LC)) and Q = ω0·L/R (textbook circuit theory).
- Q from the sweep by Yaghjian & Best, IEEE Trans. Antennas Propag. 53(4), 2005,
  Q ≈ ω0·|Z′(ω0)|/(2R) — what ``compute_metrics`` estimates.
- Lossy line: Z_in = Z0·(Z_L + Z0·tanh γl)/(Z0 + Z_L·tanh γl), Γ(l) = Γ_L·e^(−2γl)
  (Pozar, *Microwave Engineering* 4th ed., lossy line; equation number from memory),
  written out independently below from the cable's k-coefficients and velocity factor.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from mastwatch.demo.models import (
    Collinear,
    Dipole,
    EndFed,
    FanDipole,
    JPole,
    SeriesRLC,
    SmallLoop,
    Vertical,
    Yagi,
    detune,
)
from mastwatch.demo.synth import (
    LineBreak,
    MidLineReflection,
    WaterInLine,
    line_sections,
    synthesize,
)
from mastwatch.rf.lines import Feedline, deembed, get_cable
from mastwatch.rf.metrics import compute_metrics
from mastwatch.rf.touchstone import write_touchstone

C0 = 299_792_458.0  # m/s, exact (SI)
DB_PER_NP = 20 / math.log(10)  # 8.685889638 dB per neper


def _gamma_line(cable, f_hz: np.ndarray, length_m: float) -> np.ndarray:
    """γ·l from the cable's published-style coefficients, written out (not rf.lines)."""
    f_mhz = f_hz / 1e6
    db_per_m = (cable.k0 + cable.k1 * np.sqrt(f_mhz) + cable.k2 * f_mhz) / 100.0
    alpha = db_per_m / DB_PER_NP
    beta = 2 * np.pi * f_hz / (cable.velocity_factor * C0)
    return (alpha + 1j * beta) * length_m


def _zin(z_load: np.ndarray, z0: float, gl: np.ndarray) -> np.ndarray:
    """Pozar's lossy-line input impedance, as printed."""
    t = np.tanh(gl)
    return z0 * (z_load + z0 * t) / (z0 + z_load * t)


def _one_resonance(sweep, near_hz: float, kind: str | None = None):
    """The resonance of ``sweep`` closest to ``near_hz`` (of ``kind`` if given)."""
    res = [r for r in compute_metrics(sweep).resonances if kind is None or r.kind == kind]
    assert res, "no resonance found"
    return min(res, key=lambda r: abs(r.hz - near_hz))


# -- determinism ---------------------------------------------------------------------------


def test_same_seed_gives_the_same_bytes_and_another_seed_does_not():
    fl = Feedline(get_cable("RG-213"), 30.0, 2)
    kw = dict(feedline=fl, noise=0.002, erratic=0.01)
    a = write_touchstone(synthesize(Dipole(7.1e6), 6.5e6, 7.7e6, 401, seed=7, **kw))
    b = write_touchstone(synthesize(Dipole(7.1e6), 6.5e6, 7.7e6, 401, seed=7, **kw))
    c = write_touchstone(synthesize(Dipole(7.1e6), 6.5e6, 7.7e6, 401, seed=8, **kw))
    assert a.encode() == b.encode()
    assert a != c


def test_without_noise_the_sweep_is_the_model():
    m = Dipole(7.1e6)
    s = synthesize(m, 6.5e6, 7.7e6, 401)
    f = np.linspace(6.5e6, 7.7e6, 401)
    np.testing.assert_array_equal(s.freq_hz, f)
    z = m.impedance(f)
    np.testing.assert_allclose(s.gamma, (z - 50) / (z + 50), rtol=0, atol=1e-15)


# -- models against their parameters ---------------------------------------------------------


def test_series_rlc_resonance_and_q_match_circuit_theory():
    # Textbook circuit theory: f0 = 1/(2π√(LC)), Q = ω0·L/R.
    rlc = SeriesRLC(r_ohm=50.0, l_h=10e-6, c_f=50e-12)
    f0 = 1 / (2 * math.pi * math.sqrt(10e-6 * 50e-12))
    q = 2 * math.pi * f0 * 10e-6 / 50.0
    assert rlc.f0_hz == pytest.approx(f0, rel=1e-12)
    assert rlc.q == pytest.approx(q, rel=1e-12)
    s = synthesize(rlc, f0 * 0.9, f0 * 1.1, 2001)
    r = _one_resonance(s, f0)
    assert r.kind == "series"
    assert r.hz == pytest.approx(f0, rel=1e-5)
    assert r.r_ohm == pytest.approx(50.0, rel=1e-4)
    assert r.q == pytest.approx(q, rel=0.01)  # Yaghjian–Best recovers ω0L/R to 1 %


@pytest.mark.parametrize(
    "model",
    [
        Dipole(7.1e6),
        Dipole(3.65e6, r_rad_ohm=55.0, r_loss_ohm=3.0, q=13.0),
        Vertical(7.1e6),
        Vertical(14.18e6, r_rad_ohm=36.0, r_loss_ohm=12.0, q=9.0),
    ],
    ids=["dipole-40m", "dipole-80m", "vertical-40m", "vertical-20m"],
)
def test_wire_model_resonance_r_and_q_match_its_parameters(model):
    s = synthesize(model, model.f0_hz * 0.92, model.f0_hz * 1.08, 1601)
    r = _one_resonance(s, model.f0_hz)
    assert r.kind == "series"
    assert r.hz == pytest.approx(model.f0_hz, rel=1e-5)
    assert r.r_ohm == pytest.approx(model.r_rad_ohm + model.r_loss_ohm, rel=1e-3)
    assert r.q == pytest.approx(model.q, rel=0.01)
    # The series RLC of the same R and L = Q·R/ω0 (Q = ω0L/R) gives the same Q.
    w0 = 2 * math.pi * model.f0_hz
    assert w0 * model.series_l_h / model.r_ohm == pytest.approx(model.q, rel=1e-12)


def test_dipole_is_a_series_rlc_near_resonance_and_not_far_from_it():
    d = Dipole(7.1e6)
    rlc = SeriesRLC.from_resonance(d.f0_hz, d.r_ohm, d.q)
    near = np.linspace(0.99, 1.01, 41) * d.f0_hz
    np.testing.assert_allclose(d.impedance(near), rlc.impedance(near), rtol=0.02, atol=0.5)
    # The line picture has the parallel resonance near 2·f0 that a plain RLC lacks.
    s = synthesize(d, 1.5 * d.f0_hz, 2.5 * d.f0_hz, 2001)
    par = _one_resonance(s, 2 * d.f0_hz, "parallel")
    assert par.hz == pytest.approx(2 * d.f0_hz, rel=0.01)
    assert par.r_ohm > 1000  # a full-wave centre-fed wire: kilo-ohms


def test_fan_dipole_has_one_series_resonance_per_branch():
    branches = (Dipole(3.65e6), Dipole(7.1e6), Dipole(14.2e6))
    s = synthesize(FanDipole(branches), 3.3e6, 14.8e6, 4001)
    for b in branches:
        r = _one_resonance(s, b.f0_hz, "series")
        # The other branches load this one a little: the resonance moves < 1 %.
        assert r.hz == pytest.approx(b.f0_hz, rel=0.01)
        assert 40 < r.r_ohm < 90


def test_yagi_hairpin_match_is_exactly_z0_at_design_frequency():
    y = Yagi(14.15e6)
    z = y.impedance(np.array([14.15e6]))[0]
    assert z.real == pytest.approx(50.0, rel=1e-9)
    assert abs(z.imag) < 1e-6
    assert y.element.f0_hz > y.f0_hz  # the element is cut short: capacitive at f0
    assert y.hairpin_l_h > 0
    # Driven element alone: the low resistance of a 3-element beam.
    zr = y.element.impedance(np.array([y.element.f0_hz]))[0]
    assert zr.real == pytest.approx(y.r_rad_ohm + y.r_loss_ohm, rel=1e-9)


@pytest.mark.parametrize("model", [JPole(145e6), Collinear(433.5e6, r_ohm=48.0, q=22.0)])
def test_stub_matched_vhf_antennas_are_parallel_resonances(model):
    s = synthesize(model, model.f0_hz * 0.95, model.f0_hz * 1.05, 1601)
    r = _one_resonance(s, model.f0_hz, "parallel")
    assert r.hz == pytest.approx(model.f0_hz, rel=1e-5)
    assert r.r_ohm == pytest.approx(model.r_ohm, rel=1e-3)
    assert r.q == pytest.approx(model.q, rel=0.01)


def test_end_fed_transformer_brings_kilo_ohms_near_50_on_each_harmonic():
    e = EndFed(3.555e6)
    s = synthesize(e, 3.3e6, 30e6, 8001)
    for n in (1, 2, 4, 6, 8):
        r = _one_resonance(s, n * e.f0_hz, "parallel")
        assert r.hz == pytest.approx(n * e.f0_hz, rel=0.03)
        assert 25 < r.r_ohm < 70, f"harmonic {n}: {r.r_ohm:.1f} Ω"
    fund = _one_resonance(s, e.f0_hz, "parallel")
    # At the fundamental the 49:1 transformer maps R_end to about R_end/49.
    assert fund.r_ohm == pytest.approx(e.r_end_ohm / 49, rel=0.05)


def test_small_loop_has_its_high_q_at_the_feedpoint():
    loop = SmallLoop(7.08e6, q=400.0)
    s = synthesize(loop, 7.06e6, 7.10e6, 2001)
    r = _one_resonance(s, loop.f0_hz, "series")
    assert r.hz == pytest.approx(loop.f0_hz, rel=1e-6)
    assert r.r_ohm == pytest.approx(loop.r_match_ohm, rel=1e-3)
    assert r.q == pytest.approx(400.0, rel=0.01)
    assert loop.efficiency == pytest.approx(0.05 / 0.15)


# -- damage ----------------------------------------------------------------------------------


@pytest.mark.parametrize("shift_hz", [-320e3, -50e3, 120e3])
def test_detune_moves_the_resonance_by_the_requested_amount(shift_hz):
    d = Dipole(7.1e6)
    base = _one_resonance(synthesize(d, 6.4e6, 7.8e6, 2801), 7.1e6)
    moved = _one_resonance(synthesize(detune(d, shift_hz), 6.4e6, 7.8e6, 2801), 7.1e6 + shift_hz)
    assert moved.hz - base.hz == pytest.approx(shift_hz, abs=50.0)  # 50 Hz of a 500 Hz step
    assert moved.q == pytest.approx(base.q, rel=0.01)


def test_embedded_sweep_matches_pozar_and_deembeds_back_to_the_feedpoint():
    cable = get_cable("RG-213")
    fl = Feedline(cable, 30.0)
    model = Dipole(7.1e6)
    at_line = synthesize(model, 6.5e6, 7.7e6, 401, feedline=fl)
    at_feed = synthesize(model, 6.5e6, 7.7e6, 401)
    f = at_line.freq_hz
    z_expected = _zin(model.impedance(f), cable.z0_ohm, _gamma_line(cable, f, 30.0))
    np.testing.assert_allclose(at_line.z, z_expected, rtol=1e-9)
    back = deembed(at_line, fl)
    np.testing.assert_allclose(back.gamma, at_feed.gamma, rtol=0, atol=1e-9)


@pytest.mark.parametrize("factor,wet_m", [(3.0, None), (5.0, 10.0)])
def test_water_raises_the_line_loss_as_asked(factor, wet_m):
    # A short at the feedpoint: |Γ_in| = e^(−2·Σαl), so return loss = twice the one-way loss.
    cable = get_cable("hardline-1/2in")
    length = 40.0
    fl = Feedline(cable, length)
    f = np.linspace(140e6, 150e6, 101)
    dry_db = (cable.k1 * np.sqrt(f / 1e6) + cable.k2 * f / 1e6) / 100.0 * length
    wet_share = 1.0 if wet_m is None else wet_m / length
    expected_one_way = dry_db * ((1 - wet_share) + factor * wet_share)
    water = WaterInLine(
        loss_factor=factor, wet_length_m=wet_m, z0_step_ohm=0.0, velocity_factor_ratio=1.0
    )
    s = synthesize(
        Dipole(145e6), 140e6, 150e6, 101, feedline=fl, damage=(water, LineBreak("short"))
    )
    np.testing.assert_allclose(s.return_loss_db, 2 * expected_one_way, rtol=1e-9)
    dry = synthesize(Dipole(145e6), 140e6, 150e6, 101, feedline=fl, damage=(LineBreak("short"),))
    np.testing.assert_allclose(dry.return_loss_db, 2 * dry_db, rtol=1e-9)


def test_water_makes_a_small_impedance_step_where_the_wet_part_starts():
    cable = get_cable("RG-213")
    fl = Feedline(cable, 30.0)
    water = WaterInLine(loss_factor=4.0, wet_length_m=10.0, z0_step_ohm=-4.0)
    secs = line_sections(fl, (water,))
    assert [round(s.length_m, 9) for s in secs] == [10.0, 20.0]  # antenna end first
    assert secs[0].cable.z0_ohm == 46.0
    assert secs[0].cable.velocity_factor == pytest.approx(0.66 * 0.96)
    # A matched 50 Ω load now reflects a little (the 46 Ω section), never more than
    # the step's own |Γ| = 4/96.
    s = synthesize(SeriesRLC(50.0, 1e-12, 1.0), 6e6, 8e6, 201, feedline=fl, damage=(water,))
    assert 0.005 < s.gamma_mag.max() < 2 * 4 / 96


def test_open_at_a_distance_is_seen_through_that_much_line_only():
    cable = get_cable("RG-58")
    fl = Feedline(cable, 15.0)
    s = synthesize(
        Vertical(14.18e6),
        13.6e6,
        14.8e6,
        201,
        feedline=fl,
        damage=(LineBreak("open", distance_m=6.2),),
    )
    expected = np.exp(-2 * _gamma_line(cable, s.freq_hz, 6.2))  # Γ_L = +1 (open)
    np.testing.assert_allclose(s.gamma, expected, rtol=1e-12)
    short = synthesize(
        Vertical(14.18e6), 13.6e6, 14.8e6, 201, feedline=fl, damage=(LineBreak("short"),)
    )
    np.testing.assert_allclose(
        short.gamma, -np.exp(-2 * _gamma_line(cable, short.freq_hz, 15.0)), rtol=1e-12
    )


def test_mid_line_reflection_equals_the_cascade_written_out():
    cable = get_cable("RG-213")
    fl = Feedline(cable, 30.0)
    model = Dipole(145e6)
    refl = MidLineReflection(distance_m=12.0, length_m=0.1, z0_ohm=30.0)
    s = synthesize(model, 140e6, 150e6, 201, feedline=fl, damage=(refl,))
    f = s.freq_hz
    # Antenna → 17.9 m of cable → 0.1 m of 30 Ω (same loss and VF) → 12 m of cable.
    z = _zin(model.impedance(f), 50.0, _gamma_line(cable, f, 17.9))
    z = _zin(z, 30.0, _gamma_line(cable, f, 0.1))
    z = _zin(z, 50.0, _gamma_line(cable, f, 12.0))
    np.testing.assert_allclose(s.z, z, rtol=1e-9)


# -- measurement -----------------------------------------------------------------------------


def test_noise_has_the_requested_rms_and_stays_inside_the_unit_circle():
    clean = synthesize(Dipole(7.1e6), 6.5e6, 7.7e6, 20001)
    noisy = synthesize(Dipole(7.1e6), 6.5e6, 7.7e6, 20001, noise=0.003, seed=3)
    rms = float(np.sqrt(np.mean(np.abs(noisy.gamma - clean.gamma) ** 2)))
    assert rms == pytest.approx(0.003, rel=0.03)  # 20,001 samples: ~0.5 % standard error
    near_open = synthesize(
        Dipole(7.1e6), 6.5e6, 7.7e6, 2001, noise=0.05, seed=1, damage=(LineBreak("open"),)
    )
    assert near_open.gamma_mag.max() <= 1.0


def test_erratic_points_replace_the_requested_share():
    clean = synthesize(Dipole(7.1e6), 6.5e6, 7.7e6, 10001)
    bad = synthesize(Dipole(7.1e6), 6.5e6, 7.7e6, 10001, erratic=0.1, seed=5)
    share = float(np.mean(np.abs(bad.gamma - clean.gamma) > 1e-12))
    assert share == pytest.approx(0.1, abs=0.01)


# -- bad input -------------------------------------------------------------------------------


def test_bad_arguments_say_what_is_wrong():
    with pytest.raises(ValueError, match="needs a feedline"):
        synthesize(Dipole(7.1e6), 6e6, 8e6, 11, damage=(WaterInLine(),))
    with pytest.raises(ValueError, match="beyond the 30 m feedline"):
        synthesize(
            Dipole(7.1e6),
            6e6,
            8e6,
            11,
            feedline=Feedline(get_cable("RG-213"), 30.0),
            damage=(MidLineReflection(distance_m=31.0),),
        )
    with pytest.raises(ValueError, match="at most one LineBreak"):
        synthesize(
            Dipole(7.1e6),
            6e6,
            8e6,
            11,
            feedline=Feedline(get_cable("RG-213"), 30.0),
            damage=(LineBreak("open"), LineBreak("short", 3.0)),
        )
    with pytest.raises(ValueError, match="0 < f_start < f_stop"):
        synthesize(Dipole(7.1e6), 8e6, 6e6, 11)
    with pytest.raises(ValueError, match="at least 2 points"):
        synthesize(Dipole(7.1e6), 6e6, 8e6, 1)
    with pytest.raises(ValueError, match="q > 1"):
        Dipole(7.1e6, q=0.5)
    with pytest.raises(ValueError, match="leaves no resonance"):
        detune(Dipole(7.1e6), -8e6)
    with pytest.raises(ValueError, match="'open' or 'short'"):
        LineBreak("broken")  # type: ignore[arg-type]
    with pytest.raises(ValueError, match="noise is an RMS"):
        synthesize(Dipole(7.1e6), 6e6, 8e6, 11, noise=-1.0)
