"""Timestamps are aware UTC on both databases; naive ones are refused."""

from __future__ import annotations

from datetime import UTC, datetime, timedelta, timezone

import pytest
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
