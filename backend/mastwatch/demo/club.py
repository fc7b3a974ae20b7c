"""The invented demo club: its sites, antennas, feedlines, events and two years of sweeps.

Everything here is made up: the club, the call sign (a Q prefix, which no country
issues), the people, the sites and their locators (well-formed squares in the open
South Atlantic). The scenario is plain data so tests and docs read the expected
outcome (``SCENARIO.damaged``) instead of repeating it:

    2024-11      antennas installed at three sites
    2024-12 ..   a sweep of every antenna every three months (baseline: the first one)
    2025-03-08   the fan dipole's sweep fails (a neighbour transmitting); swept again
    2025-06-14   the field-day vertical's RG-58 is found crushed: open 6.2 m from the radio
    2025-07-05   repair: that cable replaced; the next sweep is the new baseline candidate
    2025-11-01   storm 1 at the Clubhouse: everything re-swept next day, nothing damaged
    2026-10-24   storm 2 at Windy Knoll: the 40 m vertical bent (resonance 320 kHz lower),
                 water in the 2 m collinear's hardline; both re-swept next day
    2026-11-14   last routine sweeps at the Clubhouse and of the field-day kit

    write_demo_files(directory) -> list[Path]     every sweep as a Touchstone .s1p file
    load_demo_club(session, settings) -> DemoSummary
                                                  the whole club through the records
                                                  services (parse → metrics → store)
"""

from __future__ import annotations

import math
import zlib
from collections.abc import Iterator
from dataclasses import dataclass, field
from datetime import UTC, date, datetime, timedelta
from pathlib import Path
from typing import TYPE_CHECKING, Any, Literal

from mastwatch.demo.models import (
    AntennaModel,
    Collinear,
    Detuned,
    Dipole,
    EndFed,
    FanDipole,
    JPole,
    SmallLoop,
    Vertical,
    Yagi,
)
from mastwatch.demo.synth import LineBreak, LineDamage, WaterInLine, synthesize
from mastwatch.rf.lines import Feedline, get_cable
from mastwatch.rf.sweep import Sweep

if TYPE_CHECKING:
    from sqlalchemy.orm import Session

Plane = Literal["feedpoint", "line_input"]

MEASUREMENT_NOISE = 0.0015
"""RMS |ΔΓ| of the demo analyzer's trace noise: a careful hobby VNA after calibration."""

SEASONAL_DRIFT = 0.0004
"""Peak relative resonance drift over a year (wire sag and temperature): tiny by design."""

LOOP_TUNING_DRIFT = 0.00005
"""The small loop is retuned to its dial mark before every sweep: only a setting error
remains (its Q of 400 would turn a 0.04 % drift into a large SWR change at the mark)."""


# --------------------------------------------------------------------------------------
# Scenario data
# --------------------------------------------------------------------------------------


@dataclass(frozen=True)
class SiteSpec:
    key: str
    name: str
    itu_region: int
    locator: str
    timezone: str
    notes: str


@dataclass(frozen=True)
class FeedlineSpec:
    cable: str  # a name in mastwatch.rf.lines.CABLES
    length_m: float
    connectors: int = 2

    def to_rf(self) -> Feedline:
        return Feedline(get_cable(self.cable), self.length_m, self.connectors)


@dataclass(frozen=True)
class AntennaSpec:
    key: str
    site: str  # SiteSpec.key
    name: str
    kind: str
    bands: tuple[str, ...]
    installed_on: date
    model: AntennaModel
    feedline: FeedlineSpec | None
    f_start_hz: float
    f_stop_hz: float
    points: int
    notes: str
    drift: float = SEASONAL_DRIFT  # peak relative yearly drift of the resonance


@dataclass(frozen=True)
class EventSpec:
    occurred_at: datetime
    kind: str  # storm | maintenance | repair | modification | note
    title: str
    notes: str
    site: str | None = None  # a site event ...
    antenna: str | None = None  # ... or an antenna event (AntennaSpec.key)


@dataclass(frozen=True)
class SweepSpec:
    antenna: str  # AntennaSpec.key
    measured_at: datetime
    plane: Plane
    operator: str
    conditions: str = ""
    notes: str = ""
    detune_hz: float = 0.0  # antenna damage (on top of the seasonal drift)
    damage: tuple[LineDamage, ...] = ()  # feedline damage
    erratic: float = 0.0  # share of erratic points (a failed sweep)

    @property
    def filename(self) -> str:
        return f"{self.antenna}_{self.measured_at:%Y%m%dT%H%M}Z.s1p"


