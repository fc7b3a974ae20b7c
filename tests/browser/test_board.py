"""The page shell and the status board in headless Chromium against the live server."""

from __future__ import annotations

from typing import Any

from tests.browser.conftest import Club, PageLog, shot, wait_ready


def test_board_shows_every_antenna_with_its_verdict(page: Any, page_log: PageLog,
                                                    club: Club) -> None:
    page.set_viewport_size({"width": 1280, "height": 900})
    page.goto("/#/")
    wait_ready(page, "/")
    cards = page.locator("a.card")
    assert cards.count() == len(club.antennas)
    for a in club.antennas:
        card = page.locator(f'a.card[data-antenna-id="{a["id"]}"]')
        assert card.count() == 1
        # The card's name is the antenna's name, as text (hostile names included).
        assert card.locator(".name").inner_text() == a["name"]
        latest = club.sweeps[a["id"]][0]
        expected = latest.get("status") or "unknown"
        assert card.get_attribute("data-verdict") == expected
        assert card.locator(".verdict").inner_text().strip().lower() == expected
    shot(page, "board")
    assert page_log.errors == []
    assert page_log.dialogs == []


def test_board_filters_by_site_and_verdict(page: Any, page_log: PageLog, club: Club) -> None:
    page.goto("/#/")
    wait_ready(page)
    site = club.sites[0]
    page.select_option("select[name=site]", str(site["id"]))
    on_site = [a for a in club.antennas if a["site_id"] == site["id"]]
    assert page.locator("a.card").count() == len(on_site)
    page.select_option("select[name=site]", "")
    page.select_option("select[name=verdict]", "fault")
    faults = [a for a in club.antennas if (club.sweeps[a["id"]][0].get("status") == "fault")]
    assert page.locator("a.card").count() == len(faults)
    assert page_log.errors == []


def test_stale_sweeps_stand_out(page: Any, page_log: PageLog, club: Club) -> None:
    page.goto("/#/")
    wait_ready(page)
    # With a stale age of one day every seeded sweep (all in the past) is stale ...
    page.fill("input[name=stale]", "1")
    page.dispatch_event("input[name=stale]", "change")
    assert page.locator("a.card.stale").count() == len(club.antennas)
    # ... and with a hundred years none is.
    page.fill("input[name=stale]", "36500")
    page.dispatch_event("input[name=stale]", "change")
    assert page.locator("a.card.stale").count() == 0
    assert page_log.errors == []


def test_board_on_a_phone(page: Any, page_log: PageLog, club: Club) -> None:
    page.set_viewport_size({"width": 390, "height": 844})
    page.goto("/#/")
    wait_ready(page)
    # No sideways scrolling at phone width.
    assert page.evaluate("document.documentElement.scrollWidth") <= 390
    page.click(".menu-toggle")
    assert page.locator("#nav").is_visible()
    shot(page, "board-phone")
    assert page_log.errors == []
