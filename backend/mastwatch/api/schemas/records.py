"""Schemas of sites, antennas, cable types, feedlines and events."""

from __future__ import annotations

import re
from datetime import date, datetime
from typing import Any, Literal

from pydantic import BaseModel, ConfigDict, Field, field_validator

AntennaKind = Literal[
    "dipole", "vertical", "yagi", "loop", "end-fed", "j-pole", "collinear", "other"
]
EventKind = Literal["storm", "maintenance", "repair", "modification", "note"]
Region = Literal[1, 2, 3]

_LOCATOR = re.compile(r"^[A-R]{2}(?:[0-9]{2}(?:[A-X]{2}(?:[0-9]{2})?)?)?$", re.IGNORECASE)


def _locator(value: str | None) -> str | None:
    """Maidenhead locator: field letters upper case, subsquare letters lower (JO62qm)."""
    if value is None or value == "":
        return None
    value = value.strip()
    if not _LOCATOR.match(value):
        raise ValueError(f"{value!r} is not a Maidenhead locator (e.g. JO62 or JO62qm)")
    out = value[:2].upper() + value[2:4]
    if len(value) > 4:
        out += value[4:6].lower() + value[6:]
    return out


class Public(BaseModel):
    model_config = ConfigDict(from_attributes=True)


# -- sites -------------------------------------------------------------------------------


class SiteCreate(BaseModel):
    name: str = Field(min_length=1, max_length=200)
    itu_region: Region | None = Field(default=None, description="1, 2 or 3; default from settings")
    locator: str | None = Field(default=None, description="Maidenhead locator, e.g. JO62qm")
    timezone: str | None = Field(default=None, description="IANA zone; default from settings")
    notes: str = ""

    @field_validator("locator")
    @classmethod
    def _check_locator(cls, value: str | None) -> str | None:
        return _locator(value)


class SiteUpdate(BaseModel):
    name: str | None = Field(default=None, min_length=1, max_length=200)
    itu_region: Region | None = None
    locator: str | None = None
    timezone: str | None = None
    notes: str | None = None

    @field_validator("locator")
    @classmethod
    def _check_locator(cls, value: str | None) -> str | None:
        return _locator(value)


class SitePublic(Public):
    id: int
    name: str
    itu_region: int
    locator: str | None
    timezone: str
    notes: str
    created_at: datetime


# -- cable types and feedlines -----------------------------------------------------------


class CableTypeCreate(BaseModel):
    name: str = Field(min_length=1, max_length=100)
    z0_ohm: float = Field(gt=0, description="characteristic impedance, Ω")
    velocity_factor: float = Field(gt=0, le=1)
    k0: float | None = Field(default=None, ge=0, description="dB/100 m, constant term")
    k1: float | None = Field(default=None, ge=0, description="dB/100 m per √MHz")
    k2: float | None = Field(default=None, ge=0, description="dB/100 m per MHz")
    measured_points: list[tuple[float, float]] | None = Field(
        default=None, description="[[f_hz, dB per 100 m], ...] to fit k1 and k2 to"
    )
    kind: Literal["coax", "twin"] = "coax"
    source: str = ""


class CableTypePublic(Public):
    id: int
    name: str
    z0_ohm: float
    velocity_factor: float
    k0: float
    k1: float
    k2: float
    kind: str
    source: str
    builtin: bool
    measured_points: list[Any] | None


class FeedlinePut(BaseModel):
    cable_type_id: int | None = None
    cable: str | None = Field(default=None, description="cable type name, e.g. RG-213")
    length_m: float = Field(gt=0)
    connectors: int = Field(default=0, ge=0)
    connector_loss_db: float | None = Field(default=None, ge=0, description="per connector")
    notes: str = ""


class FeedlinePublic(Public):
    cable_type: CableTypePublic
    length_m: float
    connectors: int
    connector_loss_db: float | None
    notes: str
    updated_at: datetime


# -- antennas ----------------------------------------------------------------------------


class AntennaCreate(BaseModel):
    site_id: int
    name: str = Field(min_length=1, max_length=200)
    kind: AntennaKind
    bands: list[str] = Field(default_factory=list, description="band names, e.g. ['40m', '20m']")
    installed_on: date | None = None
    notes: str = ""
    thresholds: dict[str, Any] | None = None


class AntennaUpdate(BaseModel):
    site_id: int | None = None
    name: str | None = Field(default=None, min_length=1, max_length=200)
    kind: AntennaKind | None = None
    bands: list[str] | None = None
    installed_on: date | None = None
    notes: str | None = None
    thresholds: dict[str, Any] | None = None


class AntennaPublic(Public):
    id: int
    site_id: int
    name: str
    kind: str
    bands: list[str]
    installed_on: date | None
    notes: str
    thresholds: dict[str, Any] | None
    created_at: datetime
    feedline: FeedlinePublic | None


# -- events ------------------------------------------------------------------------------


class EventCreate(BaseModel):
    kind: EventKind
    occurred_at: datetime = Field(description="naive values are the site's local time")
    title: str = Field(min_length=1, max_length=200)
    notes: str = ""


class EventPublic(Public):
    id: int
    site_id: int | None
    antenna_id: int | None
    kind: str
    occurred_at: datetime
    title: str
    notes: str
    created_at: datetime
