"""Health on the records: baselines, the verdict stored with each sweep, antenna health.

The judging itself is pure (services/health.py); this module fetches what it needs
from the database and writes the outcome back:

    judge_sweep(session, row)       ingest hook (inside the upload transaction):
                                    verdict vs the current baseline → sweep.status,
                                    sweep.status_reasons; verdict change → notification
    set_baseline(session, ...)      PUT /antennas/{id}/baseline: history kept (ended_at),
                                    the sweeps since the new baseline judged again
    baseline_candidate(...)         first sweep after the latest repair/modification of
                                    the antenna, else after its installation, else its
                                    first sweep (the keeper confirms it)
    antenna_health(...)             GET /antennas/{id}/health

Which numbers: the metrics rows at the feedpoint plane when the sweep has them, else
at the measured plane; the arrays at both planes for the whole-sweep signatures;
the distance-to-fault views (C's ``rf.dtf``) of line-input sweeps; and the trend since
the baseline for the change-point test (services/changepoint.py).
"""

from __future__ import annotations

import logging
import math
from collections import OrderedDict
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from datetime import UTC, datetime, time
from types import SimpleNamespace
from typing import Any

from sqlalchemy import bindparam, select
from sqlalchemy.orm import Session, undefer

from mastwatch.db.models import Antenna, Baseline, Event, SweepMetrics
from mastwatch.db.models import Sweep as SweepRow
from mastwatch.db.types import utcnow
from mastwatch.rf.errors import AnalysisError
from mastwatch.services import codec
from mastwatch.services.changepoint import MIN_POINTS, drift_reason
from mastwatch.services.errors import Invalid, not_found
from mastwatch.services.health import (
    SAFETY_CAUTIONS,
    DtfTrace,
    Finding,
    SweepView,
    Verdict,
    format_hz,
    judge,
)
from mastwatch.services.thresholds import thresholds_for

log = logging.getLogger(__name__)
REJUDGE_LIMIT = 500  # sweeps judged again when a baseline changes (newest first)
DRIFT_WINDOW = 60  # sweeps of the trend the change-point test looks at
CANDIDATE_EVENTS = ("repair", "modification")


@dataclass
class Metrics:
    """What health.judge reads of a sweep's metrics, built from the database rows."""

    plane: str
    bands: list[Any]  # SweepMetrics rows, or the same values as the upload inserted them
    resonances: list[dict[str, Any]] = field(default_factory=list)


@dataclass(frozen=True)
class DriftMetric:
    field: str
    label: str
    floor: Callable[[Any], float]  # measurement resolution, from the band's low/high_hz
    fmt: Callable[[float], str]


DRIFT_METRICS: tuple[DriftMetric, ...] = (
    DriftMetric("min_swr", "min SWR", lambda m: 0.02, lambda v: f"{abs(v):.2f}"),
    DriftMetric("swr_center", "SWR at band centre", lambda m: 0.02, lambda v: f"{abs(v):.2f}"),
    # 0.05 % of the band centre: about what an analyzer's frequency steps resolve.
    DriftMetric("resonance_hz", "resonance", lambda m: 2.5e-4 * (m.low_hz + m.high_hz), format_hz),
)


# -- reading ------------------------------------------------------------------------------


def sweep_metrics(
    session: Session, row: SweepRow, band_rows: Sequence[dict[str, Any]] | None = None
) -> Metrics:
    """The sweep's band metrics at the plane the judge reads, in frequency order.

    ``band_rows`` are its metrics rows as just inserted (the upload has them in memory:
    the same values the database holds); without them they are selected.
    """
    has_feed = row.summary.get("feedpoint") is not None
    plane = "feedpoint" if has_feed else "measured"
    summary = row.summary.get(plane) or {}
    bands: list[Any]
    if band_rows is None:
        bands = list(
            session.scalars(
                select(SweepMetrics)
                .where(SweepMetrics.sweep_id == row.id, SweepMetrics.plane == plane)
                .order_by(SweepMetrics.low_hz)
            )
        )
    else:
        bands = sorted(
            (SimpleNamespace(**r) for r in band_rows if r["plane"] == plane),
            key=lambda b: b.low_hz,
        )
    return Metrics(plane, bands, list(summary.get("resonances") or []))


def with_arrays(session: Session, sweep_id: int) -> SweepRow:
    row = session.scalar(
        select(SweepRow)
        .where(SweepRow.id == sweep_id)
        .options(
            undefer(SweepRow.freq_hz), undefer(SweepRow.gamma), undefer(SweepRow.gamma_feedpoint)
        )
    )
    if row is None:
        raise not_found("sweep", sweep_id)
    return row


