"""The status board's data: sites → antennas with verdict, bands, last sweep, sparkline.

One cheap query path, four SELECTs whatever the size of the club, none touching the
sweep arrays (a test checks the SQL):

    sites · antennas · latest sweep per antenna (metadata + stored verdict) ·
    sweep_metrics rows (antenna, sweep, band, plane, time, min SWR, SWR and return loss
    at centre)

The verdict shown is the one stored with the antenna's latest sweep at upload (or
after a baseline change). SWR at band centres comes from that sweep's metrics, with
``centre_swept``: a null ``swr_center`` is ∞ when the centre was swept, "not measured"
when the sweep does not reach it (then the return loss there is null too); the
sparkline is, per sweep, the lowest min SWR over the antenna's bands of interest,
at the feedpoint plane where the sweep has it (the last SPARK_POINTS sweeps).
"""

from __future__ import annotations

import math
from datetime import datetime
from typing import Any

from sqlalchemy import and_, func, select
from sqlalchemy.orm import Session

from mastwatch.db.models import Antenna, Site, SweepMetrics
from mastwatch.db.models import Sweep as SweepRow
from mastwatch.db.types import utcnow
from mastwatch.settings import Settings

SPARK_POINTS = 30


def _finite(v: float | None) -> float | None:
    return None if v is None or not math.isfinite(v) else float(v)


def board(session: Session, settings: Settings, now: datetime | None = None) -> dict[str, Any]:
    now = now or utcnow()
    sites = session.execute(
        select(Site.id, Site.name, Site.itu_region, Site.locator, Site.timezone).order_by(Site.name)
    ).all()
    antennas = session.execute(
        select(Antenna.id, Antenna.site_id, Antenna.name, Antenna.kind, Antenna.bands).order_by(
            Antenna.name
        )
    ).all()
    last_at = (
        select(SweepRow.antenna_id, func.max(SweepRow.measured_at).label("at"))
        .group_by(SweepRow.antenna_id)
        .subquery()
    )
    latest: dict[int, Any] = {}
    for r in session.execute(
        select(
            SweepRow.id,
            SweepRow.antenna_id,
            SweepRow.measured_at,
            SweepRow.status,
            SweepRow.status_reasons,
            SweepRow.reference_plane,
        ).join(
            last_at,
            and_(SweepRow.antenna_id == last_at.c.antenna_id, SweepRow.measured_at == last_at.c.at),
        )
    ):
        if r.antenna_id not in latest or r.id > latest[r.antenna_id].id:
            latest[r.antenna_id] = r
    # (antenna, sweep) → plane → band → (min_swr, swr_center, centre swept); sweep times.
    per_sweep: dict[tuple[int, int], dict[str, dict[str, tuple[Any, Any, bool]]]] = {}
    times: dict[tuple[int, int], datetime] = {}
    for m in session.execute(
        select(
            SweepMetrics.antenna_id,
            SweepMetrics.sweep_id,
            SweepMetrics.band,
            SweepMetrics.plane,
            SweepMetrics.measured_at,
            SweepMetrics.min_swr,
            SweepMetrics.swr_center,
            SweepMetrics.return_loss_center_db,
        ).order_by(SweepMetrics.antenna_id, SweepMetrics.measured_at, SweepMetrics.sweep_id)
    ):
        key = (m.antenna_id, m.sweep_id)
        # Swept centre: an SWR (∞ stored as null has return loss 0 dB) or a return loss.
        swept = m.swr_center is not None or m.return_loss_center_db is not None
        per_sweep.setdefault(key, {}).setdefault(m.plane, {})[m.band] = (
            m.min_swr,
            m.swr_center,
            swept,
        )
        times[key] = m.measured_at

    def plane_of(key: tuple[int, int]) -> dict[str, tuple[Any, Any, bool]]:
        planes = per_sweep.get(key, {})
        return planes.get("feedpoint") or planes.get("measured") or {}

    keys_by_antenna: dict[int, list[tuple[int, int]]] = {}
    for key in times:
        keys_by_antenna.setdefault(key[0], []).append(key)

    by_site: dict[int, list[dict[str, Any]]] = {s.id: [] for s in sites}
    for a in antennas:
        bands = list(a.bands or [])
        last = latest.get(a.id)
        card: dict[str, Any] = {
            "antenna": {"id": a.id, "name": a.name, "kind": a.kind, "bands": bands},
            "status": (last.status or "unknown") if last else "unknown",
            "reasons": list(last.status_reasons or []) if last else ["no sweep yet"],
            "latest_sweep": None,
            "stale": True,
            "swr_center": [],
            "sparkline": [],
        }
        if last is not None:
            age = (now - last.measured_at).total_seconds() / 86400.0
            card["latest_sweep"] = {
                "sweep_id": last.id,
                "measured_at": last.measured_at,
                "age_days": round(age, 1),
                "reference_plane": last.reference_plane,
            }
            card["stale"] = age > settings.stale_after_days
            values = plane_of((a.id, last.id))
            card["swr_center"] = [
                {"band": b, "swr_center": _finite(values[b][1]), "centre_swept": values[b][2]}
                for b in (bands or sorted(values))
                if b in values
            ]
        spark = []
        for key in keys_by_antenna.get(a.id, [])[-SPARK_POINTS:]:
            values = plane_of(key)
            mins = [v[0] for b, v in values.items() if not bands or b in bands]
            finite = [x for x in (_finite(v) for v in mins) if x is not None]
            if finite:
                spark.append({"sweep_id": key[1], "measured_at": times[key], "value": min(finite)})
        card["sparkline"] = spark
        by_site.setdefault(a.site_id, []).append(card)
    return {
        "stale_after_days": settings.stale_after_days,
        "generated_at": now,
        "sites": [
            {
                "site": {
                    "id": s.id,
                    "name": s.name,
                    "itu_region": s.itu_region,
                    "locator": s.locator,
                    "timezone": s.timezone,
                },
                "antennas": by_site.get(s.id, []),
            }
            for s in sites
        ],
    }
