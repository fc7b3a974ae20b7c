"""Metrics on sweeps whose answers are known in closed form, and against scikit-rf.

Every sweep here is built so the true value is analytic: Γ linear in frequency (then
the piecewise-linear model of rf/metrics.py is exact), or an RLC circuit (circuit
theory: series RLC Z = R + j(ωL − 1/(ωC)); SWR from Pozar's definitions).
"""

from __future__ import annotations

import json
import math

import numpy as np
import pytest

from mastwatch.rf.bands import Band, get_band
from mastwatch.rf.errors import AnalysisError
from mastwatch.rf.metrics import PHASE_METRICS, POLE_RATIO, compute_metrics, value_at
from mastwatch.rf.sweep import Sweep

BAND_40M_R1 = get_band("40m", 1)  # 7.0–7.2 MHz


def linear_gamma(f: np.ndarray, f_zero: float, slope_per_hz: complex) -> Sweep:
    """Γ(f) = slope·(f − f_zero): straight in frequency, so interpolation is exact."""
    return Sweep(f, slope_per_hz * (f - f_zero))


def series_rlc(f: np.ndarray, f0: float, q: float, r: float, z0: float = 50.0) -> Sweep:
    w0 = 2 * math.pi * f0
    big_l = q * r / w0
    c = 1 / (w0**2 * big_l)
    w = 2 * np.pi * f
    return Sweep.from_impedance(f, r + 1j * (w * big_l - 1 / (w * c)), z0)


# -- minimum SWR ----------------------------------------------------------------------


def test_min_swr_between_points_when_gamma_passes_through_zero() -> None:
    # Γ = k·(f − 7.043 MHz) with k complex: |Γ| = 0 at 7.043 MHz, between grid points
    f = np.linspace(6.9e6, 7.3e6, 9)  # 50 kHz steps; 7.043 MHz is not on the grid
    s = linear_gamma(f, 7.043e6, (1 + 1j) * 1e-6)
    m = compute_metrics(s)
    assert m.min_swr == pytest.approx(1.0, abs=1e-12)
    assert m.min_swr_hz == pytest.approx(7.043e6, rel=1e-12)
    assert np.min(s.swr) > 1.01  # the sampled minimum would have missed it


def test_min_swr_at_a_sample_point() -> None:
    f = np.linspace(1e6, 2e6, 11)
    gm = np.array([0.5, 0.4, 0.3, 0.2, 0.1, 0.05, 0.1, 0.2, 0.3, 0.4, 0.5]) + 0j
    m = compute_metrics(Sweep(f, gm))
    assert m.min_swr == pytest.approx(1.05 / 0.95, rel=1e-12)
    assert m.min_swr_hz == 1.5e6


# -- SWR bandwidths -------------------------------------------------------------------


def test_bandwidth_edges_on_a_linear_gamma() -> None:
    # Γ = (f − 7.1 MHz)/1 MHz (real): SWR = s where |Γ| = (s−1)/(s+1), i.e. at
    # f = 7.1 MHz ± (s−1)/(s+1)·1 MHz
    f = np.linspace(6.0e6, 8.2e6, 23)  # 100 kHz steps
    m = compute_metrics(linear_gamma(f, 7.1e6, 1e-6))
    for s in (1.5, 2.0, 3.0):
        bw = m.bandwidth(s)
        half = (s - 1) / (s + 1) * 1e6
        assert bw.low_hz == pytest.approx(7.1e6 - half, rel=1e-12)
        assert bw.high_hz == pytest.approx(7.1e6 + half, rel=1e-12)
        assert bw.width_hz == pytest.approx(2 * half, rel=1e-9)
        assert not bw.open_low and not bw.open_high


