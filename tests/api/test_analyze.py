"""POST /analyze: the upload's computation with nothing stored."""

from __future__ import annotations

import httpx
import pytest
from sqlalchemy import Engine

from mastwatch.rf import bands as rf_bands
from mastwatch.rf import lines
from mastwatch.rf.metrics import compute_metrics
from mastwatch.rf.parse import read_sweep
from mastwatch.rf.touchstone import write_touchstone
from tests.api.helpers import API
from tests.dbfixtures import rlc_sweep, rlc_touchstone, row_counts

pytestmark = pytest.mark.anyio


async def test_preview_matches_rf_and_stores_nothing(
    client: httpx.AsyncClient, clean_db: Engine
) -> None:
    before = row_counts(clean_db)
    data = rlc_touchstone(points=1601)
    r = await client.post(f"{API}/analyze", files={"file": ("p.s1p", data)})
    assert r.status_code == 200, r.text
    body = r.json()
    sweep = read_sweep(data, "p.s1p")
    want = compute_metrics(sweep, rf_bands.bands_in(sweep.f_start_hz, sweep.f_stop_hz, 1))
    assert body["metrics"]["measured"] == want.to_dict()
    assert body["points"] == 1601 and len(body["preview"]["freq_hz"]) <= 201
    assert min(body["preview"]["measured"]["swr"]) == pytest.approx(float(sweep.swr.min()))
    assert row_counts(clean_db) == before


async def test_preview_with_feedline_spec(client: httpx.AsyncClient) -> None:
    feedline = lines.parse_feedline("RG-213:30m")
    at_radio = lines.embed(rlc_sweep(), feedline)
    data = write_touchstone(at_radio).encode()
    r = await client.post(
        f"{API}/analyze",
        files={"file": ("p.s1p", data)},
        data={"reference_plane": "line_input", "feedline": "RG-213:30m"},
    )
    assert r.status_code == 200, r.text
    body = r.json()
    fp = {b["band"]: b for b in body["metrics"]["feedpoint"]["bands"]}
    assert fp["40m"]["resonance_hz"] == pytest.approx(7.1e6, rel=1e-6)
    assert body["feedline"]["cable"] == "RG-213" and body["preview"]["feedpoint"] is not None
    r = await client.post(
        f"{API}/analyze",
        files={"file": ("p.s1p", data)},
        data={"reference_plane": "line_input", "feedline": "RG-000:30m"},
    )
    assert r.status_code == 422 and "RG-000" in r.json()["detail"]