@dataclass(frozen=True)
class Scenario:
    club: str
    call_sign: str
    sites: tuple[SiteSpec, ...]
    antennas: tuple[AntennaSpec, ...]
    events: tuple[EventSpec, ...]
    sweeps: tuple[SweepSpec, ...]
    storm_site: str  # the site of the damaging storm
    storm_at: datetime
    damaged: tuple[str, ...]  # antenna keys the storm damaged (what the site check must flag)
    repaired: str  # antenna key of the fault that was repaired
    notes: dict[str, str] = field(default_factory=dict)

    def antenna(self, key: str) -> AntennaSpec:
        for a in self.antennas:
            if a.key == key:
                return a
        raise KeyError(f"no demo antenna {key!r}; known: {', '.join(a.key for a in self.antennas)}")

    def site(self, key: str) -> SiteSpec:
        for s in self.sites:
            if s.key == key:
                return s
        raise KeyError(f"no demo site {key!r}; known: {', '.join(s.key for s in self.sites)}")

    def damaged_names(self) -> tuple[str, ...]:
        return tuple(self.antenna(k).name for k in self.damaged)


def _utc(y: int, m: int, d: int, hh: int = 10, mm: int = 0) -> datetime:
    return datetime(y, m, d, hh, mm, tzinfo=UTC)


CLUB = "Quillmoor Amateur Radio Circle"
CALL_SIGN = "Q0QRC"

SITES = (
    SiteSpec(
        "clubhouse",
        "Clubhouse",
        1,
        "HH55kg",
        "UTC",
        "The club's own garden: wire antennas in the trees and a short tower.",
    ),
    SiteSpec(
        "knoll",
        "Windy Knoll repeater site",
        1,
        "HH55mj",
        "UTC",
        "Hilltop mast with the repeaters and an HF vertical. Exposed: check after storms.",
    ),
    SiteSpec(
        "fieldkit",
        "Field-day kit",
        1,
        "HH54pw",
        "UTC",
        "Portable antennas in the club trailer; swept before and after each field day.",
    ),
)

_INSTALLED = date(2024, 11, 16)

