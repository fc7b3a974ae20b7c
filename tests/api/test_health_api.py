"""Health API: baseline, antenna health, verdicts stored at upload, site check, board.

Runs on SQLite and PostgreSQL (tests/dbfixtures.py). Sweeps are series-RLC resonators
(tests/dbfixtures.rlc_touchstone: Pozar §6.1's series resonant circuit), so where the
resonance is is known exactly; the verdict thresholds are rules of thumb (common
practice, services/thresholds.py).
"""

from __future__ import annotations

from typing import Any

import httpx
import pytest
from sqlalchemy import Engine, event

from tests.api.helpers import API, make_antenna, make_site, upload
from tests.dbfixtures import rlc_touchstone

pytestmark = pytest.mark.anyio

ARRAY_COLUMNS = ("original", "freq_hz", "gamma", "gamma_feedpoint")


async def put_sweep(client: httpx.AsyncClient, antenna_id: int, f0_hz: float, when: str) -> dict:
    data = rlc_touchstone(f0_hz, comments=(f"f0 {f0_hz}",))
    r = await upload(client, antenna_id, data, measured_at=when)
    assert r.status_code == 201, r.text
    return r.json()


async def sweep_status(client: httpx.AsyncClient, sweep_id: int) -> tuple[str, list[str]]:
    r = await client.get(f"{API}/sweeps/{sweep_id}")
    assert r.status_code == 200, r.text
    body = r.json()
    return body["status"], body["status_reasons"]


async def test_baseline_health_and_stored_verdicts(client: httpx.AsyncClient) -> None:
    site = await make_site(client)
    ant = await make_antenna(client, site["id"])
    first = await put_sweep(client, ant["id"], 7.10e6, "2025-04-02T10:00:00")
    # No baseline yet: unknown, and the first sweep is offered as the candidate.
    assert await sweep_status(client, first["id"]) == (
        "unknown",
        ["no baseline set yet: confirm a good sweep as the baseline"],
    )
    h = (await client.get(f"{API}/antennas/{ant['id']}/health")).json()
    assert h["status"] == "unknown" and h["baseline"] is None
    assert h["candidate"]["sweep_id"] == first["id"]
    assert h["candidate"]["why"] == "first sweep of the antenna"

    r = await client.put(
        f"{API}/antennas/{ant['id']}/baseline",
        json={"sweep_id": first["id"], "reason": "after installation"},
    )
    assert r.status_code == 200, r.text
    assert r.json()["sweep_id"] == first["id"]
    # Setting the baseline judges the sweeps since it again.
    assert (await sweep_status(client, first["id"]))[0] == "ok"

    # 7.10 → 6.92 MHz: 180 kHz, 2.5 % of the 7.1 MHz centre of 40 m (Region 1).
    moved = await put_sweep(client, ant["id"], 6.92e6, "2025-11-03T09:00:00")
    status, reasons = await sweep_status(client, moved["id"])
    assert status == "watch"
    assert reasons[0] == (
        "40m: resonance moved 180 kHz down since the baseline of 2025-04-02 (2.5 % of band centre)"
    )
    h = (await client.get(f"{API}/antennas/{ant['id']}/health")).json()
    assert h["status"] == "watch" and h["reasons"] == reasons
    assert h["cautions"] == []  # cautions come with a fault (see the site check test)
    assert h["sweep"]["sweep_id"] == moved["id"]
    assert h["baseline"]["sweep_id"] == first["id"]
    assert h["baseline"]["reason"] == "after installation"
    band = h["verdict"]["bands"][0]
    assert band["band"] == "40m"
    assert band["resonance_shift_hz"] == pytest.approx(-180e3, abs=1e3)
    assert [p["status"] for p in h["history"]] == ["ok", "watch"]

    # A new baseline ends the old one (history kept) and re-judges since it.
    r = await client.put(
        f"{API}/antennas/{ant['id']}/baseline",
        json={"sweep_id": moved["id"], "reason": "retuned on purpose"},
    )
    assert r.status_code == 200
    h = (await client.get(f"{API}/antennas/{ant['id']}/health")).json()
    assert h["status"] == "ok"
    assert [b["sweep_id"] for b in h["baselines"]] == [moved["id"], first["id"]]
    assert h["baselines"][0]["ended_at"] is None and h["baselines"][1]["ended_at"] is not None


