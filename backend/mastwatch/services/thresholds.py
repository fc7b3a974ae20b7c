"""Verdict thresholds: the defaults and how an antenna overrides them per band.

Every default below is a rule of thumb (common practice, no published source): they
say when a change since the baseline is worth a look (``watch``) or needs someone to
go and check (``fault``). An antenna may override any of them in its ``thresholds``
JSON column, for all bands and per band::

    {"swr_center_watch": 2.5,
     "bands": {"80m": {"resonance_shift_watch_pct": 2.5, "resonance_shift_fault_pct": 5}}}

:func:`thresholds_for` resolves defaults → antenna-wide values → that band's values;
:func:`validate_thresholds` checks such a document and says what is wrong and where.
"""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass, fields, replace
from typing import Any


@dataclass(frozen=True)
class Thresholds:
    """When a change since the baseline turns a verdict to ``watch`` or ``fault``.

    All values are common practice (rules of thumb), none comes from a standard.
    """

    # Resonance shift, in % of the band's centre frequency.
    resonance_shift_watch_pct: float = 1.5
    resonance_shift_fault_pct: float = 3.0
    # SWR at the band centre: crossing these levels since the baseline ...
    swr_center_watch: float = 2.0
    swr_center_fault: float = 3.0
    # ... or rising by more than this much over the baseline's value.
    swr_center_rise_watch: float = 0.5
    # Minimum SWR inside the band rising by more than this much.
    min_swr_rise_watch: float = 0.5
    # Share of the band usable at SWR ≤ 2 dropping by more than this (0…1, absolute).
    usable_drop_watch: float = 0.25
    usable_drop_fault: float = 0.75
    # SWR ≤ 2 bandwidth shrinking by more than this share of the baseline's width.
    bandwidth_drop_watch_pct: float = 30.0
    # Return loss across the band (from the mean |Γ| over the band) worse by this many dB
    # while the band is no longer well matched (below the level of SWR 2).
    return_loss_drop_watch_db: float = 3.0
    # Open or short circuit: |Γ| at least this everywhere in the sweep.
    open_short_min_mag: float = 0.7
    # Feedline that got lossier: estimated extra one-way loss in dB.
    lossy_line_watch_db: float = 0.5
    lossy_line_fault_db: float = 2.0
    # New reflection in the distance-to-fault view: peak at least this many dB above
    # the baseline at the same distance, and at least this strong in itself (dB of |Γ|).
    new_reflection_rise_db: float = 6.0
    new_reflection_min_db: float = -30.0
    # Noisy or failed sweep: estimated noise of Γ, and share of erratic points.
    noise_sigma_max: float = 0.02
    erratic_fraction_max: float = 0.02
    # Trend change detection (tabular CUSUM, see changepoint.py): k and h in units of σ.
    cusum_k: float = 0.5
    cusum_h: float = 5.0

    def to_dict(self) -> dict[str, float]:
        return asdict(self)


DEFAULT_THRESHOLDS = Thresholds()
THRESHOLD_NAMES: tuple[str, ...] = tuple(f.name for f in fields(Thresholds))


def _check_values(values: Any, where: str) -> dict[str, float]:
    if not isinstance(values, dict):
        raise ValueError(f"{where}: expected an object of threshold values, got {values!r}")
    out: dict[str, float] = {}
    for key, value in values.items():
        if key not in THRESHOLD_NAMES:
            raise ValueError(
                f"{where}: unknown threshold {key!r}; valid names: {', '.join(THRESHOLD_NAMES)}"
            )
        if isinstance(value, bool) or not isinstance(value, int | float):
            raise ValueError(f"{where}.{key}: expected a number, got {value!r}")
        if not math.isfinite(value) or (value < 0 and key != "new_reflection_min_db"):
            raise ValueError(f"{where}.{key}: expected a finite non-negative number, got {value}")
        out[key] = float(value)
    return out


def validate_thresholds(doc: Any) -> dict[str, Any]:
    """Check an antenna's ``thresholds`` document; return it normalised (floats).

    Raises ValueError naming the offending key and where it is.
    """
    if doc is None:
        return {}
    if not isinstance(doc, dict):
        raise ValueError(f"thresholds: expected an object, got {doc!r}")
    flat = {k: v for k, v in doc.items() if k != "bands"}
    out: dict[str, Any] = _check_values(flat, "thresholds")
    bands = doc.get("bands", {})
    if not isinstance(bands, dict):
        raise ValueError(f"thresholds.bands: expected an object keyed by band name, got {bands!r}")
    out_bands = {str(b): _check_values(v, f"thresholds.bands.{b}") for b, v in bands.items()}
    if out_bands:
        out["bands"] = out_bands
    base = replace(DEFAULT_THRESHOLDS, **{k: v for k, v in out.items() if k != "bands"})
    _check_order(base, "thresholds")
    for band, vals in out_bands.items():
        _check_order(replace(base, **vals), f"thresholds.bands.{band}")
    return out


def _check_order(t: Thresholds, where: str) -> None:
    pairs = [
        ("resonance_shift_watch_pct", "resonance_shift_fault_pct"),
        ("swr_center_watch", "swr_center_fault"),
        ("usable_drop_watch", "usable_drop_fault"),
        ("lossy_line_watch_db", "lossy_line_fault_db"),
    ]
    for watch, fault in pairs:
        if getattr(t, watch) > getattr(t, fault):
            raise ValueError(
                f"{where}: {watch} ({getattr(t, watch)}) must not exceed {fault} "
                f"({getattr(t, fault)})"
            )


def thresholds_for(doc: dict[str, Any] | None, band: str | None = None) -> Thresholds:
    """Thresholds for one antenna (its ``thresholds`` document) and optionally one band."""
    clean = validate_thresholds(doc)
    t = replace(DEFAULT_THRESHOLDS, **{k: v for k, v in clean.items() if k != "bands"})
    if band is not None and band in clean.get("bands", {}):
        t = replace(t, **clean["bands"][band])
    return t
