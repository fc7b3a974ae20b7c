"""Upload of one sweep file: parse, compute at both planes, store, all in one transaction.

    bytes ─sha256─▶ already stored for this antenna? ─yes─▶ the existing sweep (200)
      │ no
      ├─ read_sweep (mastwatch.rf.parse)     SweepFormatError → 422 with line, nothing written
      ├─ analyse: metrics at the measured plane and at the feedpoint (de-embedded)
      ├─ INSERT sweep + sweep_metrics rows, post-ingest hooks (health verdict), COMMIT
      └─ a concurrent upload of the same bytes won the race (unique antenna_id+sha256)?
         → ROLLBACK and return that one (200): exactly one sweep, whatever the timing

Extension point — post-ingest hooks: after the rows are flushed and before the commit,
``mastwatch.services.health.judge_sweep(session, sweep_row, band_rows)`` is called when
that module defines it (issue 5; ``band_rows``: the metrics rows as inserted, so the
judge need not select them back), then every callable in :data:`POST_INGEST_HOOKS`. A hook may set
``sweep_row.status`` / ``status_reasons`` and add rows (e.g. queue a notification); it
runs inside the upload's transaction, so it must not do network I/O (queue instead).
"""

from __future__ import annotations

import functools
import hashlib
import importlib
import importlib.util
from collections.abc import Callable
from dataclasses import dataclass, field
from datetime import datetime
from typing import Any, cast

from sqlalchemy import Table, and_, bindparam, insert, select
from sqlalchemy.exc import IntegrityError
from sqlalchemy.orm import Session, joinedload, lazyload

from mastwatch.db.models import BAND_METRIC_FIELDS, Antenna, SweepMetrics
from mastwatch.db.models import Sweep as SweepRow
from mastwatch.db.types import utcnow
from mastwatch.rf import lines
from mastwatch.services import codec
from mastwatch.services.analysis import Analysis, analyse
from mastwatch.services.antennas import feedline_snapshot, to_rf_feedline
from mastwatch.services.errors import Invalid, not_found
from mastwatch.services.timeutil import to_utc

PostIngestHook = Callable[[Session, SweepRow], None]
# The health verdict also gets the metrics rows as inserted (None: read them back).
HealthJudge = Callable[[Session, SweepRow, "list[dict[str, Any]] | None"], None]
POST_INGEST_HOOKS: list[PostIngestHook] = []
"""Extra callables run after each new sweep is flushed (see the module docstring)."""

HEALTH_MODULE = "mastwatch.services.health"
METRICS_TABLE = cast(Table, SweepMetrics.__table__)


@dataclass
class UploadMeta:
    """What the keeper says about the sweep (form fields of the upload)."""

    measured_at: datetime | None = None  # naive: the site's local time; None: from the file
    reference_plane: str = "feedpoint"
    operator: str = ""
    conditions: str = ""
    notes: str = ""
    columns: str | None = None  # CSV column spec passed to the parser, if any


@dataclass
class IngestResult:
    sweep: SweepRow
    created: bool
    extra: dict[str, Any] = field(default_factory=dict)


def parse_upload(data: bytes, filename: str | None, columns: str | None = None) -> Any:
    """The file as an ``rf.Sweep`` (SweepFormatError with the line when it is not one)."""
    from mastwatch.rf.parse import read_sweep

    return read_sweep(data, filename, columns=columns)


def find_existing(session: Session, antenna_id: int, sha256: str) -> SweepRow | None:
    return session.scalar(
        select(SweepRow).where(SweepRow.antenna_id == antenna_id, SweepRow.sha256 == sha256)
    )


# Built once with bound parameters (building it costs about as much as running it).
_ANTENNA_AND_DUPLICATE = (
    select(Antenna, SweepRow.id)
    .outerjoin(
        SweepRow,
        and_(SweepRow.antenna_id == Antenna.id, SweepRow.sha256 == bindparam("sha256")),
    )
    .where(Antenna.id == bindparam("antenna_id"))
    .options(joinedload(Antenna.site), lazyload(Antenna.feedline))
)


def get_antenna_for_ingest(
    session: Session, antenna_id: int, sha256: str
) -> tuple[Antenna, int | None]:
    """The antenna with its site, and the id of its sweep with these bytes (None if
    none), in one query. The feedline loads on first access: only line-input uploads
    read it."""
    found = session.execute(
        _ANTENNA_AND_DUPLICATE, {"antenna_id": antenna_id, "sha256": sha256}
    ).first()
    if found is None:
        raise not_found("antenna", antenna_id)
    return found[0], found[1]