async def test_baseline_errors(client: httpx.AsyncClient) -> None:
    site = await make_site(client)
    a = await make_antenna(client, site["id"], name="A")
    b = await make_antenna(client, site["id"], name="B")
    s = await put_sweep(client, a["id"], 7.1e6, "2025-04-02T10:00:00")
    r = await client.put(f"{API}/antennas/{b['id']}/baseline", json={"sweep_id": s["id"]})
    assert r.status_code == 422
    assert r.json() == {
        "detail": f"sweep {s['id']} belongs to antenna {a['id']}, not to antenna {b['id']}",
        "line": None,
    }
    r = await client.put(f"{API}/antennas/{a['id']}/baseline", json={"sweep_id": 999_999})
    assert r.status_code == 404 and r.json()["detail"] == "sweep 999999 does not exist"
    r = await client.put(f"{API}/antennas/999999/baseline", json={"sweep_id": s["id"]})
    assert r.status_code == 404 and r.json()["detail"] == "antenna 999999 does not exist"
    r = await client.get(f"{API}/antennas/999999/health")
    assert r.status_code == 404


async def test_candidate_after_a_repair(client: httpx.AsyncClient) -> None:
    site = await make_site(client)
    ant = await make_antenna(client, site["id"])
    await put_sweep(client, ant["id"], 7.1e6, "2025-01-10T10:00:00")
    r = await client.post(
        f"{API}/antennas/{ant['id']}/events",
        json={"kind": "repair", "occurred_at": "2025-06-01T12:00:00", "title": "new balun"},
    )
    assert r.status_code == 201, r.text
    after = await put_sweep(client, ant["id"], 7.11e6, "2025-06-02T10:00:00")
    await put_sweep(client, ant["id"], 7.12e6, "2025-09-02T10:00:00")
    h = (await client.get(f"{API}/antennas/{ant['id']}/health")).json()
    assert h["candidate"]["sweep_id"] == after["id"]
    assert h["candidate"]["why"] == "first sweep after the repair of 2025-06-01"


async def test_site_check_after_a_storm(client: httpx.AsyncClient) -> None:
    site = await make_site(client)
    hit = await make_antenna(client, site["id"], name="hit")
    fine = await make_antenna(client, site["id"], name="fine")
    late = await make_antenna(client, site["id"], name="not swept yet")
    for a, f0 in ((hit, 7.10e6), (fine, 7.05e6), (late, 7.08e6)):
        s = await put_sweep(client, a["id"], f0, "2025-04-02T10:00:00")
        await client.put(f"{API}/antennas/{a['id']}/baseline", json={"sweep_id": s["id"]})
    r = await client.post(
        f"{API}/sites/{site['id']}/events",
        json={"kind": "storm", "occurred_at": "2025-10-24T18:00:00", "title": "autumn gale"},
    )
    storm = r.json()
    await put_sweep(client, hit["id"], 6.87e6, "2025-10-26T11:00:00")  # bent: −230 kHz
    await put_sweep(client, fine["id"], 7.051e6, "2025-10-26T11:30:00")

    r = await client.get(f"{API}/sites/{site['id']}/check", params={"since": storm["id"]})
    assert r.status_code == 200, r.text
    body = r.json()
    assert body["flagged"] == [hit["id"]]
    assert body["not_swept"] == [late["id"]]
    assert body["since"]["event"]["kind"] == "storm"
    rows = {row["antenna"]["id"]: row for row in body["antennas"]}
    assert rows[hit["id"]]["status"] == "fault"  # 3.2 % of 7.1 MHz: above the 3 % rule
    assert rows[hit["id"]]["reasons"][0].startswith(
        "40m: resonance moved 230 kHz down since the sweep of 2025-04-02 before the storm "
        "of 2025-10-24"
    )
    assert rows[fine["id"]]["status"] == "ok" and not rows[fine["id"]]["flagged"]
    assert rows[late["id"]]["reasons"] == ["not swept since the storm of 2025-10-24 yet"]
    assert any("power lines" in c for c in body["cautions"])
    assert any("climb alone" in c for c in body["cautions"])
    h = (await client.get(f"{API}/antennas/{hit['id']}/health")).json()
    assert h["status"] == "fault" and h["cautions"] == body["cautions"]

    # The same by date (midnight in the site's zone), and bad input.
    r = await client.get(f"{API}/sites/{site['id']}/check", params={"since": "2025-10-24"})
    assert r.json()["flagged"] == [hit["id"]]
    r = await client.get(f"{API}/sites/{site['id']}/check", params={"since": "last week"})
    assert r.status_code == 422
    assert r.json()["detail"] == (
        "since: expected an event id or an ISO date such as 2025-10-24, got 'last week'"
    )
    other = await make_site(client, name="Q0HRS clubhouse")
    r = await client.get(f"{API}/sites/{other['id']}/check", params={"since": storm["id"]})
    assert r.status_code == 422
    r = await client.get(f"{API}/sites/999999/check", params={"since": "2025-10-24"})
    assert r.status_code == 404


