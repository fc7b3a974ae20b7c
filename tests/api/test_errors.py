"""Every error kind of the API answers with one JSON shape: {"detail": str, "line": int|null}."""

from __future__ import annotations

import httpx
import pytest

from tests.api.helpers import API, make_antenna, make_site, site_and_antenna, upload
from tests.dbfixtures import rlc_touchstone

pytestmark = pytest.mark.anyio


def assert_shape(r: httpx.Response, status: int) -> dict:
    assert r.status_code == status, r.text
    body = r.json()
    assert set(body) == {"detail", "line"}, body
    assert isinstance(body["detail"], str) and body["detail"]
    assert body["line"] is None or isinstance(body["line"], int)
    return body


async def test_unknown_id_is_404(client: httpx.AsyncClient) -> None:
    for path in (
        "sites/9999",
        "antennas/9999",
        "sweeps/9999",
        "sweeps/9999/data",
        "sweeps/9999/file",
        "cable-types/9999",
        "antennas/9999/sweeps",
        "antennas/9999/trend?band=40m",
    ):
        body = assert_shape(await client.get(f"{API}/{path}"), 404)
        assert "9999 does not exist" in body["detail"]


async def test_unknown_path_and_method(client: httpx.AsyncClient) -> None:
    assert_shape(await client.get(f"{API}/nothing-here"), 404)
    assert_shape(await client.put(f"{API}/sites"), 405)


async def test_invalid_fields_name_the_field(client: httpx.AsyncClient) -> None:
    body = assert_shape(await client.post(f"{API}/sites", json={"name": "x", "itu_region": 4}), 422)
    assert body["detail"].startswith("itu_region:")
    body = assert_shape(await client.post(f"{API}/sites", json={}), 422)
    assert "name: Field required" in body["detail"]
    body = assert_shape(
        await client.post(f"{API}/sites", json={"name": "x", "locator": "ZZ99"}), 422
    )
    assert "Maidenhead" in body["detail"]


async def test_service_invalid_is_422(client: httpx.AsyncClient) -> None:
    site = await make_site(client)
    r = await client.post(
        f"{API}/antennas",
        json={"site_id": site["id"], "name": "a", "kind": "dipole", "bands": ["41m"]},
    )
    body = assert_shape(r, 422)
    assert "unknown band '41m'" in body["detail"] and "40m" in body["detail"]
    body = assert_shape(
        await client.post(f"{API}/sites", json={"name": "y", "timezone": "Mars/Base"}), 422
    )
    assert "Mars/Base" in body["detail"]


async def test_conflicts_are_409(client: httpx.AsyncClient) -> None:
    site = await make_site(client, name="Clubhouse")
    body = assert_shape(await client.post(f"{API}/sites", json={"name": "Clubhouse"}), 409)
    assert "already exists" in body["detail"]
    await make_antenna(client, site["id"])
    body = assert_shape(await client.delete(f"{API}/sites/{site['id']}"), 409)
    assert "still has 1 antenna" in body["detail"]


async def test_bad_file_is_422_with_line(client: httpx.AsyncClient) -> None:
    _, antenna = await site_and_antenna(client)
    bad = b"# Hz S RI R 50\n7e6 0.1 0.2\n7.1e6 0.1 zero\n"
    body = assert_shape(await upload(client, antenna["id"], bad), 422)
    assert body == {"detail": "'zero' is not a number", "line": 3}


async def test_too_large_is_413_with_the_limit(app, client: httpx.AsyncClient) -> None:
    _, antenna = await site_and_antenna(client)
    app.state.settings = app.state.settings.model_copy(update={"max_upload_bytes": 1000})
    body = assert_shape(await upload(client, antenna["id"], rlc_touchstone()), 413)
    assert "limit of 1000 bytes" in body["detail"]


async def test_a_bug_is_500_in_the_same_shape(app) -> None:
    @app.get("/boom")
    def boom() -> None:
        raise KeyError("oops")

    transport = httpx.ASGITransport(app=app, raise_app_exceptions=False)
    async with httpx.AsyncClient(transport=transport, base_url="http://test") as c:
        body = assert_shape(await c.get("/boom"), 500)
    assert body["detail"] == "internal error (KeyError); this is a bug"
