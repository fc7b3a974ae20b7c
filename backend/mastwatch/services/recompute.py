"""Re-derive every metrics row from the stored arrays (when a method improves).

Sweeps are read in batches by id (arrays undeferred for that batch only); for each,
the feedpoint view is redone from the measured Γ and the sweep's own feedline
snapshot, the metrics rows are replaced and the summary columns updated. Each batch
is one transaction, so an interrupted run leaves every sweep either old or new.
Afterwards :func:`rejudge_all` lets the health service judge the sweeps again.
"""

from __future__ import annotations

import importlib
import importlib.util
from collections.abc import Callable

from sqlalchemy import delete, func, insert, select
from sqlalchemy.orm import Session, undefer

from mastwatch.db.models import Sweep as SweepRow
from mastwatch.db.models import SweepMetrics
from mastwatch.services import codec
from mastwatch.services.analysis import analyse
from mastwatch.services.antennas import feedline_from_snapshot
from mastwatch.services.ingest import METRICS_TABLE, metrics_rows

DEFAULT_BATCH = 100
HEALTH_RECORDS_MODULE = "mastwatch.services.health_records"


def count_sweeps(session: Session) -> int:
    return session.scalar(select(func.count()).select_from(SweepRow)) or 0


def recompute_sweep(session: Session, row: SweepRow) -> None:
    sweep = codec.measured_sweep(row)
    snap = row.feedline_snapshot
    feedline = (
        feedline_from_snapshot(snap) if snap and row.reference_plane == "line_input" else None
    )
    analysis = analyse(sweep, row.reference_plane, feedline, row.antenna.site.itu_region)
    measured = analysis.docs()["measured"]
    row.min_swr, row.min_swr_hz = measured["min_swr"], measured["min_swr_hz"]
    row.summary = analysis.summary()
    at_feed = analysis.feedpoint
    row.gamma_feedpoint = (
        codec.pack_gamma(at_feed.sweep.gamma)
        if at_feed is not None and row.reference_plane == "line_input"
        else None
    )
    session.execute(delete(SweepMetrics).where(SweepMetrics.sweep_id == row.id))
    session.execute(insert(METRICS_TABLE), metrics_rows(row, analysis))


def recompute_all(
    session: Session,
    *,
    batch_size: int = DEFAULT_BATCH,
    progress: Callable[[int], None] | None = None,
) -> int:
    """Recompute every sweep; ``progress(n)`` after each batch of n. Returns the count."""
    done = 0
    last_id = 0
    while True:
        rows = list(
            session.scalars(
                select(SweepRow)
                .where(SweepRow.id > last_id)
                .order_by(SweepRow.id)
                .limit(batch_size)
                .options(undefer(SweepRow.freq_hz), undefer(SweepRow.gamma))
            )
        )
        if not rows:
            return done
        for row in rows:
            recompute_sweep(session, row)
        session.commit()
        session.expunge_all()  # keep memory flat over many batches
        last_id = rows[-1].id
        done += len(rows)
        if progress is not None:
            progress(len(rows))


def rejudge_all(session: Session) -> int:
    """Judge every antenna's sweeps again against its baseline (issue 5's verdicts), since
    they were computed from the metrics just replaced. Returns the antennas re-judged."""
    if importlib.util.find_spec(HEALTH_RECORDS_MODULE) is None:
        return 0
    rejudge = getattr(importlib.import_module(HEALTH_RECORDS_MODULE), "rejudge_antenna", None)
    if rejudge is None:
        return 0
    antenna_ids = session.scalars(
        select(SweepRow.antenna_id).distinct().order_by(SweepRow.antenna_id)
    )
    return sum(int(rejudge(session, antenna_id)) for antenna_id in list(antenna_ids))