ANTENNAS = (
    AntennaSpec(
        "dipole40",
        "clubhouse",
        "40 m dipole",
        "dipole",
        ("40m",),
        _INSTALLED,
        Dipole(7.090e6, r_rad_ohm=58.0, r_loss_ohm=2.0, q=12.0),
        FeedlineSpec("RG-213", 30.0),
        6.6e6,
        7.6e6,
        401,
        "Inverted-vee at 12 m between the oak and the clubhouse roof.",
    ),
    AntennaSpec(
        "fan",
        "clubhouse",
        "80/40/20 m fan dipole",
        "dipole",
        ("80m", "40m", "20m"),
        _INSTALLED,
        FanDipole(
            (
                Dipole(3.650e6, r_rad_ohm=55.0, r_loss_ohm=3.0, q=13.0),
                Dipole(7.120e6, r_rad_ohm=60.0, r_loss_ohm=2.0, q=12.0),
                Dipole(14.180e6, r_rad_ohm=64.0, r_loss_ohm=2.0, q=12.0),
            )
        ),
        FeedlineSpec("RG-213", 25.0),
        3.3e6,
        14.8e6,
        1601,
        "Three dipoles on one centre insulator, spread apart by spacers.",
    ),
    AntennaSpec(
        "endfed80",
        "clubhouse",
        "80 m end-fed",
        "end-fed",
        ("80m", "40m", "20m", "15m", "10m"),
        _INSTALLED,
        EndFed(3.555e6),
        FeedlineSpec("RG-8X", 20.0),
        3.3e6,
        30.0e6,
        1601,
        "Half-wave wire end-fed through a 49:1 transformer at the garden fence.",
    ),
    AntennaSpec(
        "yagi20",
        "clubhouse",
        "20 m yagi",
        "yagi",
        ("20m",),
        _INSTALLED,
        Yagi(14.150e6),
        FeedlineSpec("RG-213", 35.0),
        13.7e6,
        14.7e6,
        401,
        "3-element beam on the 15 m tower, hairpin match.",
    ),
    AntennaSpec(
        "vert40",
        "knoll",
        "40 m vertical",
        "vertical",
        ("40m",),
        _INSTALLED,
        Vertical(7.100e6, r_rad_ohm=36.0, r_loss_ohm=9.0, q=10.0),
        FeedlineSpec("foam-400", 25.0),
        6.5e6,
        7.7e6,
        401,
        "Quarter-wave aluminium tube over 16 buried radials.",
    ),
    AntennaSpec(
        "coll2",
        "knoll",
        "2 m repeater collinear",
        "collinear",
        ("2m",),
        _INSTALLED,
        Collinear(145.200e6, r_ohm=52.0, q=20.0),
        FeedlineSpec("hardline-1/2in", 40.0),
        140.0e6,
        150.0e6,
        401,
        "Repeater Q0QRC/R antenna at the top of the mast.",
    ),
    AntennaSpec(
        "coll70",
        "knoll",
        "70 cm repeater collinear",
        "collinear",
        ("70cm",),
        _INSTALLED,
        Collinear(433.500e6, r_ohm=48.0, q=22.0),
        FeedlineSpec("hardline-1/2in", 42.0),
        420.0e6,
        447.0e6,
        401,
        "70 cm repeater antenna, side-mounted below the 2 m collinear.",
    ),
    AntennaSpec(
        "jpole2",
        "knoll",
        "2 m j-pole (link)",
        "j-pole",
        ("2m",),
        _INSTALLED,
        JPole(145.000e6, r_ohm=55.0, q=14.0),
        FeedlineSpec("RG-213", 20.0),
        140.0e6,
        150.0e6,
        401,
        "Link receiver antenna on the shed roof.",
    ),
    AntennaSpec(
        "vert20p",
        "fieldkit",
        "Portable 20 m vertical",
        "vertical",
        ("20m",),
        _INSTALLED,
        Vertical(14.180e6, r_rad_ohm=36.0, r_loss_ohm=12.0, q=9.0),
        FeedlineSpec("RG-58", 15.0),
        13.6e6,
        14.8e6,
        401,
        "Telescopic whip on a ground spike with four elevated radials.",
    ),
    AntennaSpec(
        "loop40",
        "fieldkit",
        "40 m small loop",
        "loop",
        ("40m",),
        _INSTALLED,
        SmallLoop(7.100e6, r_rad_ohm=0.05, r_loss_ohm=0.10, q=400.0, r_match_ohm=48.0),
        FeedlineSpec("RG-58", 5.0),
        7.05e6,
        7.15e6,
        801,
        "1 m diameter copper loop, retuned to its 7.100 MHz dial mark before each sweep; "
        "swept at its own connector.",
        drift=LOOP_TUNING_DRIFT,
    ),
)

STORM1_AT = _utc(2025, 11, 1, 22, 0)
STORM2_AT = _utc(2026, 10, 24, 3, 0)
REPAIR_AT = _utc(2025, 7, 5, 14, 0)
CRUSH_FOUND = _utc(2025, 6, 14, 10, 0)

ROUTINE = (
    _utc(2024, 12, 7),
    _utc(2025, 3, 8),
    _utc(2025, 6, 14),
    _utc(2025, 9, 13),
    _utc(2025, 12, 6),
    _utc(2026, 3, 14),
    _utc(2026, 6, 13),
    _utc(2026, 9, 12),
    _utc(2026, 11, 14),
)
"""Routine visits: every antenna swept (Windy Knoll's last one is the storm check)."""

OPERATORS = {"clubhouse": "Q0QRC", "knoll": "Q0XMB", "fieldkit": "Q2ZLD"}
"""Who swept where: invented Q-prefix call signs only (no real holder, no names)."""

