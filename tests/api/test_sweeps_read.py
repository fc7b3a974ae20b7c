"""Listing, plot arrays with decimation, and deleting sweeps."""

from __future__ import annotations

import httpx
import numpy as np
import pytest
from sqlalchemy import Engine

from mastwatch.rf.parse import read_sweep
from tests.api.helpers import API, site_and_antenna, upload
from tests.dbfixtures import rlc_touchstone, row_counts

pytestmark = pytest.mark.anyio


async def test_list_is_newest_first_paginated_and_filtered(client: httpx.AsyncClient) -> None:
    _, antenna = await site_and_antenna(client)
    for month in (3, 1, 5, 2, 4):
        r = await upload(
            client,
            antenna["id"],
            rlc_touchstone(q=10 + month),
            measured_at=f"2025-0{month}-01T10:00:00Z",
        )
        assert r.status_code == 201
    url = f"{API}/antennas/{antenna['id']}/sweeps"
    page = (await client.get(url, params={"limit": 2})).json()
    assert page["total"] == 5 and (page["limit"], page["offset"]) == (2, 0)
    assert [s["measured_at"][:7] for s in page["items"]] == ["2025-05", "2025-04"]
    page = (await client.get(url, params={"limit": 2, "offset": 4})).json()
    assert [s["measured_at"][:7] for s in page["items"]] == ["2025-01"]
    page = (
        await client.get(
            url, params={"since": "2025-02-01T10:00:00Z", "until": "2025-04-01T10:00:00Z"}
        )
    ).json()
    assert page["total"] == 3
    assert [s["measured_at"][:7] for s in page["items"]] == ["2025-04", "2025-03", "2025-02"]
    r = await client.get(url, params={"limit": 0})
    assert r.status_code == 422 and r.json()["detail"].startswith("limit:")


async def test_data_full_and_decimated(client: httpx.AsyncClient) -> None:
    _, antenna = await site_and_antenna(client)
    # 7.0–7.2 MHz is the 40m band of Region 1; sweep 6–8 MHz so both edges are inside.
    data = rlc_touchstone(7.1234e6, points=1601)
    sweep = (await upload(client, antenna["id"], data)).json()
    full = (await client.get(f"{API}/sweeps/{sweep['id']}/data")).json()
    parsed = read_sweep(data, "a.s1p")
    assert full["returned"] == full["points"] == 1601
    np.testing.assert_array_equal(full["freq_hz"], parsed.freq_hz)
    np.testing.assert_array_equal(full["measured"]["gamma_re"], parsed.gamma.real)
    np.testing.assert_allclose(full["measured"]["r_ohm"], parsed.r, rtol=1e-12)
    np.testing.assert_allclose(full["measured"]["swr"], parsed.swr, rtol=1e-12)
    assert full["feedpoint"] is not None  # measured at the feedpoint

    small = (
        await client.get(f"{API}/sweeps/{sweep['id']}/data", params={"max_points": 100})
    ).json()
    assert 50 <= small["returned"] <= 110
    f = np.array(small["freq_hz"])
    assert np.all(np.diff(f) > 0)
    # The minimum SWR point, the ends and the points nearest the band edges survive.
    k = int(np.argmin(parsed.swr))
    assert parsed.freq_hz[k] in f and min(small["measured"]["swr"]) == parsed.swr[k]
    assert f[0] == parsed.freq_hz[0] and f[-1] == parsed.freq_hz[-1]
    for edge in (7.0e6, 7.2e6):
        nearest = parsed.freq_hz[np.argmin(np.abs(parsed.freq_hz - edge))]
        assert nearest in f
    r = await client.get(f"{API}/sweeps/{sweep['id']}/data", params={"max_points": 3})
    assert r.status_code == 422


async def test_delete_sweep_removes_its_rows(client: httpx.AsyncClient, clean_db: Engine) -> None:
    _, antenna = await site_and_antenna(client)
    before = row_counts(clean_db)
    sweep = (await upload(client, antenna["id"], rlc_touchstone())).json()
    assert row_counts(clean_db)["sweep_metrics"] > before["sweep_metrics"]
    r = await client.delete(f"{API}/sweeps/{sweep['id']}")
    assert r.status_code == 204
    assert row_counts(clean_db) == before
    assert (await client.get(f"{API}/sweeps/{sweep['id']}")).status_code == 404


