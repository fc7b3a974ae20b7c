"""The antenna page's tools and the other pages' numbers, checked against the API."""

from __future__ import annotations

from typing import Any

from tests.browser.conftest import Club, PageLog, shot, wait_ready


def _antenna(club: Club, name: str) -> dict[str, Any]:
    return next(a for a in club.antennas if a["name"] == name)


def _open_antenna(page: Any, antenna_id: int, query: str = "") -> None:
    page.set_viewport_size({"width": 1280, "height": 900})
    page.goto(f"/#/antenna/{antenna_id}{query}")
    wait_ready(page, "/antenna/")
    page.wait_for_function("document.getElementById('smith-plot')?.data?.length > 0")


def test_matching_helper_shows_the_api_networks(page: Any, page_log: PageLog, club: Club,
                                                live_server: Any) -> None:
    ant = _antenna(club, "40 m dipole")
    latest = club.sweeps[ant["id"]][0]
    _open_antenna(page, ant["id"])
    page.fill("input[name=match-mhz]", "7.1500")
    page.click("form:has(input[name=match-mhz]) button[type=submit]")
    page.locator(".match-out li.network").first.wait_for()
    api = live_server.api.get(f"/sweeps/{latest['id']}/match",
                              params={"at_hz": 7.15e6, "plane": "feedpoint"}).json()
    text = page.locator(".match-out").inner_text()
    assert page.locator(".match-out li.network").count() == len(api["networks"])
    for net in api["networks"]:
        for element in net["elements"]:
            assert element["display"] in text
    shot(page, "antenna-match")
    assert page_log.errors == []


def test_trend_point_click_overlays_that_sweep(page: Any, page_log: PageLog,
                                               club: Club) -> None:
    ant = _antenna(club, "40 m vertical")
    _open_antenna(page, ant["id"])
    page.wait_for_function("document.getElementById('trend-plot')?.data?.length > 0")
    before = page.evaluate("document.getElementById('smith-plot').data.length")
    shown = page.evaluate("[...document.querySelectorAll('.history input:checked')]"
                          ".map(i => Number(i.dataset.sweepId))")
    target = next(s["id"] for s in club.sweeps[ant["id"]] if s["id"] not in shown)
    # What plotly emits on a click on a trend point (customdata = [sweep id, verdict]).
    page.evaluate("id => document.getElementById('trend-plot').emit('plotly_click',"
                  " {points: [{customdata: [id, 'ok']}]})", target)
    page.wait_for_function("n => document.getElementById('smith-plot').data.length === n",
                           arg=before + 1)
    assert page.locator(f'.history input[data-sweep-id="{target}"]').is_checked()
    # Storm events are drawn as thick vertical lines on the trend plot.
    shapes = page.evaluate("document.getElementById('trend-plot').layout.shapes")
    assert any(s["type"] == "line" and s["line"]["width"] == 3 for s in shapes)
    assert page_log.errors == []


def test_plane_choice_switches_the_arrays(page: Any, page_log: PageLog, club: Club,
                                          live_server: Any) -> None:
    ant = _antenna(club, "40 m dipole")  # swept at the line input through 30 m of RG-213
    latest = club.sweeps[ant["id"]][0]
    _open_antenna(page, ant["id"])
    data = live_server.api.get(f"/sweeps/{latest['id']}/data",
                               params={"max_points": 501}).json()
    name = f"#{latest['id']}"

    def plotted_r() -> list[float]:
        return page.evaluate(
            "n => { const t = document.getElementById('smith-plot').data"
            ".find(t => t.name.includes(n)); return t.real; }", name)

    z0 = data["z0"]
    assert abs(plotted_r()[10] * z0 - data["feedpoint"]["r_ohm"][10]) < 1e-9
    assert abs(data["feedpoint"]["r_ohm"][10] - data["measured"]["r_ohm"][10]) > 1e-3
    page.select_option("select[name=plane]", "measured")
    page.wait_for_function(
        "([n, r]) => Math.abs(document.getElementById('smith-plot').data"
        ".find(t => t.name.includes(n)).real[10] - r) < 1e-12",
        arg=[name, data["measured"]["r_ohm"][10] / z0])
    assert page_log.errors == []


