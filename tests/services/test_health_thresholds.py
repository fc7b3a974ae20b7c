"""Verdict thresholds (services/thresholds.py): defaults, per-band overrides, bad documents."""

from __future__ import annotations

import pytest

from mastwatch.services.thresholds import (
    DEFAULT_THRESHOLDS,
    THRESHOLD_NAMES,
    thresholds_for,
    validate_thresholds,
)


def test_defaults_are_the_documented_rules_of_thumb() -> None:
    # Common practice (no source): watch above 1.5 % resonance shift, fault above 3 %;
    # SWR at centre watch above 2, fault above 3. docs/health.md lists the same values.
    t = DEFAULT_THRESHOLDS
    assert (t.resonance_shift_watch_pct, t.resonance_shift_fault_pct) == (1.5, 3.0)
    assert (t.swr_center_watch, t.swr_center_fault, t.swr_center_rise_watch) == (2.0, 3.0, 0.5)
    assert thresholds_for(None) == t


def test_antenna_then_band_values_win() -> None:
    doc = {"swr_center_watch": 2.5, "bands": {"80m": {"swr_center_watch": 2.8}}}
    assert thresholds_for(doc).swr_center_watch == 2.5
    assert thresholds_for(doc, "40m").swr_center_watch == 2.5
    assert thresholds_for(doc, "80m").swr_center_watch == 2.8
    assert thresholds_for(doc, "80m").swr_center_fault == 3.0


@pytest.mark.parametrize(
    ("doc", "message"),
    [
        ([1, 2], "thresholds: expected an object"),
        ({"swr_limit": 2}, "thresholds: unknown threshold 'swr_limit'"),
        ({"swr_center_watch": "2"}, "thresholds.swr_center_watch: expected a number"),
        ({"swr_center_watch": True}, "thresholds.swr_center_watch: expected a number"),
        ({"swr_center_watch": -1}, "finite non-negative"),
        ({"bands": []}, "thresholds.bands: expected an object"),
        ({"bands": {"40m": {"q": 1}}}, "thresholds.bands.40m: unknown threshold 'q'"),
        ({"swr_center_watch": 4}, "swr_center_watch (4.0) must not exceed swr_center_fault"),
        ({"bands": {"2m": {"lossy_line_fault_db": 0.1}}}, "thresholds.bands.2m: lossy_line_watch"),
    ],
)
def test_bad_documents_say_what_and_where(doc: object, message: str) -> None:
    with pytest.raises(ValueError) as err:
        validate_thresholds(doc)
    assert message in str(err.value)


def test_every_name_is_listed_in_the_docs() -> None:
    from pathlib import Path

    text = (Path(__file__).parents[2] / "docs" / "health.md").read_text(encoding="utf-8")
    missing = [n for n in THRESHOLD_NAMES if f"`{n}`" not in text]
    assert not missing, f"docs/health.md does not describe: {missing}"
