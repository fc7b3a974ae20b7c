"""The keeper token in the browser: asked for at the first refused change, kept, forgotten.

The server side is api/auth.py (tested over HTTP in tests/api/test_auth.py); here the
live server gets a token for the length of one test.
"""

from __future__ import annotations

from collections.abc import Iterator
from typing import Any

import pytest
from pydantic import SecretStr

from tests.browser.conftest import Club, PageLog, shot, wait_ready
from tests.browser.sweepfiles import touchstone
from tests.browser.test_upload import _drop, _open_upload

TOKEN = "Q0QRC-keepers-7f3a"


@pytest.fixture
def guarded(live_server: Any) -> Iterator[Any]:
    state = live_server.app.state
    plain = state.settings
    state.settings = plain.model_copy(update={"keeper_token": SecretStr(TOKEN)})
    yield live_server
    state.settings = plain


def _add_site(page: Any, name: str) -> None:
    page.fill("form.manage-form input[name=name]", name)
    page.click("form.manage-form button[type=submit]")


def test_a_change_asks_for_the_token_once_and_keeps_it(
    page: Any, page_log: PageLog, club: Club, guarded: Any
) -> None:
    page.set_viewport_size({"width": 1280, "height": 900})
    page.goto("/#/manage/sites")
    wait_ready(page, "/manage")
    assert "Changes need the keeper token" in page.locator("#who-may-change").inner_text()

    # A wrong token: refused, nothing stored, the error is shown and the token not kept.
    _add_site(page, "Q0HRS ridge")
    page.locator("dialog.token-dialog").wait_for()
    shot(page, "keeper-token-dialog")
    page.fill("#keeper-token", "not-it")
    page.click("dialog.token-dialog button[type=submit]")
    page.locator("form.manage-form .error").wait_for()
    assert "keeper token" in page.locator("form.manage-form .error").inner_text()
    assert page.evaluate("localStorage.getItem('mastwatch.keeperToken')") is None
    names = {s["name"] for s in guarded.api.get("/sites").json()}
    assert "Q0HRS ridge" not in names

    # The right one: stored, and the next change goes through without asking.
    _add_site(page, "Q0HRS ridge")
    page.locator("dialog.token-dialog").wait_for()
    page.fill("#keeper-token", TOKEN)
    page.click("dialog.token-dialog button[type=submit]")
    page.locator("td", has_text="Q0HRS ridge").wait_for()
    assert page.evaluate("localStorage.getItem('mastwatch.keeperToken')") == TOKEN
    wait_ready(page, "/manage")
    _add_site(page, "Q0HRS saddle")
    page.locator("td", has_text="Q0HRS saddle").wait_for()
    assert page.locator("dialog.token-dialog").count() == 0

    # Forget it on the Manage page.
    page.click("#who-may-change button")
    assert page.evaluate("localStorage.getItem('mastwatch.keeperToken')") is None
    # The refused requests are the only failures: without a token, then with the wrong
    # one, then without again (the wrong one was dropped) before the right one.
    assert [f.split()[0] for f in page_log.failed] == ["401", "401", "401"]
    assert [e for e in page_log.errors if "401" not in e] == []


def test_an_open_server_says_so(page: Any, page_log: PageLog, club: Club) -> None:
    page.goto("/#/manage/sites")
    wait_ready(page, "/manage")
    assert "anyone who reaches this server" in page.locator("#who-may-change").inner_text()


def test_a_token_no_header_can_carry_is_explained_not_sent(
    page: Any, page_log: PageLog, club: Club, guarded: Any
) -> None:
    # "’" (U+2019) is outside Latin-1, so the Fetch standard's header-value check throws;
    # RFC 6750 §2.1 b64token excludes it (and the space) anyway.
    page.set_viewport_size({"width": 1280, "height": 900})
    page.goto("/#/manage/sites")
    wait_ready(page, "/manage")
    _add_site(page, "Q0HRS col")
    page.locator("dialog.token-dialog").wait_for()
    page.fill("#keeper-token", "ab’c d")
    page.click("dialog.token-dialog button[type=submit]")
    problem = page.locator("#keeper-token-problem")
    problem.wait_for()
    assert "It contains ’ (U+2019) and a space" in problem.inner_text()
    assert "letters A–Z, a–z, digits" in problem.inner_text()
    assert page.locator("dialog.token-dialog[open]").count() == 1  # asked again
    shot(page, "keeper-token-bad-characters")
    assert page.evaluate("localStorage.getItem('mastwatch.keeperToken')") is None
    page.fill("#keeper-token", TOKEN)
    page.click("dialog.token-dialog button[type=submit]")
    page.locator("td", has_text="Q0HRS col").wait_for()
    assert [f.split()[0] for f in page_log.failed] == ["401"]
    assert [e for e in page_log.errors if "401" not in e] == []


