"""One antenna's whole record as a zip file: every original sweep file, plus tables.

    README.txt     what is inside, and when it was written
    record.json    the antenna, its site, feedline and events (as the API shows them)
    sweeps.csv     one row per sweep: time, plane, who, conditions, verdict, file
    metrics.csv    one row per sweep, band and plane: the numbers behind the trends
    files/         the uploaded files byte for byte, <UTC time>_<sweep id>_<name>

A club's records must outlive any one program: this is what a keeper hands over, keeps
off site, or opens in a spreadsheet. The originals are read in batches and the zip is
written to a file object the caller gives (a spooled temporary file for the API), so a
long record never sits in memory whole.
"""

from __future__ import annotations

import csv
import io
import json
import re
import zipfile
from collections.abc import Iterator
from datetime import datetime
from typing import IO, Any

from sqlalchemy import select
from sqlalchemy.orm import Session, undefer

from mastwatch import __version__
from mastwatch.db.models import BAND_METRIC_FIELDS, Antenna, SweepMetrics
from mastwatch.db.models import Sweep as SweepRow
from mastwatch.db.types import utcnow
from mastwatch.services import codec

BATCH = 50
"""Sweeps whose original files are read per query."""

SWEEP_COLUMNS = (
    "sweep_id", "measured_at_utc", "measured_at_source", "uploaded_at_utc",
    "reference_plane", "operator", "conditions", "notes", "status", "status_reasons",
    "min_swr", "min_swr_hz", "points", "f_start_hz", "f_stop_hz", "z0_ohm",
    "file_format", "sha256", "original_filename", "file",
)  # fmt: skip
METRIC_COLUMNS = ("sweep_id", "measured_at_utc", "plane", "band", *BAND_METRIC_FIELDS)


def _utc(when: datetime) -> str:
    return when.strftime("%Y-%m-%dT%H:%M:%SZ")


def _safe(name: str) -> str:
    """A file name that unpacks the same everywhere: no folders, no odd characters."""
    return re.sub(r"[^A-Za-z0-9._-]+", "_", name.rsplit("/", 1)[-1].rsplit("\\", 1)[-1]) or "sweep"


def archive_name(antenna: Antenna, when: datetime | None = None) -> str:
    """``antenna-<id>-<name>-<YYYYMMDD>.zip`` for the download."""
    day = (when or utcnow()).strftime("%Y%m%d")
    return f"antenna-{antenna.id}-{_safe(antenna.name.lower())}-{day}.zip"


def _rows(session: Session, antenna_id: int) -> Iterator[SweepRow]:
    """The antenna's sweeps oldest first, originals loaded ``BATCH`` at a time."""
    ids = list(
        session.scalars(
            select(SweepRow.id)
            .where(SweepRow.antenna_id == antenna_id)
            .order_by(SweepRow.measured_at, SweepRow.id)
        )
    )
    for start in range(0, len(ids), BATCH):
        chunk = ids[start : start + BATCH]
        rows = session.scalars(
            select(SweepRow).where(SweepRow.id.in_(chunk)).options(undefer(SweepRow.original))
        ).all()
        by_id = {r.id: r for r in rows}
        for sweep_id in chunk:
            yield by_id[sweep_id]
        for r in rows:  # let the batch's bytes go
            session.expunge(r)


def _csv(header: tuple[str, ...], rows: list[list[Any]]) -> bytes:
    buf = io.StringIO()
    writer = csv.writer(buf, lineterminator="\n")
    writer.writerow(header)
    writer.writerows(rows)
    return buf.getvalue().encode()


def _number(value: float | None) -> str:
    """Empty where the record holds no number (infinite, or not measured)."""
    return "" if value is None else repr(float(value))


def _cell(value: Any) -> Any:
    """A metrics value for the CSV: numbers at full precision, text as it is."""
    return value if isinstance(value, str) else _number(value)


def write_archive(
    session: Session, antenna: Antenna, record: dict[str, Any], out: IO[bytes]
) -> int:
    """Write the zip of ``antenna`` (with ``record`` as record.json) to ``out``; the
    number of sweeps in it."""
    sweep_rows: list[list[Any]] = []
    with zipfile.ZipFile(out, "w", compression=zipfile.ZIP_DEFLATED) as zf:
        for row in _rows(session, antenna.id):
            stamp = row.measured_at.strftime("%Y%m%dT%H%M%SZ")
            path = f"files/{stamp}_{row.id}_{_safe(row.filename)}"
            zf.writestr(path, codec.decompress(row.original))
            sweep_rows.append([
                row.id, _utc(row.measured_at), row.measured_at_source, _utc(row.uploaded_at),
                row.reference_plane, row.operator, row.conditions, row.notes, row.status or "",
                " | ".join(str(r) for r in row.status_reasons),
                _number(row.min_swr), _number(row.min_swr_hz), row.points, row.f_start_hz,
                row.f_stop_hz, row.z0, row.file_format or "", row.sha256, row.filename, path,
            ])  # fmt: skip
        metrics = session.execute(
            select(SweepMetrics)
            .where(SweepMetrics.antenna_id == antenna.id)
            .order_by(SweepMetrics.measured_at, SweepMetrics.sweep_id, SweepMetrics.plane,
                      SweepMetrics.band)
        ).scalars()
        metric_rows = [
            [m.sweep_id, _utc(m.measured_at), m.plane, m.band]
            + [_cell(getattr(m, f)) for f in BAND_METRIC_FIELDS]
            for m in metrics
        ]
        zf.writestr("sweeps.csv", _csv(SWEEP_COLUMNS, sweep_rows))
        zf.writestr("metrics.csv", _csv(METRIC_COLUMNS, metric_rows))
        zf.writestr("record.json", json.dumps(record, indent=2, default=str) + "\n")
        zf.writestr("README.txt", _readme(antenna, len(sweep_rows)))
    return len(sweep_rows)


def _readme(antenna: Antenna, count: int) -> str:
    return f"""The record of antenna {antenna.id}, "{antenna.name}",
written by Mastwatch {__version__} on {_utc(utcnow())}: {count} sweeps.

files/        every sweep file as it was uploaded, byte for byte (its SHA-256 is in
              sweeps.csv), named <measured, UTC>_<sweep id>_<original name>
sweeps.csv    one row per sweep: when (UTC), the reference plane (feedpoint, or
              line_input at the radio end), who swept it and in what conditions, the
              verdict and its reasons, min SWR at the measured plane
metrics.csv   one row per sweep, band and plane (measured, feedpoint): the numbers the
              trend plots draw; frequencies in Hz, resistance and reactance in ohms,
              losses in dB, fractions 0-1. Empty: infinite SWR (an open or a
              short), or not measured (coverage 0, or the centre outside the sweep,
              where the return loss at the centre is empty too)
record.json   the antenna, its site, feedline and events

Any Touchstone reader opens the .s1p/.s2p files; the CSV files open in a spreadsheet.
"""
