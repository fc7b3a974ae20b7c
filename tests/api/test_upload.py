"""Upload of sweep files: stored whole and exactly, metrics as mastwatch.rf computes them,
idempotent per file content (also under concurrency), and nothing written for a bad file."""

from __future__ import annotations

import asyncio

import httpx
import numpy as np
import pytest
from sqlalchemy import Engine

from mastwatch.api.app import create_app
from mastwatch.rf import bands as rf_bands
from mastwatch.rf import lines
from mastwatch.rf.metrics import compute_metrics
from mastwatch.rf.parse import read_sweep
from tests.api.helpers import API, site_and_antenna, upload
from tests.dbfixtures import rlc_sweep, rlc_touchstone, row_counts

pytestmark = pytest.mark.anyio


def expected_bands(sweep, region: int = 1) -> dict[str, dict]:
    bands = rf_bands.bands_in(sweep.f_start_hz, sweep.f_stop_hz, region)
    return {b.band: b.to_dict() for b in compute_metrics(sweep, bands).bands}


async def test_upload_read_back_is_exact(client: httpx.AsyncClient) -> None:
    _, antenna = await site_and_antenna(client)
    data = rlc_touchstone(comments=("Q0HRS test sweep",))
    r = await upload(
        client,
        antenna["id"],
        data,
        "dipole 40m.s1p",
        measured_at="2025-04-02T12:00:00+02:00",
        operator="Q0HRS",
        conditions="dry, 12 °C",
        notes="after install",
    )
    assert r.status_code == 201, r.text
    sweep = r.json()
    assert sweep["duplicate"] is False
    assert sweep["measured_at"] == "2025-04-02T10:00:00Z"
    assert sweep["measured_at_source"] == "form"
    assert (sweep["operator"], sweep["conditions"]) == ("Q0HRS", "dry, 12 °C")
    assert sweep["points"] == 201 and sweep["file_format"] == "touchstone-1"

    # The original bytes come back identical, under the original name.
    f = await client.get(f"{API}/sweeps/{sweep['id']}/file")
    assert f.status_code == 200 and f.content == data
    assert 'filename="dipole 40m.s1p"' in f.headers["content-disposition"]

    # Metrics equal what mastwatch.rf computes from the same file.
    parsed = read_sweep(data, "a.s1p")
    want = expected_bands(parsed)
    got = {b["band"]: b for b in sweep["metrics"]["measured"]["bands"]}
    assert set(got) == set(want) == {"40m"}
    for name, values in want.items():
        assert got[name] == values
    # Measured at the feedpoint: the feedpoint view is the same numbers.
    assert sweep["metrics"]["feedpoint"]["bands"] == sweep["metrics"]["measured"]["bands"]
    # Series RLC resonates at f0 = 7.1 MHz with R = 60 Ω: min SWR 60/50 = 1.2 (textbook
    # series resonance, e.g. Pozar 4th ed. §6.1; SWR = R/Z0 for a real load above Z0).
    assert got["40m"]["resonance_hz"] == pytest.approx(7.1e6, rel=1e-6)
    assert got["40m"]["min_swr"] == pytest.approx(1.2, rel=1e-6)

    # GET /sweeps/{id} gives the same record.
    detail = (await client.get(f"{API}/sweeps/{sweep['id']}")).json()
    assert detail["metrics"] == sweep["metrics"]

    # Export → parse gives the same Γ, bit for bit (A's writer uses repr floats).
    t = await client.get(f"{API}/sweeps/{sweep['id']}/touchstone", params={"plane": "measured"})
    assert t.status_code == 200
    back = read_sweep(t.content, "export.s1p")
    np.testing.assert_array_equal(back.freq_hz, parsed.freq_hz)
    np.testing.assert_array_equal(back.gamma, parsed.gamma)


