"""Recompute re-derives every metrics row from the stored arrays."""

from __future__ import annotations

from datetime import UTC, datetime

import pytest
from sqlalchemy import select, update
from sqlalchemy.orm import Session

from mastwatch.db.models import SweepMetrics
from mastwatch.services import antennas, ingest, sites
from mastwatch.services.recompute import recompute_all
from tests.dbfixtures import rlc_touchstone


def _metrics(session: Session) -> list[tuple]:
    rows = session.scalars(
        select(SweepMetrics).order_by(SweepMetrics.sweep_id, SweepMetrics.plane, SweepMetrics.band)
    )
    return [(m.sweep_id, m.band, m.plane, m.min_swr, m.resonance_hz, m.q) for m in rows]


def test_recompute_restores_tampered_rows(session: Session) -> None:
    site = sites.create_site(session, {"name": "s", "itu_region": 1})
    antenna = antennas.create_antenna(session, {"site_id": site.id, "name": "a", "kind": "dipole"})
    antennas.set_feedline(session, antenna.id, {"cable": "RG-58", "length_m": 10.0})
    for i, plane in enumerate(("feedpoint", "line_input", "feedpoint")):
        ingest.ingest_sweep(
            session,
            antenna.id,
            rlc_touchstone(7.0e6 + i * 5e4),
            f"s{i}.s1p",
            ingest.UploadMeta(
                measured_at=datetime(2025, 1 + i, 1, tzinfo=UTC), reference_plane=plane
            ),
        )
    good = _metrics(session)
    assert len({r[2] for r in good}) == 2  # both planes present
    session.execute(update(SweepMetrics).values(min_swr=99.0, resonance_hz=None))
    session.commit()
    assert _metrics(session) != good
    progress: list[int] = []
    assert recompute_all(session, batch_size=2, progress=progress.append) == 3
    assert progress == [2, 1]
    session.expire_all()
    after = _metrics(session)
    assert [r[1:3] for r in after] == [r[1:3] for r in good]
    for a, b in zip(after, good, strict=True):
        assert a[3:] == pytest.approx(b[3:])


def test_rejudge_after_recompute_restores_verdicts(session: Session) -> None:
    from mastwatch.db.models import Sweep as SweepRow
    from mastwatch.services import health_records
    from mastwatch.services.recompute import rejudge_all

    site = sites.create_site(session, {"name": "s", "itu_region": 1})
    antenna = antennas.create_antenna(
        session, {"site_id": site.id, "name": "a", "kind": "dipole", "bands": ["40m"]}
    )
    rows = [
        ingest.ingest_sweep(
            session,
            antenna.id,
            rlc_touchstone(f0),
            f"s{i}.s1p",
            ingest.UploadMeta(measured_at=datetime(2025, 1 + i, 1, tzinfo=UTC)),
        ).sweep
        for i, f0 in enumerate((7.10e6, 7.10e6, 6.95e6))
    ]
    health_records.set_baseline(session, antenna.id, rows[0].id, "first")
    want = [session.get(SweepRow, r.id).status for r in rows]
    assert want[0] == "ok" and want[2] in ("watch", "fault")  # a 150 kHz shift is flagged
    session.execute(update(SweepRow).values(status=None, status_reasons=[]))
    session.commit()
    recompute_all(session)
    assert rejudge_all(session) == 1
    session.expire_all()
    assert [session.get(SweepRow, r.id).status for r in rows] == want