def test_bandwidth_open_when_the_span_runs_off_the_sweep() -> None:
    f = np.linspace(7.0e6, 7.5e6, 51)
    m = compute_metrics(linear_gamma(f, 7.1e6, 1e-6))  # |Γ| = 0.1 at the start: SWR 1.22
    bw = m.bandwidth(2.0)
    assert bw.open_low and not bw.open_high
    assert bw.low_hz == 7.0e6  # a lower bound: the sweep's start
    assert bw.high_hz == pytest.approx(7.1e6 + 1e6 / 3, rel=1e-12)
    wide = compute_metrics(linear_gamma(np.linspace(7.05e6, 7.15e6, 5), 7.1e6, 1e-6))
    both = wide.bandwidth(3.0)
    assert both.open_low and both.open_high
    assert both.width_hz == pytest.approx(0.1e6)


def test_bandwidth_absent_when_the_minimum_is_above_the_threshold() -> None:
    f = np.linspace(7.0e6, 7.2e6, 21)
    s = Sweep(f, np.full(f.size, 0.4 + 0j))  # SWR 2.333 everywhere
    m = compute_metrics(s)
    assert [bw.threshold for bw in m.swr_bandwidths] == [1.5, 2.0, 3.0]
    for th in (1.5, 2.0):
        bw = m.bandwidth(th)
        assert (bw.low_hz, bw.high_hz, bw.width_hz, bw.open_low, bw.open_high) == (
            None, None, None, False, False,
        )  # fmt: skip
    assert m.bandwidth(3.0).width_hz == pytest.approx(0.2e6)


def test_bandwidth_is_the_span_around_the_minimum_not_every_dip() -> None:
    # two dips below SWR 2: the span is the one around the deeper dip only
    f = np.linspace(1e6, 3e6, 201)
    g = 0.9 * np.ones(f.size) + 0j
    g[40:61] = 0.2  # shallower dip around 1.5 MHz (SWR 1.5)
    g[140:161] = 0.05  # deeper dip around 2.5 MHz
    m = compute_metrics(Sweep(f, g))
    bw = m.bandwidth(2.0)
    assert m.min_swr_hz == pytest.approx(f[140])
    assert f[139] < bw.low_hz < f[140] and f[160] < bw.high_hz < f[161]


def test_bad_threshold() -> None:
    s = Sweep(np.array([1e6, 2e6]), np.array([0.1, 0.2]) + 0j)
    with pytest.raises(ValueError, match=r"above 1, got 1\.0"):
        compute_metrics(s, thresholds=(1.0,))


# -- resonances and the pole rule ------------------------------------------------------


def test_no_resonance_where_x_keeps_its_sign() -> None:
    f = np.linspace(7.0e6, 7.2e6, 11)
    assert compute_metrics(Sweep.from_impedance(f, 50 + 20j + 0 * f)).resonances == ()


def test_sign_change_through_a_pole_is_not_a_resonance() -> None:
    # a nearly lossless parallel LC (R = 1 MΩ) sampled far more coarsely than its
    # bandwidth: X jumps from +large to −large with R tiny on both sides
    f0 = 10e6
    w0 = 2 * math.pi * f0
    c = 1e-9
    big_l = 1 / (w0**2 * c)
    f = np.linspace(9.0e6, 11.05e6, 42) + 13e3  # 50 kHz steps off f0; tank bandwidth ~0.2 Hz
    w = 2 * np.pi * f
    z = 1 / (1 / 1e6 + 1j * w * c + 1 / (1j * w * big_l))
    s = Sweep.from_impedance(f, z)
    k = int(np.flatnonzero(np.diff(np.sign(s.x)))[0])
    assert min(abs(s.x[k]), abs(s.x[k + 1])) > POLE_RATIO * max(s.r[k], s.r[k + 1])
    assert compute_metrics(s).resonances == ()
    # the same tank with R = 300 Ω is resolved by the grid: a parallel resonance
    z_lossy = 1 / (1 / 300 + 1j * w * c + 1 / (1j * w * big_l))
    (res,) = compute_metrics(Sweep.from_impedance(f, z_lossy)).resonances
    assert res.kind == "parallel"
    assert res.hz == pytest.approx(f0, rel=1e-4)


