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
