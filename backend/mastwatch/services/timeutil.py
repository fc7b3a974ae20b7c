"""Time zones at the edges: a naive datetime from a form means the site's local time."""

from __future__ import annotations

import zoneinfo
from datetime import UTC, datetime

from mastwatch.services.errors import Invalid


def zone(name: str) -> zoneinfo.ZoneInfo:
    try:
        return zoneinfo.ZoneInfo(name)
    except (zoneinfo.ZoneInfoNotFoundError, ValueError) as exc:
        raise Invalid(f"unknown IANA time zone {name!r} (e.g. 'Europe/Berlin')") from exc


def to_utc(value: datetime, tz_name: str) -> datetime:
    """``value`` in UTC; a naive ``value`` is read as local time in ``tz_name``."""
    if value.tzinfo is None or value.utcoffset() is None:
        value = value.replace(tzinfo=zone(tz_name))
    return value.astimezone(UTC)
