"""Band plans: edges per ITU region against the reference table, lookups, overlap."""

from __future__ import annotations

import pytest

from mastwatch.rf.bands import (
    BAND_BASIS,
    BAND_NAMES,
    PLAN_EDITION,
    PLAN_SOURCE,
    Band,
    band_plan,
    bands_in,
    get_band,
)

kHz, MHz = 1e3, 1e6

# ITU Radio Regulations Article 5 amateur allocations, as tabulated in
# /work/shared/REFERENCES.md §8 (rows there marked found; the others from memory).
# band: (Region 1, Region 2, Region 3) edges in Hz; None = no allocation.
EXPECTED = {
    "2200m": [(135.7 * kHz, 137.8 * kHz)] * 3,  # from memory
    "630m": [(472 * kHz, 479 * kHz)] * 3,  # from memory
    "160m": [(1810 * kHz, 1850 * kHz), (1800 * kHz, 2000 * kHz), (1800 * kHz, 2000 * kHz)],
    "80m": [(3500 * kHz, 3800 * kHz), (3500 * kHz, 4000 * kHz), (3500 * kHz, 3900 * kHz)],
    "60m": [(5351.5 * kHz, 5366.5 * kHz)] * 3,
    "40m": [(7000 * kHz, 7200 * kHz), (7000 * kHz, 7300 * kHz), (7000 * kHz, 7200 * kHz)],
    "30m": [(10100 * kHz, 10150 * kHz)] * 3,  # from memory
    "20m": [(14000 * kHz, 14350 * kHz)] * 3,  # from memory
    "17m": [(18068 * kHz, 18168 * kHz)] * 3,  # from memory
    "15m": [(21000 * kHz, 21450 * kHz)] * 3,  # from memory
    "12m": [(24890 * kHz, 24990 * kHz)] * 3,  # from memory
    "10m": [(28000 * kHz, 29700 * kHz)] * 3,  # from memory
    "6m": [(50 * MHz, 52 * MHz), (50 * MHz, 54 * MHz), (50 * MHz, 54 * MHz)],
    "2m": [(144 * MHz, 146 * MHz), (144 * MHz, 148 * MHz), (144 * MHz, 148 * MHz)],  # memory
    "1.25m": [None, (220 * MHz, 225 * MHz), None],
    "70cm": [(430 * MHz, 440 * MHz)] * 3,  # from memory
    "23cm": [(1240 * MHz, 1300 * MHz)] * 3,  # from memory
}


@pytest.mark.parametrize("region", [1, 2, 3])
def test_edges_match_the_reference_table(region: int) -> None:
    plan = band_plan(region)
    got = {b.name: (b.low_hz, b.high_hz) for b in plan}
    want = {n: e[region - 1] for n, e in EXPECTED.items() if e[region - 1] is not None}
    assert got == want
    assert all(b.region == region for b in plan)


def test_band_names_in_frequency_order_and_plans_sorted() -> None:
    assert tuple(EXPECTED) == BAND_NAMES
    for region in (1, 2, 3):
        lows = [b.low_hz for b in band_plan(region)]
        assert lows == sorted(lows)
        assert all(b.low_hz < b.high_hz for b in band_plan(region))


def test_source_edition_and_basis_are_recorded() -> None:
    assert "Article 5" in PLAN_SOURCE
    assert "2020" in PLAN_EDITION
    assert set(BAND_BASIS) == set(BAND_NAMES)
    assert BAND_BASIS["160m"] == "found"
    assert BAND_BASIS["20m"] == "memory"


def test_notes_for_national_variations() -> None:
    for region in (1, 2, 3):
        assert "national" in get_band("60m", region).note
        assert "countries" in get_band("70cm", region).note
    assert get_band("1.25m", 2).note == "Region 2 only"


def test_get_band_is_case_insensitive_and_returns_the_region_edges() -> None:
    assert get_band("40M", 2) == Band("40m", 7.0e6, 7.3e6, 2, "")
    assert get_band(" 40m ", 1).high_hz == 7.2e6
    assert get_band("40m", 1).center_hz == 7.1e6
    assert get_band("40m", 1).width_hz == 200e3


def test_get_band_unknown_lists_the_valid_names_of_that_region() -> None:
    with pytest.raises(ValueError, match=r"unknown band '1\.25m' for ITU Region 1") as e:
        get_band("1.25m", 1)
    assert "valid bands: 2200m, 630m, 160m" in str(e.value)
    assert "1.25m" not in str(e.value).split("valid bands:")[1]
    with pytest.raises(ValueError, match=r"valid bands: .*1\.25m"):
        get_band("4m", 2)


def test_bad_region() -> None:
    with pytest.raises(ValueError, match="ITU region must be 1, 2 or 3, got 4"):
        band_plan(4)


def test_bands_in_a_sweep() -> None:
    assert [b.name for b in bands_in(1e6, 30e6, 1)] == [
        "160m", "80m", "60m", "40m", "30m", "20m", "17m", "15m", "12m", "10m",
    ]  # fmt: skip
    # partial overlap counts, touching an edge does not
    assert [b.name for b in bands_in(7.15e6, 7.5e6, 1)] == ["40m"]
    assert bands_in(7.2e6, 7.5e6, 1) == ()
    assert [b.name for b in bands_in(7.2e6, 7.5e6, 2)] == ["40m"]
    # a single-frequency sweep: inside, edges included
    assert [b.name for b in bands_in(7.0e6, 7.0e6, 1)] == ["40m"]
    assert [b.name for b in bands_in(220e6, 222e6, 2)] == ["1.25m"]
    assert bands_in(220e6, 222e6, 1) == ()
    with pytest.raises(ValueError, match="below f_start"):
        bands_in(8e6, 7e6, 1)
