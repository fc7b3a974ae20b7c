"""The keeper token: members read freely, changes need the token when the server has one.

HTTP semantics checked against RFC 9110 §15.5.2 (401 carries a WWW-Authenticate
challenge) and RFC 6750 §2.1 (the "Authorization: Bearer <token>" request header).
"""

from __future__ import annotations

from collections.abc import AsyncIterator

import httpx
import pytest
from fastapi import FastAPI
from pydantic import SecretStr
from sqlalchemy import Engine

from mastwatch.api.app import create_app
from mastwatch.settings import Settings
from tests.api.helpers import API
from tests.dbfixtures import rlc_touchstone, row_counts

pytestmark = pytest.mark.anyio

TOKEN = "Q0QRC-keepers-7f3a"
KEEPER = {"Authorization": f"Bearer {TOKEN}"}


@pytest.fixture
def guarded_app(settings: Settings, clean_db: Engine) -> FastAPI:
    guarded = settings.model_copy(update={"keeper_token": SecretStr(TOKEN)})
    return create_app(guarded, engine=clean_db)


@pytest.fixture
async def member(guarded_app: FastAPI) -> AsyncIterator[httpx.AsyncClient]:
    transport = httpx.ASGITransport(app=guarded_app)
    async with httpx.AsyncClient(transport=transport, base_url="http://test") as c:
        yield c


async def test_changes_without_the_token_are_refused_and_nothing_is_written(
    member: httpx.AsyncClient, clean_db: Engine
) -> None:
    before = row_counts(clean_db)
    for headers in ({}, {"Authorization": "Bearer wrong"}, {"Authorization": "Basic eDp5"}):
        r = await member.post(f"{API}/sites", json={"name": "Hill", "itu_region": 1},
                              headers=headers)
        assert r.status_code == 401, r.text
        assert r.headers["www-authenticate"] == "Bearer"  # RFC 9110 §15.5.2
        assert "keeper token" in r.json()["detail"]
    assert row_counts(clean_db) == before


async def test_with_the_token_a_keeper_changes_and_a_member_reads(
    member: httpx.AsyncClient,
) -> None:
    r = await member.post(f"{API}/sites", json={"name": "Hill", "itu_region": 1}, headers=KEEPER)
    assert r.status_code == 201, r.text
    site_id = r.json()["id"]
    r = await member.post(
        f"{API}/antennas",
        json={"site_id": site_id, "name": "2 m j-pole", "kind": "j-pole", "bands": ["2m"]},
        headers=KEEPER,
    )
    assert r.status_code == 201, r.text
    antenna_id = r.json()["id"]
    data = rlc_touchstone(145e6, 50.0, 20.0, f_start_hz=140e6, f_stop_hz=150e6, points=101)
    files = {"file": ("j.s1p", data, "application/octet-stream")}
    r = await member.post(f"{API}/antennas/{antenna_id}/sweeps", files=files)
    assert r.status_code == 401
    r = await member.post(f"{API}/antennas/{antenna_id}/sweeps", files=files, headers=KEEPER)
    assert r.status_code == 201, r.text
    sweep_id = r.json()["id"]
    # reads need nothing
    for path in (f"/sites/{site_id}", f"/antennas/{antenna_id}/sweeps", f"/sweeps/{sweep_id}"):
        assert (await member.get(API + path)).status_code == 200, path
    # a delete is a change too
    assert (await member.delete(f"{API}/sweeps/{sweep_id}")).status_code == 401
    assert (await member.delete(f"{API}/sweeps/{sweep_id}", headers=KEEPER)).status_code == 204


async def test_a_preview_stores_nothing_so_it_needs_no_token(member: httpx.AsyncClient) -> None:
    data = rlc_touchstone(7.1e6, 50.0, 10.0, f_start_hz=6.9e6, f_stop_hz=7.3e6, points=101)
    r = await member.post(f"{API}/analyze", files={"file": ("mine.s1p", data)})
    assert r.status_code == 200, r.text


async def test_healthz_says_whether_changes_need_the_token(
    member: httpx.AsyncClient, client: httpx.AsyncClient
) -> None:
    assert (await member.get("/healthz")).json()["changes_need_token"] is True
    assert (await client.get("/healthz")).json()["changes_need_token"] is False


async def test_without_a_token_setting_the_api_stays_open(client: httpx.AsyncClient) -> None:
    r = await client.post(f"{API}/sites", json={"name": "Hill", "itu_region": 1})
    assert r.status_code == 201, r.text


def test_an_empty_token_setting_means_no_token(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setenv("MASTWATCH_KEEPER_TOKEN", "  ")
    assert Settings().keeper_token is None
    monkeypatch.setenv("MASTWATCH_KEEPER_TOKEN", TOKEN)
    token = Settings().keeper_token
    assert token is not None and token.get_secret_value() == TOKEN
    assert TOKEN not in repr(Settings())  # a secret stays out of logs and tracebacks


def test_a_token_a_header_cannot_carry_is_refused_at_start(
    monkeypatch: pytest.MonkeyPatch,
) -> None:
    # RFC 6750 §2.1: b64token = 1*( ALPHA / DIGIT / "-" / "." / "_" / "~" / "+" / "/" ) *"="
    for bad in ("clé", "ab’c", "two words", "a=b", "tab\there"):
        monkeypatch.setenv("MASTWATCH_KEEPER_TOKEN", bad)
        with pytest.raises(ValueError, match=r"only the letters A-Z a-z, the digits 0-9"):
            Settings()
    for good in ("Q0QRC-keepers-7f3a", "a.b_c~d+e/f", "bWFzdA==", "-"):
        monkeypatch.setenv("MASTWATCH_KEEPER_TOKEN", good)
        token = Settings().keeper_token
        assert token is not None and token.get_secret_value() == good


def test_spaces_around_the_token_setting_are_dropped(monkeypatch: pytest.MonkeyPatch) -> None:
    # "abc " in an .env file: a header value cannot end in a space (RFC 9110 §5.5 strips
    # it), so the keepers could never send it; the server keeps "abc".
    monkeypatch.setenv("MASTWATCH_KEEPER_TOKEN", f" {TOKEN} \n")
    token = Settings().keeper_token
    assert token is not None and token.get_secret_value() == TOKEN


async def test_a_sent_token_with_other_characters_is_only_wrong(
    member: httpx.AsyncClient,
) -> None:
    # A header carries Latin-1 bytes (RFC 9110 §5.5 obs-text); such a token is a wrong
    # token (401), not a server error.
    headers = [(b"authorization", "Bearer cl\u00e9".encode("latin-1"))]
    r = await member.post(f"{API}/sites", json={"name": "Hill", "itu_region": 1},
                          headers=headers)
    assert r.status_code == 401, r.text
    assert r.json()["detail"] == "the keeper token is not the server's"
