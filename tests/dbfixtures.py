"""Database and API fixtures for every test that needs records (imported by conftest.py).

    database_url   session-scoped, parametrised over "sqlite" (a file in a temporary
                   directory) and "postgresql" (a fresh database
                   ``mastwatch_test_<pid>_<hex>`` on the server named by
                   MASTWATCH_TEST_DATABASE_URL, default
                   postgresql+psycopg://postgres@127.0.0.1:5432/postgres, dropped at the
                   end; skipped with the reason when the server cannot be reached).
                   Each is migrated to head once with Alembic (so every run tests the
                   migrations too) and the built-in cable types are synced.
    db_engine      session-scoped engine on that database
    clean_db       function-scoped: empties every table (built-in cable types stay)
    settings       Settings on that database, tmp data_dir (what create_app takes)
    session        a Session on a clean database (service tests)
    app            create_app(settings, engine=db_engine) on a clean database
    client         httpx.AsyncClient(transport=ASGITransport(app), base_url="http://test");
                   use it from ``@pytest.mark.anyio`` tests (``anyio_backend`` is asyncio)

Any test that takes one of these runs twice, once per database. Helpers (plain
functions): :func:`row_counts` (rows per table) and :func:`rlc_touchstone` (a sweep
file of a series RLC: a textbook resonator, exact to the last bit).
"""

from __future__ import annotations

import os
import secrets
from collections.abc import AsyncIterator, Iterator
from pathlib import Path

import httpx
import numpy as np
import pytest
from fastapi import FastAPI
from sqlalchemy import Engine, create_engine, delete, func, select, text
from sqlalchemy.engine import make_url
from sqlalchemy.exc import OperationalError
from sqlalchemy.orm import Session

from mastwatch.settings import Settings

DEFAULT_PG_URL = "postgresql+psycopg://postgres@127.0.0.1:5432/postgres"
PG_URL_ENV = "MASTWATCH_TEST_DATABASE_URL"


def pg_admin_url() -> str:
    return os.environ.get(PG_URL_ENV) or DEFAULT_PG_URL


def _pg_reachable(url: str) -> str | None:
    """None when the server answers, else why not."""
    engine = create_engine(url, connect_args={"connect_timeout": 3})
    try:
        with engine.connect() as conn:
            conn.execute(text("SELECT 1"))
    except OperationalError as exc:
        first = str(exc.orig).strip().splitlines()[0] if exc.orig else str(exc)
        return f"PostgreSQL at {make_url(url).render_as_string()} unreachable: {first}"
    finally:
        engine.dispose()
    return None


def _create_pg_database(admin_url: str) -> tuple[str, str]:
    name = f"mastwatch_test_{os.getpid()}_{secrets.token_hex(3)}"
    admin = create_engine(admin_url, isolation_level="AUTOCOMMIT")
    with admin.connect() as conn:
        conn.execute(text(f'CREATE DATABASE "{name}"'))
    admin.dispose()
    return make_url(admin_url).set(database=name).render_as_string(hide_password=False), name


def _drop_pg_database(admin_url: str, name: str) -> None:
    admin = create_engine(admin_url, isolation_level="AUTOCOMMIT")
    with admin.connect() as conn:
        conn.execute(text(f'DROP DATABASE IF EXISTS "{name}" WITH (FORCE)'))
    admin.dispose()


@pytest.fixture(
    scope="session",
    params=["sqlite", pytest.param("postgresql", marks=pytest.mark.postgres)],
)
def database_url(
    request: pytest.FixtureRequest, tmp_path_factory: pytest.TempPathFactory
) -> Iterator[str]:
    from mastwatch.db.migrate import upgrade

    if request.param == "sqlite":
        path: Path = tmp_path_factory.mktemp("db") / "mastwatch.sqlite3"
        url = f"sqlite:///{path}"
        upgrade(url)
        yield url
        return
    admin = pg_admin_url()
    reason = _pg_reachable(admin)
    if reason:
        pytest.skip(f"{reason} (set {PG_URL_ENV} to a reachable server)")
    url, name = _create_pg_database(admin)
    try:
        upgrade(url)
        yield url
    finally:
        _drop_pg_database(admin, name)


