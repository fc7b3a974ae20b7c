"""L-network matching: every solution matches, against scikit-rf circuits over frequency."""

from __future__ import annotations

import warnings

import numpy as np
import pytest
import skrf
from hypothesis import given, settings
from hypothesis import strategies as st

from mastwatch.rf.errors import AnalysisError
from mastwatch.rf.matching import (
    format_capacitance,
    format_inductance,
    l_networks,
    load_hint,
    matched_sweep,
)
from mastwatch.rf.sweep import Sweep


@settings(max_examples=300, deadline=None)
@given(
    r=st.floats(0.5, 5000.0),
    x=st.floats(-3000.0, 3000.0),
    f=st.floats(1e5, 3e9),
    z0=st.sampled_from([50.0, 75.0, 300.0]),
)
def test_every_network_matches_the_load(r: float, x: float, f: float, z0: float) -> None:
    nets = l_networks(complex(r, x), f, z0)
    assert nets, "a load with R > 0 always has at least one L-network"
    for n in nets:
        assert abs(n.input_gamma()) < 1e-9
        for e in n.elements:
            assert e.value > 0
    # existence rules (Pozar 4th ed. §5.1): series-at-load iff R ≤ Z0, shunt iff G ≤ 1/Z0
    g = (1 / complex(r, x)).real
    tops = {n.topology for n in nets}
    if r < z0 * (1 - 1e-9):
        assert "series_at_load" in tops or any(not n.elements for n in nets)
    if r > z0 * (1 + 1e-9):
        assert "series_at_load" not in tops
    if g > (1 / z0) * (1 + 1e-9):
        assert "shunt_at_load" not in tops


def test_both_signs_and_both_topologies_when_both_exist() -> None:
    nets = l_networks(20 - 30j, 14.2e6)  # R < 50 and G = 0.0154 < 0.02: four solutions
    assert len(nets) == 4
    assert sorted(n.topology for n in nets) == ["series_at_load"] * 2 + ["shunt_at_load"] * 2


def test_matched_load_needs_nothing_and_on_circle_needs_one_element() -> None:
    assert [n.elements for n in l_networks(50 + 0j, 7.1e6)] == [()]
    nets = l_networks(50 + 30j, 7.1e6)
    one = [n for n in nets if len(n.elements) == 1]
    assert one and one[0].elements[0].kind == "C" and one[0].elements[0].position == "series"


def test_unmatchable_loads_raise() -> None:
    with pytest.raises(AnalysisError, match="needs R > 0"):
        l_networks(0 + 20j, 7.1e6)
    with pytest.raises(AnalysisError, match="not finite"):
        l_networks(complex(np.inf, 0), 7.1e6)
    with pytest.raises(ValueError, match="design frequency"):
        l_networks(20 + 0j, 0.0)


def _rlc_sweep() -> Sweep:
    f = np.linspace(6.5e6, 7.7e6, 241)
    w = 2 * np.pi * f
    z = 18 + 1j * (w * 4e-6 - 1 / (w * 130e-12))
    return Sweep.from_impedance(f, z, 50.0)


def test_matched_sweep_against_skrf_circuit() -> None:
    # scikit-rf 2.2 media.inductor / capacitor / shunt_* cascaded ** load (REFERENCES §9)
    sweep = _rlc_sweep()
    f0 = 7.1e6
    zl = complex(sweep.z[np.argmin(np.abs(sweep.freq_hz - f0))])
    freq = skrf.Frequency.from_f(sweep.freq_hz, unit="Hz")
    media = skrf.media.DefinedGammaZ0(freq, z0_port=50.0, z0=50.0)
    load = skrf.Network(frequency=freq, s=sweep.gamma.reshape(-1, 1, 1), z0=50)
    for net in l_networks(zl, f0):
        parts = []
        for e in net.elements:
            if e.position == "series":
                parts.append(media.inductor(e.value) if e.kind == "L" else media.capacitor(e.value))
            else:
                parts.append(media.shunt_inductor(e.value) if e.kind == "L"
                             else media.shunt_capacitor(e.value))
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            ref = parts[0]
            for p in parts[1:]:
                ref = ref ** p
            ref = ref ** load
        ours = matched_sweep(sweep, net)
        np.testing.assert_allclose(ours.gamma, ref.s[:, 0, 0], rtol=1e-9, atol=1e-12)
        i0 = np.argmin(np.abs(sweep.freq_hz - f0))
        assert abs(ours.gamma[i0]) < 1e-9
        assert ours.swr[i0] == pytest.approx(1.0, abs=1e-8)


def test_matched_sweep_handles_open_and_short_points() -> None:
    f = np.array([7.0e6, 7.1e6, 7.2e6])
    s = Sweep(f, np.array([1.0, 0.2 + 0.1j, -1.0]))
    net = l_networks(complex(s.z[1]), 7.1e6)[0]
    out = matched_sweep(s, net)  # no warnings (filterwarnings=error), lossless stays |Γ| = 1
    np.testing.assert_allclose(np.abs(out.gamma[[0, 2]]), 1.0, rtol=1e-12)
    with pytest.raises(AnalysisError, match="SWR only"):
        matched_sweep(Sweep(f, np.full(3, 0.3 + 0j), has_phase=False), net)


def test_formatting_and_hints() -> None:
    assert format_inductance(38.99e-9) == "38.99 nH"
    assert format_inductance(1.37e-6) == "1.37 µH"
    assert format_inductance(450e-12) == "450 pH"
    assert format_capacitance(0.92277e-12) == "0.9228 pF"
    assert format_capacitance(2.2e-9) == "2.2 nF"
    assert format_capacitance(245e-12) == "245 pF"
    assert "inductive" in load_hint(30 + 40j, 7.1e6) and "capacitance" in load_hint(30 + 40j, 7.1e6)
    assert "capacitive" in load_hint(30 - 40j, 7.1e6)
    # Signs as typeset: "+" and the minus sign U+2212, never a hyphen-minus.
    assert "(X = +40 Ω)" in load_hint(30 + 40j, 7.1e6)
    assert "(X = \u221240 Ω)" in load_hint(30 - 40j, 7.1e6)
    hints = {n.hint.split(":")[0] for n in l_networks(200 - 100j, 500e6, 100)}
    assert hints == {"series inductance with shunt capacitance (low-pass)",
                     "series capacitance with shunt inductance (high-pass)"}
