"""Every page loads in Chromium with no console error, at desktop and phone width, and
has its screenshot saved (tests/browser/artifacts/screenshots/) for a person to look at."""

from __future__ import annotations

from typing import Any

import pytest

from tests.browser.conftest import Club, PageLog, shot, wait_ready


def _routes(club: Club) -> dict[str, str]:
    dipole = next(a for a in club.antennas if a["name"] == "40 m dipole")
    site = next(s for s in club.sites if s["id"] == dipole["site_id"])
    return {
        "board": "/#/",
        "antenna": f"/#/antenna/{dipole['id']}",
        "upload": f"/#/upload?antenna={dipole['id']}",
        "compare": f"/#/compare?antenna={dipole['id']}",
        "check": f"/#/check/{site['id']}",
        "manage-sites": "/#/manage/sites",
        "manage-antennas": "/#/manage/antennas",
        "manage-feedlines": f"/#/manage/feedlines?edit={dipole['id']}",
        "manage-cable-types": "/#/manage/cable-types",
        "manage-events": "/#/manage/events",
    }


NAMES = ["board", "antenna", "upload", "compare", "check", "manage-sites", "manage-antennas",
         "manage-feedlines", "manage-cable-types", "manage-events"]


@pytest.mark.parametrize("name", NAMES)
@pytest.mark.parametrize("width", [1280, 390])
def test_page_loads_clean(page: Any, page_log: PageLog, club: Club, name: str,
                          width: int) -> None:
    page.set_viewport_size({"width": width, "height": 900 if width > 500 else 844})
    page.goto(_routes(club)[name])
    wait_ready(page)
    page.wait_for_load_state("networkidle")
    assert page.locator("main h1").count() >= 1
    assert "could not be shown" not in page.locator("main h1").first.inner_text()
    if width < 500:
        # Nothing wider than a phone's screen (no sideways scrolling).
        assert page.evaluate("document.documentElement.scrollWidth") <= width
    shot(page, f"{name}-{width}")
    assert page_log.errors == []
    assert page_log.dialogs == []


def test_unknown_route_says_so(page: Any, page_log: PageLog, live_server: Any) -> None:
    page.goto("/#/no-such-page")
    page.wait_for_selector("main h1")
    assert page.locator("main h1").inner_text() == "Page not found"
    assert page_log.errors == []


def test_printing_the_site_check_keeps_the_record_and_drops_the_controls(
    page: Any, page_log: PageLog, club: Club
) -> None:
    site = club.sites[0]
    page.goto(f"/#/check/{site['id']}")
    wait_ready(page, "/check")
    page.emulate_media(media="print")
    assert not page.locator("header.topbar").is_visible()
    assert page.locator("button:visible").count() == 0
    assert page.locator(".caution").first.is_visible()  # the cautions go on paper too
    assert page.locator("h1").first.is_visible()
    page.emulate_media(media="screen")
    assert page.locator("header.topbar").is_visible()
    assert page_log.errors == []
