"""Use cases for antennas and their feedline (one current feedline per antenna)."""

from __future__ import annotations

from typing import Any

from sqlalchemy import select
from sqlalchemy.exc import IntegrityError
from sqlalchemy.orm import Session

from mastwatch.db.models import Antenna, Feedline
from mastwatch.rf import bands as rf_bands
from mastwatch.rf import lines
from mastwatch.services import cables
from mastwatch.services.errors import Conflict, Invalid, not_found
from mastwatch.services.sites import get_site


def get_antenna(session: Session, antenna_id: int) -> Antenna:
    antenna = session.get(Antenna, antenna_id)
    if antenna is None:
        raise not_found("antenna", antenna_id)
    return antenna


def list_antennas(session: Session, site_id: int | None = None) -> list[Antenna]:
    query = select(Antenna).order_by(Antenna.site_id, Antenna.name)
    if site_id is not None:
        get_site(session, site_id)
        query = query.where(Antenna.site_id == site_id)
    return list(session.scalars(query))


def _normalise_bands(names: list[str], region: int) -> list[str]:
    out: list[str] = []
    for name in names:
        try:
            band = rf_bands.get_band(name, region)
        except ValueError as exc:
            raise Invalid(f"bands: {exc}") from exc
        if band.name not in out:
            out.append(band.name)
    # Keep the band plan's order so lists read low to high.
    order = {b.name: i for i, b in enumerate(rf_bands.band_plan(region))}
    return sorted(out, key=order.__getitem__)


def _validate(session: Session, data: dict[str, Any], site_id: int) -> None:
    site = get_site(session, site_id)
    if "bands" in data and data["bands"] is not None:
        data["bands"] = _normalise_bands(data["bands"], site.itu_region)
    if data.get("thresholds") is not None:
        from mastwatch.services.thresholds import validate_thresholds

        try:
            data["thresholds"] = validate_thresholds(data["thresholds"]) or None
        except ValueError as exc:
            raise Invalid(str(exc)) from exc


def _commit_unique(session: Session, antenna: Antenna) -> None:
    try:
        session.commit()
    except IntegrityError as exc:
        session.rollback()
        raise Conflict(
            f"site {antenna.site_id} already has an antenna named {antenna.name!r}"
        ) from exc


def create_antenna(session: Session, data: dict[str, Any]) -> Antenna:
    data = {k: v for k, v in data.items() if v is not None}
    _validate(session, data, data["site_id"])
    antenna = Antenna(**data)
    session.add(antenna)
    _commit_unique(session, antenna)
    return antenna


REQUIRED_ANTENNA_FIELDS = ("site_id", "name", "kind", "bands", "notes")


def update_antenna(session: Session, antenna_id: int, changes: dict[str, Any]) -> Antenna:
    antenna = get_antenna(session, antenna_id)
    # null for a field that must have a value means "leave it" (installed_on and
    # thresholds can be cleared with null).
    changes = {
        k: v for k, v in changes.items() if v is not None or k not in REQUIRED_ANTENNA_FIELDS
    }
    _validate(session, changes, changes.get("site_id") or antenna.site_id)
    if "site_id" in changes and changes["site_id"] != antenna.site_id and antenna.bands:
        # Band names are per region: re-check the kept bands against the new site.
        changes.setdefault("bands", antenna.bands)
        changes["bands"] = _normalise_bands(
            changes["bands"], get_site(session, changes["site_id"]).itu_region
        )
    for key, value in changes.items():
        setattr(antenna, key, value)
    _commit_unique(session, antenna)
    return antenna


def delete_antenna(session: Session, antenna_id: int) -> None:
    """Delete an antenna with its whole record (sweeps, metrics, events, baselines)."""
    antenna = get_antenna(session, antenna_id)
    session.delete(antenna)
    session.commit()


# -- feedline ---------------------------------------------------------------------------


def set_feedline(session: Session, antenna_id: int, data: dict[str, Any]) -> Feedline:
    """Create or replace the antenna's feedline. Stored sweeps keep their own snapshot."""
    antenna = get_antenna(session, antenna_id)
    if data.get("cable_type_id") is not None:
        cable = cables.get_cable_type(session, data["cable_type_id"])
    elif data.get("cable"):
        cable = cables.find_cable_type(session, data["cable"])
    else:
        raise Invalid("give the feedline's cable_type_id or its cable name (e.g. 'RG-213')")
    values = {
        "cable_type_id": cable.id,
        "length_m": data["length_m"],
        "connectors": data.get("connectors") or 0,
        "connector_loss_db": data.get("connector_loss_db"),
        "notes": data.get("notes") or "",
    }
    feedline = antenna.feedline
    if feedline is None:
        feedline = Feedline(antenna_id=antenna.id, **values)
        session.add(feedline)
    else:
        for key, value in values.items():
            setattr(feedline, key, value)
    feedline.cable_type = cable
    to_rf_feedline(feedline)  # validates the combination the way the maths will use it
    session.commit()
    session.refresh(antenna)
    return feedline


def delete_feedline(session: Session, antenna_id: int) -> None:
    antenna = get_antenna(session, antenna_id)
    if antenna.feedline is None:
        raise not_found("feedline of antenna", antenna_id)
    session.delete(antenna.feedline)
    session.commit()
    session.expire(antenna)


def to_rf_feedline(row: Feedline) -> lines.Feedline:
    extra = {} if row.connector_loss_db is None else {"connector_loss_db": row.connector_loss_db}
    try:
        return lines.Feedline(
            cable=cables.to_rf_cable(row.cable_type),
            length_m=row.length_m,
            connectors=row.connectors,
            **extra,
        )
    except ValueError as exc:
        raise Invalid(f"feedline: {exc}") from exc


def feedline_snapshot(feedline: lines.Feedline) -> dict[str, Any]:
    """Everything needed to redo the de-embedding later, as JSON."""
    c = feedline.cable
    return {
        "cable": c.name,
        "z0_ohm": c.z0_ohm,
        "velocity_factor": c.velocity_factor,
        "k0": c.k0,
        "k1": c.k1,
        "k2": c.k2,
        "kind": c.kind,
        "cable_source": c.source,
        "length_m": feedline.length_m,
        "connectors": feedline.connectors,
        "connector_loss_db": feedline.connector_loss_db,
    }


def feedline_from_snapshot(snap: dict[str, Any]) -> lines.Feedline:
    cable = lines.CableType(
        name=snap["cable"],
        z0_ohm=snap["z0_ohm"],
        velocity_factor=snap["velocity_factor"],
        k0=snap.get("k0", 0.0),
        k1=snap["k1"],
        k2=snap["k2"],
        kind=snap.get("kind", "coax"),
        source=snap.get("cable_source", ""),
    )
    return lines.Feedline(
        cable=cable,
        length_m=snap["length_m"],
        connectors=snap.get("connectors", 0),
        connector_loss_db=snap.get("connector_loss_db", lines.DEFAULT_CONNECTOR_LOSS_DB),
    )
