"""The antenna page: Smith chart traces and hover values against the API's own arrays."""

from __future__ import annotations

import math
from typing import Any

from tests.browser.conftest import ARTIFACTS, Club, PageLog, shot, wait_ready

PLOT_POINTS = 501  # frontend/js/pages/antenna.js asks the server for this many points


def _impedance(r: float, x: float) -> str:
    """The page's R + jX format (frontend/js/format.js), for comparing hover text."""
    sign = "−" if x < 0 else "+"
    return f"{r:.2f} {sign} j{abs(x):.2f} Ω"


def _open(page: Any, antenna_id: int) -> None:
    page.set_viewport_size({"width": 1280, "height": 900})
    page.goto(f"/#/antenna/{antenna_id}")
    wait_ready(page, "/antenna/")
    page.wait_for_function("document.getElementById('smith-plot')?.data?.length > 0")


def test_smith_chart_traces_and_hover_impedance(page: Any, page_log: PageLog, club: Club,
                                                live_server: Any) -> None:
    ant = next(a for a in club.antennas if a["name"] == "40 m dipole")
    sweeps = club.sweeps[ant["id"]]
    _open(page, ant["id"])
    shown = page.evaluate("document.getElementById('smith-plot').data.map(t => t.name)")
    # The latest sweep (and the baseline, when one is set), then the two marker traces.
    health = live_server.api.get(f"/antennas/{ant['id']}/health").json()
    base = health.get("baseline")
    extra = 1 if base and base["sweep_id"] != sweeps[0]["id"] else 0
    assert len(shown) == 1 + extra + 2, shown
    assert shown[-2:] == ["band edges", "resonances"]
    assert page.evaluate("document.getElementById('smith-plot').data[0].type") == "scattersmith"

    # Hover a known point of the latest sweep and compare with the API's arrays.
    latest = sweeps[0]
    data = live_server.api.get(f"/sweeps/{latest['id']}/data",
                               params={"max_points": PLOT_POINTS}).json()
    k = len(data["freq_hz"]) // 3
    curve = next(i for i, n in enumerate(shown) if f"#{latest['id']}" in n)
    page.evaluate(
        "([c, k]) => Plotly.Fx.hover('smith-plot', [{curveNumber: c, pointNumber: k}], 'smith')",
        [curve, k],
    )
    hover = page.locator("#smith-plot .hoverlayer .hovertext").first
    hover.wait_for()
    text = hover.text_content() or ""
    # The page shows the feedpoint plane when the antenna has a feedline.
    plane = data["feedpoint"] if ant["feedline"] and data["feedpoint"] else data["measured"]
    r, x = plane["r_ohm"][k], plane["x_ohm"][k]
    assert _impedance(r, x) in text, text
    assert f"{data['freq_hz'][k] / 1e6:.4f} MHz" in text, text
    assert f"SWR {plane['swr'][k]:.2f}" in text, text
    shot(page, "antenna")

    # Toggling an older sweep on from the history adds one trace.
    off = page.locator(".history input[type=checkbox]:not(:checked)").first
    off.check()
    page.wait_for_function("n => document.getElementById('smith-plot').data.length === n",
                           arg=len(shown) + 1)
    assert page_log.errors == []


