"""The ingest service: one transaction, the feedline snapshot, what a hook may do."""

from __future__ import annotations

from datetime import UTC, datetime

import pytest
from sqlalchemy import Engine
from sqlalchemy.orm import Session

from mastwatch.db.models import Sweep as SweepRow
from mastwatch.services import antennas, ingest, sites, sweeps
from mastwatch.services.recompute import recompute_all
from tests.dbfixtures import rlc_touchstone, row_counts


def _antenna(session: Session) -> int:
    site = sites.create_site(session, {"name": "Q0HRS field", "itu_region": 1})
    return antennas.create_antenna(
        session, {"site_id": site.id, "name": "40m", "kind": "dipole", "bands": ["40m"]}
    ).id


def test_a_failing_hook_leaves_nothing_written(
    session: Session, clean_db: Engine, monkeypatch: pytest.MonkeyPatch
) -> None:
    antenna_id = _antenna(session)
    seen: list[int] = []

    def hook(s: Session, row: SweepRow) -> None:
        seen.append(row.id)  # the row is flushed: it has its id, and its metrics rows exist
        raise RuntimeError("verdict store failed")

    monkeypatch.setattr(ingest, "POST_INGEST_HOOKS", [hook])
    before = row_counts(clean_db)
    with pytest.raises(RuntimeError, match="verdict store failed"):
        ingest.ingest_sweep(session, antenna_id, rlc_touchstone(), "a.s1p", ingest.UploadMeta())
    session.rollback()
    assert len(seen) == 1 and row_counts(clean_db) == before


def test_hook_sees_the_new_sweep_and_may_set_its_status(
    session: Session, monkeypatch: pytest.MonkeyPatch
) -> None:
    antenna_id = _antenna(session)

    def hook(s: Session, row: SweepRow) -> None:
        row.status, row.status_reasons = "watch", ["set by a test hook"]

    monkeypatch.setattr(ingest, "POST_INGEST_HOOKS", [hook])
    monkeypatch.setattr(ingest, "_health_judge", lambda: None)
    result = ingest.ingest_sweep(
        session, antenna_id, rlc_touchstone(), "a.s1p", ingest.UploadMeta()
    )
    session.expire_all()
    stored = session.get(SweepRow, result.sweep.id)
    assert stored is not None and stored.status == "watch"
    assert stored.status_reasons == ["set by a test hook"]


def test_stored_sweep_keeps_the_feedline_it_was_deembedded_with(session: Session) -> None:
    antenna_id = _antenna(session)
    antennas.set_feedline(session, antenna_id, {"cable": "RG-213", "length_m": 30.0})
    meta = ingest.UploadMeta(
        measured_at=datetime(2025, 3, 1, tzinfo=UTC), reference_plane="line_input"
    )
    row = ingest.ingest_sweep(session, antenna_id, rlc_touchstone(), "a.s1p", meta).sweep
    before = sweeps.plane_metrics(sweeps.get_sweep(session, row.id))["feedpoint"]["bands"]
    # The feedline is replaced later (new cable): the stored sweep and a recompute keep
    # using the snapshot taken at upload.
    antennas.set_feedline(session, antenna_id, {"cable": "RG-58", "length_m": 5.0})
    recompute_all(session)
    session.expire_all()
    again = sweeps.get_sweep(session, row.id)
    assert again.feedline_snapshot is not None
    assert (again.feedline_snapshot["cable"], again.feedline_snapshot["length_m"]) == (
        "RG-213",
        30.0,
    )
    after = sweeps.plane_metrics(again)["feedpoint"]["bands"]
    assert after == before
