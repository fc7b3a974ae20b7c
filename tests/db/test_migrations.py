"""Migrations: empty → head → base on SQLite and PostgreSQL, and the models agree with them
(Alembic's autogenerate comparison finds no difference)."""

from __future__ import annotations

from collections.abc import Iterator
from pathlib import Path

import pytest
from alembic.autogenerate import compare_metadata
from alembic.runtime.migration import MigrationContext
from sqlalchemy import inspect

from mastwatch.db import migrate
from mastwatch.db.engine import make_engine
from mastwatch.db.models import Base
from tests.dbfixtures import (
    PG_URL_ENV,
    _create_pg_database,
    _drop_pg_database,
    _pg_reachable,
    pg_admin_url,
)


@pytest.fixture(params=["sqlite", pytest.param("postgresql", marks=pytest.mark.postgres)])
def empty_url(request: pytest.FixtureRequest, tmp_path: Path) -> Iterator[str]:
    """A database with nothing in it, of each kind."""
    if request.param == "sqlite":
        yield f"sqlite:///{tmp_path / 'empty.sqlite3'}"
        return
    admin = pg_admin_url()
    reason = _pg_reachable(admin)
    if reason:
        pytest.skip(f"{reason} (set {PG_URL_ENV} to a reachable server)")
    url, name = _create_pg_database(admin)
    try:
        yield url
    finally:
        _drop_pg_database(admin, name)


def test_upgrade_to_head_then_downgrade_to_base(empty_url: str) -> None:
    engine = make_engine(empty_url)
    try:
        assert migrate.current_revision(engine) is None
        with pytest.raises(migrate.DatabaseNotCurrent, match="mastwatch db upgrade"):
            migrate.check_current(engine)
        migrate.upgrade(empty_url)
        assert migrate.current_revision(engine) == migrate.head_revision()
        migrate.check_current(engine)
        tables = set(inspect(engine).get_table_names())
        assert set(Base.metadata.tables) <= tables
        migrate.downgrade(empty_url, "base")
        assert migrate.current_revision(engine) is None
        assert set(inspect(engine).get_table_names()) <= {"alembic_version"}
    finally:
        engine.dispose()


def test_models_and_migrations_agree(empty_url: str) -> None:
    migrate.upgrade(empty_url)
    engine = make_engine(empty_url)
    try:
        with engine.connect() as conn:
            ctx = MigrationContext.configure(conn, opts={"compare_type": True})
            diff = compare_metadata(ctx, Base.metadata)
    finally:
        engine.dispose()
    assert diff == [], f"models and migrations differ: {diff}"


def test_sqlite_pragmas(tmp_path: Path) -> None:
    engine = make_engine(f"sqlite:///{tmp_path / 'p.sqlite3'}")
    try:
        with engine.connect() as conn:
            assert conn.exec_driver_sql("PRAGMA foreign_keys").scalar() == 1
            assert conn.exec_driver_sql("PRAGMA journal_mode").scalar() == "wal"
    finally:
        engine.dispose()
