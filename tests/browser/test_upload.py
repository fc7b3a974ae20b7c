"""Upload by drag and drop: preview from /analyze, then the new sweep in the history;
the same file again is reported as a duplicate; a bad file shows its error and line."""

from __future__ import annotations

import base64
from typing import Any

from tests.browser.conftest import Club, PageLog, shot, wait_ready
from tests.browser.sweepfiles import bad_touchstone, touchstone

DROP = """([name, b64]) => {
  const bytes = Uint8Array.from(atob(b64), (c) => c.charCodeAt(0));
  const dt = new DataTransfer();
  dt.items.add(new File([bytes], name, { type: "application/octet-stream" }));
  return dt;
}"""


def _drop(page: Any, name: str, data: bytes) -> Any:
    dt = page.evaluate_handle(DROP, [name, base64.b64encode(data).decode()])
    page.dispatch_event("#drop-zone", "drop", {"dataTransfer": dt})
    return page.locator(f'.file-card[data-file="{name}"]')


def _open_upload(page: Any, antenna_id: int) -> None:
    page.set_viewport_size({"width": 1280, "height": 900})
    page.goto(f"/#/upload?antenna={antenna_id}")
    wait_ready(page, "/upload")


def test_drop_preview_then_save_shows_in_history(page: Any, page_log: PageLog, club: Club,
                                                 live_server: Any) -> None:
    ant = next(a for a in club.antennas if a["name"] == "40 m vertical")
    _open_upload(page, ant["id"])
    data = touchstone(7.05e6, r_ohm=40.0, q=9.0, points=401, comment="dropped in the browser")
    card = _drop(page, "hilltop-after-storm.s1p", data)
    card.locator(".file-state.previewed").wait_for()
    # The preview is the server's /analyze answer for the same bytes.
    expected = live_server.api.post("/analyze", files={"file": ("x.s1p", data)},
                                    data={"reference_plane": "feedpoint"}).json()
    text = card.locator(".preview").inner_text()
    assert "401 points" in text
    assert f"Min SWR {expected['metrics']['measured']['min_swr']:.2f}" in text
    page.wait_for_function(
        "n => document.querySelector(`.file-card[data-file='${n}'] .smith-preview`)"
        "?.data?.length > 0",
        arg="hilltop-after-storm.s1p")
    shot(page, "upload-preview")
    card.locator("button", has_text="Save").click()
    card.locator('[data-result="saved"]').or_(card.locator(".file-state.saved")).first.wait_for()
    link = card.locator(".file-state a")
    href = link.get_attribute("href") or ""
    sweep_id = int(href.rsplit("=", 1)[1])
    assert live_server.api.get(f"/sweeps/{sweep_id}").json()["antenna_id"] == ant["id"]
    shot(page, "upload-saved")
    link.click()
    wait_ready(page, "/antenna/")
    assert page.locator(f'.history li[data-sweep-id="{sweep_id}"]').count() == 1
    assert page.locator(f'.history input[data-sweep-id="{sweep_id}"]').is_checked()
    assert page_log.errors == []


def test_same_file_again_is_reported_as_duplicate(page: Any, page_log: PageLog, club: Club,
                                                  live_server: Any) -> None:
    ant = next(a for a in club.antennas if a["name"] == "40 m dipole")
    existing = club.sweeps[ant["id"]][-1]
    original = live_server.api.get(f"/sweeps/{existing['id']}/file").content
    _open_upload(page, ant["id"])
    card = _drop(page, existing["filename"], original)
    card.locator(".file-state.previewed").wait_for()
    card.locator("button", has_text="Save").click()
    card.locator(".file-state.duplicate").wait_for()
    assert f"sweep #{existing['id']}" in card.locator(".file-state").inner_text()
    assert card.get_attribute("data-result") == "duplicate"
    assert page_log.errors == []


def test_bad_file_shows_error_with_line(page: Any, page_log: PageLog, club: Club,
                                        live_server: Any) -> None:
    ant = club.antennas[0]
    _open_upload(page, ant["id"])
    data, line = bad_touchstone()
    card = _drop(page, "broken.s1p", data)
    card.locator(".file-state.failed").wait_for()
    err = card.locator(".error").inner_text()
    expected = live_server.api.post("/analyze", files={"file": ("broken.s1p", data)}).json()
    assert expected["line"] == line
    assert f"(line {line})" in err
    assert expected["detail"] in err
    assert card.locator("button", has_text="Save").is_disabled()
    shot(page, "upload-bad-file")
    # The 422 of the preview is the only failed request, and it is the expected one.
    assert [f for f in page_log.failed if "/analyze" not in f] == []
    assert all("422" in f for f in page_log.failed)


