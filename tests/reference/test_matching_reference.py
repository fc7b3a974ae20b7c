"""L-network component values against textbook worked examples (REFERENCES §6)."""

from __future__ import annotations

import math

import pytest

from mastwatch.rf.matching import LNetwork, l_networks


def _by_b_sign(nets: list[LNetwork], topology: str, positive: bool) -> LNetwork:
    return next(n for n in nets if n.topology == topology and (n.b_s > 0) == positive)


def _value(net: LNetwork, position: str) -> tuple[str, float]:
    e = next(e for e in net.elements if e.position == position)
    return e.kind, e.value


def test_pozar_example_5_1() -> None:
    # Pozar, Microwave Engineering 4th ed., Example 5.1 (book's figures [memory]):
    # ZL = 200 − j100 Ω to 100 Ω at 500 MHz; book 0.92 pF + 38.8 nH, or 46.1 nH + 2.61 pF.
    # Exact [computed] REFERENCES §6: B = 2.898979e-3 S, X = 122.4745 Ω → 0.92277 pF,
    # 38.985 nH; B = −6.898979e-3 S, X = −122.4745 Ω → 46.139 nH, 2.5990 pF.
    nets = l_networks(200 - 100j, 500e6, 100.0)
    assert {n.topology for n in nets} == {"shunt_at_load"}  # R_L > Z0: only this one
    first = _by_b_sign(nets, "shunt_at_load", True)
    assert first.b_s == pytest.approx(2.898979e-3, abs=5e-10)
    assert first.x_ohm == pytest.approx(122.4745, abs=5e-5)
    assert _value(first, "shunt") == ("C", pytest.approx(0.92277e-12, abs=5e-18))
    assert _value(first, "series") == ("L", pytest.approx(38.985e-9, abs=5e-13))
    second = _by_b_sign(nets, "shunt_at_load", False)
    assert second.b_s == pytest.approx(-6.898979e-3, abs=5e-10)
    assert second.x_ohm == pytest.approx(-122.4745, abs=5e-5)
    assert _value(second, "shunt") == ("L", pytest.approx(46.139e-9, abs=5e-13))
    assert _value(second, "series") == ("C", pytest.approx(2.5990e-12, abs=5e-17))
    # and the book's rounded figures, within their last digit (from memory)
    assert _value(first, "shunt")[1] == pytest.approx(0.92e-12, abs=0.01e-12)
    assert _value(second, "series")[1] == pytest.approx(2.61e-12, abs=0.02e-12)


@pytest.mark.parametrize(
    ("zl", "solutions"),
    [
        # REFERENCES §6 topology (b) [computed], 14.2 MHz, Z0 50 Ω
        (25 + 0j, [(25.0, 0.02), (-25.0, -0.02)]),
        (20 - 30j, [(54.495, 0.024495), (5.505, -0.024495)]),
    ],
)
def test_topology_b_cases_at_14_2_mhz(zl: complex, solutions: list[tuple[float, float]]) -> None:
    nets = [n for n in l_networks(zl, 14.2e6, 50.0) if n.topology == "series_at_load"]
    got = sorted((n.x_ohm, n.b_s) for n in nets)
    for (x, b), (gx, gb) in zip(sorted(solutions), got, strict=True):
        assert gx == pytest.approx(x, abs=5e-4)
        assert gb == pytest.approx(b, abs=5e-7)
    # Pozar's closed form for (b): B = ±√((Z0 − RL)/RL)/Z0, X = ±√(RL(Z0 − RL)) − XL
    rl, xl = zl.real, zl.imag
    assert max(b for _, b in got) == pytest.approx(math.sqrt((50 - rl) / rl) / 50, rel=1e-12)
    assert max(x for x, _ in got) == pytest.approx(math.sqrt(rl * (50 - rl)) - xl, rel=1e-12)


def test_bowick_real_to_real() -> None:
    # C. Bowick, RF Circuit Design 2nd ed., ch. 4 [memory]: 100 Ω → 1000 Ω at 100 MHz,
    # Q = √(Rhigh/Rlow − 1) = 3; low-pass L-network 477 nH series, 4.77 pF shunt.
    nets = l_networks(1000 + 0j, 100e6, 100.0)
    low_pass = next(n for n in nets if _value(n, "series")[0] == "L")
    q = math.sqrt(1000 / 100 - 1)
    assert q == 3.0
    assert low_pass.x_ohm == pytest.approx(q * 100, rel=1e-12)  # X_s = Q·R_low
    assert _value(low_pass, "series")[1] == pytest.approx(477e-9, abs=1e-9)
    assert _value(low_pass, "shunt") == ("C", pytest.approx(4.77e-12, abs=0.01e-12))
