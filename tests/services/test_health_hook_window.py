"""The health hook inside the upload: bounded reads, the same verdict as from the records.

The hook runs inside every upload, so its work must not grow with the antenna's record
(health_records.drift_reasons): the series handed to the change-point test is checked
against a plain query of the newest DRIFT_WINDOW sweeps' stored metrics, with several
sweeps sharing the instant where the window starts (those older by id fall outside it).
The upload judges from the metrics rows it holds in memory; judging again from the
database must agree, reasons in the same order.
"""

from __future__ import annotations

from datetime import datetime, timedelta
from typing import Any

import pytest
from sqlalchemy import select
from sqlalchemy.orm import Session

from mastwatch.db.models import SweepMetrics
from mastwatch.services import antennas, health_records, sites
from mastwatch.services.ingest import UploadMeta, ingest_sweep
from tests.dbfixtures import rlc_touchstone

WINDOW = health_records.DRIFT_WINDOW
TIED = (3, 4, 5, 6)  # these sweeps share one instant; the window starts at sweep 5


def test_drift_series_is_the_newest_window_of_sweeps(
    session: Session, monkeypatch: pytest.MonkeyPatch
) -> None:
    site = sites.create_site(session, {"name": "Q0HRS ridge", "itu_region": 1, "timezone": "UTC"})
    ant = antennas.create_antenna(
        session, {"site_id": site.id, "name": "40m dipole", "kind": "dipole", "bands": ["40m"]}
    )
    t0 = datetime(2024, 1, 10, 10, 0)
    total = WINDOW + 5  # sweep 0 is the baseline; the newest WINDOW are 5 … total-1
    seen: list[dict[str, Any]] = []
    original = health_records.drift_reason

    def spy(dates: Any, values: Any, **kw: Any) -> str | None:
        seen.append({"label": kw["label"], "band": kw["band"], "values": list(values)})
        return original(dates, values, **kw)

    ids = []
    for i in range(total):
        day = TIED[0] if i in TIED else i
        # R creeps by 0.01 Ω a sweep: every sweep's min SWR differs (SWR = R/50 at
        # resonance for R > 50 Ω, Pozar §6.1), so the series names its sweeps.
        data = rlc_touchstone(7.1e6, 60.0 + 0.01 * i, 12.0, comments=(f"sweep {i}",))
        if i == total - 1:
            monkeypatch.setattr(health_records, "drift_reason", spy)
        meta = UploadMeta(measured_at=t0 + timedelta(days=day))
        ids.append(ingest_sweep(session, ant.id, data, f"s{i}.s1p", meta).sweep.id)
        if i == 0:
            health_records.set_baseline(session, ant.id, ids[0], "after installation")

    expected = list(
        session.scalars(
            select(SweepMetrics.min_swr)
            .where(
                SweepMetrics.sweep_id.in_(ids[total - WINDOW :]),
                SweepMetrics.band == "40m",
                SweepMetrics.plane == "feedpoint",
            )
            .order_by(SweepMetrics.measured_at, SweepMetrics.sweep_id)
        )
    )
    assert len(expected) == WINDOW
    series = [s for s in seen if s["label"] == "min SWR"]
    assert len(series) == 1 and series[0]["band"] == "40m"
    assert series[0]["values"] == expected


@pytest.mark.parametrize("bands", [["40m", "30m"], []])
def test_upload_verdict_equals_the_verdict_from_the_stored_rows(
    session: Session, bands: list[str]
) -> None:
    """The upload judges from the metrics rows it just inserted (in memory); judging the
    same sweep again from the database must give the same status and reasons, in order."""
    site = sites.create_site(session, {"name": "Q0HRS mast", "itu_region": 1, "timezone": "UTC"})
    ant = antennas.create_antenna(
        session, {"site_id": site.id, "name": "fan dipole", "kind": "dipole", "bands": bands}
    )
    t0 = datetime(2025, 2, 1, 9, 0)
    wide = {"f_start_hz": 6.0e6, "f_stop_hz": 11.0e6, "points": 801}

    def upload(i: int, f0_hz: float, r_ohm: float) -> Any:
        data = rlc_touchstone(f0_hz, r_ohm, 12.0, comments=(f"sweep {i}",), **wide)
        meta = UploadMeta(measured_at=t0 + timedelta(days=30 * i))
        return ingest_sweep(session, ant.id, data, f"s{i}.s1p", meta).sweep

    base = upload(0, 7.1e6, 60.0)
    health_records.set_baseline(session, ant.id, base.id)
    # Detuned well past the watch level (resonance shift, SWR at band centre: rules of
    # thumb in thresholds.py), so several reasons come in a defined order.
    moved = upload(1, 6.85e6, 75.0)
    assert moved.status in ("watch", "fault") and len(moved.status_reasons) >= 2
    again = health_records.verdict_for(
        session, ant, moved, health_records.with_arrays(session, base.id)
    )
    assert (again.status, again.reasons) == (moved.status, moved.status_reasons)
