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


# Amateur allocations of ITU RR Article 5 per region, in kHz (the source rf/bands.py
# cites): 160 m R1 1810–1850, R2/R3 1800–2000; 80 m R1 3500–3800, R2 3500–4000,
# R3 3500–3900; 60 m 5351.5–5366.5 (WRC-15, all regions); 40 m 7000–7200 in R1/R3 and
# 7000–7300 in R2 (the R2 upper edge from memory, as bands.py marks it).
ARTICLE_5_KHZ = {
    1: {"160m": (1810, 1850), "80m": (3500, 3800), "60m": (5351.5, 5366.5), "40m": (7000, 7200)},
    2: {"160m": (1800, 2000), "80m": (3500, 4000), "60m": (5351.5, 5366.5), "40m": (7000, 7300)},
    3: {"160m": (1800, 2000), "80m": (3500, 3900), "60m": (5351.5, 5366.5), "40m": (7000, 7200)},
}


async def _preview_bands(client: httpx.AsyncClient, data: bytes, **form: str) -> dict:
    r = await client.post(f"{API}/analyze", files={"file": ("p.s1p", data)}, data=form)
    assert r.status_code == 200, r.text
    return {
        b["band"]: (b["low_hz"] / 1e3, b["high_hz"] / 1e3)
        for b in r.json()["metrics"]["measured"]["bands"]
    }


@pytest.mark.parametrize("region", [1, 2, 3])
async def test_preview_uses_the_region_sent_as_a_form_field(
    client: httpx.AsyncClient, region: int
) -> None:
    # A 1.7–7.5 MHz sweep overlaps 160, 80, 60 and 40 m in every region.
    data = rlc_touchstone(f_start_hz=1.7e6, f_stop_hz=7.5e6, points=1001)
    got = await _preview_bands(client, data, itu_region=str(region))
    assert got == ARTICLE_5_KHZ[region]


async def test_preview_region_2_has_the_top_of_40m_that_region_1_lacks(
    client: httpx.AsyncClient,
) -> None:
    # 7.21–7.29 MHz lies in 40 m only where it runs to 7.3 MHz (Region 2, Article 5).
    data = rlc_touchstone(f_start_hz=7.21e6, f_stop_hz=7.29e6)
    assert await _preview_bands(client, data, itu_region="2") == {"40m": (7000, 7300)}
    assert await _preview_bands(client, data, itu_region="1") == {}
    # Not given (or empty): the default_region setting, 1 unless configured.
    assert await _preview_bands(client, data) == {}
    assert await _preview_bands(client, data, itu_region="") == {}


@pytest.mark.parametrize("value", ["4", "0", "two", "2.5", "-1"])
async def test_preview_refuses_a_region_other_than_1_2_3(
    client: httpx.AsyncClient, value: str
) -> None:
    r = await client.post(
        f"{API}/analyze", files={"file": ("p.s1p", rlc_touchstone())}, data={"itu_region": value}
    )
    assert r.status_code == 422
    assert r.json() == {"detail": "itu_region: Input should be 1, 2 or 3", "line": None}