def test_coarse_low_r_series_resonance_is_kept() -> None:
    # a series LC with 0.05 Ω loss (Q ≈ 5000) on a 50 kHz grid: |X| ≫ R at both
    # neighbours, but X rises smoothly through zero (a zero, not a pole: Foster)
    f0, q, r = 10e6, 5000.0, 0.05
    f = np.linspace(9.0e6, 11.05e6, 42) + 13e3
    (res,) = compute_metrics(series_rlc(f, f0, q, r)).resonances
    assert res.kind == "series"
    step = f[1] - f[0]
    assert abs(res.hz - f0) < f0 * (step / f0) ** 2  # second-order interpolation error
    assert res.q == pytest.approx(q, rel=0.01)  # Yaghjian–Best = ω0L/R (circuit theory)


@pytest.mark.parametrize("seed", range(6))
def test_trace_noise_does_not_split_a_resonance(seed: int) -> None:
    # series RLC (circuit theory: f0 = 1/(2π√(LC)), Q = ω0L/R) plus complex Gaussian
    # noise of RMS |ΔΓ| 0.003 (seeded): near f0 the noise flips the sign of X several
    # times between neighbouring points; the metrics must report one series resonance
    f0, q = 14.2e6, 10.0
    f = np.linspace(13.2e6, 15.2e6, 2001)
    clean = series_rlc(f, f0, q, 50.0)
    rng = np.random.default_rng(seed)
    noise = 0.003 * (rng.standard_normal(f.size) + 1j * rng.standard_normal(f.size)) / math.sqrt(2)
    noisy = clean.with_gamma(clean.gamma + noise)
    neg = noisy.gamma.imag < 0
    assert np.count_nonzero(neg[1:] != neg[:-1]) >= 3  # the raw sign changes
    (res,) = compute_metrics(noisy).resonances
    assert res.kind == "series"
    assert res.hz == pytest.approx(f0, rel=5e-4)
    assert res.q == pytest.approx(q, rel=0.15)  # noise-limited; clean sweeps: 1 % (reference)


def test_touching_zero_is_not_a_resonance_pair() -> None:
    # X = 0 exactly at one point with the same sign on both sides: no crossing
    f = np.linspace(7.0e6, 7.2e6, 21)
    x = -np.abs(f - 7.1e6) * 1e-4
    assert compute_metrics(Sweep.from_impedance(f, 50 + 1j * x)).resonances == ()


def test_resonance_q_is_none_where_r_is_not_positive() -> None:
    # R < 0 (an active or badly calibrated reading): the crossing is reported, Q is not
    f = np.linspace(7.0e6, 7.2e6, 21)
    x = (f - 7.105e6) * 1e-5  # |X| ≤ 1 Ω: well resolved, not a pole
    (res,) = compute_metrics(Sweep.from_impedance(f, -0.5 + 1j * x)).resonances
    assert res.hz == pytest.approx(7.105e6, rel=1e-12)
    assert res.kind == "series"
    assert res.r_ohm == pytest.approx(-0.5)
    assert res.q is None
    assert res.to_dict() == {"hz": res.hz, "kind": "series", "r_ohm": res.r_ohm, "q": None}


# -- value_at ---------------------------------------------------------------------------


def test_value_at_interpolates_gamma_linearly() -> None:
    f = np.linspace(7.0e6, 7.2e6, 5)
    s = linear_gamma(f, 7.1e6, (0.5 - 1j) * 1e-6)
    hz = 7.0123e6
    g = (0.5 - 1j) * 1e-6 * (hz - 7.1e6)  # exact, since Γ is linear
    z = 50 * (1 + g) / (1 - g)
    p = value_at(s, hz)
    assert p.hz == hz
    assert p.r_ohm == pytest.approx(z.real, rel=1e-12)
    assert p.x_ohm == pytest.approx(z.imag, rel=1e-12)
    assert p.swr == pytest.approx((1 + abs(g)) / (1 - abs(g)), rel=1e-12)
    assert p.return_loss_db == pytest.approx(-20 * math.log10(abs(g)), rel=1e-12)
    assert p.mismatch_loss_db == pytest.approx(-10 * math.log10(1 - abs(g) ** 2), rel=1e-12)


