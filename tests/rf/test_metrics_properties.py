"""Property tests (hypothesis): on any valid sweep the metrics hold their definitions.

Invariants checked, each following from the definitions in DESIGN.md / rf/metrics.py:
the minimum SWR is at most every sampled SWR and equals value_at at its frequency; an
SWR≤s span contains the minimum, its edges are inside the sweep and at SWR = s unless
open; usable fraction lies in [0, coverage]; resonances lie in the sweep, sorted;
everything serialises to strict JSON.
"""

from __future__ import annotations

import json

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st

from mastwatch.rf.bands import band_plan
from mastwatch.rf.metrics import compute_metrics, value_at
from mastwatch.rf.sweep import Sweep

PLAN = band_plan(1)


@st.composite
def sweeps(draw: st.DrawFn) -> Sweep:
    n = draw(st.integers(min_value=1, max_value=60))
    start = draw(st.floats(min_value=1e5, max_value=4e8))
    steps = draw(st.lists(st.floats(min_value=1e2, max_value=5e6), min_size=n - 1, max_size=n - 1))
    f = start + np.concatenate(([0.0], np.cumsum(steps)))
    mag = draw(st.lists(st.floats(min_value=0.0, max_value=1.0), min_size=n, max_size=n))
    phase = draw(st.lists(st.floats(min_value=-np.pi, max_value=np.pi), min_size=n, max_size=n))
    gamma = np.array(mag) * np.exp(1j * np.array(phase))
    has_phase = draw(st.booleans())
    if not has_phase:
        gamma = np.abs(gamma) + 0j
    return Sweep(f, gamma, z0=draw(st.sampled_from([50.0, 75.0])), has_phase=has_phase)


@settings(max_examples=150, deadline=None)
@given(sweeps())
def test_metric_invariants(s: Sweep) -> None:
    m = compute_metrics(s, PLAN)
    # 1e-9 absolute: the closed-form segment minimum may differ from a sampled exact
    # match by round-off (|Γ| ~ 1e-12 where a sample is 0); physically nothing.
    assert m.min_swr <= float(np.min(s.swr)) * (1 + 1e-12) + 1e-9
    assert s.f_start_hz <= m.min_swr_hz <= s.f_stop_hz
    at_min = value_at(s, m.min_swr_hz).swr
    assert np.isclose(at_min, m.min_swr, rtol=1e-6) or (at_min > 1e6 and m.min_swr > 1e6)

    for bw in m.swr_bandwidths:
        if bw.width_hz is None:
            assert m.min_swr > bw.threshold
            continue
        assert bw.low_hz is not None and bw.high_hz is not None
        assert s.f_start_hz <= bw.low_hz <= m.min_swr_hz <= bw.high_hz <= s.f_stop_hz
        assert bw.open_low == (bw.low_hz == s.f_start_hz and s.swr[0] <= bw.threshold)
        for edge, is_open in ((bw.low_hz, bw.open_low), (bw.high_hz, bw.open_high)):
            if not is_open:
                assert np.isclose(value_at(s, edge).swr, bw.threshold, rtol=1e-6)

    for b in m.bands:
        assert 0.0 <= b.coverage <= 1.0
        if b.coverage == 0.0 and b.min_swr is None:
            assert b.usable_fraction_2 is None
            continue
        assert b.usable_fraction_2 is not None
        assert -1e-12 <= b.usable_fraction_2 <= b.coverage + 1e-9
        if b.min_swr is not None:
            assert b.min_swr_hz is not None and b.low_hz <= b.min_swr_hz <= b.high_hz

    hz = [r.hz for r in m.resonances]
    assert hz == sorted(hz)
    assert all(s.f_start_hz <= h <= s.f_stop_hz for h in hz)
    if not s.has_phase:
        assert m.resonances == () and "q" in m.unavailable
    json.dumps(m.to_dict(), allow_nan=False)
