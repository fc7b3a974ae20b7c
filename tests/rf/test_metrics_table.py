"""The one table of per-band metrics: names agreed in the team interface, real fields."""

from __future__ import annotations

from dataclasses import fields

import pytest

from mastwatch.rf.metric_table import METRIC_NAMES, METRICS, get_metric
from mastwatch.rf.metrics import BandMetrics

AGREED = (
    "min_swr", "min_swr_hz", "resonance", "bandwidth_2", "swr_center",
    "return_loss_center", "r_center", "x_center", "q", "usable_fraction_2",
)  # fmt: skip


def test_agreed_trend_names_and_real_fields() -> None:
    assert set(AGREED) <= set(METRIC_NAMES)
    band_fields = {f.name for f in fields(BandMetrics)}
    for spec in METRICS.values():
        assert spec.field in band_fields
        assert spec.label and spec.description
    assert METRICS["resonance"].field == "resonance_hz"
    assert METRICS["bandwidth_2"].field == "bandwidth_2_hz"


def test_si_units_stored_display_units_for_labels() -> None:
    res = METRICS["resonance"]
    assert res.unit == "Hz" and res.axis_label == "Resonance (MHz)"
    assert res.display(7.1e6) == pytest.approx(7.1)
    assert res.display(None) is None
    assert METRICS["bandwidth_2"].display(250e3) == pytest.approx(250.0)
    assert METRICS["min_swr"].axis_label == "Min SWR"
    assert METRICS["r_center"].unit == "Ω"


def test_unknown_metric_names_the_valid_ones() -> None:
    with pytest.raises(ValueError, match="unknown metric 'swr'; valid metrics: min_swr, "):
        get_metric("swr")
    assert get_metric("q") is METRICS["q"]
