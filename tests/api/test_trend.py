"""The trend endpoint: one metric of one band over time from sweep_metrics alone."""

from __future__ import annotations

import httpx
import pytest
from sqlalchemy import Engine, event

from tests.api.helpers import API, site_and_antenna, upload
from tests.dbfixtures import rlc_touchstone

pytestmark = pytest.mark.anyio

SWEEP_BLOBS = ("original", "freq_hz", "gamma", "gamma_feedpoint")


async def _three_sweeps(client: httpx.AsyncClient) -> tuple[dict, list[dict]]:
    _, antenna = await site_and_antenna(client)
    sweeps = []
    # Resonance drifting down: 7.10, 7.05, 7.00 MHz (series RLC, f0 is the resonance).
    for when, f0 in (
        ("2025-01-10T10:00Z", 7.10e6),
        ("2024-06-01T10:00Z", 7.05e6),
        ("2025-09-01T10:00Z", 7.00e6),
    ):
        r = await upload(client, antenna["id"], rlc_touchstone(f0), measured_at=when)
        assert r.status_code == 201
        sweeps.append(r.json())
    return antenna, sweeps


async def test_trend_points_in_time_order_with_events(client: httpx.AsyncClient) -> None:
    antenna, sweeps = await _three_sweeps(client)
    storm = await client.post(
        f"{API}/sites/{antenna['site_id']}/events",
        json={"kind": "storm", "occurred_at": "2025-08-20T03:00:00Z", "title": "gale"},
    )
    assert storm.status_code == 201
    r = await client.get(
        f"{API}/antennas/{antenna['id']}/trend", params={"band": "40m", "metric": "resonance"}
    )
    assert r.status_code == 200, r.text
    body = r.json()
    assert (body["band"], body["metric"], body["field"], body["unit"]) == (
        "40m",
        "resonance",
        "resonance_hz",
        "Hz",
    )
    times = [p["measured_at"] for p in body["points"]]
    assert times == sorted(times) and len(times) == 3
    values = [p["value"] for p in body["points"]]
    assert values == pytest.approx([7.05e6, 7.10e6, 7.00e6], rel=1e-6)
    assert [p["sweep_id"] for p in body["points"]] == [
        sweeps[1]["id"],
        sweeps[0]["id"],
        sweeps[2]["id"],
    ]
    assert [e["title"] for e in body["events"]] == ["gale"]


async def test_trend_date_bounds_and_bad_names(client: httpx.AsyncClient) -> None:
    antenna, _ = await _three_sweeps(client)
    url = f"{API}/antennas/{antenna['id']}/trend"
    r = await client.get(url, params={"band": "40m", "since": "2025-01-01T00:00:00Z"})
    assert len(r.json()["points"]) == 2
    r = await client.get(url, params={"band": "40m", "metric": "loudness"})
    assert r.status_code == 422 and "unknown metric 'loudness'" in r.json()["detail"]
    r = await client.get(url, params={"band": "41m"})
    assert r.status_code == 422 and "unknown band '41m'" in r.json()["detail"]
    r = await client.get(url, params={"band": "20m"})  # a band the sweeps do not cover
    assert r.status_code == 200 and r.json()["points"] == []


async def test_trend_never_reads_sweep_arrays(client: httpx.AsyncClient, clean_db: Engine) -> None:
    antenna, _ = await _three_sweeps(client)
    statements: list[str] = []

    def record(conn, cursor, statement, parameters, context, executemany) -> None:
        statements.append(statement.lower())

    event.listen(clean_db, "before_cursor_execute", record)
    try:
        for metric in ("min_swr", "resonance", "bandwidth_2", "q"):
            r = await client.get(
                f"{API}/antennas/{antenna['id']}/trend", params={"band": "40m", "metric": metric}
            )
            assert r.status_code == 200
    finally:
        event.remove(clean_db, "before_cursor_execute", record)
    assert any("from sweep_metrics" in s for s in statements)
    for s in statements:
        assert "from sweep " not in s and "join sweep " not in s, s
        for blob in SWEEP_BLOBS:
            assert f"sweep.{blob}" not in s, s
