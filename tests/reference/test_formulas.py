"""SWR, return loss, mismatch loss and impedance from the metrics, against published values.

Sources (see /work/shared/REFERENCES.md §2):
- D. M. Pozar, *Microwave Engineering*, 4th ed., Wiley 2012: Γ = (Z−Z0)/(Z+Z0),
  SWR = (1+|Γ|)/(1−|Γ|), RL = −20·log10|Γ| (equation numbers from memory), and
  Example 2.2, p. 66 (book values chart-read; exact values computed).
- T. S. Bird, "Definition and misuse of return loss", IEEE AP Magazine 51(2), 2009
  (from memory): return loss is a positive number of dB.
- The SWR/|Γ|/RL/ML table of REFERENCES §2 (computed exact from the definitions).
- SWR of a resistive load = max(R/Z0, Z0/R): common practice.
"""

from __future__ import annotations

import numpy as np
import pytest

from mastwatch.rf.metrics import compute_metrics, value_at
from mastwatch.rf.sweep import Sweep

F = np.array([7.0e6, 7.1e6, 7.2e6])


def _flat(z: complex, z0: float = 50.0) -> Sweep:
    """A sweep whose impedance is ``z`` at every frequency."""
    return Sweep.from_impedance(F, np.full(F.size, z), z0)


@pytest.mark.parametrize("r_ohm", [25.0, 100.0])
def test_resistive_loads_of_half_and_double_z0_give_swr_2(r_ohm: float) -> None:
    # common practice: SWR = max(R/Z0, Z0/R) → 2.0 for 25 Ω and 100 Ω on 50 Ω
    m = compute_metrics(_flat(r_ohm))
    assert m.min_swr == pytest.approx(2.0, rel=1e-12)
    assert value_at(_flat(r_ohm), 7.05e6).swr == pytest.approx(2.0, rel=1e-12)


@pytest.mark.parametrize("r_ohm", [1.0, 12.5, 37.0, 50.0, 61.0, 300.0, 5000.0])
def test_resistive_load_swr_is_max_ratio(r_ohm: float) -> None:
    # common practice: SWR = max(R/Z0, Z0/R)
    p = value_at(_flat(r_ohm), 7.1e6)
    assert p.swr == pytest.approx(max(r_ohm / 50, 50 / r_ohm), rel=1e-12)
    assert p.r_ohm == pytest.approx(r_ohm, rel=1e-12)
    assert p.x_ohm == pytest.approx(0.0, abs=1e-9)


def test_return_loss_20_db_is_gamma_0_1_and_swr_1_2222() -> None:
    # Pozar definitions: |Γ| = 0.1 → RL = 20 dB, SWR = 1.1/0.9 = 1.2222…
    for phase in (0.0, 1.0, -2.5):
        s = Sweep(F, np.full(F.size, 0.1 * np.exp(1j * phase)))
        p = value_at(s, 7.13e6)
        assert p.return_loss_db == pytest.approx(20.0, abs=1e-12)
        assert p.swr == pytest.approx(11 / 9, rel=1e-12)
        assert p.swr == pytest.approx(1.2222, abs=1e-4)


# REFERENCES.md §2 table [computed, exact]: SWR, |Γ|, RL dB, ML dB
TABLE = [
    (1.2, 0.090909, 20.8279, 0.03604),
    (1.5, 0.2, 13.9794, 0.17729),
    (2.0, 1 / 3, 9.5424, 0.51153),
    (3.0, 0.5, 6.0206, 1.24939),
]


@pytest.mark.parametrize(("swr", "mag", "rl", "ml"), TABLE)
def test_swr_gamma_rl_ml_table(swr: float, mag: float, rl: float, ml: float) -> None:
    s = Sweep(F, np.full(F.size, mag * np.exp(0.7j)))
    p = value_at(s, 7.0e6)
    assert p.swr == pytest.approx(swr, abs=2e-6)  # table |Γ| has 6 decimals
    assert p.return_loss_db == pytest.approx(rl, abs=6e-5)
    assert p.mismatch_loss_db == pytest.approx(ml, abs=6e-6)
    # the other way: a sweep at exactly that SWR has |Γ| = (S−1)/(S+1)
    exact = Sweep(F, np.full(F.size, (swr - 1) / (swr + 1) + 0j))
    assert compute_metrics(exact).min_swr == pytest.approx(swr, rel=1e-12)


def test_pozar_example_2_2() -> None:
    # Pozar 4th ed. Example 2.2 p. 66: ZL = 40 + j70 Ω on a 100 Ω line 0.3λ long.
    # Book (chart-read): |Γ| = 0.59, SWR 3.87, RL 4.6 dB. Exact (REFERENCES §2, computed):
    # SWR 3.866359, RL 4.597472 dB, Zin = 36.53396 − j61.11897 Ω.
    load = _flat(40 + 70j, z0=100.0)
    p = value_at(load, 7.1e6)
    assert p.swr == pytest.approx(3.866359, abs=2e-6)
    assert p.return_loss_db == pytest.approx(4.597472, abs=2e-6)
    assert p.swr == pytest.approx(3.87, rel=0.01)
    assert p.return_loss_db == pytest.approx(4.6, rel=0.01)
    # the lossless line turns Γ by e^(−j2βl), βl = 2π·0.3: |Γ|, SWR and RL stay
    at_input = load.with_gamma(load.gamma * np.exp(-2j * 2 * np.pi * 0.3))
    q = value_at(at_input, 7.1e6)
    assert q.swr == pytest.approx(p.swr, rel=1e-12)
    assert q.r_ohm == pytest.approx(36.53396, abs=1e-5)
    assert q.x_ohm == pytest.approx(-61.11897, abs=1e-5)
