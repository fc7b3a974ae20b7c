"""/antennas: create, list (filter by site), read, change, delete; the feedline."""

from __future__ import annotations

from fastapi import APIRouter, Response, status

from mastwatch.api.deps import SessionDep
from mastwatch.api.schemas.records import (
    AntennaCreate,
    AntennaPublic,
    AntennaUpdate,
    FeedlinePublic,
    FeedlinePut,
)
from mastwatch.services import antennas

router = APIRouter(prefix="/antennas", tags=["antennas"])


@router.get("", response_model=list[AntennaPublic])
def list_antennas(session: SessionDep, site_id: int | None = None) -> list[AntennaPublic]:
    return [AntennaPublic.model_validate(a) for a in antennas.list_antennas(session, site_id)]


@router.post("", status_code=status.HTTP_201_CREATED, response_model=AntennaPublic)
def create_antenna(body: AntennaCreate, session: SessionDep) -> AntennaPublic:
    return AntennaPublic.model_validate(antennas.create_antenna(session, body.model_dump()))


@router.get("/{antenna_id}", response_model=AntennaPublic)
def get_antenna(antenna_id: int, session: SessionDep) -> AntennaPublic:
    return AntennaPublic.model_validate(antennas.get_antenna(session, antenna_id))


@router.patch("/{antenna_id}", response_model=AntennaPublic)
def update_antenna(antenna_id: int, body: AntennaUpdate, session: SessionDep) -> AntennaPublic:
    changes = body.model_dump(exclude_unset=True)
    return AntennaPublic.model_validate(antennas.update_antenna(session, antenna_id, changes))


@router.delete("/{antenna_id}", status_code=status.HTTP_204_NO_CONTENT)
def delete_antenna(antenna_id: int, session: SessionDep) -> Response:
    antennas.delete_antenna(session, antenna_id)
    return Response(status_code=status.HTTP_204_NO_CONTENT)


@router.put("/{antenna_id}/feedline", response_model=FeedlinePublic)
def put_feedline(antenna_id: int, body: FeedlinePut, session: SessionDep) -> FeedlinePublic:
    return FeedlinePublic.model_validate(
        antennas.set_feedline(session, antenna_id, body.model_dump())
    )


@router.delete("/{antenna_id}/feedline", status_code=status.HTTP_204_NO_CONTENT)
def delete_feedline(antenna_id: int, session: SessionDep) -> Response:
    antennas.delete_feedline(session, antenna_id)
    return Response(status_code=status.HTTP_204_NO_CONTENT)
