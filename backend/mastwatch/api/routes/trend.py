"""GET /antennas/{id}/trend: one metric of one band over time, with the antenna's events."""

from __future__ import annotations

from datetime import datetime
from typing import Annotated, Any, Literal

from fastapi import APIRouter, Query

from mastwatch.api.deps import SessionDep
from mastwatch.api.schemas.records import EventPublic
from mastwatch.api.schemas.sweeps import TrendPublic
from mastwatch.services import trend

router = APIRouter(tags=["trend"])


@router.get("/antennas/{antenna_id}/trend", response_model=TrendPublic)
def antenna_trend(
    antenna_id: int,
    session: SessionDep,
    band: Annotated[str, Query(description="band name, e.g. 40m")],
    metric: Annotated[str, Query(description="min_swr, resonance, bandwidth_2, ...")] = "min_swr",
    plane: Literal["measured", "feedpoint"] = "feedpoint",
    since: datetime | None = None,
    until: datetime | None = None,
) -> dict[str, Any]:
    t = trend.antenna_trend(session, antenna_id, band, metric, plane, since, until)
    # Plain dicts: the response model validates and serialises them once, in pydantic-core.
    return {
        "antenna_id": t.antenna_id,
        "band": t.band,
        "metric": t.metric.name,
        "plane": plane,
        "field": t.metric.field,
        "label": t.metric.label,
        "unit": t.metric.unit,
        "points": t.points,
        "events": [EventPublic.model_validate(e) for e in t.events],
    }
