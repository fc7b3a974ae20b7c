"""Load a demo scenario into the records through the records services.

    sync cable catalog ─▶ sites ─▶ antennas + feedlines ─▶ (events and sweeps, by date)
                                                           sweep: synthesise → .s1p bytes
                                                           → services.ingest.ingest_sweep

Sweeps take the real upload path (the same bytes a keeper would upload), so what the
demo shows is what the product computes. Nothing is written past the services: no
SQL here.
"""

from __future__ import annotations

import time
from typing import TYPE_CHECKING

from mastwatch.demo.club import DemoSummary, EventSpec, Scenario, SweepSpec, touchstone_bytes
from mastwatch.services import antennas as antenna_service
from mastwatch.services import cables as cable_service
from mastwatch.services import events as event_service
from mastwatch.services import health_records
from mastwatch.services import sites as site_service
from mastwatch.services.ingest import UploadMeta, ingest_sweep

if TYPE_CHECKING:
    from sqlalchemy.orm import Session


def load(session: Session, scenario: Scenario, *, confirm_baselines: bool = True) -> DemoSummary:
    """Create every site, antenna, feedline, event and sweep of ``scenario``.

    With ``confirm_baselines`` the demo keeper confirms each baseline candidate the
    health service offers (the first sweep after installation, then the first after a
    repair) as soon as it is on record, as a keeper looking at it would.
    """
    started = time.perf_counter()
    cable_service.sync_builtin_cable_types(session)
    session.commit()

    site_ids: dict[str, int] = {}
    for s in scenario.sites:
        row = site_service.create_site(
            session,
            {
                "name": s.name,
                "itu_region": s.itu_region,
                "locator": s.locator,
                "timezone": s.timezone,
                "notes": s.notes,
            },
        )
        site_ids[s.key] = row.id

    antenna_ids: dict[str, int] = {}
    for a in scenario.antennas:
        antenna = antenna_service.create_antenna(
            session,
            {
                "site_id": site_ids[a.site],
                "name": a.name,
                "kind": a.kind,
                "bands": list(a.bands),
                "installed_on": a.installed_on,
                "notes": a.notes,
            },
        )
        antenna_ids[a.key] = antenna.id
        if a.feedline is not None:
            antenna_service.set_feedline(
                session,
                antenna.id,
                {
                    "cable": a.feedline.cable,
                    "length_m": a.feedline.length_m,
                    "connectors": a.feedline.connectors,
                },
            )

    # Events and sweeps in time order; an event at the same instant as a sweep goes first.
    timeline: list[EventSpec | SweepSpec] = sorted(
        [*scenario.events, *scenario.sweeps],
        key=lambda x: (x.occurred_at, 0) if isinstance(x, EventSpec) else (x.measured_at, 1),
    )
    event_ids: list[int] = []
    sweep_ids: list[int] = []
    # Antennas whose next sweep is a baseline candidate: new ones, and after a repair.
    due = set(antenna_ids)
    for item in timeline:
        if isinstance(item, EventSpec):
            event_ids.append(_add_event(session, item, site_ids, antenna_ids))
            if item.antenna is not None and item.kind in health_records.CANDIDATE_EVENTS:
                due.add(item.antenna)
            continue
        result = ingest_sweep(
            session,
            antenna_ids[item.antenna],
            touchstone_bytes(item, scenario),
            item.filename,
            UploadMeta(
                measured_at=item.measured_at,
                reference_plane=item.plane,
                operator=item.operator,
                conditions=item.conditions,
                notes=item.notes,
            ),
        )
        sweep_ids.append(result.sweep.id)
        if confirm_baselines and item.antenna in due:
            _confirm_candidate(session, antenna_ids[item.antenna])
            due.discard(item.antenna)

    return DemoSummary(
        club=scenario.club,
        site_ids=site_ids,
        antenna_ids=antenna_ids,
        event_ids=event_ids,
        sweep_ids=sweep_ids,
        seconds=time.perf_counter() - started,
    )


def _add_event(
    session: Session, e: EventSpec, site_ids: dict[str, int], antenna_ids: dict[str, int]
) -> int:
    data = {"kind": e.kind, "occurred_at": e.occurred_at, "title": e.title, "notes": e.notes}
    if e.antenna is not None:
        return event_service.create_antenna_event(session, antenna_ids[e.antenna], data).id
    if e.site is None:
        raise ValueError(f"demo event {e.title!r} names neither a site nor an antenna")
    return event_service.create_site_event(session, site_ids[e.site], data).id


def _confirm_candidate(session: Session, antenna_id: int) -> None:
    """Confirm the offered baseline candidate when it is not the baseline yet."""
    antenna = antenna_service.get_antenna(session, antenna_id)
    candidate = health_records.baseline_candidate(session, antenna)
    if candidate is None or candidate["is_current"]:
        return
    health_records.set_baseline(
        session,
        antenna_id,
        candidate["sweep_id"],
        reason=f"confirmed by the demo keeper: {candidate['why']}",
    )
