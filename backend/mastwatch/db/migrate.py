"""Alembic from code: upgrade, downgrade, current revision, "is this database current?".

The Alembic configuration is the ``[tool.alembic]`` table of the repository's
pyproject.toml, so ``mastwatch db upgrade`` works from any working directory.
"""

from __future__ import annotations

import io
from pathlib import Path

from alembic import command
from alembic.config import Config
from alembic.runtime.migration import MigrationContext
from alembic.script import ScriptDirectory
from sqlalchemy import Engine

from mastwatch.db.engine import make_engine

PYPROJECT = Path(__file__).resolve().parents[3] / "pyproject.toml"

UPGRADE_HINT = "run `mastwatch db upgrade` (with the same MASTWATCH_DATABASE_URL)"


class DatabaseNotCurrent(RuntimeError):
    """The database schema is not at the code's head revision."""


def alembic_config(database_url: str, *, stdout: io.TextIOBase | None = None) -> Config:
    if not PYPROJECT.exists():
        raise RuntimeError(f"cannot find {PYPROJECT}: migrations run from a source checkout")
    kwargs = {"stdout": stdout} if stdout is not None else {}
    cfg = Config(toml_file=str(PYPROJECT), **kwargs)  # type: ignore[arg-type]
    cfg.attributes["database_url"] = database_url
    return cfg


def upgrade(database_url: str, revision: str = "head") -> None:
    command.upgrade(alembic_config(database_url), revision)


def downgrade(database_url: str, revision: str = "-1") -> None:
    command.downgrade(alembic_config(database_url), revision)


def head_revision(database_url: str = "sqlite://") -> str | None:
    return ScriptDirectory.from_config(alembic_config(database_url)).get_current_head()


def current_revision(engine: Engine) -> str | None:
    with engine.connect() as conn:
        return MigrationContext.configure(conn).get_current_revision()


def check_current(engine: Engine) -> None:
    """Raise DatabaseNotCurrent, saying what to run, unless the schema is at head."""
    head = head_revision()
    current = current_revision(engine)
    if current == head:
        return
    where = engine.url.render_as_string(hide_password=True)
    if current is None:
        raise DatabaseNotCurrent(
            f"the database {where} has no Mastwatch schema yet: {UPGRADE_HINT}"
        )
    raise DatabaseNotCurrent(
        f"the database {where} is at revision {current}, the code needs {head}: {UPGRADE_HINT}"
    )


def check_url_current(database_url: str) -> None:
    engine = make_engine(database_url)
    try:
        check_current(engine)
    finally:
        engine.dispose()
