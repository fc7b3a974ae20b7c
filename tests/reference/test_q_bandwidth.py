"""Q, resonance and SWR bandwidth of RLC circuits, against circuit theory and Yaghjian–Best.

Sources:
- Series RLC: ω0 = 1/√(LC), Q = ω0·L/R; parallel RLC: Q = ω0·R·C (textbook circuit
  theory; series/parallel resonance as in Pozar, Microwave Engineering 4th ed. §6.1,
  from memory).
- A. D. Yaghjian and S. R. Best, "Impedance, Bandwidth, and Q of Antennas", IEEE Trans.
  Antennas Propag. 53(4):1298–1324, 2005: Q ≈ ω0·|Z′(ω0)|/(2R(ω0)) and the matched VSWR
  fractional bandwidth FBW = (s−1)/(Q·√s) (formulas from memory, confident; see
  REFERENCES §4). For a series RLC with R = Z0 that bandwidth relation is exact with
  ω0 = √(ω1·ω2) (REFERENCES §4, computed).
"""

from __future__ import annotations

import itertools
import math

import numpy as np
import pytest

from mastwatch.rf.metrics import compute_metrics
from mastwatch.rf.sweep import Sweep


def series_rlc(f0: float, q: float, r: float) -> tuple[float, float]:
    """L and C of a series RLC with resonance f0 and Q = ω0L/R."""
    w0 = 2 * math.pi * f0
    big_l = q * r / w0
    return big_l, 1 / (w0**2 * big_l)


def series_sweep(f: np.ndarray, big_l: float, c: float, r: float, z0: float = 50.0) -> Sweep:
    w = 2 * np.pi * f
    return Sweep.from_impedance(f, r + 1j * (w * big_l - 1 / (w * c)), z0)


@pytest.mark.parametrize(
    ("q", "r", "points"),
    [(5.0, 50.0, 101), (10.0, 50.0, 121), (10.0, 35.0, 41), (40.0, 12.0, 401), (80.0, 70.0, 801)],
)
def test_yaghjian_best_q_recovers_series_rlc_q_to_1_percent(
    q: float, r: float, points: int
) -> None:
    f0 = 7.1e6
    big_l, c = series_rlc(f0, q, r)
    # circuit theory: Q = ω0L/R exactly (the definition used to build L)
    assert 2 * math.pi * f0 * big_l / r == pytest.approx(q, rel=1e-12)
    # a grid that does not contain f0, over ±3 half-power bandwidths
    half = 3 * f0 / q
    f = np.linspace(f0 - half * 1.013, f0 + half, points)
    (res,) = compute_metrics(series_sweep(f, big_l, c, r)).resonances
    assert res.kind == "series"
    assert res.q == pytest.approx(q, rel=0.01)
    # linear interpolation of X misses ω0 by a second-order term: ~(step/f0)² relative
    step = f[1] - f[0]
    f_lc = 1 / (2 * math.pi * math.sqrt(big_l * c))
    assert abs(res.hz - f_lc) < f0 * (step / f0) ** 2
    assert res.r_ohm == pytest.approx(r, rel=1e-9)


def test_resonance_location_by_interpolation_on_a_coarse_grid() -> None:
    # ω0 = 1/√(LC) (circuit theory); X = ωL − 1/(ωC) is smooth, so linear interpolation
    # between two points 50 kHz apart lands within a few hertz of it
    f0 = 14.2e6
    big_l, c = series_rlc(f0, 15.0, 50.0)
    f = np.arange(13.0e6, 15.5e6, 50e3) + 17e3
    (res,) = compute_metrics(series_sweep(f, big_l, c, 50.0)).resonances
    assert abs(res.hz - 1 / (2 * math.pi * math.sqrt(big_l * c))) < 20.0


@pytest.mark.parametrize("s", [1.5, 2.0, 3.0])
def test_matched_vswr_bandwidth_relation(s: float) -> None:
    # R = Z0: SWR≤s fractional bandwidth (f2−f1)/√(f1·f2) = (s−1)/(Q√s) exactly (REFERENCES §4)
    f0, q, r = 7.1e6, 12.0, 50.0
    big_l, c = series_rlc(f0, q, r)
    f = np.linspace(6.0e6, 8.4e6, 2401)
    bw = compute_metrics(series_sweep(f, big_l, c, r), thresholds=(s,)).bandwidth(s)
    assert not (bw.open_low or bw.open_high)
    assert bw.low_hz is not None and bw.high_hz is not None and bw.width_hz is not None
    fbw = bw.width_hz / math.sqrt(bw.low_hz * bw.high_hz)
    assert fbw == pytest.approx((s - 1) / (q * math.sqrt(s)), rel=1e-4)
    # and the edges themselves: |X| = R·(s−1)/√s there (|Γ| = (s−1)/(s+1) for Z = R + jX, R = Z0)
    x_edge = r * (s - 1) / math.sqrt(s)
    for sign, edge in ((-1, bw.low_hz), (1, bw.high_hz)):
        w = (sign * x_edge + math.sqrt(x_edge**2 + 4 * big_l / c)) / (2 * big_l)
        assert edge == pytest.approx(w / (2 * math.pi), rel=1e-6)


def test_parallel_rlc_gives_a_parallel_resonance_with_its_q() -> None:
    # parallel RLC: Z = 1/(1/R + jωC + 1/(jωL)); resonance at ω0 = 1/√(LC), R there, Q = ω0RC
    f0, q, r = 3.65e6, 20.0, 2500.0
    w0 = 2 * math.pi * f0
    c = q / (w0 * r)
    big_l = 1 / (w0**2 * c)
    f = np.linspace(3.3e6, 4.0e6, 351) + 1.1e3
    w = 2 * np.pi * f
    z = 1 / (1 / r + 1j * w * c + 1 / (1j * w * big_l))
    (res,) = compute_metrics(Sweep.from_impedance(f, z)).resonances
    assert res.kind == "parallel"
    assert res.hz == pytest.approx(f0, rel=1e-6)
    assert res.r_ohm == pytest.approx(r, rel=1e-3)
    assert res.q == pytest.approx(q, rel=0.01)


def test_series_and_parallel_resonances_of_one_network() -> None:
    # a series RLC in series with a parallel RLC tank: a series resonance where the total
    # X rises through zero, a parallel one where it falls (Foster: they alternate)
    f = np.linspace(5e6, 20e6, 3001)
    w = 2 * np.pi * f
    big_l1, c1 = series_rlc(7.0e6, 10.0, 40.0)
    wp = 2 * math.pi * 14e6
    cp = 10.0 / (wp * 3000.0)
    lp = 1 / (wp**2 * cp)
    tank = 1 / (1 / 3000.0 + 1j * w * cp + 1 / (1j * w * lp))
    z = 40.0 + 1j * (w * big_l1 - 1 / (w * c1)) + tank
    kinds = [r.kind for r in compute_metrics(Sweep.from_impedance(f, z)).resonances]
    assert kinds[0] == "series"
    assert "parallel" in kinds
    assert all(a != b for a, b in itertools.pairwise(kinds))
