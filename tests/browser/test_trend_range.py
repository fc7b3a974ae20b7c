"""The trend's y axis: widened to the change the verdict watches for, never showing a
value the metric cannot take (an SWR below 1, a fraction of a band below 0 or above 100 %).

SWR ≥ 1 by its definition (1 + |Γ|)/(1 − |Γ|) with |Γ| ≤ 1 for a passive load (IEEE Std
145 / any RF textbook); a usable fraction is a share of the band, 0–100 %.
"""

from __future__ import annotations

from typing import Any

import pytest

from tests.browser.conftest import Club, PageLog, shot, wait_ready

RANGE = """async ([values, metric]) => {
  const { trendRange, TREND_METRICS } = await import("/assets/js/plots/trend.js");
  return trendRange(values, TREND_METRICS[metric]);
}"""


@pytest.fixture
def trend_range(page: Any, club: Club) -> Any:
    page.goto("/#/")
    wait_ready(page)
    return lambda values, metric: page.evaluate(RANGE, [values, metric])


@pytest.mark.parametrize(
    ("values", "metric", "expected"),
    [
        # the whole band usable every time: the window (25 % + 8 % each side) ends at 100 %
        ([100.0, 100.0], "usable_fraction_2", [71.0, 100.0]),
        ([0.0, 5.0], "usable_fraction_2", [0.0, 29.0]),
        ([50.0, 50.0], "usable_fraction_2", [35.5, 64.5]),  # free to centre
        # a near-perfect match: starts at SWR 1, 0.5 + 8 % each side tall
        ([1.0, 1.05], "min_swr", [1.0, 1.58]),
        ([1.0, 1.0], "swr_center", [1.0, 1.58]),
        ([2.0, 2.1], "min_swr", [1.76, 2.34]),
    ],
)
def test_the_axis_stays_inside_what_the_metric_can_be(
    trend_range: Any, page_log: PageLog, values: list[float], metric: str,
    expected: list[float],
) -> None:
    got = trend_range(values, metric)
    assert got == pytest.approx(expected, abs=1e-9)
    assert page_log.errors == []


def test_a_spread_wider_than_the_span_is_left_to_plotly(trend_range: Any) -> None:
    assert trend_range([1.1, 3.0], "min_swr") is None
    assert trend_range([None], "min_swr") is None


def test_the_usable_fraction_trend_draws_inside_0_to_100(
    page: Any, page_log: PageLog, club: Club
) -> None:
    ant = next(a for a in club.antennas if a["name"] == "20 m yagi")
    page.set_viewport_size({"width": 1280, "height": 900})
    page.goto(f"/#/antenna/{ant['id']}")
    wait_ready(page, "/antenna/")
    page.wait_for_function("document.getElementById('trend-plot')?.data?.length > 0")
    page.select_option("select[name=trend-metric]", "usable_fraction_2")
    page.wait_for_function(
        "document.getElementById('trend-plot').layout.yaxis.title.text.startsWith('Band usable')")
    plot = page.evaluate("(() => { const p = document.getElementById('trend-plot');"
                         " return { y: p.data[0].y, range: p.layout.yaxis.range }; })()")
    ys = [v for v in plot["y"] if v is not None]
    assert ys, "the demo yagi has a usable fraction on 20 m"
    low, high = plot["range"]
    assert 0.0 <= low <= min(ys) and max(ys) <= high <= 100.0
    page.locator("#trend-plot").scroll_into_view_if_needed()
    shot(page, "trend-usable-fraction")
    assert page_log.errors == []
