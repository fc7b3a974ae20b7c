"""Site check after a storm: every antenna of a site, what changed since the event.

    site_check(session, site_id, since)     since = an event id or an ISO date/time
      for each antenna of the site:
        latest sweep  vs its baseline                   (verdict "vs_baseline")
        latest sweep  vs the last sweep before the event (verdict "vs_before")
        swept since the event?  (if not: still to sweep)
      flagged = swept since the event, and the comparison with the sweep before the
                event (or, without one, with the baseline) says watch or fault

The antenna's own status is the worse of the two verdicts; ``flagged`` says what the
event changed (an antenna already on watch before the storm is not flagged by it).
Every answer carries the safety cautions: the check sends people to masts after storms.
"""

from __future__ import annotations

import re
from datetime import UTC, datetime, time
from typing import Any

from sqlalchemy import select
from sqlalchemy.orm import Session

from mastwatch.db.models import Antenna, Event, Site
from mastwatch.db.models import Sweep as SweepRow
from mastwatch.services.errors import Invalid, not_found
from mastwatch.services.health import SAFETY_CAUTIONS, Verdict
from mastwatch.services.health_records import (
    current_baseline,
    latest_sweep,
    verdict_for,
    with_arrays,
)
from mastwatch.services.timeutil import to_utc

_RANK = {"ok": 0, "unknown": 1, "watch": 2, "fault": 3}
_BAD = ("watch", "fault")


def resolve_since(session: Session, site: Site, since: str) -> tuple[datetime, Event | None]:
    """The moment to check from: an event of the site (or of one of its antennas), or
    an ISO date (midnight in the site's time zone) or date-time (naive = site time)."""
    text = since.strip()
    if re.fullmatch(r"\d+", text):
        event = session.get(Event, int(text))
        if event is None:
            raise not_found("event", text)
        owner_site = event.site_id
        if owner_site is None and event.antenna_id is not None:
            antenna = session.get(Antenna, event.antenna_id)
            owner_site = antenna.site_id if antenna else None
        if owner_site != site.id:
            raise Invalid(f"since: event {event.id} is not an event of site {site.id}")
        return event.occurred_at, event
    try:
        if re.fullmatch(r"\d{4}-\d{2}-\d{2}", text):
            naive = datetime.combine(datetime.fromisoformat(text).date(), time())
        else:
            naive = datetime.fromisoformat(text.replace("Z", "+00:00"))
    except ValueError as exc:
        raise Invalid(
            f"since: expected an event id or an ISO date such as 2025-10-24, got {since!r}"
        ) from exc
    if naive.tzinfo is not None:
        return naive.astimezone(UTC), None
    return to_utc(naive, site.timezone), None


def _ref(row: SweepRow | None, status: str | None = None) -> dict[str, Any] | None:
    if row is None:
        return None
    return {
        "sweep_id": row.id,
        "measured_at": row.measured_at,
        "status": status if status is not None else row.status,
    }


def _before(session: Session, antenna_id: int, at: datetime) -> SweepRow | None:
    row_id = session.scalar(
        select(SweepRow.id)
        .where(SweepRow.antenna_id == antenna_id, SweepRow.measured_at < at)
        .order_by(SweepRow.measured_at.desc(), SweepRow.id.desc())
        .limit(1)
    )
    return with_arrays(session, row_id) if row_id is not None else None


def check_antenna(session: Session, antenna: Antenna, at: datetime, what: str) -> dict[str, Any]:
    latest = latest_sweep(session, antenna.id)
    swept = latest is not None and latest.measured_at >= at
    baseline = current_baseline(session, antenna.id)
    base_row = with_arrays(session, baseline.sweep_id) if baseline else None
    vs_baseline: Verdict | None = None
    vs_before: Verdict | None = None
    before = _before(session, antenna.id, at)
    if latest is not None:
        vs_baseline = verdict_for(session, antenna, latest, base_row, drift=False)
    if swept and latest is not None and before is not None:
        label = f"the sweep of {before.measured_at.date().isoformat()} before {what}"
        vs_before = verdict_for(session, antenna, latest, before, label=label, drift=False)
    if not swept:
        flagged, status = False, "unknown"
        reasons = [f"not swept since {what} yet"]
        if vs_baseline is not None and vs_baseline.status in _BAD:
            status = vs_baseline.status
            reasons += vs_baseline.reasons
    else:
        decisive = vs_before if vs_before is not None else vs_baseline
        flagged = decisive is not None and decisive.status in _BAD
        verdicts = [v for v in (vs_baseline, vs_before) if v is not None]
        worst = max(verdicts, key=lambda v: _RANK[v.status])
        status = worst.status
        reasons = decisive.reasons if flagged and decisive else worst.reasons
    return {
        "antenna": {
            "id": antenna.id,
            "name": antenna.name,
            "kind": antenna.kind,
            "bands": list(antenna.bands or []),
        },
        "status": status,
        "reasons": reasons,
        "flagged": flagged,
        "swept_since": swept,
        "latest": _ref(latest),
        "before": _ref(before),
        "baseline": _ref(base_row),
        "vs_baseline": vs_baseline.to_dict() if vs_baseline else None,
        "vs_before": vs_before.to_dict() if vs_before else None,
    }


def site_check(session: Session, site_id: int, since: str) -> dict[str, Any]:
    site = session.get(Site, site_id)
    if site is None:
        raise not_found("site", site_id)
    at, event = resolve_since(session, site, since)
    what = (
        f"the {event.kind} of {event.occurred_at.date().isoformat()}"
        if event
        else at.date().isoformat()
    )
    antennas = list(
        session.scalars(select(Antenna).where(Antenna.site_id == site.id).order_by(Antenna.name))
    )
    rows = [check_antenna(session, a, at, what) for a in antennas]
    return {
        "site": {"id": site.id, "name": site.name},
        "since": {
            "at": at,
            "event": None
            if event is None
            else {
                "id": event.id,
                "kind": event.kind,
                "title": event.title,
                "occurred_at": event.occurred_at,
            },
        },
        "antennas": rows,
        "flagged": [r["antenna"]["id"] for r in rows if r["flagged"]],
        "not_swept": [r["antenna"]["id"] for r in rows if not r["swept_since"]],
        "cautions": list(SAFETY_CAUTIONS),
    }