EVENTS = (
    EventSpec(
        datetime(2024, 11, 16, 12, 0, tzinfo=UTC),
        "note",
        "Antennas installed",
        "Work party put up the Clubhouse antennas.",
        site="clubhouse",
    ),
    EventSpec(
        datetime(2024, 11, 17, 12, 0, tzinfo=UTC),
        "note",
        "Antennas installed",
        "Repeater antennas and the HF vertical on the Windy Knoll mast.",
        site="knoll",
    ),
    EventSpec(
        datetime(2025, 5, 10, 11, 0, tzinfo=UTC),
        "maintenance",
        "Connectors re-taped",
        "Self-amalgamating tape renewed on every outdoor connector.",
        site="knoll",
    ),
    EventSpec(
        CRUSH_FOUND + timedelta(hours=1),
        "note",
        "Cable crushed in the trailer door",
        "The sweep after loading the trailer showed an open line: the RG-58 was "
        "crushed and its centre conductor broken about 6 m from the radio end.",
        antenna="vert20p",
    ),
    EventSpec(
        REPAIR_AT,
        "repair",
        "Feedline replaced",
        "New 15 m RG-58 with fresh connectors; the crushed cable was cut up.",
        antenna="vert20p",
    ),
    EventSpec(
        STORM1_AT,
        "storm",
        "Autumn gale",
        "Gusts about 90 km/h overnight. Everything re-swept next morning.",
        site="clubhouse",
    ),
    EventSpec(
        STORM2_AT,
        "storm",
        "Storm with freezing rain",
        "Severe gusts and ice on the mast. Do not climb until the ice is gone and "
        "someone is with you.",
        site="knoll",
    ),
)


def _seasonal(when: datetime, peak: float) -> float:
    """Relative resonance drift at a date: a small yearly swing (lower in summer heat)."""
    day = when.timetuple().tm_yday
    return -peak * math.sin(2 * math.pi * (day - 80) / 365.25)


def _sweeps() -> Iterator[SweepSpec]:
    for a in ANTENNAS:
        op = OPERATORS[a.site]
        for i, when in enumerate(ROUTINE):
            if a.site == "knoll" and when > STORM2_AT:
                continue  # the post-storm check is Windy Knoll's latest sweep
            if a.site == "fieldkit" and CRUSH_FOUND < when < REPAIR_AT + timedelta(days=1):
                continue
            plane: Plane = "line_input"
            if a.key == "loop40" or (a.key == "yagi20" and i == 0):
                plane = "feedpoint"
            minute = 10 * (ANTENNAS.index(a) % 6)
            at = when.replace(minute=minute)
            notes = ""
            damage: tuple[LineDamage, ...] = ()
            if a.key == "yagi20" and i == 0:
                notes = "Swept at the feedpoint on the tower before the feedline was connected."
            if a.key == "vert20p" and when == CRUSH_FOUND:
                damage = (LineBreak("open", distance_m=6.2),)
                notes = "SWR off the scale; the cable is flattened about 6 m from the radio end."
            if a.key == "fan" and when == _utc(2025, 3, 8):
                yield SweepSpec(
                    a.key,
                    at,
                    plane,
                    op,
                    "club net on the air next door",
                    "Trace jumping about: neighbour transmitting. Swept again.",
                    erratic=0.08,
                )
                at = at + timedelta(minutes=25)
                notes = "Second sweep after the neighbour's transmitter went off."
            yield SweepSpec(a.key, at, plane, op, "dry, light wind", notes, damage=damage)
        if a.site == "fieldkit":
            yield SweepSpec(
                a.key,
                REPAIR_AT + timedelta(hours=20),
                "feedpoint" if a.key == "loop40" else "line_input",
                op,
                "dry",
                "After the feedline repair." if a.key == "vert20p" else "",
            )
        if a.site == "clubhouse":
            yield SweepSpec(
                a.key,
                STORM1_AT + timedelta(hours=12),
                "line_input",
                op,
                "wet, after the gale",
                "Storm check: looks as before.",
            )
        if a.site == "knoll":
            detune = -320e3 if a.key == "vert40" else 0.0
            damage = (WaterInLine(loss_factor=5.0, wet_length_m=25.0),) if a.key == "coll2" else ()
            notes = {
                "vert40": "Top section bent over by ice; resonance well down.",
                "coll2": "Return loss looks better than ever at the shack end: suspicious.",
            }.get(a.key, "Storm check.")
            yield SweepSpec(
                a.key,
                STORM2_AT + timedelta(hours=31),
                "line_input",
                op,
                "cold, ice melting",
                notes,
                detune_hz=detune,
                damage=damage,
            )


SCENARIO = Scenario(
    club=CLUB,
    call_sign=CALL_SIGN,
    sites=SITES,
    antennas=ANTENNAS,
    events=EVENTS,
    sweeps=tuple(sorted(_sweeps(), key=lambda s: (s.measured_at, s.antenna))),
    storm_site="knoll",
    storm_at=STORM2_AT,
    damaged=("vert40", "coll2"),
    repaired="vert20p",
    notes={
        "vert40": "storm 2 bent the top section: resonance 320 kHz lower (4.5 % of 7.1 MHz)",
        "coll2": "storm 2 let water into the top 25 m of the hardline: loss ×5 there",
        "vert20p": "RG-58 crushed, open 6.2 m from the radio (2025-06-14), replaced 2025-07-05",
        "fan": "one failed sweep on 2025-03-08 (erratic points), swept again 25 min later",
    },
)


