"""Line transformations against published worked examples and closed forms (REFERENCES §2, §3)."""

from __future__ import annotations

import numpy as np
import pytest

from mastwatch.rf.lines import (
    C0,
    FEET,
    CableType,
    Feedline,
    additional_loss_db,
    arrl_total_loss_db,
    deembed,
    fit_cable,
    input_impedance,
    matched_loss_db,
    propagation_constant,
    radio_swr,
    total_loss_db,
)
from mastwatch.rf.sweep import Sweep, return_loss_from_mag, swr_from_mag


def _lossless(z0: float, vf: float = 1.0):
    return fit_cable("lossless", z0, vf, [(1e6, 0.0), (2e6, 0.0)], source="test")


F = np.array([3.5e6, 7.1e6, 14.2e6, 28.4e6])
LOADS = np.array([25.0, 100.0, 37 - 22j, 210 + 95j, 3.0 + 0.5j])


@pytest.mark.parametrize("z0", [50.0, 75.0, 450.0])
def test_quarter_wave_gives_z0_squared_over_zl(z0: float) -> None:
    # Pozar, Microwave Engineering 4th ed., §2.3/2.5: λ/4 lossless line, Zin = Z0²/ZL
    cable = _lossless(z0, 0.66)
    for f in F:
        quarter = 0.66 * C0 / f / 4
        zin = input_impedance(LOADS, cable, quarter, np.full(LOADS.size, f))
        np.testing.assert_allclose(zin, z0**2 / LOADS, rtol=1e-9)


def test_half_wave_repeats_the_load() -> None:
    # Pozar 4th ed., §2.3: a λ/2 lossless line repeats the load, any Z0
    cable = _lossless(300.0, 0.8)
    for f in F:
        half = 0.8 * C0 / f / 2
        for n in (1, 3):
            zin = input_impedance(LOADS, cable, n * half, np.full(LOADS.size, f))
            np.testing.assert_allclose(zin, LOADS, rtol=1e-9)


def test_pozar_example_2_2() -> None:
    # Pozar 4th ed., Example 2.2 p. 66 [found]: ZL = 40 + j70 Ω, Z0 = 100 Ω, l = 0.3λ.
    # Book (Smith chart): |Γ| = 0.59, SWR = 3.87, RL = 4.6 dB. Exact values [computed]
    # REFERENCES §2: Zin = 36.53396 − j61.11897 Ω, SWR 3.866359, RL 4.597472 dB.
    f = np.array([100e6])
    cable = _lossless(100.0, 1.0)
    lam = C0 / f[0]
    zin = input_impedance(np.array([40 + 70j]), cable, 0.3 * lam, f)[0]
    assert zin.real == pytest.approx(36.53396, abs=5e-6)
    assert zin.imag == pytest.approx(-61.11897, abs=5e-6)
    g = abs((zin - 100) / (zin + 100))
    assert g == pytest.approx(0.589015, abs=5e-7)
    assert float(swr_from_mag(g)) == pytest.approx(3.866359, abs=5e-7)
    assert float(return_loss_from_mag(g)) == pytest.approx(4.597472, abs=5e-7)
    # the book's chart-read figures, within 1 %
    assert g == pytest.approx(0.59, rel=0.01)
    assert float(swr_from_mag(g)) == pytest.approx(3.87, rel=0.01)
    assert float(return_loss_from_mag(g)) == pytest.approx(4.6, rel=0.01)


def test_lossy_deembedding_case() -> None:
    # REFERENCES §2 lossy de-embedding case [computed]: 30.48 m, 1.0 dB/100 ft, VF 0.66,
    # 14 MHz, Z0 = 50 Ω, ZL = 150 Ω → α = 3.77721e-3 Np/m, γl = 0.1151293 + j13.550591,
    # Zin = 28.73941 − j24.98912 Ω; de-embedding returns 150 Ω.
    per_100m = 1.0 / FEET  # 1 dB/100 ft in dB/100 m; a flat loss is the k0 term alone
    flat = CableType("flat", 50.0, 0.66, k1=0.0, k2=0.0, k0=per_100m)
    f = np.array([14e6])
    gl = propagation_constant(flat, f)[0] * 30.48
    assert gl.real == pytest.approx(0.1151293, abs=5e-8)
    assert gl.imag == pytest.approx(13.550591, abs=5e-7)
    assert flat.alpha_np_per_m(f)[0] == pytest.approx(3.77721e-3, abs=5e-9)
    zin = input_impedance(np.array([150.0]), flat, 30.48, f)[0]
    assert zin.real == pytest.approx(28.73941, abs=5e-6)
    assert zin.imag == pytest.approx(-24.98912, abs=5e-6)
    measured = Sweep.from_impedance(f, np.array([zin]), 50.0)
    feed = deembed(measured, Feedline(flat, 30.48))
    assert feed.z[0] == pytest.approx(150.0, abs=1e-9)


def test_arrl_additional_loss_worked_example() -> None:
    # ARRL Antenna Book, "Additional Loss Due to SWR" formula [memory, formula confident];
    # worked values [computed] REFERENCES §3: ML 1.0 dB, SWR 3.0 at the load →
    # total 1.503853 dB (additional 0.503853 dB), SWR at the input 2.317653.
    assert float(arrl_total_loss_db(1.0, 3.0)) == pytest.approx(1.503853, abs=5e-7)
    # the same case through a Feedline: a flat 1 dB line on a 150 Ω (SWR 3) load
    flat = CableType("flat", 50.0, 0.66, k1=0.0, k2=0.0, k0=1.0 / 0.3)  # 1 dB over 30 m
    fl = Feedline(flat, 30.0)
    f = np.array([7.1e6, 14.2e6])
    feed = Sweep.from_impedance(f, np.array([150.0, 150.0 + 0j]), 50.0)
    np.testing.assert_allclose(matched_loss_db(fl, f), 1.0, rtol=1e-12)
    np.testing.assert_allclose(total_loss_db(fl, feed), 1.503853, atol=5e-7)
    np.testing.assert_allclose(additional_loss_db(fl, feed), 0.503853, atol=5e-7)
    np.testing.assert_allclose(radio_swr(feed, fl), 2.317653, atol=5e-7)


def test_infinite_swr_total_loss_is_infinite_without_warnings() -> None:
    assert np.isinf(arrl_total_loss_db(1.0, np.inf))
    assert float(arrl_total_loss_db(0.0, np.inf)) == 0.0
