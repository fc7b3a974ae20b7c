"""/sites/{id}/events and /antennas/{id}/events: dated history entries."""

from __future__ import annotations

from fastapi import APIRouter, status

from mastwatch.api.deps import SessionDep
from mastwatch.api.schemas.records import EventCreate, EventPublic
from mastwatch.services import events

router = APIRouter(tags=["events"])


@router.get("/sites/{site_id}/events", response_model=list[EventPublic])
def site_events(site_id: int, session: SessionDep) -> list[EventPublic]:
    return [EventPublic.model_validate(e) for e in events.site_events(session, site_id)]


@router.post(
    "/sites/{site_id}/events", status_code=status.HTTP_201_CREATED, response_model=EventPublic
)
def create_site_event(site_id: int, body: EventCreate, session: SessionDep) -> EventPublic:
    return EventPublic.model_validate(events.create_site_event(session, site_id, body.model_dump()))


@router.get("/antennas/{antenna_id}/events", response_model=list[EventPublic])
def antenna_events(antenna_id: int, session: SessionDep) -> list[EventPublic]:
    """The antenna's own events and its site's, oldest first."""
    return [EventPublic.model_validate(e) for e in events.antenna_events(session, antenna_id)]


@router.post(
    "/antennas/{antenna_id}/events",
    status_code=status.HTTP_201_CREATED,
    response_model=EventPublic,
)
def create_antenna_event(antenna_id: int, body: EventCreate, session: SessionDep) -> EventPublic:
    return EventPublic.model_validate(
        events.create_antenna_event(session, antenna_id, body.model_dump())
    )
