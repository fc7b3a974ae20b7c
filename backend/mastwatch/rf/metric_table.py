"""The one table of per-band metrics: name, BandMetrics field, label, unit, meaning.

The trend endpoint, the CLI tables and the plots all read this table, so a metric's
name, its database/BandMetrics column and its axis label are written once.
Values stay SI (Hz, ohms, dB) everywhere; ``display_scale``/``display_unit`` are for
labels and printed numbers only (Hz → MHz or kHz).

    METRICS["resonance"].field          -> "resonance_hz"
    METRICS["resonance"].axis_label     -> "Resonance (MHz)"
    METRICS["resonance"].display(7.1e6) -> 7.1
"""

from __future__ import annotations

from dataclasses import dataclass, fields

from mastwatch.rf.metrics import BandMetrics


@dataclass(frozen=True)
class MetricSpec:
    """One per-band metric. ``unit`` is the SI unit of the stored value ("" if none)."""

    name: str
    field: str
    label: str
    unit: str
    description: str
    display_scale: float = 1.0
    display_unit: str = ""

    @property
    def axis_label(self) -> str:
        """The label with the display unit, for plot axes and table headers."""
        return f"{self.label} ({self.display_unit})" if self.display_unit else self.label

    def display(self, value: float | None) -> float | None:
        """A stored SI value in display units (None stays None)."""
        return None if value is None else value / self.display_scale


# fmt: off
_SPECS = (
    MetricSpec("min_swr", "min_swr", "Min SWR", "",
               "lowest SWR inside the band (swept part; band edges interpolated)"),
    MetricSpec("min_swr_hz", "min_swr_hz", "Min SWR at", "Hz",
               "frequency of the lowest SWR inside the band", 1e6, "MHz"),
    MetricSpec("resonance", "resonance_hz", "Resonance", "Hz",
               "zero crossing of X inside the band closest to the band centre", 1e6, "MHz"),
    MetricSpec("bandwidth_2", "bandwidth_2_hz", "SWR≤2 bandwidth", "Hz",
               "width of the contiguous SWR ≤ 2 span around the in-band minimum", 1e3, "kHz"),
    MetricSpec("swr_center", "swr_center", "SWR at centre", "",
               "SWR at the band's arithmetic centre (interpolated)"),
    MetricSpec("return_loss_center", "return_loss_center_db", "Return loss at centre", "dB",
               "return loss −20·log10|Γ| at the band centre", 1.0, "dB"),
    MetricSpec("r_center", "r_center_ohm", "R at centre", "Ω",
               "resistance at the band centre", 1.0, "Ω"),
    MetricSpec("x_center", "x_center_ohm", "X at centre", "Ω",
               "reactance at the band centre", 1.0, "Ω"),
    MetricSpec("q", "q", "Q", "",
               "Q at the in-band resonance, Yaghjian–Best ω0·|Z′(ω0)|/(2R)"),
    MetricSpec("usable_fraction_2", "usable_fraction_2", "Usable fraction", "",
               "share of the full band width where SWR ≤ 2 (0…1; see coverage)"),
    MetricSpec("coverage", "coverage", "Coverage", "",
               "share of the band's width inside the sweep (0…1)"),
)
# fmt: on

METRICS: dict[str, MetricSpec] = {spec.name: spec for spec in _SPECS}
"""Per-band metrics by trend name, in display order."""

METRIC_NAMES: tuple[str, ...] = tuple(METRICS)

_FIELDS = {f.name for f in fields(BandMetrics)}
for _spec in _SPECS:  # the table may only name real BandMetrics fields
    if _spec.field not in _FIELDS:
        raise RuntimeError(f"metric {_spec.name!r} names unknown BandMetrics field {_spec.field!r}")


def get_metric(name: str) -> MetricSpec:
    """The spec of a metric by name; ValueError listing the valid names."""
    try:
        return METRICS[name]
    except KeyError:
        raise ValueError(
            f"unknown metric {name!r}; valid metrics: {', '.join(METRIC_NAMES)}"
        ) from None
