"""Names holding markup render as text: no script runs, no dialog opens, on any page."""

from __future__ import annotations

from typing import Any

from tests.browser.conftest import Club, PageLog, shot, wait_ready


def _hostile(club: Club) -> tuple[dict[str, Any], dict[str, Any]]:
    ant = next(a for a in club.antennas if club.hostile_name in a["name"])
    site = next(s for s in club.sites if s["id"] == ant["site_id"])
    return site, ant


def _no_script_ran(page: Any, log: PageLog) -> None:
    assert page.evaluate("window.__pwned") is None
    assert log.dialogs == []
    # The markup never became elements: no <script>/<img> inside the page's content.
    assert page.locator("main script, main img[src=x]").count() == 0


def test_hostile_names_render_as_text(page: Any, page_log: PageLog, club: Club) -> None:
    site, ant = _hostile(club)
    page.goto("/#/")
    wait_ready(page, "/")
    card = page.locator(f'a.card[data-antenna-id="{ant["id"]}"]')
    assert card.locator(".name").inner_text() == ant["name"]
    section = page.locator(f'section.site[data-site-id="{site["id"]}"] h2')
    assert section.inner_text() == site["name"]
    _no_script_ran(page, page_log)

    for route, prefix in [
        (f"/#/antenna/{ant['id']}", "/antenna/"),
        (f"/#/compare?antenna={ant['id']}", "/compare"),
        (f"/#/check/{site['id']}", "/check"),
        (f"/#/upload?antenna={ant['id']}", "/upload"),
        ("/#/manage/sites", "/manage"),
        ("/#/manage/antennas", "/manage"),
        ("/#/manage/events", "/manage"),
    ]:
        page.goto(route)
        wait_ready(page, prefix)
        page.wait_for_load_state("networkidle")
        assert club.hostile_name in page.locator("main").inner_text(), route
        _no_script_ran(page, page_log)
    page.goto(f"/#/antenna/{ant['id']}")
    wait_ready(page, "/antenna/")
    assert page.locator("main h1").inner_text() == ant["name"]
    shot(page, "hostile-names")
    assert page_log.errors == []
