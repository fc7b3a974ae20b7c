"""A band or band centre the sweep does not reach reads — (not measured), never ∞.

∞ is a true reading: SWR = (1 + |Γ|)/(1 − |Γ|) has no finite value at |Γ| = 1 (a short
or open, any RF textbook); the API sends it as null. The same null for a centre outside
the sweep means "no measurement": the pages tell them apart by the band's coverage
(docs/analyze-json.md) and the board's `centre_swept` (docs/api.md). The answers are
rewritten in the page (page.route), so each case is exact and nothing is stored.
"""

from __future__ import annotations

from typing import Any

from tests.browser.conftest import Club, PageLog, shot, wait_ready
from tests.browser.sweepfiles import touchstone
from tests.browser.test_upload import _drop, _open_upload


def _rewrite(page: Any, pattern: str, change: Any) -> None:
    def handler(route: Any) -> None:
        if route.request.method not in ("GET", "POST"):
            route.continue_()
            return
        body = route.fetch().json()
        change(body)
        route.fulfill(json=body)

    page.route(pattern, handler)


def test_board_centre_not_swept_is_a_dash_and_swept_null_is_infinite(
    page: Any, page_log: PageLog, club: Club
) -> None:
    ant = next(a for a in club.antennas if a["name"] == "40 m dipole")

    def two_readings(body: dict) -> None:
        for site in body["sites"]:
            for card in site["antennas"]:
                if card["antenna"]["id"] == ant["id"]:
                    card["antenna"]["bands"] = ["40m", "30m"]
                    card["swr_center"] = [
                        {"band": "40m", "swr_center": None, "centre_swept": False},
                        {"band": "30m", "swr_center": None, "centre_swept": True},
                    ]

    _rewrite(page, "**/api/v1/board", two_readings)
    page.set_viewport_size({"width": 1280, "height": 900})
    page.goto("/#/")
    wait_ready(page)
    values = page.locator(f'a.card[data-antenna-id="{ant["id"]}"] .swr-list > span:not(.muted)')
    assert values.all_inner_texts() == ["40m —", "30m ∞"]
    page.locator(f'a.card[data-antenna-id="{ant["id"]}"]').scroll_into_view_if_needed()
    shot(page, "board-centre-not-swept")
    assert page_log.errors == []


def test_compare_centre_not_swept_is_a_dash(
    page: Any, page_log: PageLog, club: Club
) -> None:
    ant = next(a for a in club.antennas if a["name"] == "40 m vertical")
    b, a = club.sweeps[ant["id"]][0], club.sweeps[ant["id"]][-1]

    def centre_outside(body: dict) -> None:
        for plane in ("measured", "feedpoint"):
            for row in (body["metrics"].get(plane) or {}).get("bands", []):
                row.update(swr_center=None, return_loss_center_db=None, r_center_ohm=None,
                           x_center_ohm=None)

    _rewrite(page, f"**/api/v1/sweeps/{a['id']}", centre_outside)
    page.goto(f"/#/compare?antenna={ant['id']}&a={a['id']}&b={b['id']}")
    wait_ready(page, "/compare")
    cells = page.locator('#metric-differences tr[data-metric="swr_center"] td').all_inner_texts()
    assert cells[1] == "—" and cells[2] != "∞" and cells[3] == "—"
    shot(page, "compare-centre-not-swept")
    assert page_log.errors == []


def test_upload_band_not_swept_has_no_min_swr(
    page: Any, page_log: PageLog, club: Club
) -> None:
    ant = next(a for a in club.antennas if a["name"] == "40 m vertical")

    def band_outside(body: dict) -> None:
        for plane in ("measured", "feedpoint"):
            for row in (body["metrics"].get(plane) or {}).get("bands", []):
                row.update(coverage=0.0, min_swr=None, min_swr_hz=None, swr_center=None,
                           return_loss_center_db=None, bandwidth_2_hz=None)

    _rewrite(page, "**/api/v1/analyze", band_outside)
    _open_upload(page, ant["id"])
    card = _drop(page, "outside.s1p", touchstone(7.1e6, r_ohm=45.0, q=9.0))
    card.locator(".file-state.previewed").wait_for()
    cells = card.locator(".preview tbody tr").first.locator("td").all_inner_texts()
    assert cells[0] == "40m" and cells[1] == "—" and cells[2] == "—"
    shot(page, "upload-band-not-swept")
    assert page_log.errors == []