def sweep_view(
    session: Session,
    row: SweepRow,
    label: str | None = None,
    band_rows: Sequence[dict[str, Any]] | None = None,
) -> SweepView:
    return SweepView(
        metrics=sweep_metrics(session, row, band_rows),
        taken_at=row.measured_at,
        measured=codec.measured_sweep(row),
        plane="line_input" if row.reference_plane == "line_input" else "feedpoint",
        feedpoint=codec.feedpoint_sweep(row),
        label=label,
    )


_CURRENT_BASELINE = (
    select(Baseline)
    .where(Baseline.antenna_id == bindparam("antenna_id"), Baseline.ended_at.is_(None))
    .order_by(Baseline.set_at.desc(), Baseline.id.desc())
    .limit(1)
)
_CURRENT_BASELINE_SWEEP = _CURRENT_BASELINE.with_only_columns(Baseline.sweep_id)


def current_baseline(session: Session, antenna_id: int) -> Baseline | None:
    baseline: Baseline | None = session.scalar(_CURRENT_BASELINE, {"antenna_id": antenna_id})
    return baseline


def current_baseline_sweep_id(session: Session, antenna_id: int) -> int | None:
    """The sweep id of :func:`current_baseline` (one column: the upload needs no more)."""
    sweep_id: int | None = session.scalar(_CURRENT_BASELINE_SWEEP, {"antenna_id": antenna_id})
    return sweep_id


def baseline_history(session: Session, antenna_id: int) -> list[Baseline]:
    return list(
        session.scalars(
            select(Baseline)
            .where(Baseline.antenna_id == antenna_id)
            .order_by(Baseline.set_at.desc(), Baseline.id.desc())
        )
    )


_DTF_CACHE: OrderedDict[tuple[Any, ...], DtfTrace | None] = OrderedDict()
_DTF_CACHE_SIZE = 64


def _dtf_trace(row: SweepRow, snap: dict[str, Any]) -> DtfTrace | None:
    """The distance-to-fault view of a line-input sweep (cached: baselines recur)."""
    key = (row.sha256, row.antenna_id, *sorted((k, str(v)) for k, v in snap.items()))
    if key in _DTF_CACHE:
        _DTF_CACHE.move_to_end(key)
        return _DTF_CACHE[key]
    from mastwatch.rf.dtf import distance_to_fault
    from mastwatch.services.antennas import feedline_from_snapshot

    try:
        cable = feedline_from_snapshot(snap).cable
        trace: DtfTrace | None = DtfTrace.from_result(
            distance_to_fault(codec.measured_sweep(row), cable=cable)
        )
    except AnalysisError:
        trace = None  # a single-band sweep: too coarse to place anything on the line
    _DTF_CACHE[key] = trace
    if len(_DTF_CACHE) > _DTF_CACHE_SIZE:
        _DTF_CACHE.popitem(last=False)
    return trace


def _dtf_pair(current: SweepRow, base: SweepRow) -> tuple[DtfTrace, DtfTrace] | None:
    """Distance-to-fault views of two line-input sweeps, or None where they say nothing."""
    snap = current.feedline_snapshot
    if (
        snap is None
        or current.reference_plane != "line_input"
        or base.reference_plane != "line_input"
        or not (current.has_phase and base.has_phase)
    ):
        return None
    base_trace = _dtf_trace(base, snap)  # the baseline seen with today's line model
    if base_trace is None:
        return None
    cur_trace = _dtf_trace(current, snap)
    return None if cur_trace is None else (cur_trace, base_trace)


# The hook's statements are built once, with bound parameters: building a select costs
# about as much as running one of these small indexed queries.
_WINDOW = (
    select(SweepRow.id, SweepRow.status, SweepRow.measured_at)
    .where(
        SweepRow.antenna_id == bindparam("antenna_id"),
        SweepRow.measured_at >= bindparam("since"),
        SweepRow.measured_at <= bindparam("until"),
    )
    .order_by(SweepRow.measured_at.desc(), SweepRow.id.desc())
    .limit(DRIFT_WINDOW)
)
_SERIES_COLUMNS = (
    "sweep_id",
    "measured_at",
    "band",
    "low_hz",
    "high_hz",
    "min_swr",
    "swr_center",
    "resonance_hz",
)
_SERIES = (
    select(*(getattr(SweepMetrics, c) for c in _SERIES_COLUMNS))
    .where(
        SweepMetrics.antenna_id == bindparam("antenna_id"),
        SweepMetrics.plane == bindparam("plane"),
        # The oldest sweep of the window bounds the range; rows of sweeps sharing that
        # instant but outside the window are dropped when read.
        SweepMetrics.measured_at >= bindparam("since"),
        SweepMetrics.measured_at <= bindparam("until"),
    )
    .order_by(SweepMetrics.measured_at, SweepMetrics.sweep_id, SweepMetrics.band)
)
_SERIES_OF_BANDS = _SERIES.where(SweepMetrics.band.in_(bindparam("bands", expanding=True)))