def test_offline_upload_waits_on_the_device_then_sends(page: Any, context: Any, page_log: PageLog,
                                                       club: Club, live_server: Any) -> None:
    ant = next(a for a in club.antennas if a["name"] == "2 m j-pole (link)")
    _open_upload(page, ant["id"])
    data = touchstone(145.1e6, r_ohm=52.0, q=15.0, points=201, comment="sent later")
    card = _drop(page, "hilltop-offline.s1p", data)
    card.locator(".file-state.previewed").wait_for()
    context.set_offline(True)
    card.locator("button", has_text="Save").click()
    card.locator(".file-state", has_text="kept on this device").wait_for()
    pending = page.locator(".notice", has_text="waiting on this device")
    pending.wait_for()
    shot(page, "upload-offline")
    before = {s["sha256"] for s in live_server.api.get(
        f"/antennas/{ant['id']}/sweeps", params={"limit": 500}).json()["items"]}
    context.set_offline(False)
    pending.locator("button", has_text="Send pending").click()
    pending.wait_for(state="hidden")
    after = live_server.api.get(f"/antennas/{ant['id']}/sweeps", params={"limit": 500}).json()
    new = [s for s in after["items"] if s["sha256"] not in before]
    assert [s["filename"] for s in new] == ["hilltop-offline.s1p"]
    # The only errors are the refused request while offline.
    assert all("ERR_INTERNET_DISCONNECTED" in e for e in page_log.errors), page_log.errors


# Chromium does not show a FormData body with a file to Playwright, so the page itself
# records every itu_region it puts into a form.
RECORD_REGIONS = """(() => {
  window.__regions = [];
  const append = FormData.prototype.append;
  FormData.prototype.append = function (k, v, ...rest) {
    if (k === "itu_region") window.__regions.push(String(v));
    return append.call(this, k, v, ...rest);
  };
})();"""


def test_preview_uses_the_band_plan_of_the_antennas_site(page: Any, page_log: PageLog,
                                                         club: Club) -> None:
    ant = next(a for a in club.antennas if a["name"] == "40 m vertical")
    site = next(s for s in club.sites if s["id"] == ant["site_id"])
    # 7.21–7.29 MHz is inside 40 m in Region 2 (to 7.3 MHz) and outside every Region 1
    # band (40 m ends at 7.2 MHz): ITU RR Article 5, as rf/bands.py.
    data = touchstone(7.25e6, r_ohm=45.0, q=9.0, start_hz=7.21e6, stop_hz=7.29e6)
    page.add_init_script(RECORD_REGIONS)
    _open_upload(page, ant["id"])
    card = _drop(page, "top-of-40m.s1p", data)
    card.locator(".file-state.previewed").wait_for()
    assert page.evaluate("window.__regions") == [str(site["itu_region"])] == ["1"]
    assert card.locator(".preview table").count() == 0  # no Region 1 band in the sweep

    # The same antenna on a Region 2 site (the sites list rewritten in this page only).
    def as_region_2(route: Any) -> None:
        body = route.fetch().json()
        for s in body["items"] if isinstance(body, dict) else body:
            if s["id"] == site["id"]:
                s["itu_region"] = 2
        route.fulfill(json=body)

    page.route("**/api/v1/sites", as_region_2)
    page.goto("about:blank")  # a new document: the sites are fetched again
    _open_upload(page, ant["id"])
    card = _drop(page, "top-of-40m.s1p", data)
    card.locator(".file-state.previewed").wait_for()
    assert page.evaluate("window.__regions") == ["2"]
    rows = card.locator(".preview tbody tr")
    assert rows.count() == 1 and rows.first.locator("td").first.inner_text() == "40m"
    # The band centre (7.15 MHz) lies below the sweep: "not measured" (—), not ∞.
    assert rows.first.locator("td").nth(2).inner_text() == "—"
    shot(page, "upload-preview-region-2")
    assert page_log.errors == []
