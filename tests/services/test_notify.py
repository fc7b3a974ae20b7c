"""Notifications on a verdict change: queued with the upload, delivered after it.

Rows are queued only for the channels the app's settings configure; with none, nothing
is queued and the verdict is still stored with the sweep. A local HTTP receiver
(http.server on 127.0.0.1, in a thread) and a local SMTP server (aiosmtpd's Controller on
127.0.0.1) stand in for the club's endpoints. The signature is checked against Python's
own ``hmac`` (RFC 2104 HMAC with SHA-256).
"""

from __future__ import annotations

import hashlib
import hmac
import json
import socket
import threading
from collections.abc import AsyncIterator, Iterator
from contextlib import asynccontextmanager
from datetime import timedelta
from email import message_from_bytes, policy
from http.server import BaseHTTPRequestHandler, HTTPServer
from typing import Any

import httpx
import pytest
from fastapi import FastAPI
from sqlalchemy import Engine, select

from mastwatch.api.app import create_app
from mastwatch.db.engine import make_sessionmaker
from mastwatch.db.models import Notification
from mastwatch.db.models import Sweep as SweepRow
from mastwatch.db.types import utcnow
from mastwatch.services.notify import (
    SIGNATURE_HEADER,
    deliver_pending,
    enabled_channels,
    settings_of,
    sign,
    verify,
)
from mastwatch.settings import Settings, get_settings
from tests.api.helpers import API, make_antenna, make_site, upload
from tests.dbfixtures import rlc_touchstone

SECRET = "q0hrs-test-secret"


class Receiver:
    """Answers 500 to the first ``fail`` requests, then 204; records what it got."""

    def __init__(self, fail: int) -> None:
        self.fail = fail
        self.requests: list[tuple[bytes, dict[str, str]]] = []
        outer = self

        class Handler(BaseHTTPRequestHandler):
            def do_POST(self) -> None:
                body = self.rfile.read(int(self.headers["Content-Length"]))
                outer.requests.append((body, dict(self.headers)))
                code = 500 if len(outer.requests) <= outer.fail else 204
                self.send_response(code)
                self.send_header("Content-Length", "0")
                self.end_headers()

            def log_message(self, *args: Any) -> None:
                pass

        self.server = HTTPServer(("127.0.0.1", 0), Handler)
        self.url = f"http://127.0.0.1:{self.server.server_port}/hook"
        self.thread = threading.Thread(target=self.server.serve_forever, daemon=True)

    def __enter__(self) -> Receiver:
        self.thread.start()
        return self

    def __exit__(self, *exc: object) -> None:
        self.server.shutdown()
        self.server.server_close()

    @property
    def delivered(self) -> list[bytes]:
        return [b for i, (b, _) in enumerate(self.requests) if i >= self.fail]


@pytest.fixture
def receiver() -> Iterator[Receiver]:
    with Receiver(fail=2) as r:
        yield r


def _settings(base: Settings, **kw: Any) -> Settings:
    return Settings(database_url=base.database_url, data_dir=base.data_dir, **kw)


# A webhook nobody listens on (port 9, discard): for tests that only look at the queue.
UNHEARD = {"webhook_url": "http://127.0.0.1:9/hook", "webhook_secret": SECRET}


@asynccontextmanager
async def _app_with(
    cfg: Settings, engine: Engine
) -> AsyncIterator[tuple[FastAPI, httpx.AsyncClient]]:
    """An app on ``cfg`` (its channels decide what is queued) and a client on it."""
    app = create_app(cfg, engine=engine)
    transport = httpx.ASGITransport(app=app)
    async with httpx.AsyncClient(transport=transport, base_url="http://test") as c:
        yield app, c


async def _verdict_change(client: httpx.AsyncClient) -> int:
    """Baseline, then a sweep that turns the antenna from ok to watch. Returns its id."""
    site = await make_site(client)
    ant = await make_antenna(client, site["id"])
    r = await upload(client, ant["id"], rlc_touchstone(7.1e6), measured_at="2025-04-02T10:00")
    first = r.json()["id"]
    await client.put(f"{API}/antennas/{ant['id']}/baseline", json={"sweep_id": first})
    r = await upload(client, ant["id"], rlc_touchstone(6.92e6), measured_at="2025-11-03T09:00")
    assert r.status_code == 201, r.text
    return int(r.json()["id"])


def _rows(app: FastAPI) -> list[Notification]:
    with app.state.sessionmaker() as s:
        return list(s.scalars(select(Notification).order_by(Notification.id)))


