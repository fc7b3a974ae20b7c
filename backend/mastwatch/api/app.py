"""The app factory: ``create_app(settings)`` builds a FastAPI app on its own database.

    create_app(settings)
      ├── engine + sessionmaker on app.state (one per app: tests build many); its
      │                 sessions carry the settings (services/notify.bind_settings)
      ├── error handlers (api/errors.py): one JSON shape for every 4xx
      ├── BodyLimit middleware (api/limits.py)
      ├── GZip middleware: bodies of GZIP_MIN_BYTES or more, gzipped for clients that
      │                    accept it (plot arrays about halve; httpx and browsers
      │                    decode it, so a download still yields its exact bytes)
      ├── /api/v1/...   records routes (api/routes/*), plus health (F) and tools (C)
      │                 routes when their modules exist; a change needs the keeper
      │                 token when the server has one (api/auth.py)
      ├── /healthz      process, database and migrations
      └── /             the browser frontend (api/frontend.py) when present

On startup (lifespan) the app refuses to run on a database that is not at the
migrations' head (saying to run ``mastwatch db upgrade``), syncs the built-in
cable types from ``mastwatch.rf.lines.CABLES`` and marks pending notifications of
channels that are not configured ``skipped`` (services/notify.py). Its sessions carry
the settings, so an upload queues notifications only for configured channels.
In-process test clients skip the lifespan: tests call :func:`prepare_database`
themselves (tests/conftest.py does).

Run with uvicorn: ``uvicorn --factory mastwatch.api.app:app_from_env`` or ``mastwatch serve``.
"""

from __future__ import annotations

import importlib
import importlib.util
from collections.abc import AsyncIterator
from contextlib import asynccontextmanager

from fastapi import APIRouter, Depends, FastAPI
from sqlalchemy import Engine
from starlette.middleware.gzip import GZipMiddleware

from mastwatch import __version__
from mastwatch.api.auth import require_keeper
from mastwatch.api.errors import install_error_handlers
from mastwatch.api.limits import BodyLimit
from mastwatch.db.engine import make_engine, make_sessionmaker
from mastwatch.db.migrate import check_current
from mastwatch.services import notify
from mastwatch.settings import Settings, get_settings

API_PREFIX = "/api/v1"

# Below about 1 kB gzip saves a few hundred bytes at best: not worth a compressor.
GZIP_MIN_BYTES = 1024
# zlib's own default; level 9 gained nothing on a demo /data body (45,122 vs 45,096 bytes).
GZIP_LEVEL = 6

# Records routers of this package, then routers other issues add (included if present).
CORE_ROUTERS = (
    "sites", "antennas", "cable_types", "sweeps", "trend", "analyze", "events", "archive",
)
OPTIONAL_ROUTERS = ("health", "tools")


def prepare_database(engine: Engine) -> None:
    """Check the schema is current and sync built-in cable types (startup work)."""
    from mastwatch.services.cables import sync_builtin_cable_types

    check_current(engine)
    with make_sessionmaker(engine)() as session:
        sync_builtin_cable_types(session)
        session.commit()


def _module_exists(name: str) -> bool:
    try:
        return importlib.util.find_spec(name) is not None
    except ModuleNotFoundError:
        return False


def _api_router() -> APIRouter:
    router = APIRouter(prefix=API_PREFIX, dependencies=[Depends(require_keeper)])
    for name in CORE_ROUTERS + OPTIONAL_ROUTERS:
        module_name = f"mastwatch.api.routes.{name}"
        if name in OPTIONAL_ROUTERS and not _module_exists(module_name):
            continue
        router.include_router(importlib.import_module(module_name).router)
    return router


def create_app(settings: Settings, *, engine: Engine | None = None) -> FastAPI:
    """A Mastwatch app on ``settings.database_url`` (or on ``engine`` when given)."""
    engine = engine or make_engine(settings.database_url)

    @asynccontextmanager
    async def lifespan(app: FastAPI) -> AsyncIterator[None]:
        prepare_database(engine)
        with app.state.sessionmaker() as session:
            notify.skip_unconfigured(session, settings)
        yield
        engine.dispose()

    app = FastAPI(
        title="Mastwatch",
        version=__version__,
        description="Test records of a radio club's antennas: sweeps, metrics, trends.",
        docs_url="/api/docs",
        redoc_url=None,
        openapi_url="/api/openapi.json",
        lifespan=lifespan,
    )
    app.state.settings = settings
    app.state.engine = engine
    app.state.sessionmaker = make_sessionmaker(engine)
    notify.bind_settings(app.state.sessionmaker, settings)
    install_error_handlers(app)
    app.add_middleware(BodyLimit, file_limit=settings.max_upload_bytes)
    # Added last, so outermost: it sees every response, including BodyLimit's 413.
    app.add_middleware(GZipMiddleware, minimum_size=GZIP_MIN_BYTES, compresslevel=GZIP_LEVEL)

    from mastwatch.api.routes import system

    app.include_router(system.router)
    app.include_router(_api_router())
    if _module_exists("mastwatch.api.frontend"):
        from mastwatch.api import frontend

        app.include_router(frontend.make_router())
    return app


def app_from_env() -> FastAPI:
    """The app on the settings from the environment (for ``uvicorn --factory``)."""
    return create_app(get_settings())