def test_value_at_on_sample_points_equals_the_sweep_views() -> None:
    f = np.linspace(3.5e6, 3.8e6, 31)
    s = series_rlc(f, 3.65e6, 8.0, 30.0)
    for i in (0, 7, 30):
        p = value_at(s, f[i])
        assert p.r_ohm == pytest.approx(s.r[i], rel=1e-12)
        assert p.x_ohm == pytest.approx(s.x[i], rel=1e-12, abs=1e-12)
        assert p.swr == pytest.approx(s.swr[i], rel=1e-12)
        assert p.return_loss_db == pytest.approx(s.return_loss_db[i], rel=1e-12)


def test_value_at_outside_the_sweep() -> None:
    s = Sweep(np.array([7.0e6, 7.2e6]), np.array([0.1, 0.2]) + 0j)
    with pytest.raises(AnalysisError, match=r"7\.3 MHz is outside the sweep \(7–7\.2 MHz\)"):
        value_at(s, 7.3e6)
    with pytest.raises(AnalysisError, match="outside the sweep"):
        value_at(s, math.nan)
    assert isinstance(AnalysisError("x"), ValueError)


def test_value_at_infinite_swr_and_perfect_match() -> None:
    f = np.array([1e6, 2e6])
    short = value_at(Sweep(f, np.array([-1, -1]) + 0j), 1.5e6)
    assert short.swr == math.inf and short.r_ohm == pytest.approx(0.0)
    assert short.to_dict()["swr"] is None and short.to_dict()["mismatch_loss_db"] is None
    matched = value_at(Sweep(f, np.zeros(2, complex)), 1.5e6)
    assert matched.return_loss_db == math.inf and matched.swr == 1.0
    assert matched.to_dict()["return_loss_db"] is None


# -- per band -----------------------------------------------------------------------------


def test_usable_fraction_on_a_linear_gamma() -> None:
    # |Γ| = |f − 7.05 MHz|/150 kHz ≤ 1/3 on 7.0–7.1 MHz: half of 40 m in Region 1,
    # a third of it in Region 2 (7.0–7.3 MHz)
    f = np.linspace(6.9e6, 7.4e6, 11)
    s = linear_gamma(f, 7.05e6, 1 / 150e3)
    m = compute_metrics(s, [BAND_40M_R1, get_band("40m", 2)])
    assert m.band("40m").usable_fraction_2 == pytest.approx(0.5, rel=1e-12)
    assert m.bands[1].usable_fraction_2 == pytest.approx(1 / 3, rel=1e-12)


def test_usable_fraction_of_a_series_rlc_against_its_analytic_edges() -> None:
    # R = Z0: SWR ≤ 2 where |X| ≤ R/√2 (|Γ| = |X|/|2R + jX| ≤ 1/3); edges from the quadratic
    f0, q, r = 7.15e6, 30.0, 50.0
    f = np.linspace(6.8e6, 7.5e6, 1401)
    s = series_rlc(f, f0, q, r)
    w0 = 2 * math.pi * f0
    big_l = q * r / w0
    c = 1 / (w0**2 * big_l)
    x = r / math.sqrt(2)
    f_low = (-x + math.sqrt(x * x + 4 * big_l / c)) / (2 * big_l) / (2 * math.pi)
    b = compute_metrics(s, [BAND_40M_R1]).band("40m")
    assert 7.0e6 < f_low < 7.2e6
    assert b.usable_fraction_2 == pytest.approx((7.2e6 - f_low) / 0.2e6, rel=1e-5)
    assert b.bandwidth_2_hz == pytest.approx(f0 / (q * math.sqrt(2)), rel=1e-4)  # beyond the band
    assert b.resonance_kind == "series" and b.resonance_hz == pytest.approx(f0, rel=1e-6)
    assert b.q == pytest.approx(q, rel=0.01)
    assert b.swr_center == pytest.approx(value_at(s, 7.1e6).swr, rel=1e-12)
    assert b.r_center_ohm == pytest.approx(r, rel=1e-9)


