"""The laptop's outbox: queue offline, push later, never lose or double a sweep.

The server side is the real app in process (SQLite and PostgreSQL, tests/dbfixtures.py);
the "network" is httpx's ASGI transport, and a transport that raises stands in for a
hilltop with no signal.
"""

from __future__ import annotations

import os
from datetime import UTC, datetime
from pathlib import Path

import httpx
import pytest
from sqlalchemy import Engine
from typer.testing import CliRunner

from mastwatch.cli import app as cli_app
from mastwatch.outbox import Outbox, OutboxError
from mastwatch.rf.errors import SweepFormatError
from mastwatch.settings import Settings
from tests.api.helpers import API, site_and_antenna
from tests.dbfixtures import rlc_touchstone

pytestmark = pytest.mark.anyio


def _file(tmp_path: Path, name: str, data: bytes) -> Path:
    path = tmp_path / name
    path.write_bytes(data)
    return path


class _NoSignal(httpx.AsyncBaseTransport):
    async def handle_async_request(self, request: httpx.Request) -> httpx.Response:
        raise httpx.ConnectError("no route to host", request=request)


async def test_push_sends_each_file_once_and_empties_the_outbox(
    client: httpx.AsyncClient, tmp_path: Path
) -> None:
    _, antenna = await site_and_antenna(client)
    box = Outbox(tmp_path / "outbox")
    first = _file(tmp_path, "a.s1p", rlc_touchstone(7.1e6))
    second = _file(tmp_path, "b.s1p", rlc_touchstone(7.05e6))
    when = datetime(2026, 3, 1, 10, 0, tzinfo=UTC)
    box.add(first, antenna_id=antenna["id"], measured_at=when, operator="Q0HRS")
    box.add(second, antenna_id=antenna["id"], measured_at=when, conditions="dry, calm")
    assert len(box.entries()) == 2

    results = await box.push(client)

    assert [r.outcome for r in results] == ["created", "created"]
    assert box.entries() == []
    listing = (await client.get(f"{API}/antennas/{antenna['id']}/sweeps")).json()
    assert listing["total"] == 2
    stored = {s["operator"] for s in listing["items"]}
    assert "Q0HRS" in stored


async def test_a_lost_reply_then_a_second_push_stores_the_sweep_once(
    client: httpx.AsyncClient, tmp_path: Path
) -> None:
    """The server got the file but the laptop never heard back: the retry is a duplicate."""
    _, antenna = await site_and_antenna(client)
    data = rlc_touchstone(7.1e6)
    await client.post(
        f"{API}/antennas/{antenna['id']}/sweeps",
        files={"file": ("a.s1p", data)},
        data={"measured_at": "2026-03-01T10:00:00+00:00", "reference_plane": "line_input"},
    )
    box = Outbox(tmp_path / "outbox")
    box.add(
        _file(tmp_path, "a.s1p", data),
        antenna_id=antenna["id"],
        measured_at=datetime(2026, 3, 1, 10, tzinfo=UTC),
    )

    results = await box.push(client)

    assert [r.outcome for r in results] == ["duplicate"]
    assert box.entries() == []
    listing = (await client.get(f"{API}/antennas/{antenna['id']}/sweeps")).json()
    assert listing["total"] == 1


async def test_no_network_keeps_everything_queued(tmp_path: Path) -> None:
    box = Outbox(tmp_path / "outbox")
    box.add(
        _file(tmp_path, "a.s1p", rlc_touchstone(7.1e6)),
        antenna_id=1,
        measured_at=datetime(2026, 3, 1, tzinfo=UTC),
    )
    box.add(
        _file(tmp_path, "b.s1p", rlc_touchstone(7.0e6)),
        antenna_id=1,
        measured_at=datetime(2026, 3, 1, tzinfo=UTC),
    )
    async with httpx.AsyncClient(transport=_NoSignal(), base_url="http://club") as offline:
        results = await box.push(offline)
    assert [r.outcome for r in results] == ["unreachable"]  # stops at the first failure
    entries = box.entries()
    assert len(entries) == 2
    assert entries[0].attempts == 1 and entries[0].rejected is None


async def test_a_rejected_entry_stays_with_the_servers_reason(
    client: httpx.AsyncClient, tmp_path: Path
) -> None:
    box = Outbox(tmp_path / "outbox")
    box.add(
        _file(tmp_path, "a.s1p", rlc_touchstone(7.1e6)),
        antenna_id=987654,
        measured_at=datetime(2026, 3, 1, tzinfo=UTC),
    )

    results = await box.push(client)

    assert results[0].outcome == "rejected"
    [entry] = box.entries()
    assert entry.rejected is not None and entry.rejected.startswith("404")
    assert await box.push(client) == []  # not resent until the keeper says so
    assert box.retry() == 1
    assert box.entries()[0].rejected is None


