"""Slow drift on the records: flagged by the change-point test before any threshold.

Uploads go through the real ingest path (services/ingest.py), whose post-ingest hook
stores each sweep's verdict. The antenna is a series RLC (Pozar §6.1): at resonance
SWR = R/50 for R > 50 Ω, so a radiation/loss resistance creeping from 60 to 66 Ω lifts
the minimum SWR from 1.20 to 1.32, under the 0.5 rise rule of thumb (common practice).
"""

from __future__ import annotations

from datetime import datetime, timedelta

from sqlalchemy.orm import Session

from mastwatch.services import antennas, health_records, sites
from mastwatch.services.ingest import UploadMeta, ingest_sweep
from tests.dbfixtures import rlc_touchstone


def test_slow_drift_becomes_a_watch_reason_before_any_threshold(session: Session) -> None:
    site = sites.create_site(session, {"name": "Q0HRS knoll", "itu_region": 1, "timezone": "UTC"})
    ant = antennas.create_antenna(
        session, {"site_id": site.id, "name": "40m dipole", "kind": "dipole", "bands": ["40m"]}
    )
    t0 = datetime(2024, 1, 10, 10, 0)
    # Eight steady sweeps (R within ±0.3 Ω), then +0.5 Ω per sweep for twelve sweeps.
    steady = [60.0, 60.2, 59.9, 60.1, 59.8, 60.3, 60.0, 59.9]
    r_values = steady + [60.0 + 0.5 * (i + 1) for i in range(12)]
    rows = []
    for i, r in enumerate(r_values):
        data = rlc_touchstone(7.1e6, r, 12.0, comments=(f"sweep {i}",))
        meta = UploadMeta(measured_at=t0 + timedelta(days=60 * i))
        rows.append(ingest_sweep(session, ant.id, data, f"s{i}.s1p", meta).sweep)
        if i == 0:
            health_records.set_baseline(session, ant.id, rows[0].id, "after installation")
    statuses = [row.status for row in rows]
    assert statuses[:8] == ["ok"] * 8
    first_watch = statuses.index("watch")
    # Found within six sweeps of the start of the drift (sweep 8), by the trend only.
    assert 8 < first_watch <= 14, statuses
    latest = rows[-1]
    assert latest.status == "watch"
    # Min SWR and SWR at the centre (the resonance sits there) both drift.
    assert len(latest.status_reasons) == 2
    for reason, label in zip(latest.status_reasons, ("min SWR", "SWR at band centre"), strict=True):
        assert reason.startswith(f"40m: {label} drifting up since 2025-"), reason
        assert reason.endswith("CUSUM change-point test)")
    # No single-sweep rule fired: min SWR rose by less than 0.5.
    health = health_records.antenna_health(session, ant.id)
    band = health["verdict"]["bands"][0]
    assert band["min_swr_change"] < 0.5


def test_rejudge_antenna_restores_stored_verdicts(session: Session) -> None:
    site = sites.create_site(session, {"name": "Q0HRS hut", "itu_region": 1, "timezone": "UTC"})
    ant = antennas.create_antenna(
        session, {"site_id": site.id, "name": "40m dipole", "kind": "dipole", "bands": ["40m"]}
    )
    assert health_records.rejudge_antenna(session, ant.id) == 0  # no baseline: nothing to do
    first = ingest_sweep(
        session,
        ant.id,
        rlc_touchstone(7.1e6),
        "a.s1p",
        UploadMeta(measured_at=datetime(2025, 1, 1, 10)),
    ).sweep
    health_records.set_baseline(session, ant.id, first.id)
    moved = ingest_sweep(
        session,
        ant.id,
        rlc_touchstone(6.92e6),
        "b.s1p",
        UploadMeta(measured_at=datetime(2025, 3, 1, 10)),
    ).sweep
    moved.status, moved.status_reasons = None, []
    session.commit()
    assert health_records.rejudge_antenna(session, ant.id) == 1
    session.refresh(moved)
    assert moved.status == "watch"
