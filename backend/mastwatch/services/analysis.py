"""The computation behind an upload, a preview and a recompute: metrics at both planes.

    Sweep (measured plane) ──compute_metrics──▶ measured metrics
        │ reference_plane == "feedpoint"        → the feedpoint view is the same sweep
        │ "line_input" and a feedline is known  → deembed(sweep, feedline) → feedpoint
        └ otherwise                             → no feedpoint view (note says why)

Metrics cover every band of the site's ITU region that the sweep overlaps, so a
later change of the antenna's bands of interest needs no recompute.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from mastwatch.rf import bands as rf_bands
from mastwatch.rf import lines
from mastwatch.rf.errors import AnalysisError
from mastwatch.rf.metrics import SweepMetrics, compute_metrics
from mastwatch.rf.sweep import Sweep


@dataclass(frozen=True)
class PlaneView:
    plane: str  # "measured" | "feedpoint"
    sweep: Sweep
    metrics: SweepMetrics


@dataclass(frozen=True)
class Analysis:
    measured: PlaneView
    feedpoint: PlaneView | None
    feedpoint_note: str | None  # why there is no (separate) feedpoint view

    def planes(self) -> list[PlaneView]:
        return [self.measured] + ([self.feedpoint] if self.feedpoint else [])

    def docs(self) -> dict[str, dict[str, Any]]:
        """``SweepMetrics.to_dict()`` per plane, each computed once (the feedpoint view of a
        feedpoint sweep is the same object as the measured one)."""
        cached = self.__dict__.get("_docs")
        if cached is None:
            by_id: dict[int, dict[str, Any]] = {}
            cached = {}
            for view in self.planes():
                key = id(view.metrics)
                if key not in by_id:
                    by_id[key] = view.metrics.to_dict()
                cached[view.plane] = by_id[key]
            object.__setattr__(self, "_docs", cached)
        return cached

    def summary(self) -> dict[str, Any]:
        """Whole-sweep metrics per plane (resonances, bandwidths, ...), without the bands."""
        out: dict[str, Any] = {"feedpoint_note": self.feedpoint_note}
        for plane, doc in self.docs().items():
            out[plane] = {k: v for k, v in doc.items() if k != "bands"}
        return out


def analyse(
    sweep: Sweep,
    reference_plane: str,
    feedline: lines.Feedline | None,
    region: int,
) -> Analysis:
    """Metrics at the measured plane and, where it can be known, at the feedpoint."""
    bands = rf_bands.bands_in(sweep.f_start_hz, sweep.f_stop_hz, region)
    measured = PlaneView("measured", sweep, compute_metrics(sweep, bands))
    if reference_plane == "feedpoint":
        return Analysis(measured, PlaneView("feedpoint", sweep, measured.metrics), None)
    if feedline is None:
        note = "measured at the line input and the antenna has no feedline: no feedpoint view"
        return Analysis(measured, None, note)
    try:
        at_feed = lines.deembed(sweep, feedline)
    except AnalysisError as exc:
        return Analysis(measured, None, f"cannot de-embed the feedline: {exc.message}")
    return Analysis(
        measured, PlaneView("feedpoint", at_feed, compute_metrics(at_feed, bands)), None
    )