async def test_baseline_sweep_cannot_be_deleted(
    client: httpx.AsyncClient, clean_db: Engine
) -> None:
    from mastwatch.db.engine import make_sessionmaker
    from mastwatch.db.models import Baseline

    _, antenna = await site_and_antenna(client)
    sweep = (await upload(client, antenna["id"], rlc_touchstone())).json()
    with make_sessionmaker(clean_db)() as s:
        s.add(Baseline(antenna_id=antenna["id"], sweep_id=sweep["id"], reason="first sweep"))
        s.commit()
    r = await client.delete(f"{API}/sweeps/{sweep['id']}")
    assert r.status_code == 409 and "baseline" in r.json()["detail"]
    # Deleting the whole antenna takes its sweeps and baselines with it.
    assert (await client.delete(f"{API}/antennas/{antenna['id']}")).status_code == 204
    counts = row_counts(clean_db)
    assert counts["sweep"] == counts["baseline"] == counts["sweep_metrics"] == 0


async def test_patch_sweep_moves_its_trend_point(client: httpx.AsyncClient) -> None:
    _, antenna = await site_and_antenna(client)  # site in Europe/Berlin
    a = (
        await upload(client, antenna["id"], rlc_touchstone(q=11), measured_at="2025-01-01T10:00Z")
    ).json()
    b = (
        await upload(client, antenna["id"], rlc_touchstone(q=12), measured_at="2025-02-01T10:00Z")
    ).json()
    r = await client.patch(
        f"{API}/sweeps/{a['id']}",
        json={"measured_at": "2025-03-01T12:00:00", "notes": "date fixed"},
    )
    assert r.status_code == 200, r.text
    assert r.json()["measured_at"] == "2025-03-01T11:00:00Z" and r.json()["notes"] == "date fixed"
    trend = (
        await client.get(f"{API}/antennas/{antenna['id']}/trend", params={"band": "40m"})
    ).json()
    assert [p["sweep_id"] for p in trend["points"]] == [b["id"], a["id"]]
    assert trend["points"][1]["measured_at"] == "2025-03-01T11:00:00Z"
    assert (await client.patch(f"{API}/sweeps/999999", json={"notes": "x"})).status_code == 404


async def test_swr_only_sweep(client: httpx.AsyncClient) -> None:
    _, antenna = await site_and_antenna(client)
    rows = "\n".join(f"{7.0 + 0.01 * i:.2f},{1.2 + abs(i - 10) * 0.1:.2f}" for i in range(21))
    r = await upload(client, antenna["id"], f"freq_mhz,swr\n{rows}\n".encode(), "swr.csv")
    assert r.status_code == 201, r.text
    sweep = r.json()
    assert sweep["has_phase"] is False and sweep["min_swr"] == pytest.approx(1.2)
    assert "resonances" in sweep["metrics"]["measured"]["unavailable"]
    data = (await client.get(f"{API}/sweeps/{sweep['id']}/data")).json()
    assert data["measured"]["r_ohm"] is None and data["measured"]["x_ohm"] is None
    assert data["measured"]["swr"][10] == pytest.approx(1.2)
    t = await client.get(f"{API}/sweeps/{sweep['id']}/touchstone")
    assert t.status_code == 422 and "SWR only" in t.json()["detail"]


async def test_data_of_a_line_input_sweep_has_both_planes(client: httpx.AsyncClient) -> None:
    from mastwatch.rf import lines
    from mastwatch.rf.touchstone import write_touchstone
    from tests.dbfixtures import rlc_sweep

    _, antenna = await site_and_antenna(client)
    await client.put(
        f"{API}/antennas/{antenna['id']}/feedline", json={"cable": "RG-58", "length_m": 20}
    )
    at_antenna = rlc_sweep(7.05e6, points=1601)
    data = write_touchstone(
        lines.embed(at_antenna, lines.Feedline(lines.CABLES["RG-58"], 20.0))
    ).encode()
    sweep = (await upload(client, antenna["id"], data, reference_plane="line_input")).json()
    small = (
        await client.get(f"{API}/sweeps/{sweep['id']}/data", params={"max_points": 120})
    ).json()
    assert small["feedpoint"] is not None and small["returned"] <= 130
    # Both planes' minima survive decimation (the same indices serve both planes).
    assert min(small["feedpoint"]["swr"]) == pytest.approx(float(at_antenna.swr.min()), rel=1e-9)
    measured = read_sweep(data, "m.s1p")
    assert min(small["measured"]["swr"]) == float(measured.swr.min())
