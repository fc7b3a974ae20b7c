"""Timestamps are aware UTC on both databases; naive ones are refused."""

from __future__ import annotations

from datetime import UTC, datetime, timedelta, timezone

import pytest
from sqlalchemy import text
from sqlalchemy.exc import StatementError
from sqlalchemy.orm import Session

from mastwatch.db.models import Site


def test_aware_datetimes_round_trip_as_utc(session: Session) -> None:
    cest = timezone(timedelta(hours=2))
    site = Site(name="t", itu_region=1, created_at=datetime(2025, 4, 2, 12, 0, tzinfo=cest))
    session.add(site)
    session.commit()
    session.expire_all()
    got = session.get(Site, site.id)
    assert got is not None
    assert got.created_at == datetime(2025, 4, 2, 10, 0, tzinfo=UTC)
    assert got.created_at.utcoffset() == timedelta(0)


def test_naive_datetime_is_refused(session: Session) -> None:
    session.add(Site(name="n", itu_region=1, created_at=datetime(2025, 4, 2, 12, 0)))
    with pytest.raises(StatementError, match="naive datetime"):
        session.commit()
    session.rollback()


@pytest.mark.parametrize(
    ("stored", "expected"),
    [
        # Naive UTC text, as this type writes it (the fast path).
        ("2025-04-02 10:00:00.000000", datetime(2025, 4, 2, 10, 0, tzinfo=UTC)),
        ("2025-04-02 10:00:00.250000", datetime(2025, 4, 2, 10, 0, 0, 250000, tzinfo=UTC)),
        # Text written elsewhere with an ISO 8601 offset: converted to UTC (general path).
        ("2025-04-02 12:00:00+02:00", datetime(2025, 4, 2, 10, 0, tzinfo=UTC)),
        ("2025-04-02T10:00:00Z", datetime(2025, 4, 2, 10, 0, tzinfo=UTC)),
    ],
)
def test_sqlite_text_reads_back_aware_utc(
    session: Session, stored: str, expected: datetime
) -> None:
    if session.get_bind().dialect.name != "sqlite":
        pytest.skip("SQLite stores timestamps as text; PostgreSQL has a zone-aware type")
    site = Site(name="text", itu_region=1)
    session.add(site)
    session.commit()
    session.execute(
        text("UPDATE site SET created_at = :v WHERE id = :i"), {"v": stored, "i": site.id}
    )
    session.commit()
    session.expire_all()
    got = session.get(Site, site.id)
    assert got is not None and got.created_at == expected
    assert got.created_at.tzinfo is UTC
