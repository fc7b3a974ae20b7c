"""/sites: create, list, read, change, delete."""

from __future__ import annotations

from fastapi import APIRouter, Response, status

from mastwatch.api.deps import SessionDep, SettingsDep
from mastwatch.api.schemas.records import SiteCreate, SitePublic, SiteUpdate
from mastwatch.services import sites

router = APIRouter(prefix="/sites", tags=["sites"])


@router.get("", response_model=list[SitePublic])
def list_sites(session: SessionDep) -> list[SitePublic]:
    return [SitePublic.model_validate(s) for s in sites.list_sites(session)]


@router.post("", status_code=status.HTTP_201_CREATED, response_model=SitePublic)
def create_site(body: SiteCreate, session: SessionDep, settings: SettingsDep) -> SitePublic:
    site = sites.create_site(
        session,
        body.model_dump(),
        default_region=settings.default_region,
        default_timezone=settings.timezone,
    )
    return SitePublic.model_validate(site)


@router.get("/{site_id}", response_model=SitePublic)
def get_site(site_id: int, session: SessionDep) -> SitePublic:
    return SitePublic.model_validate(sites.get_site(session, site_id))


@router.patch("/{site_id}", response_model=SitePublic)
def update_site(site_id: int, body: SiteUpdate, session: SessionDep) -> SitePublic:
    changes = body.model_dump(exclude_unset=True)
    return SitePublic.model_validate(sites.update_site(session, site_id, changes))


@router.delete("/{site_id}", status_code=status.HTTP_204_NO_CONTENT)
def delete_site(site_id: int, session: SessionDep) -> Response:
    sites.delete_site(session, site_id)
    return Response(status_code=status.HTTP_204_NO_CONTENT)