def drift_reasons(
    session: Session,
    antenna: Antenna,
    row: SweepRow,
    base: SweepRow,
    plane: str,
    bands: Sequence[str] | None,
) -> list[str]:
    """Change-point reasons over the metric series since the baseline, up to ``row``.

    At most the last DRIFT_WINDOW sweeps: bounded work per upload however long the
    record; the self-starting chart needs no fixed start. Two indexed queries: the
    window's sweeps (id, status) on ``ix_sweep_antenna_measured``, then their metrics
    rows of the antenna's bands on the trend index (no join, no IN list of ids).
    """
    window = session.execute(
        _WINDOW, {"antenna_id": antenna.id, "since": base.measured_at, "until": row.measured_at}
    ).all()
    if len(window) < MIN_POINTS:
        return []
    status_of = {w.id: w.status for w in window}
    params: dict[str, Any] = {
        "antenna_id": antenna.id,
        "plane": plane,
        "since": window[-1].measured_at,
        "until": row.measured_at,
    }
    if bands is not None:
        params["bands"] = list(bands)
    series: dict[str, list[Any]] = {}
    for r in session.execute(_SERIES if bands is None else _SERIES_OF_BANDS, params):
        if r.sweep_id not in status_of:
            continue  # same instant as the window's oldest sweep, but outside the window
        if status_of[r.sweep_id] == "unknown" and r.sweep_id != row.id:
            continue  # a sweep too noisy to judge says nothing about a trend either
        series.setdefault(r.band, []).append(tuple(r))
    out: list[str] = []
    at = _SERIES_COLUMNS.index
    for band, points in series.items():
        t = thresholds_for(antenna.thresholds, band)
        dates = [p[at("measured_at")] for p in points]
        first = SimpleNamespace(low_hz=points[0][at("low_hz")], high_hz=points[0][at("high_hz")])
        for metric in DRIFT_METRICS:
            i = at(metric.field)
            values = [p[i] for p in points]
            if metric.field != "resonance_hz":
                values = [None if v is None or not math.isfinite(v) else v for v in values]
            text = drift_reason(
                dates,
                values,
                label=metric.label,
                band=band,
                unit_format=metric.fmt,
                k=t.cusum_k,
                h=t.cusum_h,
                sigma_floor=metric.floor(first),
            )
            if text:
                out.append(text)
    return out


def verdict_for(
    session: Session,
    antenna: Antenna,
    row: SweepRow,
    base: SweepRow | None,
    *,
    label: str | None = None,
    drift: bool = True,
    band_rows: Sequence[dict[str, Any]] | None = None,
) -> Verdict:
    """The verdict of sweep ``row`` against sweep ``base`` (both rows with their arrays);
    ``band_rows``: ``row``'s metrics rows when the caller has them (see sweep_metrics)."""
    bands = list(antenna.bands) if antenna.bands else None
    current = sweep_view(session, row, band_rows=band_rows)
    if base is None:
        return judge(current, None, antenna.thresholds, bands=bands)
    snap = row.feedline_snapshot or {}
    reasons = (
        drift_reasons(session, antenna, row, base, current.metrics.plane, bands) if drift else []
    )
    return judge(
        current,
        sweep_view(session, base, label),
        antenna.thresholds,
        bands=bands,
        velocity_factor=snap.get("velocity_factor"),
        line_length_m=snap.get("length_m"),
        dtf=_dtf_pair(row, base),
        drift_reasons=reasons,
    )


# -- the ingest hook ----------------------------------------------------------------------


