"""GET /antennas/{id}/trend: one metric of one band over time, with the antenna's events."""

from __future__ import annotations

from datetime import datetime
from typing import Annotated, Literal

from fastapi import APIRouter, Query, Response
from pydantic import TypeAdapter

from mastwatch.api.deps import SessionDep
from mastwatch.api.schemas.records import EventPublic
from mastwatch.api.schemas.sweeps import TrendPublic
from mastwatch.services import trend

router = APIRouter(tags=["trend"])


# Validated and written to JSON bytes in pydantic-core in one pass: a trend of thousands
# of points would otherwise go through Python-level encoding twice.
TREND_JSON = TypeAdapter(TrendPublic)


@router.get("/antennas/{antenna_id}/trend", response_model=TrendPublic)
def antenna_trend(
    antenna_id: int,
    session: SessionDep,
    band: Annotated[str, Query(description="band name, e.g. 40m")],
    metric: Annotated[str, Query(description="min_swr, resonance, bandwidth_2, ...")] = "min_swr",
    plane: Literal["measured", "feedpoint"] = "feedpoint",
    since: datetime | None = None,
    until: datetime | None = None,
) -> Response:
    t = trend.antenna_trend(session, antenna_id, band, metric, plane, since, until)
    doc = {
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
    return Response(
        TREND_JSON.dump_json(TREND_JSON.validate_python(doc, from_attributes=True)),
        media_type="application/json",
    )
