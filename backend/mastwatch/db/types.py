"""Column types that behave the same on SQLite and PostgreSQL.

``UTCDateTime`` stores timezone-aware datetimes as UTC and always returns aware UTC
datetimes (SQLite has no time zone type: naive values read back are UTC by contract).
"""

from __future__ import annotations

from datetime import UTC, datetime
from typing import Any

from sqlalchemy import DateTime, Dialect
from sqlalchemy.types import TypeDecorator


class UTCDateTime(TypeDecorator[datetime]):
    """A timezone-aware timestamp, stored in UTC; naive datetimes are refused."""

    impl = DateTime(timezone=True)
    cache_ok = True

    def process_bind_param(self, value: datetime | None, dialect: Dialect) -> Any:
        if value is None:
            return None
        if value.tzinfo is None or value.utcoffset() is None:
            raise ValueError(f"naive datetime {value.isoformat()} given: say its time zone")
        value = value.astimezone(UTC)
        # SQLite stores text: keep it naive UTC so strings sort and compare in time order.
        return value.replace(tzinfo=None) if dialect.name == "sqlite" else value

    def result_processor(self, dialect: Dialect, coltype: Any) -> Any:
        if dialect.name == "postgresql":
            # Connections run with TIME ZONE 'UTC' (db/engine.py): psycopg already returns
            # aware UTC datetimes, so no per-row Python work (trends read thousands).
            return None
        if dialect.name != "sqlite":
            return super().result_processor(dialect, coltype)

        # SQLite returns text such as "2025-04-02 10:00:00.000000": datetime.fromisoformat
        # (C code) reads it several times faster than the generic regex path, which
        # matters for trends over thousands of rows. The stored text is naive UTC, so
        # "+00:00" appended yields the aware value in one call (``replace(tzinfo=...)``
        # costs several times the parse itself); anything else takes the general path.
        def process(value: Any) -> datetime | None:
            if value is None:
                return None
            if isinstance(value, str):
                try:
                    return datetime.fromisoformat(value + "+00:00")
                except ValueError:
                    parsed = datetime.fromisoformat(value)
            else:
                parsed = value
            return parsed.replace(tzinfo=UTC) if parsed.tzinfo is None else parsed.astimezone(UTC)

        return process

    def process_result_value(self, value: datetime | None, dialect: Dialect) -> datetime | None:
        if value is None:
            return None
        if value.tzinfo is None:
            return value.replace(tzinfo=UTC)
        return value.astimezone(UTC)


def utcnow() -> datetime:
    """The current time, aware, in UTC."""
    return datetime.now(UTC)