def test_signature_is_rfc2104_hmac_sha256() -> None:
    body = b'{"a":1}'
    expected = hmac.new(SECRET.encode(), body, hashlib.sha256).hexdigest()
    assert sign(body, SECRET) == f"sha256={expected}"
    assert verify(body, SECRET, f"sha256={expected}")
    assert not verify(body + b" ", SECRET, f"sha256={expected}")


@pytest.mark.anyio
async def test_webhook_fails_twice_then_delivered_exactly_once(
    clean_db: Engine, settings: Settings, receiver: Receiver
) -> None:
    cfg = _settings(settings, webhook_url=receiver.url, webhook_secret=SECRET)
    async with _app_with(cfg, clean_db) as (app, client):
        sweep_id = await _verdict_change(client)
        rows = _rows(app)
        # Queued inside the upload, for the ok → watch change only, and only for the
        # configured channel (e-mail is off, so it gets no row).
        assert [(r.channel, r.state) for r in rows] == [("webhook", "pending")]
        assert rows[0].payload["old_status"] == "ok" and rows[0].payload["new_status"] == "watch"

        waits: list[float] = []
        with app.state.sessionmaker() as s:
            report = deliver_pending(s, cfg, backoff_s=0.5, sleep=waits.append)
        assert report.sent == [rows[0].id] and report.skipped == []
        assert waits == [0.5, 1.0]  # exponential backoff between the three attempts
        assert len(receiver.requests) == 3 and len(receiver.delivered) == 1
        body, headers = receiver.requests[-1]
        assert verify(body, SECRET, headers[SIGNATURE_HEADER])
        payload = json.loads(body)
        assert payload["sweep"]["id"] == sweep_id
        assert payload["reasons"][0].startswith("40m: resonance moved 180 kHz down")

        # A second run sends nothing again: delivered once.
        with app.state.sessionmaker() as s:
            again = deliver_pending(s, cfg, now=utcnow() + timedelta(days=1), sleep=waits.append)
        assert again.sent == [] and len(receiver.requests) == 3
        states = [(r.channel, r.state, r.attempts) for r in _rows(app)]
        assert states == [("webhook", "sent", 1)]
        # The upload is unaffected.
        r = await client.get(f"{API}/sweeps/{sweep_id}")
        assert r.status_code == 200 and r.json()["status"] == "watch"


@pytest.mark.anyio
async def test_a_dead_receiver_is_retried_later_and_never_loses_the_upload(
    clean_db: Engine, settings: Settings
) -> None:
    with Receiver(fail=10_000) as dead:
        cfg = _settings(settings, webhook_url=dead.url, webhook_secret=SECRET)
        async with _app_with(cfg, clean_db) as (app, client):
            sweep_id = await _verdict_change(client)
        t0 = utcnow()
        with app.state.sessionmaker() as s:
            report = deliver_pending(
                s, cfg, now=t0, attempts=2, retry_after_s=60, sleep=lambda _: None
            )
        (hook,) = [r for r in _rows(app) if r.channel == "webhook"]
        assert report.retry == [hook.id]
        assert hook.state == "pending" and hook.attempts == 1
        assert "HTTP 500 after 2 attempts" in (hook.last_error or "")
        assert hook.next_attempt_at >= t0 + timedelta(seconds=59)
        # Not due yet: nothing is sent; due: tried again (backoff doubles).
        with app.state.sessionmaker() as s:
            assert deliver_pending(s, cfg, now=t0, sleep=lambda _: None).retry == []
            later = deliver_pending(
                s, cfg, now=t0 + timedelta(seconds=61), attempts=1, sleep=lambda _: None
            )
        assert later.retry == [hook.id]
        (hook,) = [r for r in _rows(app) if r.channel == "webhook"]
        assert hook.attempts == 2
        assert hook.next_attempt_at >= t0 + timedelta(seconds=61 + 119)
    with app.state.sessionmaker() as s:
        assert s.get(SweepRow, sweep_id) is not None


def _free_port() -> int:
    with socket.socket() as sock:
        sock.bind(("127.0.0.1", 0))
        return int(sock.getsockname()[1])


