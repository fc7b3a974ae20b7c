"""The one place that builds the database engine and the session factory.

SQLite gets WAL journaling (readers never block the writer), foreign keys on (off by
default in SQLite) and a busy timeout so concurrent uploads wait instead of failing.
PostgreSQL sessions run in UTC, so timestamps arrive aware and in UTC with no per-row
conversion.
"""

from __future__ import annotations

from typing import Any

from sqlalchemy import Engine, create_engine, event
from sqlalchemy.engine import make_url
from sqlalchemy.orm import Session, sessionmaker

SQLITE_BUSY_TIMEOUT_S = 30.0


def make_engine(url: str, **kwargs: Any) -> Engine:
    """An engine for ``url`` with the per-backend settings Mastwatch relies on."""
    parsed = make_url(url)
    if parsed.get_backend_name() == "sqlite":
        connect_args = {"check_same_thread": False, "timeout": SQLITE_BUSY_TIMEOUT_S}
        if parsed.database and parsed.database != ":memory:":
            from pathlib import Path

            Path(parsed.database).parent.mkdir(parents=True, exist_ok=True)
        engine = create_engine(url, connect_args=connect_args, **kwargs)
        event.listen(engine, "connect", _sqlite_on_connect)
        return engine
    engine = create_engine(url, pool_pre_ping=True, **kwargs)
    if parsed.get_backend_name() == "postgresql":
        event.listen(engine, "connect", _postgresql_on_connect)
    return engine


def _postgresql_on_connect(dbapi_connection: Any, _record: Any) -> None:
    # Timestamps come back in UTC whatever the server's default zone (see db/types.py).
    # Committed at once so a later ROLLBACK of the first transaction cannot undo it.
    with dbapi_connection.cursor() as cursor:
        cursor.execute("SET TIME ZONE 'UTC'")
    dbapi_connection.commit()


def _sqlite_on_connect(dbapi_connection: Any, _record: Any) -> None:
    cursor = dbapi_connection.cursor()
    try:
        cursor.execute("PRAGMA foreign_keys = ON")
        cursor.execute("PRAGMA journal_mode = WAL")
        cursor.execute("PRAGMA synchronous = NORMAL")  # safe with WAL; fsync at checkpoints
    finally:
        cursor.close()


def make_sessionmaker(engine: Engine) -> sessionmaker[Session]:
    """Sessions that keep loaded objects usable after commit (routes return them)."""
    return sessionmaker(engine, expire_on_commit=False)
