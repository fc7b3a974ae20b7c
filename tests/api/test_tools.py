"""GET /sweeps/{id}/dtf and /sweeps/{id}/match on stored sweeps (SQLite and PostgreSQL)."""

from __future__ import annotations

import httpx
import numpy as np
import pytest

from mastwatch.rf import lines
from mastwatch.rf.sweep import Sweep
from mastwatch.rf.touchstone import write_touchstone
from tests.api.helpers import API, site_and_antenna, upload
from tests.dbfixtures import rlc_touchstone

pytestmark = pytest.mark.anyio

RG58 = lines.Feedline(lines.CABLES["RG-58"], 23.4)


def _line_file() -> bytes:
    """150 Ω at the end of 23.4 m of RG-58, swept 1–401 MHz at the radio end."""
    f = np.linspace(1e6, 401e6, 401)
    feed = Sweep.from_impedance(f, np.full(f.size, 150.0 + 0j))
    return write_touchstone(lines.embed(feed, RG58)).encode()


async def _stored(client: httpx.AsyncClient, *files: bytes) -> list[int]:
    """Store the files as sweeps of one new antenna; their ids."""
    _, antenna = await site_and_antenna(client)
    ids = []
    for data in files:
        r = await upload(client, antenna["id"], data)
        assert r.status_code == 201, r.text
        ids.append(int(r.json()["id"]))
    return ids


async def test_dtf_finds_the_line_end(client: httpx.AsyncClient) -> None:
    (sweep_id,) = await _stored(client, _line_file())
    r = await client.get(f"{API}/sweeps/{sweep_id}/dtf", params={"cable": "RG-58"})
    assert r.status_code == 200, r.text
    body = r.json()
    # REFERENCES §7: 401 points over 400 MHz at VF 0.66 → 0.2473 m cells, 98.93 m range
    assert body["resolution_m"] == pytest.approx(0.2473, abs=5e-5)
    assert body["range_m"] == pytest.approx(98.93, abs=5e-3)
    assert body["cable"] == "RG-58" and body["loss_compensated"] is True
    ends = [p for p in body["peaks"] if abs(p["distance_m"] - 23.4) < body["resolution_m"]]
    assert len(ends) == 1 and ends[0]["reflection"] == pytest.approx(0.5, rel=0.1)
    assert len(body["distance_m"]) == len(body["reflection"]) <= 2000
    assert "Never climb alone" in body["safety"]


async def test_dtf_with_vf_only_and_without_arrays(client: httpx.AsyncClient) -> None:
    (sweep_id,) = await _stored(client, _line_file())
    r = await client.get(
        f"{API}/sweeps/{sweep_id}/dtf",
        params={"vf": 0.66, "window": "rect", "arrays": "false"},
    )
    assert r.status_code == 200, r.text
    body = r.json()
    assert body["window"] == "rect" and body["beta"] is None and body["loss_compensated"] is False
    assert body["distance_m"] is None
    assert any(abs(p["distance_m"] - 23.4) < body["resolution_m"] for p in body["peaks"])


async def test_dtf_uses_the_recorded_feedline(client: httpx.AsyncClient) -> None:
    _, antenna = await site_and_antenna(client)
    r = await client.put(f"{API}/antennas/{antenna['id']}/feedline",
                         json={"cable": "RG-58", "length_m": 23.4})
    assert r.status_code == 200, r.text
    r = await upload(client, antenna["id"], _line_file(), reference_plane="line_input")
    assert r.status_code == 201, r.text
    body = (await client.get(f"{API}/sweeps/{r.json()['id']}/dtf")).json()
    assert body["cable"] == "RG-58" and body["velocity_factor"] == 0.66
    # compensation stops growing at the recorded line's far end (docs/feedlines.md)
    assert body["line_length_m"] == 23.4
    assert any("held beyond (the line's far end)" in n for n in body["notes"])
    named = await client.get(f"{API}/sweeps/{r.json()['id']}/dtf", params={"cable": "RG-213"})
    assert named.json()["line_length_m"] is None  # another cable: the record's length is not its


