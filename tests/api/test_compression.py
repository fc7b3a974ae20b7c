"""Responses are gzipped for clients that accept it (GZipMiddleware in create_app).

The wire bytes are read raw (``aiter_raw``, not decoded by httpx) and checked against
RFC 1952: a gzip member starts with the magic bytes 1F 8B (§2.3.1). They are decoded
with Python's own ``gzip`` module, independently of the client.
"""

from __future__ import annotations

import gzip
import hashlib
import json

import httpx
import pytest

from mastwatch.api.app import GZIP_MIN_BYTES
from tests.api.helpers import API, site_and_antenna, upload
from tests.dbfixtures import rlc_touchstone

pytestmark = pytest.mark.anyio

GZIP_MAGIC = b"\x1f\x8b"  # RFC 1952 §2.3.1, ID1 ID2


async def _raw(
    client: httpx.AsyncClient, url: str, encoding: str, **params: int
) -> tuple[httpx.Headers, bytes]:
    """The headers and the body exactly as sent (not decoded by the client)."""
    async with client.stream(
        "GET", url, params=params, headers={"Accept-Encoding": encoding}
    ) as r:
        assert r.status_code == 200, url
        return r.headers, b"".join([chunk async for chunk in r.aiter_raw()])


async def _sweep(client: httpx.AsyncClient, data: bytes, filename: str = "a.s1p") -> int:
    _, antenna = await site_and_antenna(client)
    r = await upload(client, antenna["id"], data, filename)
    assert r.status_code == 201, r.text
    return int(r.json()["id"])


async def test_plot_arrays_travel_gzipped_when_accepted(client: httpx.AsyncClient) -> None:
    sweep_id = await _sweep(client, rlc_touchstone(points=1601))
    url = f"{API}/sweeps/{sweep_id}/data"
    plain_headers, plain = await _raw(client, url, "identity")
    headers, packed = await _raw(client, url, "gzip")
    assert "content-encoding" not in plain_headers
    assert headers["content-encoding"] == "gzip" and "accept-encoding" in headers["vary"].lower()
    assert packed[:2] == GZIP_MAGIC
    assert int(headers["content-length"]) == len(packed)
    assert gzip.decompress(packed) == plain
    assert len(packed) < len(plain) / 2  # JSON of float arrays: well over 2:1
    # httpx decodes it transparently: the same JSON as an uncompressed answer.
    assert (await client.get(url)).json() == json.loads(plain)


async def test_original_file_download_is_the_exact_uploaded_bytes(
    client: httpx.AsyncClient,
) -> None:
    # CRLF line ends, a byte-order mark and a non-ASCII comment: bytes that any
    # re-encoding on the way out would change.
    text = rlc_touchstone(comments=("Messung nach Sturm, Mast überprüft",)).decode()
    data = b"\xef\xbb\xbf" + text.replace("\n", "\r\n").encode()
    assert len(data) > GZIP_MIN_BYTES  # large enough to be compressed on the wire
    sweep_id = await _sweep(client, data, "storm.s1p")
    url = f"{API}/sweeps/{sweep_id}/file"

    r = await client.get(url, headers={"Accept-Encoding": "gzip"})
    assert r.headers["content-encoding"] == "gzip"
    assert r.content == data
    assert hashlib.sha256(r.content).hexdigest() == (
        await client.get(f"{API}/sweeps/{sweep_id}")
    ).json()["sha256"]
    headers, packed = await _raw(client, url, "gzip")
    assert gzip.decompress(packed) == data
    # A client that does not accept gzip gets the bytes as they are.
    headers, plain = await _raw(client, url, "identity")
    assert "content-encoding" not in headers and plain == data
    assert headers["content-disposition"].startswith('attachment; filename="storm.s1p"')


async def test_small_answers_are_not_compressed(client: httpx.AsyncClient) -> None:
    headers, body = await _raw(client, f"{API}/sites", "gzip")
    assert len(body) < GZIP_MIN_BYTES
    assert "content-encoding" not in headers and body[:2] != GZIP_MAGIC
