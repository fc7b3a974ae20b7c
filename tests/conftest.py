"""Shared test fixtures and session-wide test settings.

Database and API fixtures (``database_url`` over SQLite and PostgreSQL, ``db_engine``,
``clean_db``, ``settings``, ``session``, ``app``, ``client``, ``anyio_backend``) live in
tests/dbfixtures.py, whose docstring describes them; they are imported here so every
test package can use them.
"""

import os

from hypothesis import settings as hypothesis_settings

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

# Hypothesis: explore new examples on a developer's machine; in CI (CI=true) draw the same
# examples every run, so a submission's result does not depend on the luck of the draw.
hypothesis_settings.register_profile("ci", derandomize=True, print_blob=True)
if os.environ.get("CI"):
    hypothesis_settings.load_profile("ci")


def pytest_collection_modifyitems(config, items):  # type: ignore[no-untyped-def]
    """Browser tests run last: Playwright's sync API leaves an asyncio loop running in the
    main thread for the rest of the session, and anyio tests after it would fail."""
    browser_dir = os.path.join("tests", "browser") + os.sep
    items.sort(key=lambda item: browser_dir in str(item.path))