# --------------------------------------------------------------------------------------
# Synthesis of the scenario's sweeps
# --------------------------------------------------------------------------------------


def seed_of(spec: SweepSpec) -> int:
    """A stable seed per sweep (CRC-32 of antenna and time): independent of list order."""
    return zlib.crc32(f"{spec.antenna}|{spec.measured_at.isoformat()}".encode())


def sweep_of(spec: SweepSpec, scenario: Scenario = SCENARIO) -> Sweep:
    """The synthetic sweep for one scheduled measurement."""
    a = scenario.antenna(spec.antenna)
    drift = a.model.f0_hz * _seasonal(spec.measured_at, a.drift)
    model: AntennaModel = Detuned(a.model, drift + spec.detune_hz)
    feedline = a.feedline.to_rf() if (a.feedline and spec.plane == "line_input") else None
    site = scenario.site(a.site)
    comments = (
        f"{scenario.club} ({scenario.call_sign}) demo data: invented, synthesised from a model",
        f"Site: {site.name}; antenna: {a.name}",
        f"Measured {spec.measured_at:%Y-%m-%dT%H:%M:%SZ} at the "
        + ("feedpoint" if spec.plane == "feedpoint" else "line input (radio end)"),
    )
    return synthesize(
        model,
        a.f_start_hz,
        a.f_stop_hz,
        a.points,
        feedline=feedline,
        damage=spec.damage if feedline is not None else (),
        noise=MEASUREMENT_NOISE,
        erratic=spec.erratic,
        seed=seed_of(spec),
        comments=comments,
    )


def touchstone_bytes(spec: SweepSpec, scenario: Scenario = SCENARIO) -> bytes:
    """The sweep as the bytes of a Touchstone v1 .s1p file."""
    from mastwatch.rf.touchstone import write_touchstone

    sweep = sweep_of(spec, scenario)
    return write_touchstone(sweep, sweep.source.comments).encode("utf-8")


def write_demo_files(directory: str | Path, scenario: Scenario = SCENARIO) -> list[Path]:
    """Write every demo sweep as ``<antenna>_<YYYYmmddTHHMM>Z.s1p`` into ``directory``."""
    out_dir = Path(directory)
    out_dir.mkdir(parents=True, exist_ok=True)
    paths = []
    for spec in scenario.sweeps:
        path = out_dir / spec.filename
        path.write_bytes(touchstone_bytes(spec, scenario))
        paths.append(path)
    return paths


# --------------------------------------------------------------------------------------
# Loading into the records
# --------------------------------------------------------------------------------------


@dataclass(frozen=True)
class DemoSummary:
    """What ``load_demo_club`` created: ids by scenario key, and counts."""

    club: str
    site_ids: dict[str, int]
    antenna_ids: dict[str, int]
    event_ids: list[int]
    sweep_ids: list[int]
    seconds: float

    @property
    def sites(self) -> int:
        return len(self.site_ids)

    @property
    def antennas(self) -> int:
        return len(self.antenna_ids)

    @property
    def events(self) -> int:
        return len(self.event_ids)

    @property
    def sweeps(self) -> int:
        return len(self.sweep_ids)

    def to_dict(self) -> dict[str, Any]:
        return {
            "club": self.club,
            "sites": self.sites,
            "antennas": self.antennas,
            "events": self.events,
            "sweeps": self.sweeps,
            "seconds": self.seconds,
        }


def load_demo_club(
    session: Session, settings: Any = None, scenario: Scenario = SCENARIO
) -> DemoSummary:
    """Create the demo club in the records through the services, oldest entry first.

    Every sweep goes through the real upload path (``services.ingest.ingest_sweep``:
    parse → metrics at both planes → store, with the health verdict hook). Events and
    sweeps are interleaved by date so a repair is on record before the sweep after it.
    ``settings`` is accepted for the CLI's convenience (the defaults of a site come from
    the scenario, so nothing in it is needed today).
    """
    from mastwatch.demo.loader import load

    return load(session, scenario)
