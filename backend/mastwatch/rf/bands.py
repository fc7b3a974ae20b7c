"""Amateur band plans of ITU Regions 1, 2 and 3, kept as data with their source.

Source: ITU Radio Regulations, Article 5 (Table of Frequency Allocations), editions
2020 and 2024 — the amateur-service allocations, not any national or society plan.
Each row says whether its edges were read in a faithful reproduction of Article 5
("found") or recalled ("memory"); the memory rows are marked in the table below.

    band_plan(1) ─▶ (Band("2200m", 135_700.0, 137_800.0, 1, ...), ..., Band("23cm", ...))
    get_band("40m", 2) ─▶ Band("40m", 7.0e6, 7.3e6, 2, "")
    bands_in(6.9e6, 7.5e6, 1) ─▶ the bands a sweep overlaps

National rules differ: 60 m is a set of country-specific channels or a small band
inside the ITU allocation, and 70 cm (and 6 m in Region 1) vary by country. The
``note`` of a band says so. 4 m (70 MHz) is a national allocation in some Region 1
countries, not an Article 5 amateur allocation, so it is left out.
"""

from __future__ import annotations

from dataclasses import dataclass

PLAN_SOURCE = "ITU Radio Regulations, Article 5 (Table of Frequency Allocations)"
PLAN_EDITION = "2020/2024 editions"

REGIONS = (1, 2, 3)

_KHZ = 1e3
_MHZ = 1e6

_NOTE_60M = (
    "WRC-15 secondary allocation, max 15 W EIRP; national rules vary "
    "(channels or a narrower band in many countries)"
)
_NOTE_70CM = "some countries use a wider or narrower national allocation"
_NOTE_SECONDARY = "secondary allocation"

# (name, {region: (low_hz, high_hz)}, note, basis). Edges exactly as
# /work/shared/REFERENCES.md §8 (copied from the Article 5 table). basis "found" =
# seen in a faithful reproduction of Article 5; "memory" = recalled, not verified.
_TABLE: tuple[tuple[str, dict[int, tuple[float, float]], str, str], ...] = (
    # [memory] 2200m
    ("2200m", dict.fromkeys(REGIONS, (135.7 * _KHZ, 137.8 * _KHZ)), _NOTE_SECONDARY, "memory"),
    # [memory] 630m
    ("630m", dict.fromkeys(REGIONS, (472 * _KHZ, 479 * _KHZ)), _NOTE_SECONDARY, "memory"),
    (
        "160m",
        {
            1: (1810 * _KHZ, 1850 * _KHZ),
            2: (1800 * _KHZ, 2000 * _KHZ),
            3: (1800 * _KHZ, 2000 * _KHZ),
        },
        "",
        "found",
    ),
    (
        "80m",
        {
            1: (3500 * _KHZ, 3800 * _KHZ),
            2: (3500 * _KHZ, 4000 * _KHZ),
            3: (3500 * _KHZ, 3900 * _KHZ),
        },
        "",
        "found",
    ),
    ("60m", dict.fromkeys(REGIONS, (5351.5 * _KHZ, 5366.5 * _KHZ)), _NOTE_60M, "found"),
    # R1 and R3 found; [memory] the Region 2 upper edge 7300 kHz
    (
        "40m",
        {
            1: (7000 * _KHZ, 7200 * _KHZ),
            2: (7000 * _KHZ, 7300 * _KHZ),
            3: (7000 * _KHZ, 7200 * _KHZ),
        },
        "",
        "found (R1, R3); memory (R2)",
    ),
    # [memory] 30m
    ("30m", dict.fromkeys(REGIONS, (10100 * _KHZ, 10150 * _KHZ)), _NOTE_SECONDARY, "memory"),
    # [memory] 20m
    ("20m", dict.fromkeys(REGIONS, (14000 * _KHZ, 14350 * _KHZ)), "", "memory"),
    # [memory] 17m
    ("17m", dict.fromkeys(REGIONS, (18068 * _KHZ, 18168 * _KHZ)), "", "memory"),
    # [memory] 15m
    ("15m", dict.fromkeys(REGIONS, (21000 * _KHZ, 21450 * _KHZ)), "", "memory"),
    # [memory] 12m
    ("12m", dict.fromkeys(REGIONS, (24890 * _KHZ, 24990 * _KHZ)), "", "memory"),
    # [memory] 10m
    ("10m", dict.fromkeys(REGIONS, (28000 * _KHZ, 29700 * _KHZ)), "", "memory"),
    (
        "6m",
        {1: (50 * _MHZ, 52 * _MHZ), 2: (50 * _MHZ, 54 * _MHZ), 3: (50 * _MHZ, 54 * _MHZ)},
        "",
        "found",
    ),
    # [memory] 2m
    (
        "2m",
        {1: (144 * _MHZ, 146 * _MHZ), 2: (144 * _MHZ, 148 * _MHZ), 3: (144 * _MHZ, 148 * _MHZ)},
        "",
        "memory",
    ),
    ("1.25m", {2: (220 * _MHZ, 225 * _MHZ)}, "Region 2 only", "found"),
    # [memory] 70cm (edges as REFERENCES.md §8; national variations noted)
    ("70cm", dict.fromkeys(REGIONS, (430 * _MHZ, 440 * _MHZ)), _NOTE_70CM, "memory"),
    # [memory] 23cm
    ("23cm", dict.fromkeys(REGIONS, (1240 * _MHZ, 1300 * _MHZ)), _NOTE_SECONDARY, "memory"),
)

