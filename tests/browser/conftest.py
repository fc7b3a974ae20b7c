"""Browser-test fixtures: a live Mastwatch server on a free port and Debian's Chromium.

    live_server   uvicorn in a daemon thread serving create_app(settings) on a fresh
                  SQLite database (migrated to head) under a temporary data directory
    club          the records the tests look at: the demo club (loaded as ``mastwatch
                  demo`` does) plus a site and antenna with markup in their names, added
                  through the API, read back through the API as the pages see them
    page          pytest-playwright's page, with console errors and dialogs recorded
                  (``page_log``); every test asserts the console stayed clean

Chromium is launched from /usr/bin/chromium with the flags of docs RECIPES (never
``playwright install``); without it every browser test is skipped with the reason.
"""

from __future__ import annotations

import shutil
import socket
import threading
import time
from collections.abc import Iterator
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import httpx
import pytest

CHROMIUM = "/usr/bin/chromium"
CHROMIUM_ARGS = [
    "--no-sandbox",
    "--disable-gpu",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
    "--no-first-run",
    "--disable-quic",
]
ARTIFACTS = Path(__file__).parent / "artifacts" / "screenshots"


def pytest_collection_modifyitems(config: pytest.Config, items: list[pytest.Item]) -> None:
    here = Path(__file__).parent
    have = Path(CHROMIUM).exists() or shutil.which("chromium")
    for item in items:
        # Tests that drive a page need Chromium; the serving tests here need only the server.
        uses_page = "page" in getattr(item, "fixturenames", ())
        if here in Path(str(item.fspath)).parents and uses_page:
            item.add_marker(pytest.mark.browser)
            if not have:
                item.add_marker(pytest.mark.skip(reason=f"no Chromium at {CHROMIUM} "
                                                 "(apt-get install -y chromium)"))


@pytest.fixture(scope="session")
def browser_type_launch_args(browser_type_launch_args: dict[str, Any]) -> dict[str, Any]:
    return {**browser_type_launch_args, "executable_path": CHROMIUM, "args": CHROMIUM_ARGS}


def _free_port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return int(s.getsockname()[1])


@dataclass
class LiveServer:
    url: str
    api: httpx.Client
    app: Any = None  # the FastAPI app served (a test may swap app.state.settings)


@pytest.fixture(scope="session")
def live_server(tmp_path_factory: pytest.TempPathFactory) -> Iterator[LiveServer]:
    """The app on a fresh demo database (``mastwatch demo``'s own loader), served live."""
    import uvicorn

    from mastwatch.api.app import create_app
    from mastwatch.cli.records import create_demo_database, load_demo
    from mastwatch.settings import Settings

    data = tmp_path_factory.mktemp("browser-data")
    url = create_demo_database(data)
    settings = Settings(data_dir=data, database_url=url, demo=True)
    load_demo(url, settings)
    app = create_app(settings)
    port = _free_port()
    server = uvicorn.Server(
        uvicorn.Config(app, host="127.0.0.1", port=port, log_level="warning", lifespan="on")
    )
    thread = threading.Thread(target=server.run, daemon=True)
    thread.start()
    deadline = time.monotonic() + 30
    while not server.started:
        if time.monotonic() > deadline or not thread.is_alive():
            raise RuntimeError("the live server did not start")
        time.sleep(0.05)
    base = f"http://127.0.0.1:{port}"
    with httpx.Client(base_url=base + "/api/v1", timeout=60) as client:
        yield LiveServer(url=base, api=client, app=app)
    server.should_exit = True
    thread.join(timeout=10)


@pytest.fixture(scope="session")
def base_url(live_server: LiveServer) -> str:
    return live_server.url


@dataclass
class Club:
    """What the tests know about the records on the server."""

    sites: list[dict[str, Any]] = field(default_factory=list)
    antennas: list[dict[str, Any]] = field(default_factory=list)
    # antenna id → its sweeps, newest first
    sweeps: dict[int, list[dict[str, Any]]] = field(default_factory=dict)
    hostile_name: str = ""