_NEWEST_OTHER = (
    select(SweepRow.status, SweepRow.measured_at)
    .where(SweepRow.antenna_id == bindparam("antenna_id"), SweepRow.id != bindparam("row_id"))
    .order_by(SweepRow.measured_at.desc(), SweepRow.id.desc())
    .limit(1)
)
_PREVIOUS_STATUS = (
    select(SweepRow.status)
    .where(
        SweepRow.antenna_id == bindparam("antenna_id"),
        SweepRow.id != bindparam("row_id"),
        SweepRow.measured_at <= bindparam("until"),
    )
    .order_by(SweepRow.measured_at.desc(), SweepRow.id.desc())
    .limit(1)
)


def _neighbours(session: Session, row: SweepRow) -> tuple[str | None, bool]:
    """The status of the sweep before ``row`` (None: none) and whether ``row`` is the
    antenna's latest. One read of the covering timeline index in the usual case (the new
    sweep is the latest: the newest other sweep is then also the previous one)."""
    params = {"antenna_id": row.antenna_id, "row_id": row.id}
    newest = session.execute(_NEWEST_OTHER, params).first()
    if newest is None:
        return None, True
    if newest.measured_at <= row.measured_at:
        return newest.status, True
    prev = session.scalar(_PREVIOUS_STATUS, {**params, "until": row.measured_at})
    return prev, False


def store_verdict(
    session: Session,
    antenna: Antenna,
    row: SweepRow,
    verdict: Verdict,
    old_status: str | None,
    notify: bool,
) -> None:
    row.status, row.status_reasons = verdict.status, verdict.reasons
    # Members care when an antenna goes bad or recovers: a change that involves watch or
    # fault (unknown ↔ ok, e.g. the first baseline or a noisy sweep, is not news).
    involved = {old_status, verdict.status} & {"watch", "fault"}
    if notify and old_status is not None and old_status != verdict.status and involved:
        from mastwatch.services.notify import queue_verdict_change

        queue_verdict_change(session, antenna, row, old_status, verdict.status, verdict.reasons)


def judge_sweep(
    session: Session, row: SweepRow, band_rows: Sequence[dict[str, Any]] | None = None
) -> None:
    """Judge a new sweep against its antenna's baseline (runs inside the upload)."""
    antenna = session.get(Antenna, row.antenna_id)
    if antenna is None:
        return
    base_id = current_baseline_sweep_id(session, antenna.id)
    base_row = with_arrays(session, base_id) if base_id is not None else None
    try:
        verdict = verdict_for(session, antenna, row, base_row, band_rows=band_rows)
    except (ArithmeticError, ValueError, AnalysisError) as exc:
        # A verdict that cannot be computed must not cost the keeper the upload.
        log.exception("sweep %s of antenna %s could not be judged", row.id, antenna.id)
        verdict = Verdict(
            "unknown",
            (Finding("unknown", "not_judged", f"the verdict could not be computed: {exc}"),),
        )
    prev_status, is_latest = _neighbours(session, row)
    store_verdict(session, antenna, row, verdict, prev_status, notify=is_latest)


# -- baselines ----------------------------------------------------------------------------


def baseline_candidate(session: Session, antenna: Antenna) -> dict[str, Any] | None:
    """The sweep the keeper is offered as the baseline, and why that one."""
    event = session.scalar(
        select(Event)
        .where(Event.antenna_id == antenna.id, Event.kind.in_(CANDIDATE_EVENTS))
        .order_by(Event.occurred_at.desc(), Event.id.desc())
        .limit(1)
    )
    query = select(SweepRow.id, SweepRow.measured_at).where(SweepRow.antenna_id == antenna.id)
    if event is not None:
        start: datetime | None = event.occurred_at
        why = f"first sweep after the {event.kind} of {event.occurred_at.date().isoformat()}"
    elif antenna.installed_on is not None:
        start = datetime.combine(antenna.installed_on, time(), tzinfo=UTC)
        why = f"first sweep after installation on {antenna.installed_on.isoformat()}"
    else:
        start, why = None, "first sweep of the antenna"
    if start is not None:
        query = query.where(SweepRow.measured_at >= start)
    first = session.execute(query.order_by(SweepRow.measured_at, SweepRow.id).limit(1)).first()
    if first is None:
        return None
    current = current_baseline(session, antenna.id)
    return {
        "sweep_id": first.id,
        "measured_at": first.measured_at,
        "why": why,
        "is_current": current is not None and current.sweep_id == first.id,
    }


