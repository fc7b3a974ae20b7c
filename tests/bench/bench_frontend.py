"""Antenna page's Smith chart with 20 overlaid 1,601-point sweeps, in headless Chromium.

Ours: a fresh browser context opens ``#/antenna/<id>?show=all`` on a live server; the
time is from navigation start until the page marks its Smith chart drawn (the
``data-drawn-ms`` mark, ``performance.now()`` right after ``Plotly.react`` resolves).
That includes the page shell, its modules, plotly.js, the API calls (antenna, sweeps,
health, 20 × /sweeps/{id}/data decimated) and building the traces.

Floor: a static HTML page on the same server origin (fulfilled by Playwright) loading the
same /vendor/plotly.min.js and drawing exactly the traces our page drew (copied from our
plot's ``data`` and ``layout``, embedded in the page), timed the same way.

Each run uses a fresh context (cold cache) for both, alternating; medians of RUNS runs.
Target: ratio ≤ 1.5×. Bytes are the encoded (on the wire) response body sizes Playwright
reports, split into plotly.js, API JSON and the rest; the undecimated size of the same 20
sweeps' arrays is printed beside the API figure.
"""

from __future__ import annotations

import json
import socket
import statistics
import tempfile
import threading
import time
from pathlib import Path
from typing import Any

import httpx

SWEEPS = 20
POINTS = 1601
RUNS = 5
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

FLOOR_HTML = """<!doctype html><html><head><meta charset="utf-8">
<script src="/vendor/plotly.min.js"></script></head><body>
<div id="p" style="width:__W__px;height:__H__px"></div>
<script>
const data = __DATA__;
const layout = __LAYOUT__;
Plotly.newPlot("p", data, layout, {responsive: true, displaylogo: false}).then(() => {
  document.getElementById("p").dataset.drawnMs = String(performance.now());
});
</script></body></html>"""


def _free_port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return int(s.getsockname()[1])


def _serve(data_dir: Path) -> tuple[Any, threading.Thread, str]:
    import uvicorn

    from mastwatch.api.app import create_app
    from mastwatch.db.migrate import upgrade
    from mastwatch.settings import Settings

    settings = Settings(data_dir=data_dir, demo=True)
    upgrade(settings.database_url)
    app = create_app(settings)
    port = _free_port()
    server = uvicorn.Server(
        uvicorn.Config(app, host="127.0.0.1", port=port, log_level="warning", lifespan="on")
    )
    thread = threading.Thread(target=server.run, daemon=True)
    thread.start()
    while not server.started:
        if not thread.is_alive():
            raise RuntimeError("the bench server did not start")
        time.sleep(0.05)
    return server, thread, f"http://127.0.0.1:{port}"


def _seed(api: httpx.Client) -> int:
    """One antenna with SWEEPS sweeps of POINTS points, each a little detuned."""
    from tests.browser.sweepfiles import touchstone

    site = api.post("/sites", json={"name": "Bench site", "itu_region": 1}).json()
    ant = api.post("/antennas", json={"site_id": site["id"], "name": "Bench dipole",
                                        "kind": "dipole", "bands": ["40m"]}).json()
    for i in range(SWEEPS):
        data = touchstone(7.1e6 * (1 - 0.001 * i), r_ohm=50 + i, q=12.0, start_hz=6.5e6,
                          stop_hz=7.7e6, points=POINTS, comment=f"bench {i}")
        r = api.post(f"/antennas/{ant['id']}/sweeps",
                     files={"file": (f"bench-{i}.s1p", data)},
                     data={"measured_at": f"2025-{1 + i % 12:02d}-{1 + i:02d}T10:00:00Z"})
        r.raise_for_status()
    return int(ant["id"])


class _Bytes:
    """Encoded response body bytes seen by a page, by kind."""

    def __init__(self) -> None:
        self.plotly = 0
        self.api = 0
        self.other = 0

    def on_finished(self, request: Any) -> None:
        size = request.sizes()["responseBodySize"]
        if request.url.endswith("/vendor/plotly.min.js"):
            self.plotly += size
        elif "/api/v1/" in request.url:
            self.api += size
        else:
            self.other += size


