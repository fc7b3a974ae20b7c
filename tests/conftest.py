"""Shared test fixtures.

Database and API fixtures (``database_url`` over SQLite and PostgreSQL, ``db_engine``,
``clean_db``, ``settings``, ``session``, ``app``, ``client``, ``anyio_backend``) live in
tests/dbfixtures.py, whose docstring describes them; they are imported here so every
test package can use them.
"""

from tests.dbfixtures import (  # noqa: F401  (fixtures are found by name)
    anyio_backend,
    app,
    clean_db,
    client,
    database_url,
    db_engine,
    session,
    settings,
)