@pytest.mark.anyio
async def test_email_through_a_local_smtp_server(clean_db: Engine, settings: Settings) -> None:
    from aiosmtpd.controller import Controller

    received: list[bytes] = []

    class Handler:
        async def handle_DATA(self, server: Any, session: Any, envelope: Any) -> str:
            received.append(envelope.content)
            return "250 OK"

    port = _free_port()
    controller = Controller(Handler(), hostname="127.0.0.1", port=port)
    controller.start()
    try:
        cfg = _settings(
            settings,
            smtp_host="127.0.0.1",
            smtp_port=port,
            smtp_from="mastwatch@q0hrs.invalid",
            smtp_to=["keeper@q0hrs.invalid"],
        )
        async with _app_with(cfg, clean_db) as (app, client):
            await _verdict_change(client)
            assert [r.channel for r in _rows(app)] == ["email"]  # the webhook is off
            with app.state.sessionmaker() as s:
                report = deliver_pending(s, cfg)
    finally:
        controller.stop()
    assert len(report.sent) == 1 and report.skipped == []
    (raw,) = received
    msg = message_from_bytes(raw, policy=policy.default)
    assert msg["To"] == "keeper@q0hrs.invalid"
    assert msg["Subject"].endswith("40m dipole: ok → watch")
    assert "resonance moved 180 kHz down" in msg.get_content()  # type: ignore[attr-defined]


@pytest.mark.anyio
async def test_no_change_no_notification(clean_db: Engine, settings: Settings) -> None:
    async with _app_with(_settings(settings, **UNHEARD), clean_db) as (app, client):
        site = await make_site(client)
        ant = await make_antenna(client, site["id"])
        r = await upload(client, ant["id"], rlc_touchstone(7.1e6), measured_at="2025-04-02T10:00")
        first = r.json()["id"]
        await client.put(f"{API}/antennas/{ant['id']}/baseline", json={"sweep_id": first})
        await upload(client, ant["id"], rlc_touchstone(7.101e6), measured_at="2025-06-02T10:00")
        # unknown → ok when the baseline was set, then ok → ok: neither is news.
        assert _rows(app) == []


@pytest.mark.anyio
async def test_no_channel_configured_queues_nothing_and_keeps_the_verdict(
    client: httpx.AsyncClient, app: FastAPI, settings: Settings
) -> None:
    assert enabled_channels(settings) == ()  # the defaults: webhook and e-mail both off
    sweep_id = await _verdict_change(client)
    assert _rows(app) == []  # nothing waits for a worker that never runs
    r = await client.get(f"{API}/sweeps/{sweep_id}")
    assert r.status_code == 200 and r.json()["status"] == "watch"
    assert r.json()["status_reasons"][0].startswith("40m: resonance moved 180 kHz down")


@pytest.mark.anyio
async def test_rows_of_a_channel_switched_off_are_skipped_when_the_app_starts(
    clean_db: Engine, settings: Settings
) -> None:
    async with _app_with(_settings(settings, **UNHEARD), clean_db) as (app, client):
        await _verdict_change(client)
    assert [(r.channel, r.state) for r in _rows(app)] == [("webhook", "pending")]
    # Restarted with the webhook removed from the settings: no worker will ever run.
    off = create_app(settings, engine=clean_db)
    async with off.router.lifespan_context(off):
        rows = [(r.channel, r.state, r.last_error) for r in _rows(off)]
    assert rows == [("webhook", "skipped", "webhook is not configured")]


def test_a_session_without_settings_uses_the_environment(
    clean_db: Engine, monkeypatch: pytest.MonkeyPatch
) -> None:
    # The CLI's sessions (recompute, demo) carry no settings: the environment decides.
    monkeypatch.setenv("MASTWATCH_WEBHOOK_URL", UNHEARD["webhook_url"])
    monkeypatch.setenv("MASTWATCH_WEBHOOK_SECRET", SECRET)
    get_settings.cache_clear()
    try:
        with make_sessionmaker(clean_db)() as s:
            assert enabled_channels(settings_of(s)) == ("webhook",)
    finally:
        get_settings.cache_clear()


@pytest.mark.anyio
async def test_the_app_delivers_in_the_background(
    settings: Settings, clean_db: Any, monkeypatch: pytest.MonkeyPatch
) -> None:
    import asyncio

    from mastwatch.api.app import create_app
    from mastwatch.api.routes import health as health_routes

    monkeypatch.setattr(health_routes, "NOTIFY_INTERVAL_S", 0.05)
    with Receiver(fail=0) as hook:
        cfg = _settings(settings, webhook_url=hook.url, webhook_secret=SECRET)
        app = create_app(cfg, engine=clean_db)
        async with app.router.lifespan_context(app):
            transport = httpx.ASGITransport(app=app)
            async with httpx.AsyncClient(transport=transport, base_url="http://test") as c:
                await _verdict_change(c)
            for _ in range(200):
                if hook.requests:
                    break
                await asyncio.sleep(0.05)
        assert len(hook.requests) == 1
        body, headers = hook.requests[0]
        assert verify(body, SECRET, headers[SIGNATURE_HEADER])
