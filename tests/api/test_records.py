"""Sites, antennas, cable types, feedlines and events through the API."""

from __future__ import annotations

import httpx
import pytest

from tests.api.helpers import API, make_antenna, make_site

pytestmark = pytest.mark.anyio


async def test_site_lifecycle(client: httpx.AsyncClient) -> None:
    r = await client.post(f"{API}/sites", json={"name": "Q0HRS clubhouse", "locator": "io91wm"})
    assert r.status_code == 201
    site = r.json()
    # Defaults from the settings: region 1, UTC; the locator is normalised.
    assert (site["itu_region"], site["timezone"], site["locator"]) == (1, "UTC", "IO91wm")
    r = await client.patch(
        f"{API}/sites/{site['id']}", json={"notes": "roof mast", "itu_region": 2}
    )
    assert r.status_code == 200 and r.json()["notes"] == "roof mast" and r.json()["itu_region"] == 2
    assert [s["name"] for s in (await client.get(f"{API}/sites")).json()] == ["Q0HRS clubhouse"]
    assert (await client.delete(f"{API}/sites/{site['id']}")).status_code == 204
    assert (await client.get(f"{API}/sites/{site['id']}")).status_code == 404


async def test_antenna_lifecycle_and_filter(client: httpx.AsyncClient) -> None:
    a_site = await make_site(client, name="A")
    b_site = await make_site(client, name="B")
    a = await make_antenna(
        client, a_site["id"], bands=["20m", "40M", "20m"], installed_on="2024-05-01"
    )
    # Band names are normalised, de-duplicated and kept in band-plan order.
    assert a["bands"] == ["40m", "20m"] and a["installed_on"] == "2024-05-01"
    await make_antenna(client, b_site["id"], name="2m j-pole", kind="j-pole", bands=["2m"])
    listed = (await client.get(f"{API}/antennas", params={"site_id": a_site["id"]})).json()
    assert [x["name"] for x in listed] == ["40m dipole"]
    r = await client.patch(f"{API}/antennas/{a['id']}", json={"kind": "loop"})
    assert r.json()["kind"] == "loop"
    r = await client.post(
        f"{API}/antennas", json={"site_id": a_site["id"], "name": "40m dipole", "kind": "dipole"}
    )
    assert r.status_code == 409
    r = await client.post(f"{API}/antennas", json={"site_id": 9999, "name": "x", "kind": "dipole"})
    assert r.status_code == 404
    r = await client.post(
        f"{API}/antennas", json={"site_id": a_site["id"], "name": "x", "kind": "rhombic"}
    )
    assert r.status_code == 422 and r.json()["detail"].startswith("kind:")


async def test_antenna_thresholds_are_validated(client: httpx.AsyncClient) -> None:
    site = await make_site(client)
    r = await client.post(
        f"{API}/antennas",
        json={
            "site_id": site["id"],
            "name": "x",
            "kind": "dipole",
            "thresholds": {"no_such_threshold": 2},
        },
    )
    assert r.status_code == 422 and "no_such_threshold" in r.json()["detail"]


async def test_cable_types_builtin_and_user(client: httpx.AsyncClient) -> None:
    from mastwatch.rf.lines import CABLES

    types = (await client.get(f"{API}/cable-types")).json()
    builtin = {t["name"]: t for t in types if t["builtin"]}
    assert set(builtin) == set(CABLES)
    assert builtin["RG-213"]["velocity_factor"] == CABLES["RG-213"].velocity_factor
    # A user type fitted to measured points: 2 dB/100 m at 10 MHz, 6.5 at 100 MHz.
    r = await client.post(
        f"{API}/cable-types",
        json={
            "name": "club hardline",
            "z0_ohm": 50,
            "velocity_factor": 0.85,
            "measured_points": [[10e6, 2.0], [100e6, 6.5]],
        },
    )
    assert r.status_code == 201, r.text
    user = r.json()
    assert user["builtin"] is False and user["k1"] >= 0 and user["k2"] >= 0
    # The fitted model reproduces the two points it was fitted to (2 points, 2 unknowns).
    for f_hz, db in ((10e6, 2.0), (100e6, 6.5)):
        f_mhz = f_hz / 1e6
        assert user["k1"] * f_mhz**0.5 + user["k2"] * f_mhz == pytest.approx(db, rel=1e-6)
    r = await client.post(
        f"{API}/cable-types",
        json={"name": "club hardline", "z0_ohm": 50, "velocity_factor": 0.85, "k1": 1, "k2": 0},
    )
    assert r.status_code == 409
    r = await client.post(
        f"{API}/cable-types", json={"name": "y", "z0_ohm": 50, "velocity_factor": 0.85}
    )
    assert r.status_code == 422 and "k1 and k2" in r.json()["detail"]


