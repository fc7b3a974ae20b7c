"""Cable types: the built-in catalog of ``mastwatch.rf.lines`` mirrored into the database,
plus user types (given by coefficients or fitted to measured loss points).

Built-in types are synced at startup (:func:`sync_builtin_cable_types`, called by the
app's startup and by ``mastwatch db upgrade``) rather than by a data migration: the
catalog is code, so the database follows it whenever the code changes, and migrations
stay schema-only. Rows are matched by name; a user type never gets overwritten.
"""

from __future__ import annotations

from typing import Any

from sqlalchemy import select
from sqlalchemy.exc import IntegrityError
from sqlalchemy.orm import Session

from mastwatch.db.models import CableType
from mastwatch.rf import lines
from mastwatch.services.errors import Conflict, Invalid, not_found

BUILTIN_FIELDS = ("z0_ohm", "velocity_factor", "k0", "k1", "k2", "kind", "source")


def sync_builtin_cable_types(session: Session) -> int:
    """Insert or update every catalog cable as a ``builtin`` row; returns rows changed."""
    existing = {c.name: c for c in session.scalars(select(CableType))}
    changed = 0
    for name, cable in lines.CABLES.items():
        row = existing.get(name)
        values = {f: getattr(cable, f) for f in BUILTIN_FIELDS}
        points = [[f, a] for f, a in cable.points]
        if row is None:
            session.add(CableType(name=name, builtin=True, measured_points=points, **values))
            changed += 1
        elif row.builtin and any(getattr(row, f) != v for f, v in values.items()):
            for f, v in values.items():
                setattr(row, f, v)
            row.measured_points = points
            changed += 1
    session.flush()
    return changed


def list_cable_types(session: Session) -> list[CableType]:
    return list(
        session.scalars(select(CableType).order_by(CableType.builtin.desc(), CableType.name))
    )


def get_cable_type(session: Session, cable_type_id: int) -> CableType:
    row = session.get(CableType, cable_type_id)
    if row is None:
        raise not_found("cable type", cable_type_id)
    return row


def find_cable_type(session: Session, name: str) -> CableType:
    row = session.scalar(select(CableType).where(CableType.name == name))
    if row is None:
        known = ", ".join(c.name for c in list_cable_types(session))
        raise Invalid(f"unknown cable type {name!r}; known: {known}")
    return row


def create_cable_type(session: Session, data: dict[str, Any]) -> CableType:
    """A user cable type from k0/k1/k2, or fitted to ``measured_points`` [[f_hz, dB/100 m]]."""
    points = data.get("measured_points")
    try:
        if points:
            cable = lines.fit_cable(
                data["name"],
                data["z0_ohm"],
                data["velocity_factor"],
                [tuple(p) for p in points],
                source=data.get("source") or "user measurement",
                kind=data.get("kind") or "coax",
            )
        else:
            if data.get("k1") is None or data.get("k2") is None:
                raise Invalid("give either k1 and k2 (dB/100 m model) or measured_points to fit")
            cable = lines.CableType(
                name=data["name"],
                z0_ohm=data["z0_ohm"],
                velocity_factor=data["velocity_factor"],
                k0=data.get("k0") or 0.0,
                k1=data["k1"],
                k2=data["k2"],
                source=data.get("source") or "user entry",
                kind=data.get("kind") or "coax",
            )
    except ValueError as exc:
        raise Invalid(str(exc)) from exc
    row = CableType(
        name=cable.name,
        builtin=False,
        measured_points=[[f, a] for f, a in cable.points] or None,
        **{f: getattr(cable, f) for f in BUILTIN_FIELDS},
    )
    session.add(row)
    try:
        session.commit()
    except IntegrityError as exc:
        session.rollback()
        raise Conflict(f"a cable type named {cable.name!r} already exists") from exc
    return row


def to_rf_cable(row: CableType) -> lines.CableType:
    return lines.CableType(
        name=row.name,
        z0_ohm=row.z0_ohm,
        velocity_factor=row.velocity_factor,
        k0=row.k0,
        k1=row.k1,
        k2=row.k2,
        source=row.source,
        kind=row.kind,
    )
