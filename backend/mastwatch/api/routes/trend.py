"""GET /antennas/{id}/trend: one metric of one band over time, with the antenna's events."""

from __future__ import annotations

from datetime import datetime
from typing import Annotated, Literal

from fastapi import APIRouter, Query, Response
from pydantic_core import to_json

from mastwatch.api.deps import SessionDep
from mastwatch.api.schemas.records import EventPublic
from mastwatch.api.schemas.sweeps import TrendPublic
from mastwatch.services import trend

router = APIRouter(tags=["trend"])


# Written to JSON bytes by pydantic-core from plain dicts, without validating them
# against TrendPublic (which stays the documented shape): every value comes typed from
# the database columns, and validating 10,000 points cost ten times their encoding.


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
        "points": [{"sweep_id": p[0], "measured_at": p[1], "value": p[2]} for p in t.points],
        "events": [EventPublic.model_validate(e).model_dump() for e in t.events],
    }
    return Response(to_json(doc), media_type="application/json")