def test_band_minimum_includes_the_interpolated_band_edge() -> None:
    # |Γ| falls linearly from 0.5 at 6.9 MHz to 0 at 7.4 MHz; only 3 points. Inside
    # 7.0–7.2 MHz the lowest SWR is at the upper band edge: |Γ| = 0.2, SWR 1.5
    f = np.array([6.9e6, 7.15e6, 7.4e6])
    s = Sweep(f, 0.5 * (7.4e6 - f) / 0.5e6 + 0j)
    b = compute_metrics(s, [BAND_40M_R1]).band("40m")
    assert b.min_swr == pytest.approx(1.5, rel=1e-12)
    assert b.min_swr_hz == pytest.approx(7.2e6, rel=1e-12)
    assert b.coverage == 1.0
    assert b.swr_center == pytest.approx((1 + 0.3) / (1 - 0.3), rel=1e-12)
    assert b.usable_fraction_2 == pytest.approx((7.2e6 - (7.4e6 - 0.5e6 * 2 / 3)) / 0.2e6)
    assert b.bandwidth_2_hz is not None


def test_band_partly_swept() -> None:
    f = np.linspace(7.1e6, 7.4e6, 31)
    s = linear_gamma(f, 7.3e6, 1e-6)
    b = compute_metrics(s, [BAND_40M_R1]).band("40m")
    assert b.coverage == pytest.approx(0.5)
    assert b.swr_center is not None  # the centre 7.1 MHz is the sweep's first point
    late = compute_metrics(Sweep(f[2:], s.gamma[2:]), [BAND_40M_R1]).band("40m")
    assert late.coverage == pytest.approx(0.4)
    assert late.swr_center is None and late.r_center_ohm is None
    assert late.return_loss_center_db is None
    assert late.min_swr_hz == pytest.approx(7.2e6)
    # relative to the full band width: at most the coverage
    assert late.usable_fraction_2 is not None and late.usable_fraction_2 <= late.coverage


def test_band_not_swept_at_all() -> None:
    f = np.linspace(14.0e6, 14.35e6, 11)
    b = compute_metrics(Sweep(f, np.full(11, 0.1 + 0j)), [BAND_40M_R1]).band("40m")
    assert b.coverage == 0.0
    assert b.min_swr is None and b.usable_fraction_2 is None and b.swr_center is None
    assert (b.low_hz, b.high_hz) == (7.0e6, 7.2e6)


def test_band_resonance_closest_to_the_centre() -> None:
    # X = sin-like with crossings at 7.02, 7.09 and 7.17 MHz: the middle one is nearest 7.1
    f = np.linspace(6.95e6, 7.25e6, 3001)
    x = 100 * (f - 7.02e6) * (f - 7.09e6) * (f - 7.17e6) / (0.05e6) ** 3
    b = compute_metrics(Sweep.from_impedance(f, 50 + 1j * x), [BAND_40M_R1]).band("40m")
    assert b.resonance_hz == pytest.approx(7.09e6, rel=1e-7)
    assert b.resonance_kind == "parallel"  # X falls through zero there


# -- SWR-only sweeps --------------------------------------------------------------------


def test_swr_only_sweep_gets_what_swr_allows() -> None:
    f = np.linspace(6.9e6, 7.3e6, 401)
    full = series_rlc(f, 7.1e6, 10.0, 50.0)
    swr_only = Sweep(f, full.gamma_mag + 0j, has_phase=False)
    m_full = compute_metrics(full, [BAND_40M_R1])
    m = compute_metrics(swr_only, [BAND_40M_R1])
    assert m.unavailable == PHASE_METRICS
    assert "q" in m.unavailable and "resonances" in m.unavailable
    assert m.resonances == ()
    b = m.band("40m")
    assert (b.r_center_ohm, b.x_center_ohm, b.resonance_hz, b.resonance_kind, b.q) == (
        None, None, None, None, None,
    )  # fmt: skip
    # the SWR metrics agree with the phase sweep's (|Γ| rather than Γ is interpolated)
    assert m.min_swr == pytest.approx(m_full.min_swr, abs=2e-3)
    assert b.swr_center == pytest.approx(m_full.band("40m").swr_center, rel=1e-12)
    assert m.bandwidth(2.0).width_hz == pytest.approx(m_full.bandwidth(2.0).width_hz, rel=1e-3)
    assert b.usable_fraction_2 == pytest.approx(1.0)
    p = value_at(swr_only, 7.05e6)
    assert p.r_ohm is None and p.x_ohm is None
    assert p.swr == pytest.approx(value_at(full, 7.05e6).swr, rel=1e-4)
    assert compute_metrics(full).unavailable == ()