def test_a_bad_file_is_refused_at_the_site_and_nothing_is_queued(tmp_path: Path) -> None:
    bad = _file(tmp_path, "bad.s1p", b"# MHz S RI R 50\n7.0 0.1 0.2\n7.0 0.1 0.2\n")
    box = Outbox(tmp_path / "outbox")
    with pytest.raises(SweepFormatError) as info:
        box.add(bad, antenna_id=1)
    assert info.value.line == 3
    assert box.entries() == []


def test_queue_rules(tmp_path: Path) -> None:
    box = Outbox(tmp_path / "outbox")
    path = _file(tmp_path, "a.s1p", rlc_touchstone(7.1e6))
    with pytest.raises(OutboxError, match="reference plane"):
        box.add(path, antenna_id=1, reference_plane="somewhere")
    with pytest.raises(OutboxError, match="time zone"):
        box.add(path, antenna_id=1, measured_at=datetime(2026, 3, 1))
    # No date in the file: the file's modification time stands in.
    stamp = datetime(2026, 2, 3, 4, 5, 6, tzinfo=UTC).timestamp()
    os.utime(path, (stamp, stamp))
    entry = box.add(path, antenna_id=1)
    assert entry.measured_at == "2026-02-03T04:05:06+00:00"
    assert box.add(path, antenna_id=1) == entry  # queued once
    with pytest.raises(OutboxError, match="already queued for antenna 1"):
        box.add(path, antenna_id=2)


def test_cli_add_and_list(tmp_path: Path) -> None:
    runner = CliRunner()
    good = _file(tmp_path, "a.s1p", rlc_touchstone(7.1e6))
    bad = _file(tmp_path, "bad.s1p", b"# MHz S RI R 50\n7.0 0.1\n")
    box = tmp_path / "outbox"
    result = runner.invoke(
        cli_app,
        [
            "outbox",
            "add",
            str(good),
            str(bad),
            "--antenna",
            "4",
            "--dir",
            str(box),
            "--measured-at",
            "2026-03-01T10:00:00+00:00",
        ],
    )
    assert result.exit_code == 1
    assert "queued a.s1p for antenna 4" in result.stdout
    assert "bad.s1p: line 2:" in result.stderr
    listing = runner.invoke(cli_app, ["outbox", "list", "--dir", str(box)])
    assert listing.exit_code == 0 and "a.s1p" in listing.stdout and "waiting" in listing.stdout


async def test_without_the_keeper_token_nothing_is_lost_and_a_push_with_it_sends_all(
    settings: Settings, clean_db: Engine, tmp_path: Path
) -> None:
    # The token is a server setting (api/auth.py); a refusal is not the file's fault.
    from pydantic import SecretStr

    from mastwatch.api.app import create_app

    app = create_app(
        settings.model_copy(update={"keeper_token": SecretStr("t0ken")}), engine=clean_db
    )
    keeper = {"Authorization": "Bearer t0ken"}
    transport = httpx.ASGITransport(app=app)
    async with httpx.AsyncClient(transport=transport, base_url="http://test") as anon, \
            httpx.AsyncClient(transport=transport, base_url="http://test", headers=keeper) as ok:
        _, antenna = await site_and_antenna(ok)
        box = Outbox(tmp_path / "outbox")
        when = datetime(2026, 3, 1, 10, 0, tzinfo=UTC)
        for name, f0 in (("a.s1p", 7.1e6), ("b.s1p", 7.05e6)):
            box.add(_file(tmp_path, name, rlc_touchstone(f0)), antenna_id=antenna["id"],
                    measured_at=when)

        results = await box.push(anon)
        assert [r.outcome for r in results] == ["refused"]  # stops at the first refusal
        assert "keeper token" in results[0].detail
        assert [e.rejected for e in box.entries()] == [None, None]  # both still waiting

        results = await box.push(ok)
        assert [r.outcome for r in results] == ["created", "created"]
        assert box.entries() == []


def test_push_refuses_a_token_no_header_can_carry(tmp_path: Path) -> None:
    # RFC 6750 §2.1 b64token; a typographic quote (U+2019) is the usual paste accident.
    r = CliRunner().invoke(
        cli_app,
        ["outbox", "push", "--server", "http://127.0.0.1:9", "--token", "ab\u2019c",
         "--dir", str(tmp_path / "outbox")],
    )
    assert r.exit_code == 2, r.output
    assert "keeper token" in r.output