async def test_line_input_sweep_is_deembedded(client: httpx.AsyncClient) -> None:
    _, antenna = await site_and_antenna(client)
    r = await client.put(
        f"{API}/antennas/{antenna['id']}/feedline",
        json={"cable": "RG-213", "length_m": 25.0, "connectors": 2},
    )
    assert r.status_code == 200, r.text
    feedline = lines.Feedline(lines.CABLES["RG-213"], 25.0, 2)
    at_antenna = rlc_sweep()
    at_radio = lines.embed(at_antenna, feedline)
    from mastwatch.rf.touchstone import write_touchstone

    data = write_touchstone(at_radio).encode()
    r = await upload(client, antenna["id"], data, reference_plane="line_input")
    assert r.status_code == 201, r.text
    sweep = r.json()
    assert sweep["feedline_snapshot"]["cable"] == "RG-213"
    assert sweep["feedline_snapshot"]["length_m"] == 25.0
    parsed = read_sweep(data, "x.s1p")
    want_feed = expected_bands(lines.deembed(parsed, feedline))
    got_feed = {b["band"]: b for b in sweep["metrics"]["feedpoint"]["bands"]}
    assert got_feed == want_feed
    # De-embedding the embedded line gives the antenna back: resonance at 7.1 MHz again.
    assert got_feed["40m"]["resonance_hz"] == pytest.approx(7.1e6, rel=1e-6)
    got_meas = {b["band"]: b for b in sweep["metrics"]["measured"]["bands"]}
    assert got_meas == expected_bands(parsed)
    # The feedpoint export reads back as the de-embedded Γ.
    t = await client.get(f"{API}/sweeps/{sweep['id']}/touchstone", params={"plane": "feedpoint"})
    np.testing.assert_allclose(read_sweep(t.content, "f.s1p").gamma, at_antenna.gamma, atol=1e-12)


async def test_line_input_without_feedline_has_no_feedpoint_view(client: httpx.AsyncClient) -> None:
    _, antenna = await site_and_antenna(client)
    r = await upload(client, antenna["id"], rlc_touchstone(), reference_plane="line_input")
    sweep = r.json()
    assert sweep["has_feedpoint"] is False and sweep["metrics"]["feedpoint"] is None
    assert "no feedline" in sweep["metrics"]["feedpoint_note"]
    t = await client.get(f"{API}/sweeps/{sweep['id']}/touchstone", params={"plane": "feedpoint"})
    assert t.status_code == 422 and "no feedline" in t.json()["detail"]


async def test_same_bytes_again_return_the_existing_sweep(
    client: httpx.AsyncClient, clean_db: Engine
) -> None:
    _, antenna = await site_and_antenna(client)
    data = rlc_touchstone()
    first = await upload(client, antenna["id"], data)
    counts = row_counts(clean_db)
    again = await upload(client, antenna["id"], data, "renamed.s1p", notes="retry")
    assert (first.status_code, again.status_code) == (201, 200)
    assert again.json()["id"] == first.json()["id"] and again.json()["duplicate"] is True
    assert row_counts(clean_db) == counts
    # Another antenna may hold the same file: the key is (antenna, sha256).
    other = await client.post(
        f"{API}/antennas", json={"site_id": antenna["site_id"], "name": "b", "kind": "vertical"}
    )
    third = await upload(client, other.json()["id"], data)
    assert third.status_code == 201


async def test_concurrent_uploads_of_one_file_store_one_sweep(
    client: httpx.AsyncClient, clean_db: Engine
) -> None:
    _, antenna = await site_and_antenna(client)
    data = rlc_touchstone(points=1601)
    results = await asyncio.gather(*(upload(client, antenna["id"], data) for _ in range(6)))
    codes = sorted(r.status_code for r in results)
    assert codes.count(201) == 1 and codes.count(200) == 5, [r.text for r in results]
    assert len({r.json()["id"] for r in results}) == 1
    assert row_counts(clean_db)["sweep"] == 1


