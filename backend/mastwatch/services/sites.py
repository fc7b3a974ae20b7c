"""Use cases for sites: create, list, read, change, delete (refused while antennas remain)."""

from __future__ import annotations

from typing import Any

from sqlalchemy import func, select
from sqlalchemy.exc import IntegrityError
from sqlalchemy.orm import Session

from mastwatch.db.models import Antenna, Site
from mastwatch.services.errors import Conflict, not_found
from mastwatch.services.timeutil import zone


def get_site(session: Session, site_id: int) -> Site:
    site = session.get(Site, site_id)
    if site is None:
        raise not_found("site", site_id)
    return site


def list_sites(session: Session) -> list[Site]:
    return list(session.scalars(select(Site).order_by(Site.name)))


def _check(data: dict[str, Any]) -> None:
    if data.get("timezone") is not None:
        zone(data["timezone"])


def _commit_unique_name(session: Session, name: str) -> None:
    try:
        session.commit()
    except IntegrityError as exc:
        session.rollback()
        raise Conflict(f"a site named {name!r} already exists") from exc


def create_site(
    session: Session,
    data: dict[str, Any],
    *,
    default_region: int = 1,
    default_timezone: str = "UTC",
) -> Site:
    data = {k: v for k, v in data.items() if v is not None}
    data.setdefault("itu_region", default_region)
    data.setdefault("timezone", default_timezone)
    _check(data)
    site = Site(**data)
    session.add(site)
    _commit_unique_name(session, site.name)
    return site


REQUIRED_SITE_FIELDS = ("name", "itu_region", "timezone", "notes")


def update_site(session: Session, site_id: int, changes: dict[str, Any]) -> Site:
    site = get_site(session, site_id)
    # null for a field that must have a value means "leave it" (only locator can be cleared).
    changes = {k: v for k, v in changes.items() if v is not None or k not in REQUIRED_SITE_FIELDS}
    _check(changes)
    for key, value in changes.items():
        setattr(site, key, value)
    _commit_unique_name(session, site.name)
    return site


def delete_site(session: Session, site_id: int) -> None:
    site = get_site(session, site_id)
    count = session.scalar(select(func.count()).where(Antenna.site_id == site_id)) or 0
    if count:
        raise Conflict(f"site {site_id} still has {count} antenna(s); delete or move them first")
    session.delete(site)
    session.commit()