# -- shapes, JSON, single point -------------------------------------------------------------


def test_to_dict_is_json_safe() -> None:
    f = np.linspace(7.0e6, 7.2e6, 21)
    perfect = linear_gamma(f, 7.1e6, 0)  # Γ = 0 everywhere: RL infinite
    d = compute_metrics(perfect, [BAND_40M_R1]).to_dict()
    text = json.dumps(d, allow_nan=False)
    assert json.loads(text)["bands"][0]["return_loss_center_db"] is None
    assert d["min_swr"] == 1.0
    short = Sweep(f, np.full(21, -1 + 0j))
    ds = compute_metrics(short, [BAND_40M_R1]).to_dict()
    json.dumps(ds, allow_nan=False)
    assert ds["min_swr"] is None and ds["bands"][0]["min_swr"] is None
    assert [b["width_hz"] for b in ds["swr_bandwidths"]] == [None, None, None]
    assert list(d) == [
        "points", "z0_ohm", "f_start_hz", "f_stop_hz", "min_swr", "min_swr_hz",
        "resonances", "swr_bandwidths", "bands", "unavailable",
    ]  # fmt: skip


def test_single_point_sweep() -> None:
    s = Sweep(np.array([7.1e6]), np.array([0.2 + 0.1j]))
    m = compute_metrics(s, [BAND_40M_R1, Band("x", 1e6, 2e6, 1)])
    assert m.min_swr == pytest.approx(float(s.swr[0]))
    assert m.resonances == ()
    assert m.bandwidth(3.0).open_low and m.bandwidth(3.0).width_hz == 0.0
    assert m.band("40m").coverage == 0.0 and m.band("40m").swr_center is not None
    assert m.band("x").min_swr is None
    assert value_at(s, 7.1e6).swr == pytest.approx(float(s.swr[0]))


def test_band_lookup_errors() -> None:
    m = compute_metrics(Sweep(np.array([1e6, 2e6]), np.array([0.1, 0.2]) + 0j))
    with pytest.raises(KeyError, match="no metrics for band '40m'"):
        m.band("40m")
    with pytest.raises(KeyError, match=r"no SWR≤2\.5 bandwidth"):
        m.bandwidth(2.5)


# -- scikit-rf as the oracle (test-only) -------------------------------------------------


def test_point_values_match_scikit_rf() -> None:
    skrf = pytest.importorskip("skrf")
    rng = np.random.default_rng(7)
    f = np.linspace(1e6, 30e6, 301)
    g = 0.8 * rng.random(f.size) * np.exp(2j * np.pi * rng.random(f.size))
    s = Sweep(f, g, z0=75.0)
    net = skrf.Network(f=f, s=g.reshape(-1, 1, 1), z0=75.0, f_unit="Hz")
    for i in (0, 17, 150, 300):
        p = value_at(s, f[i])
        assert p.r_ohm == pytest.approx(net.z[i, 0, 0].real, rel=1e-12)
        assert p.x_ohm == pytest.approx(net.z[i, 0, 0].imag, rel=1e-12)
        assert p.swr == pytest.approx(net.s_vswr[i, 0, 0], rel=1e-12)
        assert p.return_loss_db == pytest.approx(-net.s_db[i, 0, 0], rel=1e-12)
    # between points: scikit-rf's linear interpolation of S (real and imaginary parts)
    mid = (f[:-1] + f[1:]) / 2
    inter = net.interpolate(skrf.Frequency.from_f(mid[10:20], unit="Hz"), kind="linear")
    for j, hz in enumerate(mid[10:20]):
        p = value_at(s, hz)
        assert p.r_ohm == pytest.approx(inter.z[j, 0, 0].real, rel=1e-9)
        assert p.x_ohm == pytest.approx(inter.z[j, 0, 0].imag, rel=1e-9, abs=1e-9)
        assert p.swr == pytest.approx(inter.s_vswr[j, 0, 0], rel=1e-9)