@pytest.fixture(scope="session")
def db_engine(database_url: str) -> Iterator[Engine]:
    from mastwatch.db.engine import make_engine, make_sessionmaker
    from mastwatch.services.cables import sync_builtin_cable_types

    engine = make_engine(database_url)
    with make_sessionmaker(engine)() as session:
        sync_builtin_cable_types(session)
        session.commit()
    yield engine
    engine.dispose()


def empty_tables(engine: Engine) -> None:
    """Delete every row except the built-in cable types, children first."""
    from mastwatch.db.models import Base, CableType

    with engine.begin() as conn:
        for table in reversed(Base.metadata.sorted_tables):
            if table.name == "cable_type":
                conn.execute(delete(table).where(CableType.__table__.c.builtin.is_(False)))
            else:
                conn.execute(delete(table))


@pytest.fixture
def clean_db(db_engine: Engine) -> Engine:
    empty_tables(db_engine)
    return db_engine


@pytest.fixture
def settings(database_url: str, tmp_path: Path) -> Settings:
    return Settings(database_url=database_url, data_dir=tmp_path / "data")


@pytest.fixture
def session(clean_db: Engine) -> Iterator[Session]:
    from mastwatch.db.engine import make_sessionmaker

    with make_sessionmaker(clean_db)() as s:
        yield s


@pytest.fixture
def app(settings: Settings, clean_db: Engine) -> FastAPI:
    from mastwatch.api.app import create_app

    return create_app(settings, engine=clean_db)


@pytest.fixture
def anyio_backend() -> str:
    return "asyncio"


@pytest.fixture
async def client(app: FastAPI) -> AsyncIterator[httpx.AsyncClient]:
    transport = httpx.ASGITransport(app=app)
    async with httpx.AsyncClient(transport=transport, base_url="http://test") as c:
        yield c


# -- helpers ----------------------------------------------------------------------------


def row_counts(engine: Engine) -> dict[str, int]:
    """Rows in every table of the schema."""
    from mastwatch.db.models import Base

    with engine.connect() as conn:
        return {
            t.name: int(conn.scalar(select(func.count()).select_from(t)) or 0)
            for t in Base.metadata.sorted_tables
        }


def rlc_impedance(freq_hz: np.ndarray, f0_hz: float, r_ohm: float, q: float) -> np.ndarray:
    """Series RLC: Z = R + jX, X = R·Q·(f/f0 − f0/f) (any circuits textbook, e.g.
    Pozar, Microwave Engineering, 4th ed., §6.1, series resonant circuit)."""
    f = np.asarray(freq_hz, dtype=np.float64)
    return r_ohm + 1j * r_ohm * q * (f / f0_hz - f0_hz / f)


def rlc_sweep(
    f0_hz: float = 7.1e6,
    r_ohm: float = 60.0,
    q: float = 12.0,
    *,
    f_start_hz: float = 6.0e6,
    f_stop_hz: float = 8.0e6,
    points: int = 201,
    z0: float = 50.0,
):  # -> mastwatch.rf.Sweep
    from mastwatch.rf.sweep import Sweep

    freq = np.linspace(f_start_hz, f_stop_hz, points)
    return Sweep.from_impedance(freq, rlc_impedance(freq, f0_hz, r_ohm, q), z0)


def rlc_touchstone(*args: float, comments: tuple[str, ...] = (), **kw: float) -> bytes:
    """A Touchstone v1 .s1p file (A's writer) of :func:`rlc_sweep`."""
    from mastwatch.rf.touchstone import write_touchstone

    return write_touchstone(rlc_sweep(*args, **kw), comments=comments).encode()
