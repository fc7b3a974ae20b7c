"""Schemas of sweeps, their metrics, plot arrays, trends and previews.

Numbers are SI (Hz, Ω, dB); an infinite SWR or return loss is ``null``.
"""

from __future__ import annotations

from datetime import datetime
from typing import Any, Literal

from pydantic import BaseModel, ConfigDict, Field

from mastwatch.api.schemas.records import EventPublic

Plane = Literal["measured", "feedpoint"]


class BandMetricsPublic(BaseModel):
    band: str
    low_hz: float
    high_hz: float
    coverage: float
    min_swr: float | None
    min_swr_hz: float | None
    swr_center: float | None
    r_center_ohm: float | None
    x_center_ohm: float | None
    return_loss_center_db: float | None
    usable_fraction_2: float | None
    resonance_hz: float | None
    resonance_kind: str | None
    q: float | None
    bandwidth_2_hz: float | None


class PlaneMetrics(BaseModel):
    """Whole-sweep metrics at one plane (mastwatch.rf.metrics.SweepMetrics) and per band."""

    points: int
    z0_ohm: float
    f_start_hz: float
    f_stop_hz: float
    min_swr: float | None
    min_swr_hz: float | None
    resonances: list[dict[str, Any]]
    swr_bandwidths: list[dict[str, Any]]
    unavailable: list[str]
    bands: list[BandMetricsPublic]


class SweepMetricsPublic(BaseModel):
    measured: PlaneMetrics
    feedpoint: PlaneMetrics | None
    feedpoint_note: str | None


class SweepPublic(BaseModel):
    model_config = ConfigDict(from_attributes=True)

    id: int
    antenna_id: int
    measured_at: datetime
    measured_at_source: str
    uploaded_at: datetime
    reference_plane: str
    operator: str
    conditions: str
    notes: str
    filename: str
    file_format: str | None
    original_size: int
    sha256: str
    z0: float
    has_phase: bool
    points: int
    f_start_hz: float
    f_stop_hz: float
    min_swr: float | None
    min_swr_hz: float | None
    feedline_snapshot: dict[str, Any] | None
    has_feedpoint: bool
    status: str | None
    status_reasons: list[Any]


class SweepUpdate(BaseModel):
    measured_at: datetime | None = Field(default=None, description="naive = site's local time")
    operator: str | None = Field(default=None, max_length=100)
    conditions: str | None = None
    notes: str | None = None


class SweepDetail(SweepPublic):
    metrics: SweepMetricsPublic


class UploadResult(SweepDetail):
    duplicate: bool


class SweepsPage(BaseModel):
    items: list[SweepPublic]
    total: int
    limit: int
    offset: int


class PlaneArrays(BaseModel):
    gamma_re: list[float | None]
    gamma_im: list[float | None]
    swr: list[float | None]
    return_loss_db: list[float | None]
    r_ohm: list[float | None] | None
    x_ohm: list[float | None] | None


class SweepData(BaseModel):
    sweep_id: int
    points: int
    returned: int
    z0: float
    has_phase: bool
    freq_hz: list[float | None]
    measured: PlaneArrays
    feedpoint: PlaneArrays | None


class TrendPoint(BaseModel):
    sweep_id: int
    measured_at: datetime
    value: float | None


class TrendPublic(BaseModel):
    antenna_id: int
    band: str
    metric: str
    plane: Plane
    field: str
    label: str
    unit: str
    points: list[TrendPoint]
    events: list[EventPublic]


class PreviewArrays(BaseModel):
    freq_hz: list[float | None]
    measured: PlaneArrays
    feedpoint: PlaneArrays | None


class AnalyzeResult(BaseModel):
    filename: str
    file_format: str | None
    sha256: str
    points: int
    has_phase: bool
    z0: float
    measured_at: datetime | None
    reference_plane: str
    feedline: dict[str, Any] | None
    metrics: SweepMetricsPublic
    preview: PreviewArrays