# -- on the rim of the chart ------------------------------------------------------------
# A lossless reactance keeps |Γ| = 1 at every frequency (Foster's reactance theorem;
# Pozar, Microwave Engineering 4th ed. §4.5, from memory), so between two measured
# points on the rim Γ follows the rim: the chord between them, which dips inside, is an
# artefact of the straight-line model. DESIGN.md: SWR is infinite where |Γ| ≥ 1 and the
# API returns null, never a made-up number.


def _open_line(f: np.ndarray, length_m: float, vf: float = 0.66) -> Sweep:
    """An open at the end of a lossless line: Γ = e^(−2jβl), |Γ| = 1 at every point."""
    beta = 2 * np.pi * f / (vf * 299_792_458.0)
    return Sweep(f, np.exp(-2j * beta * length_m))


def test_open_circuit_has_no_finite_swr_anywhere() -> None:
    f = np.linspace(6.9e6, 7.3e6, 201)
    sweep = _open_line(f, 500.0)  # phase turns about 8.8° per step: the chord dips to 0.997
    assert np.all(np.abs(sweep.gamma) == pytest.approx(1.0, abs=1e-15))
    m = compute_metrics(sweep, [BAND_40M_R1])
    assert math.isinf(m.min_swr)
    band = m.band("40m")
    assert band.min_swr is not None and math.isinf(band.min_swr)
    assert band.swr_center is not None and math.isinf(band.swr_center)
    assert band.usable_fraction_2 == 0.0 and band.bandwidth_2_hz is None
    doc = json.loads(json.dumps(m.to_dict(), allow_nan=False))
    assert doc["min_swr"] is None
    assert doc["bands"][0]["min_swr"] is None and doc["bands"][0]["swr_center"] is None
    # between two rim points value_at follows the rim too
    assert math.isinf(value_at(sweep, 7.0001e6).swr)


def test_a_dip_between_points_inside_the_chart_is_still_found() -> None:
    # Not on the rim: Γ = 0.2∠+80° then 0.2∠−80° passes near the centre between the
    # samples (the straight line is the model there); the minimum is the chord's.
    g0, g1 = 0.2 * np.exp(1j * np.radians(80)), 0.2 * np.exp(-1j * np.radians(80))
    m = compute_metrics(Sweep(np.array([7.0e6, 7.1e6]), np.array([g0, g1])))
    mag = 0.2 * math.cos(math.radians(80))  # the chord's closest approach to the centre
    assert m.min_swr == pytest.approx((1 + mag) / (1 - mag), rel=1e-12)
    assert m.min_swr_hz == pytest.approx(7.05e6, rel=1e-12)


@pytest.mark.parametrize("decimals", [6, 9])
def test_an_open_stored_as_a_file_stores_it_still_has_no_finite_swr(decimals: int) -> None:
    # Touchstone files keep Γ to 6–9 digits (RI): |Γ| of a lossless open then reads
    # 0.999999… or 1.000000…, and the rule must hold for the file, not only for exact data.
    f = np.linspace(6.9e6, 7.3e6, 201)
    g = _open_line(f, 500.0).gamma
    stored = np.round(g.real, decimals) + 1j * np.round(g.imag, decimals)
    m = compute_metrics(Sweep(f, stored), [BAND_40M_R1])
    assert math.isinf(m.min_swr)
    doc = json.loads(json.dumps(m.to_dict(), allow_nan=False))
    assert doc["min_swr"] is None


def test_just_inside_the_rim_tolerance_the_swr_is_a_number() -> None:
    # |Γ| = 0.999 everywhere (a lossy open): SWR 1999 at every point, a reading.
    f = np.linspace(6.9e6, 7.3e6, 201)
    m = compute_metrics(Sweep(f, 0.999 * _open_line(f, 500.0).gamma))
    assert math.isfinite(m.min_swr) and m.min_swr <= (1 + 0.999) / (1 - 0.999)