def set_baseline(session: Session, antenna_id: int, sweep_id: int, reason: str = "") -> Baseline:
    """Make ``sweep_id`` the antenna's baseline (history kept) and judge again since it."""
    antenna = session.get(Antenna, antenna_id)
    if antenna is None:
        raise not_found("antenna", antenna_id)
    sweep = with_arrays(session, sweep_id)
    if sweep.antenna_id != antenna.id:
        raise Invalid(
            f"sweep {sweep_id} belongs to antenna {sweep.antenna_id}, not to antenna {antenna.id}"
        )
    current = current_baseline(session, antenna.id)
    if current is not None and current.sweep_id == sweep.id:
        return current
    now = utcnow()
    if current is not None:
        current.ended_at = now
    new = Baseline(
        antenna_id=antenna.id,
        sweep_id=sweep.id,
        set_at=now,
        ended_at=None,
        reason=reason,
        confirmed=True,
    )
    session.add(new)
    session.flush()
    rejudge_since(session, antenna, sweep)
    session.commit()
    return new


def rejudge_since(session: Session, antenna: Antenna, base: SweepRow) -> None:
    """Judge every sweep measured since ``base`` again (newest REJUDGE_LIMIT)."""
    ids = list(
        session.scalars(
            select(SweepRow.id)
            .where(SweepRow.antenna_id == antenna.id, SweepRow.measured_at >= base.measured_at)
            .order_by(SweepRow.measured_at.desc(), SweepRow.id.desc())
            .limit(REJUDGE_LIMIT)
        )
    )
    for i, sid in enumerate(reversed(ids)):
        row = base if sid == base.id else with_arrays(session, sid)
        old = row.status
        verdict = verdict_for(session, antenna, row, base)
        store_verdict(session, antenna, row, verdict, old, notify=i == len(ids) - 1)
        session.flush()


def rejudge_antenna(session: Session, antenna_id: int) -> int:
    """Judge the antenna's sweeps since its baseline again (after a recompute). Commits."""
    antenna = session.get(Antenna, antenna_id)
    if antenna is None:
        raise not_found("antenna", antenna_id)
    baseline = current_baseline(session, antenna.id)
    if baseline is None:
        return 0
    base = with_arrays(session, baseline.sweep_id)
    rejudge_since(session, antenna, base)
    session.commit()
    return 1


# -- antenna health -----------------------------------------------------------------------


def _sweep_ref(row: SweepRow | None) -> dict[str, Any] | None:
    if row is None:
        return None
    return {
        "sweep_id": row.id,
        "measured_at": row.measured_at,
        "reference_plane": row.reference_plane,
    }


def latest_sweep(session: Session, antenna_id: int) -> SweepRow | None:
    row_id = session.scalar(
        select(SweepRow.id)
        .where(SweepRow.antenna_id == antenna_id)
        .order_by(SweepRow.measured_at.desc(), SweepRow.id.desc())
        .limit(1)
    )
    return with_arrays(session, row_id) if row_id is not None else None


def antenna_health(session: Session, antenna_id: int) -> dict[str, Any]:
    """Verdict of the latest sweep (judged now), baseline, candidate and status history."""
    antenna = session.get(Antenna, antenna_id)
    if antenna is None:
        raise not_found("antenna", antenna_id)
    latest = latest_sweep(session, antenna.id)
    baseline = current_baseline(session, antenna.id)
    base_row = with_arrays(session, baseline.sweep_id) if baseline else None
    verdict = verdict_for(session, antenna, latest, base_row) if latest is not None else None
    history = [
        {"sweep_id": sid, "measured_at": at, "status": status}
        for sid, at, status in session.execute(
            select(SweepRow.id, SweepRow.measured_at, SweepRow.status)
            .where(SweepRow.antenna_id == antenna.id)
            .order_by(SweepRow.measured_at, SweepRow.id)
        )
    ]
    return {
        "antenna_id": antenna.id,
        "status": verdict.status if verdict else "unknown",
        "reasons": verdict.reasons if verdict else ["no sweep yet"],
        "verdict": verdict.to_dict() if verdict else None,
        "sweep": _sweep_ref(latest),
        "baseline": None
        if baseline is None
        else {
            **(_sweep_ref(base_row) or {}),
            "set_at": baseline.set_at,
            "reason": baseline.reason,
        },
        "candidate": baseline_candidate(session, antenna),
        "baselines": [
            {"sweep_id": b.sweep_id, "set_at": b.set_at, "ended_at": b.ended_at, "reason": b.reason}
            for b in baseline_history(session, antenna.id)
        ],
        "history": history,
        # A fault sends someone to go and look: the usual cautions come with it.
        "cautions": list(SAFETY_CAUTIONS)
        if verdict is not None and verdict.status == "fault"
        else [],
    }
