"""Alembic environment: the URL comes from Mastwatch's settings (or the caller).

Run from code via ``mastwatch.db.migrate`` (``mastwatch db upgrade``), or
``alembic upgrade head`` from the repository root (configured by pyproject.toml).
A caller may pass ``config.attributes["connection"]`` (an open Connection) or
``config.attributes["database_url"]``; otherwise MASTWATCH_DATABASE_URL / the default.
"""

from __future__ import annotations

from logging.config import fileConfig
from pathlib import Path

from alembic import context
from sqlalchemy import Connection

from mastwatch.db.engine import make_engine
from mastwatch.db.models import Base

config = context.config
if config.config_file_name is not None and Path(config.config_file_name).exists():
    fileConfig(config.config_file_name)

target_metadata = Base.metadata


def _url() -> str:
    url = config.attributes.get("database_url")
    if url:
        return str(url)
    from mastwatch.settings import Settings

    return Settings().database_url


def _configure(connection: Connection) -> None:
    context.configure(
        connection=connection,
        target_metadata=target_metadata,
        render_as_batch=True,
        compare_type=True,
    )


def run_offline() -> None:
    context.configure(
        url=_url(),
        target_metadata=target_metadata,
        literal_binds=True,
        render_as_batch=True,
        compare_type=True,
    )
    with context.begin_transaction():
        context.run_migrations()


def run_online() -> None:
    connection = config.attributes.get("connection")
    if connection is not None:
        _configure(connection)
        with context.begin_transaction():
            context.run_migrations()
        return
    engine = make_engine(_url())
    try:
        with engine.connect() as conn:
            _configure(conn)
            with context.begin_transaction():
                context.run_migrations()
    finally:
        engine.dispose()


if context.is_offline_mode():
    run_offline()
else:
    run_online()
