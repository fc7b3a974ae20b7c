"""/cable-types: the built-in catalog and user types."""

from __future__ import annotations

from fastapi import APIRouter, status

from mastwatch.api.deps import SessionDep
from mastwatch.api.schemas.records import CableTypeCreate, CableTypePublic
from mastwatch.services import cables

router = APIRouter(prefix="/cable-types", tags=["cable types"])


@router.get("", response_model=list[CableTypePublic])
def list_cable_types(session: SessionDep) -> list[CableTypePublic]:
    return [CableTypePublic.model_validate(c) for c in cables.list_cable_types(session)]


@router.post("", status_code=status.HTTP_201_CREATED, response_model=CableTypePublic)
def create_cable_type(body: CableTypeCreate, session: SessionDep) -> CableTypePublic:
    return CableTypePublic.model_validate(cables.create_cable_type(session, body.model_dump()))


@router.get("/{cable_type_id}", response_model=CableTypePublic)
def get_cable_type(cable_type_id: int, session: SessionDep) -> CableTypePublic:
    return CableTypePublic.model_validate(cables.get_cable_type(session, cable_type_id))
