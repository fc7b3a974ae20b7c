"""GET /healthz: 200 when the database answers and is current, 503 with the reason if not."""

from __future__ import annotations

import httpx
import pytest

from mastwatch.api.app import create_app
from mastwatch.db import migrate
from mastwatch.settings import Settings

pytestmark = pytest.mark.anyio


async def test_healthz_ok(client: httpx.AsyncClient) -> None:
    r = await client.get("/healthz")
    assert r.status_code == 200
    assert r.json() == {
        "status": "ok",
        "database": "ok",
        "revision": migrate.head_revision(),
        "changes_need_token": False,  # no MASTWATCH_KEEPER_TOKEN in the test settings
    }


async def test_healthz_behind_and_unreachable(tmp_path) -> None:
    url = f"sqlite:///{tmp_path / 'empty.sqlite3'}"  # exists once opened, has no schema
    app = create_app(Settings(database_url=url, data_dir=tmp_path))
    async with httpx.AsyncClient(transport=httpx.ASGITransport(app=app), base_url="http://t") as c:
        r = await c.get("/healthz")
    assert r.status_code == 503
    assert "mastwatch db upgrade" in r.json()["detail"] and r.json()["database"] == "behind"
    app.state.engine.dispose()

    dead = "postgresql+psycopg://postgres@127.0.0.1:1/none?connect_timeout=1"
    app = create_app(Settings(database_url=dead, data_dir=tmp_path))
    async with httpx.AsyncClient(transport=httpx.ASGITransport(app=app), base_url="http://t") as c:
        r = await c.get("/healthz")
    assert r.status_code == 503 and r.json()["database"] == "unreachable"
    assert r.json()["detail"].startswith("database unreachable")
