"""Reading stored sweeps: list, detail with metrics, arrays for plots, file, export, delete."""

from __future__ import annotations

import math
from dataclasses import dataclass
from datetime import datetime
from typing import Any

import numpy as np
from sqlalchemy import func, select, update
from sqlalchemy.orm import Session, undefer

from mastwatch.db.models import BAND_METRIC_FIELDS, Baseline, SweepMetrics
from mastwatch.db.models import Sweep as SweepRow
from mastwatch.rf import bands as rf_bands
from mastwatch.rf.sweep import Sweep
from mastwatch.services import codec
from mastwatch.services.antennas import get_antenna
from mastwatch.services.decimate import keep_indices
from mastwatch.services.errors import Conflict, Invalid, not_found
from mastwatch.services.timeutil import to_utc

ARRAY_COLUMNS = ("original", "freq_hz", "gamma", "gamma_feedpoint")


def get_sweep(session: Session, sweep_id: int, *, arrays: bool = False) -> SweepRow:
    query = select(SweepRow).where(SweepRow.id == sweep_id)
    if arrays:
        query = query.options(
            undefer(SweepRow.freq_hz), undefer(SweepRow.gamma), undefer(SweepRow.gamma_feedpoint)
        )
    row = session.scalar(query)
    if row is None:
        raise not_found("sweep", sweep_id)
    return row


@dataclass
class SweepPage:
    items: list[SweepRow]
    total: int
    limit: int
    offset: int


def list_sweeps(
    session: Session,
    antenna_id: int,
    *,
    limit: int = 50,
    offset: int = 0,
    since: datetime | None = None,
    until: datetime | None = None,
) -> SweepPage:
    """The antenna's sweeps, newest first; ``since``/``until`` bound measured_at (inclusive)."""
    get_antenna(session, antenna_id)
    where = [SweepRow.antenna_id == antenna_id]
    if since is not None:
        where.append(SweepRow.measured_at >= since)
    if until is not None:
        where.append(SweepRow.measured_at <= until)
    if since is not None and until is not None and since > until:
        raise Invalid("since is after until")
    total = session.scalar(select(func.count()).select_from(SweepRow).where(*where)) or 0
    items = session.scalars(
        select(SweepRow)
        .where(*where)
        .order_by(SweepRow.measured_at.desc(), SweepRow.id.desc())
        .limit(limit)
        .offset(offset)
    )
    return SweepPage(list(items), total, limit, offset)


def plane_metrics(row: SweepRow) -> dict[str, Any]:
    """``{"measured": {...summary, "bands": [...]}, "feedpoint": {...} | None}``."""
    bands: dict[str, list[dict[str, Any]]] = {"measured": [], "feedpoint": []}
    for m in sorted(row.metrics, key=lambda m: m.low_hz):
        bands[m.plane].append(band_row(m))
    out: dict[str, Any] = {"feedpoint_note": row.summary.get("feedpoint_note")}
    for plane in ("measured", "feedpoint"):
        summary = row.summary.get(plane)
        out[plane] = None if summary is None else {**summary, "bands": bands[plane]}
    return out


def band_row(m: SweepMetrics) -> dict[str, Any]:
    return {"band": m.band, **{f: getattr(m, f) for f in BAND_METRIC_FIELDS}}


def update_sweep(session: Session, sweep_id: int, changes: dict[str, Any]) -> SweepRow:
    """Change what the keeper said about a sweep (time, operator, conditions, notes).

    A new ``measured_at`` is written to the sweep and to its metrics rows (their copy
    serves the trend index) in one transaction.
    """
    row = get_sweep(session, sweep_id)
    if changes.get("measured_at") is not None:
        changes["measured_at"] = to_utc(changes["measured_at"], row.antenna.site.timezone)
        changes["measured_at_source"] = "form"
        session.execute(
            update(SweepMetrics)
            .where(SweepMetrics.sweep_id == row.id)
            .values(measured_at=changes["measured_at"])
        )
    for key, value in changes.items():
        if value is not None:
            setattr(row, key, value)
    session.commit()
    return row