def _ours(browser: Any, base: str, antenna_id: int) -> tuple[float, Any, _Bytes]:
    ctx = browser.new_context(viewport={"width": 1280, "height": 900})
    page = ctx.new_page()
    counted = _Bytes()
    page.on("requestfinished", counted.on_finished)
    page.goto(f"{base}/#/antenna/{antenna_id}?show=all")
    page.wait_for_function(
        "n => { const p = document.getElementById('smith-plot');"
        " return p && p.dataset.drawnMs && p.data && p.data.length === n; }",
        arg=SWEEPS + 2, timeout=120_000,
    )
    ms = float(page.get_attribute("#smith-plot", "data-drawn-ms") or "nan")
    drawn = page.evaluate(
        "() => { const p = document.getElementById('smith-plot');"
        " return {data: p.data, layout: p.layout, w: p.clientWidth, h: p.clientHeight}; }"
    )
    ctx.close()
    return ms, drawn, counted


def _floor(browser: Any, base: str, drawn: Any) -> float:
    html = (FLOOR_HTML.replace("__DATA__", json.dumps(drawn["data"]))
            .replace("__LAYOUT__", json.dumps(drawn["layout"]))
            .replace("__W__", str(drawn["w"])).replace("__H__", str(drawn["h"])))
    ctx = browser.new_context(viewport={"width": 1280, "height": 900})
    page = ctx.new_page()
    page.route(f"{base}/floor.html",
               lambda route: route.fulfill(status=200, content_type="text/html", body=html))
    page.goto(f"{base}/floor.html")
    page.wait_for_function("() => document.getElementById('p').dataset.drawnMs",
                           timeout=120_000)
    ms = float(page.get_attribute("#p", "data-drawn-ms") or "nan")
    ctx.close()
    return ms


def main() -> None:
    if not Path(CHROMIUM).exists():
        print(f"skipped: no Chromium at {CHROMIUM} (apt-get install -y chromium)")
        return
    from playwright.sync_api import sync_playwright

    with tempfile.TemporaryDirectory() as tmp:
        server, thread, base = _serve(Path(tmp))
        try:
            with httpx.Client(base_url=base + "/api/v1", timeout=120) as api:
                antenna_id = _seed(api)
                ids = [s["id"] for s in api.get(f"/antennas/{antenna_id}/sweeps").json()["items"]]
                full = sum(len(api.get(f"/sweeps/{i}/data",
                                       params={"max_points": POINTS}).content) for i in ids)
            with sync_playwright() as pw:
                browser = pw.chromium.launch(executable_path=CHROMIUM, args=CHROMIUM_ARGS)
                ours_ms: list[float] = []
                floor_ms: list[float] = []
                counted = _Bytes()
                for _ in range(RUNS):
                    ms, drawn, counted = _ours(browser, base, antenna_id)
                    ours_ms.append(ms)
                    floor_ms.append(_floor(browser, base, drawn))
                browser.close()
        finally:
            server.should_exit = True
            thread.join(timeout=10)

    points = sum(len(t.get("real", [])) for t in drawn["data"][:SWEEPS])
    ours, floor = statistics.median(ours_ms), statistics.median(floor_ms)
    print(f"Smith chart, {SWEEPS} sweeps × {POINTS} points stored, "
          f"{points} points drawn ({points // SWEEPS} per sweep), median of {RUNS} cold runs")
    print(f"  ours  (page shell + modules + API + plotly.js + draw): {ours:8.0f} ms")
    print(f"  floor (static HTML, same traces, same plotly.js):      {floor:8.0f} ms")
    print(f"  ratio ours / floor: {ours / floor:.2f}x (target <= 1.5x)")
    print(f"  bytes on the wire: plotly.js {counted.plotly:,}, API JSON {counted.api:,} "
          f"(undecimated arrays would be {full:,}), other {counted.other:,}; "
          f"total {counted.plotly + counted.api + counted.other:,}")


if __name__ == "__main__":
    main()