async def test_board_is_one_cheap_query_path(client: httpx.AsyncClient, clean_db: Engine) -> None:
    site = await make_site(client)
    ant = await make_antenna(client, site["id"])
    empty = await make_antenna(client, site["id"], name="new loop", kind="loop")
    first = await put_sweep(client, ant["id"], 7.10e6, "2025-04-02T10:00:00")
    await client.put(f"{API}/antennas/{ant['id']}/baseline", json={"sweep_id": first["id"]})
    await put_sweep(client, ant["id"], 7.02e6, "2025-05-02T10:00:00")

    statements: list[str] = []

    def capture(conn: Any, cursor: Any, statement: str, *args: Any) -> None:
        statements.append(statement)

    event.listen(clean_db, "before_cursor_execute", capture)
    try:
        r = await client.get(f"{API}/board")
    finally:
        event.remove(clean_db, "before_cursor_execute", capture)
    assert r.status_code == 200, r.text
    selects = [s for s in statements if s.lstrip().upper().startswith("SELECT")]
    assert len(selects) == 4, selects
    for s in selects:
        for col in ARRAY_COLUMNS:
            assert f"sweep.{col}" not in s and f"sweep_1.{col}" not in s, s

    body = r.json()
    assert body["stale_after_days"] == 180
    cards = {c["antenna"]["id"]: c for c in body["sites"][0]["antennas"]}
    card = cards[ant["id"]]
    assert card["status"] == "ok"  # 80 kHz is 1.1 % of the centre: under the 1.5 % rule
    assert card["antenna"]["bands"] == ["40m"]
    assert card["stale"] is True  # measured in 2025: far more than 180 days before today
    assert card["latest_sweep"]["age_days"] > 180
    assert [p["value"] for p in card["sparkline"]] == pytest.approx([60 / 50, 60 / 50], abs=0.01)
    (centre,) = card["swr_center"]
    assert centre["band"] == "40m" and centre["swr_center"] > 1.2
    assert cards[empty["id"]]["status"] == "unknown" and cards[empty["id"]]["latest_sweep"] is None


async def test_antenna_thresholds_change_the_stored_verdict(client: httpx.AsyncClient) -> None:
    site = await make_site(client)
    ant = await make_antenna(client, site["id"])
    r = await client.patch(
        f"{API}/antennas/{ant['id']}",
        json={"thresholds": {"bands": {"40m": {"resonance_shift_q": 1}}}},
    )
    assert r.status_code == 422
    assert "thresholds.bands.40m: unknown threshold 'resonance_shift_q'" in r.json()["detail"]
    r = await client.patch(
        f"{API}/antennas/{ant['id']}",
        json={"thresholds": {"bands": {"40m": {"resonance_shift_watch_pct": 0.5}}}},
    )
    assert r.status_code == 200, r.text
    first = await put_sweep(client, ant["id"], 7.10e6, "2025-04-02T10:00:00")
    await client.put(f"{API}/antennas/{ant['id']}/baseline", json={"sweep_id": first["id"]})
    # 60 kHz is 0.85 % of the centre: ok by default, watch with this antenna's 0.5 %.
    s = await put_sweep(client, ant["id"], 7.04e6, "2025-06-02T10:00:00")
    status, reasons = await sweep_status(client, s["id"])
    assert status == "watch"
    assert reasons[0].startswith("40m: resonance moved 60 kHz down")


async def test_board_says_whether_a_band_centre_was_swept(client: httpx.AsyncClient) -> None:
    # 40 m in ITU Region 1 is 7.000–7.200 MHz (ITU RR Article 5), centre 7.100 MHz; a
    # sweep of 7.13–7.30 MHz overlaps the band but never reaches its centre.
    site = await make_site(client)
    ant = await make_antenna(client, site["id"])
    data = rlc_touchstone(7.2e6, 50.0, 10.0, f_start_hz=7.13e6, f_stop_hz=7.30e6, points=101)
    r = await upload(client, ant["id"], data, measured_at="2026-05-02T10:00:00")
    assert r.status_code == 201, r.text
    card = next(c for c in (await client.get(f"{API}/board")).json()["sites"][0]["antennas"]
                if c["antenna"]["id"] == ant["id"])
    assert card["swr_center"] == [{"band": "40m", "swr_center": None, "centre_swept": False}]

    wide = rlc_touchstone(7.1e6, 50.0, 10.0, f_start_hz=6.9e6, f_stop_hz=7.3e6, points=101)
    r = await upload(client, ant["id"], wide, measured_at="2026-05-03T10:00:00")
    assert r.status_code == 201, r.text
    card = next(c for c in (await client.get(f"{API}/board")).json()["sites"][0]["antennas"]
                if c["antenna"]["id"] == ant["id"])
    (centre,) = card["swr_center"]
    # resonant at the centre with R = Z0: SWR 1 (Pozar §2.3, Γ = 0)
    assert centre["centre_swept"] is True and centre["swr_center"] == pytest.approx(1.0, abs=0.01)
