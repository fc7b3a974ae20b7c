"""POST /analyze: the upload's computation on a file, stored nowhere (a preview)."""

from __future__ import annotations

import hashlib
from typing import Any

import numpy as np
from sqlalchemy.orm import Session

from mastwatch.rf import bands as rf_bands
from mastwatch.rf import lines
from mastwatch.services import cables
from mastwatch.services.analysis import analyse
from mastwatch.services.antennas import feedline_snapshot
from mastwatch.services.decimate import keep_indices
from mastwatch.services.errors import Invalid
from mastwatch.services.ingest import parse_upload
from mastwatch.services.sweeps import _finite, _plane_arrays

PREVIEW_POINTS = 201


def resolve_feedline(
    session: Session,
    spec: str | None,
    cable_type_id: int | None,
    length_m: float | None,
    connectors: int,
) -> lines.Feedline | None:
    """A feedline from 'RG-213:30m[:connectors]' or from a stored cable type and a length."""
    try:
        if spec:
            extra = {c.name: cables.to_rf_cable(c) for c in cables.list_cable_types(session)}
            return lines.parse_feedline(spec, extra=extra)
        if cable_type_id is not None:
            if length_m is None:
                raise Invalid("length_m is needed with cable_type_id")
            cable = cables.to_rf_cable(cables.get_cable_type(session, cable_type_id))
            return lines.Feedline(cable, length_m, connectors)
    except ValueError as exc:
        raise Invalid(f"feedline: {exc}") from exc
    return None


def preview(
    session: Session,
    data: bytes,
    filename: str,
    *,
    reference_plane: str,
    feedline: lines.Feedline | None,
    region: int,
    max_points: int = PREVIEW_POINTS,
    columns: str | None = None,
) -> dict[str, Any]:
    sweep = parse_upload(data, filename, columns)
    if feedline is not None and reference_plane != "line_input":
        raise Invalid("a feedline only applies to a sweep measured at the line input")
    analysis = analyse(sweep, reference_plane, feedline, region)
    metrics: dict[str, Any] = {"feedpoint_note": analysis.feedpoint_note}
    for plane in ("measured", "feedpoint"):
        view = analysis.measured if plane == "measured" else analysis.feedpoint
        metrics[plane] = None if view is None else view.metrics.to_dict()
    views = analysis.planes()
    edges = [
        e
        for b in rf_bands.bands_in(sweep.f_start_hz, sweep.f_stop_hz, region)
        for e in (b.low_hz, b.high_hz)
    ]
    idx = keep_indices(sweep.freq_hz, [v.sweep.gamma_mag for v in views], max_points, edges)
    at_feed = analysis.feedpoint
    return {
        "filename": filename,
        "file_format": sweep.source.format,
        "sha256": hashlib.sha256(data).hexdigest(),
        "points": sweep.points,
        "has_phase": sweep.has_phase,
        "z0": sweep.z0,
        "measured_at": sweep.source.measured_at,
        "reference_plane": reference_plane,
        "feedline": feedline_snapshot(feedline) if feedline is not None else None,
        "metrics": metrics,
        "preview": {
            "freq_hz": _finite(np.asarray(sweep.freq_hz)[idx]),
            "measured": _plane_arrays(sweep, idx),
            "feedpoint": _plane_arrays(at_feed.sweep, idx) if at_feed is not None else None,
        },
    }