async def test_feedline_put_replace_delete(client: httpx.AsyncClient) -> None:
    site = await make_site(client)
    antenna = await make_antenna(client, site["id"])
    url = f"{API}/antennas/{antenna['id']}/feedline"
    r = await client.put(url, json={"cable": "RG-213", "length_m": 30})
    assert r.status_code == 200 and r.json()["cable_type"]["name"] == "RG-213"
    types = (await client.get(f"{API}/cable-types")).json()
    rg58 = next(t for t in types if t["name"] == "RG-58")
    r = await client.put(url, json={"cable_type_id": rg58["id"], "length_m": 12.5, "connectors": 2})
    assert r.json()["cable_type"]["name"] == "RG-58" and r.json()["length_m"] == 12.5
    got = (await client.get(f"{API}/antennas/{antenna['id']}")).json()
    assert got["feedline"]["cable_type"]["name"] == "RG-58"
    r = await client.put(url, json={"cable": "RG-999", "length_m": 1})
    assert r.status_code == 422 and "unknown cable type 'RG-999'" in r.json()["detail"]
    r = await client.put(url, json={"length_m": 1})
    assert r.status_code == 422
    assert (await client.delete(url)).status_code == 204
    assert (await client.get(f"{API}/antennas/{antenna['id']}")).json()["feedline"] is None
    assert (await client.delete(url)).status_code == 404


async def test_events_of_site_and_antenna(client: httpx.AsyncClient) -> None:
    site = await make_site(client)  # Europe/Berlin
    antenna = await make_antenna(client, site["id"])
    r = await client.post(
        f"{API}/sites/{site['id']}/events",
        json={"kind": "storm", "occurred_at": "2025-01-15T22:00:00", "title": "winter gale"},
    )
    assert r.status_code == 201
    # Naive time = the site's local time: 22:00 CET is 21:00 UTC.
    assert r.json()["occurred_at"] == "2025-01-15T21:00:00Z"
    r = await client.post(
        f"{API}/antennas/{antenna['id']}/events",
        json={"kind": "repair", "occurred_at": "2025-02-01T10:00:00Z", "title": "new balun"},
    )
    assert r.status_code == 201 and r.json()["antenna_id"] == antenna["id"]
    own = (await client.get(f"{API}/antennas/{antenna['id']}/events")).json()
    assert [e["title"] for e in own] == ["winter gale", "new balun"]
    site_only = (await client.get(f"{API}/sites/{site['id']}/events")).json()
    assert [e["title"] for e in site_only] == ["winter gale"]
    r = await client.post(
        f"{API}/sites/{site['id']}/events",
        json={"kind": "flood", "occurred_at": "2025-01-15T22:00:00Z", "title": "x"},
    )
    assert r.status_code == 422 and r.json()["detail"].startswith("kind:")


async def test_openapi_docs_are_served(client: httpx.AsyncClient) -> None:
    r = await client.get("/api/docs")
    assert r.status_code == 200 and "swagger" in r.text.lower()
    spec = (await client.get("/api/openapi.json")).json()
    assert "/api/v1/antennas/{antenna_id}/sweeps" in spec["paths"]


async def test_patch_with_null_keeps_required_fields(client: httpx.AsyncClient) -> None:
    site = await make_site(client, name="Keep", locator="JO62")
    r = await client.patch(f"{API}/sites/{site['id']}", json={"name": None, "locator": None})
    assert r.status_code == 200
    assert r.json()["name"] == "Keep" and r.json()["locator"] is None
    antenna = await make_antenna(client, site["id"], installed_on="2024-05-01")
    r = await client.patch(
        f"{API}/antennas/{antenna['id']}", json={"name": None, "installed_on": None}
    )
    assert r.json()["name"] == "40m dipole" and r.json()["installed_on"] is None
