"""How the app serves the frontend: local plotly.js (gzip, long cache), files confined to
frontend/, and /ui/config. These need the live server only, not Chromium."""

from __future__ import annotations

from typing import Any


def test_plotly_is_served_locally_gzipped(live_server: Any) -> None:
    # RECIPES: plotly.js from the installed package, long cache header, gzip.
    r = live_server.api.get(live_server.url + "/vendor/plotly.min.js",
                            headers={"Accept-Encoding": "gzip"})
    assert r.status_code == 200
    assert r.headers["content-encoding"] == "gzip"
    assert "max-age=31536000" in r.headers["cache-control"]
    assert len(r.content) > 4_000_000  # decoded by httpx: the whole bundle
    assert int(r.headers["content-length"]) < len(r.content) / 2


def test_frontend_files_stay_inside_their_directory(live_server: Any) -> None:
    r = live_server.api.get(live_server.url + "/assets/../pyproject.toml")
    assert r.status_code == 404
    r = live_server.api.get(live_server.url + "/assets/%2e%2e/pyproject.toml")
    assert r.status_code == 404
    js = live_server.api.get(live_server.url + "/assets/js/main.js")
    assert js.status_code == 200
    assert js.headers["content-type"].startswith("text/javascript")


def test_ui_config_reports_settings_and_optional_routes(live_server: Any) -> None:
    body = live_server.api.get(live_server.url + "/ui/config").json()
    assert body["stale_after_days"] == 180  # the Settings default (docs/settings.md)
    assert set(body["features"]) == {"board", "health", "baseline", "check", "dtf", "match"}
    spec = live_server.api.get(live_server.url + "/api/openapi.json").json()["paths"]
    assert body["features"]["board"] == ("/api/v1/board" in spec)
    assert body["features"]["dtf"] == ("/api/v1/sweeps/{sweep_id}/dtf" in spec)


def test_index_is_revalidated_and_plotly_answers_304(live_server: Any) -> None:
    r = live_server.api.get(live_server.url + "/")
    assert r.status_code == 200
    assert r.headers["cache-control"] == "no-cache"
    assert '<script type="module" src="/assets/js/main.js">' in r.text
    js = live_server.api.get(live_server.url + "/vendor/plotly.min.js")
    again = live_server.api.get(live_server.url + "/vendor/plotly.min.js",
                                headers={"If-None-Match": js.headers["etag"]})
    assert again.status_code == 304