async def test_dtf_errors(client: httpx.AsyncClient) -> None:
    sweep_id, narrow = await _stored(
        client, _line_file(), rlc_touchstone(f_start_hz=7.0e6, f_stop_hz=7.2e6)
    )
    r = await client.get(f"{API}/sweeps/{sweep_id}/dtf")
    assert r.status_code == 422
    assert r.json() == {
        "detail": "give cable (a cable type name) or vf (velocity factor): "
        "this sweep has no feedline on record",
        "line": None,
    }
    r = await client.get(f"{API}/sweeps/{sweep_id}/dtf", params={"cable": "RG-999"})
    assert r.status_code == 422 and "unknown cable type 'RG-999'" in r.json()["detail"]
    r = await client.get(f"{API}/sweeps/{sweep_id}/dtf", params={"vf": 1.5})
    assert r.status_code == 422 and r.json()["detail"].startswith("vf:")
    r = await client.get(f"{API}/sweeps/999999/dtf", params={"vf": 0.66})
    assert r.status_code == 404
    r = await client.get(f"{API}/sweeps/{narrow}/dtf", params={"vf": 0.66})
    assert r.status_code == 422 and "the sweep spans 0.2 MHz" in r.json()["detail"]


async def test_match_networks_match_at_the_design_frequency(client: httpx.AsyncClient) -> None:
    (sweep_id,) = await _stored(client, rlc_touchstone(7.1e6, r_ohm=20.0, q=12.0))
    r = await client.get(f"{API}/sweeps/{sweep_id}/match", params={"at_hz": 7.15e6})
    assert r.status_code == 200, r.text
    body = r.json()
    assert body["plane"] == "measured" and body["at_hz"] == 7.15e6
    assert body["networks"], body
    z = complex(body["load_r_ohm"], body["load_x_ohm"])
    for n in body["networks"]:
        # apply the returned component values at the design frequency: |Γ| < 1e-9
        w = 2 * np.pi * 7.15e6
        v, i = z, 1.0 + 0j
        for e in reversed(n["elements"]):
            if e["position"] == "series":
                v = v + (1j * w * e["value"] if e["kind"] == "L" else 1 / (1j * w * e["value"])) * i
            else:
                y = 1j * w * e["value"] if e["kind"] == "C" else 1 / (1j * w * e["value"])
                i = i + y * v
        assert abs((v / i - 50) / (v / i + 50)) < 1e-9
        bw = n["swr_bandwidth_2"]
        assert bw["low_hz"] < 7.15e6 < bw["high_hz"]


async def test_match_errors(client: httpx.AsyncClient) -> None:
    (sweep_id,) = await _stored(client, rlc_touchstone())
    r = await client.get(f"{API}/sweeps/{sweep_id}/match", params={"at_hz": 9e6})
    assert r.status_code == 422 and "9" in r.json()["detail"]
    r = await client.get(f"{API}/sweeps/{sweep_id}/match")
    assert r.status_code == 422 and r.json()["detail"].startswith("at_hz:")
    r = await client.get(f"{API}/sweeps/{sweep_id}/match",
                         params={"at_hz": 7.1e6, "plane": "feedpoint"})
    assert r.status_code == 200  # a feedpoint sweep: both planes are the same


async def test_dtf_view_is_bounded_and_physical(client: httpx.AsyncClient) -> None:
    # Loss compensation never reports |ρ| > 1 (a passive line), and max_distance_m bounds
    # the view and the peaks (docs/feedlines.md, "Distance to fault", step 5).
    (sweep_id,) = await _stored(client, _line_file())
    r = await client.get(
        f"{API}/sweeps/{sweep_id}/dtf", params={"cable": "RG-58", "max_distance_m": 20}
    )
    assert r.status_code == 200, r.text
    body = r.json()
    assert body["max_distance_m"] == 20.0
    assert max(body["distance_m"]) <= 20.0 + 0.5 * body["resolution_m"]
    assert all(p["distance_m"] <= 20.0 + 0.5 * body["resolution_m"] for p in body["peaks"])
    assert not any(abs(p["distance_m"] - 23.4) < body["resolution_m"] for p in body["peaks"])
    assert max(body["reflection"]) <= 1.0
    r = await client.get(f"{API}/sweeps/{sweep_id}/dtf", params={"max_distance_m": 0})
    assert r.status_code == 422