def test_a_cancelled_dialog_says_so_plainly(
    page: Any, page_log: PageLog, club: Club, guarded: Any
) -> None:
    page.goto("/#/manage/sites")
    wait_ready(page, "/manage")
    _add_site(page, "Q0HRS gully")
    page.locator("dialog.token-dialog").wait_for()
    page.locator("dialog.token-dialog button", has_text="Cancel").click()
    error = page.locator("form.manage-form .error")
    error.wait_for()
    assert error.inner_text() == "This change needs the keeper token."
    assert "MASTWATCH_KEEPER_TOKEN" not in page.locator("main").inner_text()


def _keep_offline(page: Any, context: Any, name: str, data: bytes) -> Any:
    """Save one dropped file while offline, so it waits on the device; the pending box."""
    card = _drop(page, name, data)
    card.locator(".file-state.previewed").wait_for()
    context.set_offline(True)
    card.locator("button", has_text="Save").click()
    card.locator(".file-state", has_text="kept on this device").wait_for()
    context.set_offline(False)
    pending = page.locator(".notice", has_text="waiting on this device")
    pending.wait_for()
    return pending


def _pending_count(page: Any) -> int:
    return int(page.evaluate("""() => new Promise((ok, fail) => {
      const req = indexedDB.open("mastwatch", 1);
      req.onsuccess = () => { const t = req.result.transaction("pending-uploads");
        const c = t.objectStore("pending-uploads").count();
        c.onsuccess = () => { req.result.close(); ok(c.result); }; };
      req.onerror = () => fail(req.error);
    })"""))


def test_pending_files_wait_through_a_proxy_restart_and_a_missing_token(
    page: Any, context: Any, page_log: PageLog, club: Club, guarded: Any
) -> None:
    ant = next(a for a in club.antennas if a["name"] == "2 m j-pole (link)")
    page.set_viewport_size({"width": 1280, "height": 900})
    _open_upload(page, ant["id"])
    data = touchstone(145.3e6, r_ohm=49.0, q=14.0, points=201, comment="kept through 502")
    pending = _keep_offline(page, context, "ridge-502.s1p", data)

    # 502 Bad Gateway (RFC 9110 §15.6.3): the proxy's answer while the app restarts; the
    # file is not at fault and keeps waiting.
    page.route("**/api/v1/antennas/*/sweeps",
               lambda route: route.fulfill(status=502, body="Bad Gateway"))
    pending.locator("button", has_text="Send pending").click()
    pending.locator(".error", has_text="HTTP 502").wait_for()
    assert _pending_count(page) == 1
    page.unroute("**/api/v1/antennas/*/sweeps")
    shot(page, "upload-pending-kept-502")

    # A token kept by an earlier version with a character no header carries, and the
    # dialog cancelled: kept again, with the member's line.
    page.evaluate("localStorage.setItem('mastwatch.keeperToken', 'ab’c')")
    pending.locator("button", has_text="Send pending").click()
    page.locator("dialog.token-dialog").wait_for()
    page.locator("dialog.token-dialog button", has_text="Cancel").click()
    pending.locator(".error", has_text="This change needs the keeper token.").wait_for()
    assert _pending_count(page) == 1

    # With the token it goes.
    pending.locator("button", has_text="Send pending").click()
    page.locator("dialog.token-dialog").wait_for()
    page.fill("#keeper-token", TOKEN)
    page.click("dialog.token-dialog button[type=submit]")
    pending.wait_for(state="hidden")
    assert _pending_count(page) == 0
    names = [s["filename"] for s in guarded.api.get(
        f"/antennas/{ant['id']}/sweeps", params={"limit": 500}).json()["items"]]
    assert "ridge-502.s1p" in names
    expected = ("502", "401", "ERR_INTERNET_DISCONNECTED")  # the refusals above, no others
    assert all(any(k in e for k in expected) for e in page_log.errors), page_log.errors


def test_save_all_stops_at_a_cancelled_token(
    page: Any, page_log: PageLog, club: Club, guarded: Any
) -> None:
    ant = next(a for a in club.antennas if a["name"] == "40 m vertical")
    _open_upload(page, ant["id"])
    cards = [_drop(page, f"batch-{i}.s1p", touchstone(7.0e6 + i * 4e4, r_ohm=45.0, q=9.0))
             for i in range(2)]
    for card in cards:
        card.locator(".file-state.previewed").wait_for()
    page.locator("button", has_text="Save all previewed").click()
    page.locator("dialog.token-dialog").wait_for()
    page.locator("dialog.token-dialog button", has_text="Cancel").click()
    cards[0].locator(".file-state.failed").wait_for()
    assert "This change needs the keeper token." in cards[0].locator(".error").inner_text()
    page.wait_for_timeout(700)  # the next file would have been sent and refused by now
    assert page.locator("dialog.token-dialog").count() == 0
    assert "previewed" in (cards[1].locator(".file-state").get_attribute("class") or "")
    uploads = [f for f in page_log.failed if "/sweeps" in f]
    assert [f.split()[0] for f in uploads] == ["401"]