def ingest_sweep(
    session: Session,
    antenna_id: int,
    data: bytes,
    filename: str,
    meta: UploadMeta,
) -> IngestResult:
    """Store one sweep file for an antenna (idempotent per file content)."""
    if meta.reference_plane not in ("feedpoint", "line_input"):
        raise Invalid("reference_plane must be 'feedpoint' or 'line_input'")
    sha256 = hashlib.sha256(data).hexdigest()
    antenna, existing_id = get_antenna_for_ingest(session, antenna_id, sha256)
    if existing_id is not None:
        existing = session.get(SweepRow, existing_id)
        if existing is not None:
            return IngestResult(existing, created=False)
    site = antenna.site
    feedline: lines.Feedline | None = None
    if meta.reference_plane == "line_input" and antenna.feedline is not None:
        feedline = to_rf_feedline(antenna.feedline)
    if session.get_bind().dialect.name == "sqlite":
        # End the read transaction before the computation: on SQLite a transaction that
        # read before another writer committed cannot be upgraded to a write later.
        session.commit()

    sweep = parse_upload(data, filename, meta.columns)
    analysis = analyse(sweep, meta.reference_plane, feedline, site.itu_region)
    if meta.measured_at is not None:
        measured_at, source = to_utc(meta.measured_at, site.timezone), "form"
    elif sweep.source.measured_at is not None:
        measured_at, source = to_utc(sweep.source.measured_at, site.timezone), "file"
    else:
        measured_at, source = utcnow(), "upload"

    row = build_sweep_row(antenna.id, data, sha256, filename, meta, sweep, analysis, feedline)
    row.measured_at, row.measured_at_source = measured_at, source
    try:
        session.add(row)
        session.flush()
        # Core bulk insert: one executemany (one statement on PostgreSQL), no RETURNING.
        band_rows = metrics_rows(row, analysis)
        session.execute(insert(METRICS_TABLE), band_rows)
        run_post_ingest_hooks(session, row, band_rows)
        session.commit()
    except IntegrityError:
        session.rollback()
        winner = find_existing(session, antenna.id, sha256)
        if winner is None:
            raise
        return IngestResult(winner, created=False)
    # The metrics as stored, from memory: the response needs no read-back of the rows.
    metrics: dict[str, Any] = {
        "feedpoint_note": analysis.feedpoint_note,
        "measured": None,
        "feedpoint": None,
    }
    metrics.update(analysis.docs())
    return IngestResult(row, created=True, extra={"metrics": metrics})


def build_sweep_row(
    antenna_id: int,
    data: bytes,
    sha256: str,
    filename: str,
    meta: UploadMeta,
    sweep: Any,
    analysis: Analysis,
    feedline: lines.Feedline | None,
) -> SweepRow:
    measured = analysis.docs()["measured"]
    at_feed = analysis.feedpoint
    return SweepRow(
        antenna_id=antenna_id,
        reference_plane=meta.reference_plane,
        operator=meta.operator,
        conditions=meta.conditions,
        notes=meta.notes,
        filename=filename,
        file_format=sweep.source.format,
        original_size=len(data),
        sha256=sha256,
        original=codec.compress(data),
        freq_hz=codec.pack_freq(sweep.freq_hz),
        gamma=codec.pack_gamma(sweep.gamma),
        gamma_feedpoint=(
            codec.pack_gamma(at_feed.sweep.gamma)
            if at_feed is not None and meta.reference_plane == "line_input"
            else None
        ),
        z0=sweep.z0,
        has_phase=sweep.has_phase,
        points=sweep.points,
        f_start_hz=sweep.f_start_hz,
        f_stop_hz=sweep.f_stop_hz,
        min_swr=measured["min_swr"],
        min_swr_hz=measured["min_swr_hz"],
        feedline_snapshot=feedline_snapshot(feedline) if feedline is not None else None,
        summary=analysis.summary(),
        status=None,
        status_reasons=[],
    )


def metrics_rows(row: SweepRow, analysis: Analysis) -> list[dict[str, Any]]:
    """One row per band and plane, with the sweep's antenna and time repeated (trend index)."""
    out = []
    for plane, doc in analysis.docs().items():
        for band in doc["bands"]:
            values = {f: band[f] for f in BAND_METRIC_FIELDS}
            out.append(
                {
                    "sweep_id": row.id,
                    "antenna_id": row.antenna_id,
                    "measured_at": row.measured_at,
                    "band": band["band"],
                    "plane": plane,
                    **values,
                }
            )
    return out


@functools.cache  # looked up once, not on every upload
def _health_judge() -> HealthJudge | None:
    if importlib.util.find_spec(HEALTH_MODULE) is None:
        return None
    judge: HealthJudge | None = getattr(importlib.import_module(HEALTH_MODULE), "judge_sweep", None)
    return judge


def run_post_ingest_hooks(
    session: Session, row: SweepRow, band_rows: list[dict[str, Any]] | None = None
) -> None:
    """The health verdict, then every hook of POST_INGEST_HOOKS. ``band_rows`` are the
    sweep's metrics rows as just inserted: the judge reads them from memory instead of
    selecting them back."""
    judge = _health_judge()
    if judge is not None:
        judge(session, row, band_rows)
    for hook in POST_INGEST_HOOKS:
        hook(session, row)