_REGION_NOTES: dict[tuple[str, int], str] = {
    ("6m", 1): "secondary allocation in Region 1; national rules vary",
}

BAND_NAMES: tuple[str, ...] = tuple(row[0] for row in _TABLE)
"""Every band name of any region, in frequency order (2200m … 23cm)."""

BAND_BASIS: dict[str, str] = {row[0]: row[3] for row in _TABLE}
"""Per band: "found" (edges read in a reproduction of Article 5) or "memory"."""


@dataclass(frozen=True)
class Band:
    """One amateur band of one ITU region: edges in Hz."""

    name: str
    low_hz: float
    high_hz: float
    region: int
    note: str = ""

    @property
    def center_hz(self) -> float:
        """The arithmetic centre, where per-band SWR and impedance are read."""
        return 0.5 * (self.low_hz + self.high_hz)

    @property
    def width_hz(self) -> float:
        return self.high_hz - self.low_hz


def _check_region(region: int) -> int:
    if region not in REGIONS:
        raise ValueError(f"ITU region must be 1, 2 or 3, got {region!r}")
    return int(region)


def _build(region: int) -> tuple[Band, ...]:
    out = []
    for name, edges, note, _basis in _TABLE:
        if region in edges:
            low, high = edges[region]
            out.append(Band(name, low, high, region, _REGION_NOTES.get((name, region), note)))
    return tuple(out)


_PLANS: dict[int, tuple[Band, ...]] = {r: _build(r) for r in REGIONS}


def band_plan(region: int) -> tuple[Band, ...]:
    """All amateur bands of an ITU region (1, 2 or 3), in frequency order."""
    return _PLANS[_check_region(region)]


def get_band(name: str, region: int) -> Band:
    """The band called ``name`` ("40m", case-insensitive) in ``region``.

    Raises ValueError naming the valid bands of that region.
    """
    plan = band_plan(region)
    key = name.strip().lower()
    for band in plan:
        if band.name == key:
            return band
    valid = ", ".join(b.name for b in plan)
    raise ValueError(f"unknown band {name!r} for ITU Region {region}; valid bands: {valid}")


def bands_in(f_start_hz: float, f_stop_hz: float, region: int) -> tuple[Band, ...]:
    """The bands of ``region`` that a sweep from f_start to f_stop overlaps.

    Overlap means a part of positive width; a single-frequency sweep counts when
    its frequency lies inside the band (edges included).
    """
    if f_stop_hz < f_start_hz:
        raise ValueError(f"f_stop ({f_stop_hz} Hz) is below f_start ({f_start_hz} Hz)")
    plan = band_plan(region)
    if f_stop_hz == f_start_hz:
        return tuple(b for b in plan if b.low_hz <= f_start_hz <= b.high_hz)
    return tuple(b for b in plan if min(b.high_hz, f_stop_hz) > max(b.low_hz, f_start_hz))
