"""Events: dated entries in a site's or an antenna's history (storm, repair, ...).

A site event (a storm at the hilltop) belongs to every antenna of that site: an
antenna's history and its trend plots show its own events and its site's.
"""

from __future__ import annotations

from datetime import datetime
from typing import Any

from sqlalchemy import or_, select
from sqlalchemy.orm import Session

from mastwatch.db.models import Antenna, Event
from mastwatch.services.antennas import get_antenna
from mastwatch.services.sites import get_site
from mastwatch.services.timeutil import to_utc


def _create(session: Session, data: dict[str, Any], tz_name: str, **owner: int) -> Event:
    data = dict(data)
    data["occurred_at"] = to_utc(data["occurred_at"], tz_name)
    data = {k: v for k, v in data.items() if v is not None}
    event = Event(**data, **owner)
    session.add(event)
    session.commit()
    return event


def create_site_event(session: Session, site_id: int, data: dict[str, Any]) -> Event:
    site = get_site(session, site_id)
    return _create(session, data, site.timezone, site_id=site.id)


def create_antenna_event(session: Session, antenna_id: int, data: dict[str, Any]) -> Event:
    antenna = get_antenna(session, antenna_id)
    return _create(session, data, antenna.site.timezone, antenna_id=antenna.id)


def site_events(session: Session, site_id: int) -> list[Event]:
    get_site(session, site_id)
    return list(
        session.scalars(select(Event).where(Event.site_id == site_id).order_by(Event.occurred_at))
    )


def antenna_events(
    session: Session,
    antenna_id: int,
    *,
    since: datetime | None = None,
    until: datetime | None = None,
) -> list[Event]:
    """The antenna's own events and its site's, oldest first."""
    return events_of(session, get_antenna(session, antenna_id), since=since, until=until)


def events_of(
    session: Session,
    antenna: Antenna,
    *,
    since: datetime | None = None,
    until: datetime | None = None,
) -> list[Event]:
    query = select(Event).where(
        or_(Event.antenna_id == antenna.id, Event.site_id == antenna.site_id)
    )
    if since is not None:
        query = query.where(Event.occurred_at >= since)
    if until is not None:
        query = query.where(Event.occurred_at <= until)
    return list(session.scalars(query.order_by(Event.occurred_at, Event.id)))