def delete_sweep(session: Session, sweep_id: int) -> None:
    row = get_sweep(session, sweep_id)
    used = session.scalar(select(func.count()).where(Baseline.sweep_id == sweep_id)) or 0
    if used:
        raise Conflict(
            f"sweep {sweep_id} is (or was) a baseline of antenna {row.antenna_id}; "
            "set another baseline before deleting it"
        )
    session.delete(row)
    session.commit()


def original_file(session: Session, sweep_id: int) -> tuple[bytes, str]:
    row = session.scalar(
        select(SweepRow).where(SweepRow.id == sweep_id).options(undefer(SweepRow.original))
    )
    if row is None:
        raise not_found("sweep", sweep_id)
    return codec.decompress(row.original), row.filename


def sweep_at(row: SweepRow, plane: str) -> Sweep:
    """The stored sweep at ``plane`` ("measured" or "feedpoint"); Invalid when unknown."""
    if plane == "measured":
        return codec.measured_sweep(row)
    if plane == "feedpoint":
        sweep = codec.feedpoint_sweep(row)
        if sweep is None:
            note = row.summary.get("feedpoint_note") or "no feedpoint view for this sweep"
            raise Invalid(note)
        return sweep
    raise Invalid("plane must be 'measured' or 'feedpoint'")


def export_touchstone(session: Session, sweep_id: int, plane: str) -> tuple[str, str]:
    """The sweep as Touchstone v1 text at ``plane``, and a file name for it."""
    from mastwatch.rf.touchstone import write_touchstone

    row = get_sweep(session, sweep_id, arrays=True)
    sweep = sweep_at(row, plane)
    comments = [
        f"Mastwatch sweep {row.id} of antenna {row.antenna_id}",
        f"measured {row.measured_at.isoformat()} at the {row.reference_plane} plane",
        f"exported at the {plane} plane",
    ]
    if plane == "feedpoint" and row.feedline_snapshot:
        snap = row.feedline_snapshot
        comments.append(f"de-embedded feedline: {snap['cable']}, {snap['length_m']:g} m")
    text = write_touchstone(sweep, comments=comments)
    stem = row.filename.rsplit(".", 1)[0] or f"sweep-{row.id}"
    return text, f"{stem}-{plane}.s1p"


def _finite(values: np.ndarray) -> list[float | None]:
    return [float(v) if math.isfinite(v) else None for v in values.tolist()]


def _plane_arrays(sweep: Sweep, idx: np.ndarray) -> dict[str, Any]:
    g = sweep.gamma[idx]
    out: dict[str, Any] = {
        "gamma_re": _finite(g.real),
        "gamma_im": _finite(g.imag),
        "swr": _finite(sweep.swr[idx]),
        "return_loss_db": _finite(sweep.return_loss_db[idx]),
        "r_ohm": None,
        "x_ohm": None,
    }
    if sweep.has_phase:
        z = sweep.z[idx]
        out["r_ohm"], out["x_ohm"] = _finite(z.real), _finite(z.imag)
    return out


def sweep_data(session: Session, sweep_id: int, max_points: int | None = None) -> dict[str, Any]:
    """Arrays for plots at both planes, decimated to about ``max_points`` when given."""
    row = get_sweep(session, sweep_id, arrays=True)
    measured = codec.measured_sweep(row)
    feed = codec.feedpoint_sweep(row)
    # A feedpoint-plane sweep is its own feedpoint view: one magnitude array to keep.
    distinct_feed = feed is not None and row.reference_plane == "line_input"
    sweeps = [measured] + ([feed] if distinct_feed and feed is not None else [])
    if max_points is None:
        idx = np.arange(measured.points)
    else:
        region = row.antenna.site.itu_region
        edges = [
            e
            for b in rf_bands.bands_in(measured.f_start_hz, measured.f_stop_hz, region)
            for e in (b.low_hz, b.high_hz)
        ]
        idx = keep_indices(measured.freq_hz, [s.gamma_mag for s in sweeps], max_points, edges)
    return {
        "sweep_id": row.id,
        "points": measured.points,
        "returned": int(idx.size),
        "z0": row.z0,
        "has_phase": row.has_phase,
        "freq_hz": _finite(measured.freq_hz[idx]),
        "measured": _plane_arrays(measured, idx),
        "feedpoint": _plane_arrays(feed, idx) if feed is not None else None,
    }