BAD_FILES = [
    # (what, filename, bytes, line the error names)
    ("too few columns", "a.s1p", b"# Hz S RI R 50\n7e6 0.1 0.2\n7.1e6 0.1\n", 3),
    ("too many columns", "a.s1p", b"# Hz S RI R 50\n7e6 0.1 0.2 0.3\n", 2),
    ("not a number", "a.s1p", b"# Hz S RI R 50\n7e6 0.1 0.2\n7.1e6 O.1 0.2\n", 3),
    ("decreasing frequency", "a.s1p", b"# Hz S RI R 50\n7.1e6 0.1 0.2\n7e6 0.1 0.2\n", 3),
    ("duplicate frequency", "a.s1p", b"# Hz S RI R 50\n7e6 0.1 0.2\n7e6 0.1 0.2\n", 3),
    ("NaN", "a.s1p", b"# Hz S RI R 50\n7e6 0.1 0.2\n7.1e6 nan 0.2\n", 3),
    ("not passive", "a.s1p", b"# Hz S RI R 50\n7e6 0.1 0.2\n7.1e6 1.4 0.0\n", 3),
    ("bad option line", "a.s1p", b"# Hz Q RI R 50\n7e6 0.1 0.2\n", 1),
    ("negative reference", "a.s1p", b"# Hz S RI R -50\n7e6 0.1 0.2\n", 1),
    ("binary", "a.s1p", bytes(range(256)), 1),
    ("no data", "a.s1p", b"# Hz S RI R 50\n! nothing here\n", None),
    ("three-port", "a.s3p", b"# Hz S RI R 50\n7e6 0.1 0.2\n", None),
    ("csv non-number", "a.csv", b"freq_hz,re,im\n7e6,0.1,0.2\nx,0.1,0.2\n", 3),
    ("csv no rows", "a.csv", b"freq_hz,re,im\n", None),
]


@pytest.mark.parametrize(
    ("what", "filename", "data", "line"), BAD_FILES, ids=[b[0] for b in BAD_FILES]
)
async def test_bad_file_writes_nothing(
    client: httpx.AsyncClient,
    clean_db: Engine,
    what: str,
    filename: str,
    data: bytes,
    line: int | None,
) -> None:
    _, antenna = await site_and_antenna(client)
    before = row_counts(clean_db)
    r = await upload(client, antenna["id"], data, filename)
    assert r.status_code == 422, (what, r.text)
    body = r.json()
    assert set(body) == {"detail", "line"} and body["detail"]
    assert body["line"] == line, (what, body)
    assert row_counts(clean_db) == before
    # The preview endpoint refuses it the same way.
    p = await client.post(f"{API}/analyze", files={"file": (filename, data)})
    assert p.status_code == 422 and p.json() == body


async def test_empty_file_is_refused(client: httpx.AsyncClient) -> None:
    _, antenna = await site_and_antenna(client)
    r = await upload(client, antenna["id"], b"")
    assert r.status_code == 422 and r.json()["detail"] == "the uploaded file is empty"


async def test_body_over_the_limit_is_cut_off_before_reading(settings, clean_db: Engine) -> None:
    small = create_app(settings.model_copy(update={"max_upload_bytes": 2048}), engine=clean_db)
    async with httpx.AsyncClient(
        transport=httpx.ASGITransport(app=small), base_url="http://t"
    ) as c:
        _, antenna = await site_and_antenna(c)
        before = row_counts(clean_db)
        big = b"!" + b"x" * (200 * 1024) + b"\n"
        r = await upload(c, antenna["id"], big)
        assert r.status_code == 413
        assert r.json() == {
            "detail": "the upload is larger than the limit of 2048 bytes (0.0 MB)",
            "line": None,
        }
        # Just over the file limit but within the form allowance: the file check says 413.
        r = await upload(c, antenna["id"], b"!" * 3000)
        assert r.status_code == 413 and "2048 bytes" in r.json()["detail"]
        assert row_counts(clean_db) == before


async def test_measured_at_defaults(client: httpx.AsyncClient) -> None:
    _, antenna = await site_and_antenna(client)
    # A naive time is the site's local time (Europe/Berlin, CEST in April: UTC+2).
    r = await upload(client, antenna["id"], rlc_touchstone(q=11), measured_at="2025-04-02T12:00:00")
    assert r.json()["measured_at"] == "2025-04-02T10:00:00Z"
    # Without a time, and none in the file, the upload time is used and said so.
    r = await upload(client, antenna["id"], rlc_touchstone(q=13))
    assert r.json()["measured_at_source"] == "upload"


async def test_upload_to_unknown_antenna_is_404(client: httpx.AsyncClient) -> None:
    r = await upload(client, 424242, rlc_touchstone())
    assert r.status_code == 404 and r.json()["detail"] == "antenna 424242 does not exist"