def test_compare_shows_the_metric_differences(page: Any, page_log: PageLog, club: Club,
                                              live_server: Any) -> None:
    ant = _antenna(club, "40 m vertical")
    b, a = club.sweeps[ant["id"]][0], club.sweeps[ant["id"]][-1]
    page.goto(f"/#/compare?antenna={ant['id']}&a={a['id']}&b={b['id']}")
    wait_ready(page, "/compare")
    ma = live_server.api.get(f"/sweeps/{a['id']}").json()["metrics"]["feedpoint"]["bands"][0]
    mb = live_server.api.get(f"/sweeps/{b['id']}").json()["metrics"]["feedpoint"]["bands"][0]
    row = page.locator('#metric-differences tr[data-metric="swr_center"]')
    cells = row.locator("td").all_inner_texts()
    assert cells[1] == f"{ma['swr_center']:.2f}"
    assert cells[2] == f"{mb['swr_center']:.2f}"
    d = mb["swr_center"] - ma["swr_center"]
    assert cells[3] == f"{'+' if d > 0 else '−'}{abs(d):.2f}"
    at = page.locator('#metric-differences tr[data-metric="min_swr_hz"] td').all_inner_texts()
    shift_khz = (mb["min_swr_hz"] - ma["min_swr_hz"]) / 1e3
    assert at[3].endswith(f"{abs(shift_khz):.1f} kHz")
    shot(page, "compare-storm")
    assert page_log.errors == []


def test_site_check_after_the_storm(page: Any, page_log: PageLog, club: Club,
                                    live_server: Any) -> None:
    site = next(s for s in club.sites if s["name"] == "Windy Knoll repeater site")
    storm = next(e for e in live_server.api.get(f"/sites/{site['id']}/events").json()
                 if e["kind"] == "storm")
    page.goto(f"/#/check/{site['id']}")  # defaults to the site's latest storm
    wait_ready(page, "/check")
    api = live_server.api.get(f"/sites/{site['id']}/check",
                              params={"since": storm["occurred_at"]}).json()
    flagged = page.locator('#swept-since tr[data-flagged="true"]')
    assert sorted(int(x) for x in flagged.evaluate_all("rs => rs.map(r => r.dataset.antennaId)")) \
        == sorted(api["flagged"])
    todo = page.locator("#still-to-sweep li[data-antenna-id]")
    assert todo.count() == len(api["not_swept"])
    assert page.locator(".caution li").count() == len(api["cautions"])
    shot(page, "check-storm")
    assert page_log.errors == []


def test_manage_forms_create_records(page: Any, page_log: PageLog, club: Club,
                                     live_server: Any) -> None:
    page.set_viewport_size({"width": 1280, "height": 900})
    page.goto("/#/manage/sites")
    wait_ready(page, "/manage")
    page.fill("form.manage-form input[name=name]", "Q0HRS portable hill")
    page.fill("form.manage-form input[name=locator]", "io91wm")
    page.click("form.manage-form button[type=submit]")
    page.locator("td", has_text="Q0HRS portable hill").wait_for()
    site = next(s for s in live_server.api.get("/sites").json()
                if s["name"] == "Q0HRS portable hill")
    assert site["locator"] == "IO91wm"  # the API's normal form of a Maidenhead locator

    # A bad locator is refused with the API's own reason shown beside the form.
    page.fill("form.manage-form input[name=name]", "Another site")
    page.fill("form.manage-form input[name=locator]", "ZZ99")
    page.click("form.manage-form button[type=submit]")
    page.locator("form.manage-form .error").wait_for()
    assert "Maidenhead" in page.locator("form.manage-form .error").inner_text()

    page.goto("/#/manage/events")
    wait_ready(page, "/manage")
    page.select_option("select[name=owner]", f"site:{site['id']}")
    page.select_option("select[name=kind]", "storm")
    page.fill("input[name=title]", "Hail shower")
    page.click("form.manage-form button[type=submit]")
    page.locator("td", has_text="Hail shower").wait_for()
    events = live_server.api.get(f"/sites/{site['id']}/events").json()
    assert [e["kind"] for e in events if e["title"] == "Hail shower"] == ["storm"]
    # The only failed request is the refused locator (422), as intended.
    assert [f.split()[0] for f in page_log.failed] == ["422"]