def test_rectangular_and_trend_plots_are_drawn(page: Any, page_log: PageLog, club: Club) -> None:
    ant = next(a for a in club.antennas if a["name"] == "20 m yagi")
    _open(page, ant["id"])
    page.wait_for_function("document.getElementById('trend-plot')?.data?.length > 0")
    swr = page.evaluate("document.getElementById('swr-plot').data[0]")
    assert swr["type"] == "scatter"
    assert min(v for v in swr["y"] if v is not None) >= 1.0
    # The band of interest is shaded (a rect shape spanning the 20 m band in MHz).
    shapes = page.evaluate("document.getElementById('swr-plot').layout.shapes")
    assert any(s["type"] == "rect" and 13.9 < s["x0"] < 14.1 for s in shapes), shapes
    trend = page.evaluate("document.getElementById('trend-plot').data[0]")
    assert len(trend["x"]) == len(club.sweeps[ant["id"]])
    # A steady antenna's trend is drawn on at least the span the verdict watches for
    # (min SWR rise 0.5, services/thresholds.py), never below SWR 1: noise looks flat.
    ys = [v for v in trend["y"] if v is not None]
    y_range = page.evaluate("document.getElementById('trend-plot').layout.yaxis.range")
    assert max(ys) - min(ys) < 0.5, ys  # the demo yagi is untouched by the storms
    assert y_range[1] - y_range[0] >= 0.5 and y_range[0] >= 1.0 - 0.05
    assert y_range[0] <= min(ys) and max(ys) <= y_range[1]
    # Every plot has its CSV button.
    assert page.locator("button[data-csv]").count() >= 5
    with page.expect_download() as dl:
        page.click('button[data-csv$="swr.csv"]')
    assert dl.value.suggested_filename.endswith("swr.csv")
    page.set_viewport_size({"width": 390, "height": 844})
    page.wait_for_timeout(300)
    assert page.evaluate("document.documentElement.scrollWidth") <= 390
    shot(page, "antenna-phone")
    assert page_log.errors == []


def test_distance_to_fault_against_baseline_with_cautions(page: Any, page_log: PageLog,
                                                          club: Club, live_server: Any) -> None:
    # The demo's 70 cm collinear: 27 MHz wide sweeps and a feedline on record, as DTF needs.
    ant = next(a for a in club.antennas if a["name"] == "70 cm repeater collinear")
    latest = club.sweeps[ant["id"]][0]
    _open(page, ant["id"])
    page.wait_for_function("document.querySelector('#dtf .plot')?.data?.length > 0")
    names = page.evaluate("document.querySelector('#dtf .plot').data.map(t => t.name)")
    assert "this sweep" in names
    health = live_server.api.get(f"/antennas/{ant['id']}/health").json()
    if health.get("baseline") and health["baseline"]["sweep_id"] != latest["id"]:
        assert "baseline" in names
    # The trace is the API's reflection in dB, point for point, asked for as far as the
    # page asks: 1.5 line lengths + 5 m (frontend/js/pages/antenna.js).
    length = live_server.api.get(f"/sweeps/{latest['id']}").json()["feedline_snapshot"]["length_m"]
    view = f"{1.5 * length + 5:.1f}"
    api = live_server.api.get(f"/sweeps/{latest['id']}/dtf", params={"max_distance_m": view}).json()
    assert api["max_distance_m"] == float(view)
    y = page.evaluate("document.querySelector('#dtf .plot').data"
                      ".find(t => t.name === 'this sweep').y")
    k = len(y) // 2
    assert abs(y[k] - 20 * math.log10(api["reflection"][k])) < 1e-9
    # The server's notes read as sentences under the plot.
    assert "Loss compensated with" in page.locator("#dtf").inner_text()
    # The cautions sit beside the result.
    assert page.locator("#dtf .caution").is_visible()
    assert "power lines" in page.locator("#dtf .caution").inner_text()
    shot(page, "antenna-dtf")
    page.locator("#dtf").screenshot(path=str(ARTIFACTS / "antenna-dtf-detail.png"))
    assert page_log.errors == []


def test_the_record_downloads_as_one_zip(page: Any, page_log: PageLog, club: Club) -> None:
    import io
    import zipfile

    ant = next(a for a in club.antennas if a["name"] == "40 m dipole")
    _open(page, ant["id"])
    with page.expect_download() as dl:
        page.click("#archive-link")
    path = dl.value.path()
    assert dl.value.suggested_filename.startswith(f"antenna-{ant['id']}-")
    with open(path, "rb") as fh:
        zf = zipfile.ZipFile(io.BytesIO(fh.read()))
    names = zf.namelist()
    assert {"README.txt", "sweeps.csv", "metrics.csv", "record.json"} <= set(names)
    assert sum(n.startswith("files/") for n in names) == len(club.sweeps[ant["id"]])
    assert page_log.errors == []
