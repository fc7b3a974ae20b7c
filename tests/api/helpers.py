"""Small API helpers shared by the tests in tests/api (create a site, an antenna, upload)."""

from __future__ import annotations

from typing import Any

import httpx

API = "/api/v1"


async def make_site(client: httpx.AsyncClient, name: str = "Q0HRS hilltop", **kw: Any) -> dict:
    body = {"name": name, "itu_region": 1, "timezone": "Europe/Berlin", **kw}
    r = await client.post(f"{API}/sites", json=body)
    assert r.status_code == 201, r.text
    return r.json()


async def make_antenna(
    client: httpx.AsyncClient, site_id: int, name: str = "40m dipole", **kw: Any
) -> dict:
    body = {"site_id": site_id, "name": name, "kind": "dipole", "bands": ["40m"], **kw}
    r = await client.post(f"{API}/antennas", json=body)
    assert r.status_code == 201, r.text
    return r.json()


async def site_and_antenna(client: httpx.AsyncClient, **kw: Any) -> tuple[dict, dict]:
    site = await make_site(client)
    return site, await make_antenna(client, site["id"], **kw)


async def upload(
    client: httpx.AsyncClient,
    antenna_id: int,
    data: bytes,
    filename: str = "sweep.s1p",
    **form: str,
) -> httpx.Response:
    return await client.post(
        f"{API}/antennas/{antenna_id}/sweeps", files={"file": (filename, data)}, data=form
    )