HOSTILE = '<script>window.__pwned = 1; alert("x")</script><img src=x onerror="window.__pwned=2">'


def _ok(r: httpx.Response) -> dict[str, Any]:
    where = f"{r.request.method} {r.request.url}"
    assert r.status_code in (200, 201), f"{where}: {r.status_code} {r.text}"
    return dict(r.json())


def _add_hostile(api: httpx.Client) -> None:
    """A site and an antenna whose names are markup, with one sweep uploaded through the API."""
    from tests.browser.sweepfiles import touchstone

    site = _ok(api.post("/sites", json={"name": f"Field kit {HOSTILE}", "itu_region": 1,
                                          "timezone": "UTC", "notes": HOSTILE}))
    ant = _ok(api.post("/antennas", json={"site_id": site["id"], "name": f"Loop {HOSTILE}",
                                            "kind": "loop", "bands": ["40m"],
                                            "installed_on": "2025-02-01", "notes": HOSTILE}))
    data = touchstone(7.1e6, r_ohm=45.0, q=10.0, comment="hostile names test")
    _ok(api.post(f"/antennas/{ant['id']}/sweeps",
                 files={"file": ("loop.s1p", data, "application/octet-stream")},
                 data={"measured_at": "2026-03-01T10:00:00Z", "reference_plane": "feedpoint",
                       "conditions": HOSTILE, "operator": "Q0HRS"}))


@pytest.fixture(scope="session")
def club(live_server: LiveServer) -> Club:
    """The demo club plus the hostile-name entries, read back through the API."""
    api = live_server.api
    if not any(HOSTILE in s["name"] for s in _items(api.get("/sites").json())):
        _add_hostile(api)
    out = Club(hostile_name=HOSTILE)
    out.sites = list(_items(api.get("/sites").json()))
    out.antennas = list(_items(api.get("/antennas").json()))
    for a in out.antennas:
        out.sweeps[a["id"]] = list(_items(api.get(f"/antennas/{a['id']}/sweeps",
                                                  params={"limit": 500}).json()))
    return out


def _items(body: Any) -> list[dict[str, Any]]:
    return list(body["items"] if isinstance(body, dict) else body)


@dataclass
class PageLog:
    errors: list[str] = field(default_factory=list)
    dialogs: list[str] = field(default_factory=list)
    failed: list[str] = field(default_factory=list)  # "status URL" of every 4xx/5xx answer


@pytest.fixture
def page_log(page: Any) -> PageLog:
    log = PageLog()

    def on_console(msg: Any) -> None:
        if msg.type == "error":
            log.errors.append(msg.text)

    def on_dialog(dialog: Any) -> None:
        log.dialogs.append(dialog.message)
        dialog.dismiss()

    def on_response(response: Any) -> None:
        if response.status >= 400:
            log.failed.append(f"{response.status} {response.url}")
            log.errors.append(f"HTTP {response.status} {response.url}")

    page.on("console", on_console)
    page.on("response", on_response)
    page.on("pageerror", lambda exc: log.errors.append(str(exc)))
    page.on("dialog", on_dialog)
    return log


def shot(page: Any, name: str) -> Path:
    """Save a full-page screenshot under artifacts/screenshots/ and return its path."""
    ARTIFACTS.mkdir(parents=True, exist_ok=True)
    path = ARTIFACTS / f"{name}.png"
    page.screenshot(path=str(path), full_page=True)
    return path


def wait_ready(page: Any, path_prefix: str = "") -> None:
    """Wait until the router has rendered a page whose path starts with ``path_prefix``
    (``main[data-ready]`` holds the rendered path; it is cleared when a new page starts)."""
    page.wait_for_function(
        "p => { const r = document.querySelector('main')?.dataset.ready;"
        " return r !== undefined && r.startsWith(p); }",
        arg=path_prefix,
        timeout=30_000,
    )
