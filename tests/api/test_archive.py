"""GET /antennas/{id}/archive: the record as a zip, originals byte for byte.

The zip is read back with the standard library's zipfile (PKWARE APPNOTE format) and
the tables with csv; each file's SHA-256 (FIPS 180-4) is compared with the stored one.
"""

from __future__ import annotations

import csv
import hashlib
import io
import json
import zipfile

import httpx
import pytest
from sqlalchemy import Engine, func, select
from sqlalchemy.orm import Session

from mastwatch.db.models import BAND_METRIC_FIELDS, SweepMetrics
from tests.api.helpers import API, site_and_antenna, upload
from tests.dbfixtures import rlc_touchstone

pytestmark = pytest.mark.anyio


async def test_the_archive_holds_every_file_and_the_tables(
    client: httpx.AsyncClient, clean_db: Engine
) -> None:
    _, antenna = await site_and_antenna(client)
    files = {
        "first sweep.s1p": rlc_touchstone(7.10e6, comments=("Q0QRC keeper, dry",)),
        "../odd/name.s1p": rlc_touchstone(7.05e6),
    }
    when = {"first sweep.s1p": "2025-03-01T10:00:00", "../odd/name.s1p": "2025-09-01T10:00:00"}
    for name, data in files.items():
        r = await upload(client, antenna["id"], data, filename=name, measured_at=when[name],
                         operator="Q0HRS", conditions="dry, calm")
        assert r.status_code == 201, r.text
    await client.post(f"{API}/antennas/{antenna['id']}/events",
                      json={"kind": "storm", "occurred_at": "2025-06-01T00:00:00",
                            "title": "Hail"})

    r = await client.get(f"{API}/antennas/{antenna['id']}/archive")
    assert r.status_code == 200, r.text
    assert r.headers["content-type"] == "application/zip"
    disposition = r.headers["content-disposition"]
    assert disposition.startswith(f'attachment; filename="antenna-{antenna["id"]}-')
    zf = zipfile.ZipFile(io.BytesIO(r.content))
    assert zf.testzip() is None

    sweeps = list(csv.DictReader(io.StringIO(zf.read("sweeps.csv").decode())))
    # oldest first; the upload keeps a file's name without its folders
    assert [s["original_filename"] for s in sweeps] == ["first sweep.s1p", "name.s1p"]
    for s, original in zip(sweeps, files.values(), strict=True):
        data = zf.read(s["file"])
        assert data == original
        assert hashlib.sha256(data).hexdigest() == s["sha256"]
        assert s["file"].startswith("files/") and ".." not in s["file"]
        assert s["operator"] == "Q0HRS" and s["conditions"] == "dry, calm"
    assert sweeps[0]["measured_at_utc"].startswith("2025-03-01")

    metrics = list(csv.DictReader(io.StringIO(zf.read("metrics.csv").decode())))
    with Session(clean_db) as session:
        stored = session.scalar(
            select(func.count()).select_from(SweepMetrics)
            .where(SweepMetrics.antenna_id == antenna["id"])
        )
    assert len(metrics) == stored and stored > 0
    assert set(BAND_METRIC_FIELDS) <= set(metrics[0])
    forty = next(m for m in metrics if m["band"] == "40m" and m["plane"] == "measured")
    assert 1.0 <= float(forty["min_swr"]) < 2.0

    record = json.loads(zf.read("record.json"))
    assert record["antenna"]["name"] == antenna["name"]
    assert [e["title"] for e in record["events"]] == ["Hail"]
    assert "2 sweeps" in zf.read("README.txt").decode()


async def test_an_unknown_antenna_is_404(client: httpx.AsyncClient) -> None:
    r = await client.get(f"{API}/antennas/987654/archive")
    assert r.status_code == 404
