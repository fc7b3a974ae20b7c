"""Trend of one per-band metric of one antenna over time, from sweep_metrics rows alone.

One indexed range scan (``ix_sweep_metrics_trend``: antenna_id, band, plane,
measured_at) selecting three columns: the sweep arrays are never read (a test checks
the SQL). The antenna's events (its own and its site's) come along for plot markers.
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import datetime

from sqlalchemy import Row, select
from sqlalchemy.orm import Session, joinedload, lazyload

from mastwatch.db.models import Antenna, Event, SweepMetrics
from mastwatch.rf import bands as rf_bands
from mastwatch.rf.metric_table import MetricSpec, get_metric
from mastwatch.services.errors import Invalid, not_found
from mastwatch.services.events import events_of


@dataclass
class Trend:
    antenna_id: int
    band: str
    metric: MetricSpec
    plane: str
    points: list[Row[int, datetime, float | None]]  # .sweep_id, .measured_at, .value
    events: list[Event]


def trend_points(
    session: Session,
    antenna_id: int,
    band: str,
    field: str,
    plane: str,
    since: datetime | None = None,
    until: datetime | None = None,
) -> list[Row[int, datetime, float | None]]:
    column = getattr(SweepMetrics, field).label("value")
    query = select(SweepMetrics.sweep_id, SweepMetrics.measured_at, column).where(
        SweepMetrics.antenna_id == antenna_id,
        SweepMetrics.band == band,
        SweepMetrics.plane == plane,
    )
    if since is not None:
        query = query.where(SweepMetrics.measured_at >= since)
    if until is not None:
        query = query.where(SweepMetrics.measured_at <= until)
    query = query.order_by(SweepMetrics.measured_at, SweepMetrics.sweep_id)
    # Core execution on the session's connection: plain rows (attributes sweep_id,
    # measured_at, value), no ORM bookkeeping and no dict per row.
    return list(session.connection().execute(query).all())


def antenna_trend(
    session: Session,
    antenna_id: int,
    band: str,
    metric: str,
    plane: str = "feedpoint",
    since: datetime | None = None,
    until: datetime | None = None,
) -> Trend:
    antenna = session.get(
        Antenna, antenna_id, options=[joinedload(Antenna.site), lazyload(Antenna.feedline)]
    )
    if antenna is None:
        raise not_found("antenna", antenna_id)
    try:
        spec = get_metric(metric)
        band_name = rf_bands.get_band(band, antenna.site.itu_region).name
    except ValueError as exc:
        raise Invalid(str(exc)) from exc
    if plane not in ("measured", "feedpoint"):
        raise Invalid("plane must be 'measured' or 'feedpoint'")
    points = trend_points(session, antenna.id, band_name, spec.field, plane, since, until)
    events = events_of(session, antenna, since=since, until=until)
    return Trend(antenna.id, band_name, spec, plane, points, events)
