"""Health routes: baseline, antenna health, site check after a storm, status board.

    PUT  /antennas/{id}/baseline   {"sweep_id": N, "reason": "..."}  → the new baseline
    GET  /antennas/{id}/health     verdict of the latest sweep, reasons, per-band
                                   comparisons, baseline, candidate, status history
    GET  /sites/{id}/check?since=  event id or ISO date: every antenna, flagged ones,
                                   what is still to sweep, safety cautions
    GET  /board                    sites → antennas: status, reasons, bands, last sweep
                                   and age, stale flag, SWR at centres, min-SWR sparkline

The router's lifespan runs the notification worker (services/notify.deliver_pending
every NOTIFY_INTERVAL_S seconds, in a thread) when a channel is configured.
"""

from __future__ import annotations

import logging
import threading
from collections.abc import AsyncIterator
from contextlib import asynccontextmanager
from typing import Annotated, Any

from fastapi import APIRouter, FastAPI, Query
from pydantic import BaseModel, Field

from mastwatch.api.deps import SessionDep, SettingsDep
from mastwatch.services import board as board_service
from mastwatch.services import health_records, notify, sitecheck

log = logging.getLogger(__name__)
NOTIFY_INTERVAL_S = 15.0


def _worker(app: FastAPI, stop: threading.Event) -> None:
    settings = app.state.settings
    while not stop.wait(NOTIFY_INTERVAL_S):
        try:
            with app.state.sessionmaker() as session:
                notify.deliver_pending(session, settings)
        except Exception:  # the worker must outlive a bad run; the log says what happened
            log.exception("notification delivery run failed")


@asynccontextmanager
async def lifespan(app: FastAPI) -> AsyncIterator[None]:
    settings = getattr(app.state, "settings", None)
    stop = threading.Event()
    thread = None
    if settings is not None and any(notify.channel_enabled(settings, c) for c in notify.CHANNELS):
        thread = threading.Thread(
            target=_worker, args=(app, stop), daemon=True, name="mastwatch-notify"
        )
        thread.start()
    yield
    stop.set()
    if thread is not None:
        thread.join(timeout=5)


router = APIRouter(tags=["health"], lifespan=lifespan)


class BaselineSet(BaseModel):
    sweep_id: int = Field(description="the sweep to judge this antenna against")
    reason: str = Field(default="", max_length=2000, description="why (e.g. 'after repair')")


@router.put("/antennas/{antenna_id}/baseline")
def set_baseline(antenna_id: int, body: BaselineSet, session: SessionDep) -> dict[str, Any]:
    """Confirm a sweep as the antenna's baseline; earlier ones stay in the history."""
    b = health_records.set_baseline(session, antenna_id, body.sweep_id, body.reason)
    return {
        "antenna_id": b.antenna_id,
        "sweep_id": b.sweep_id,
        "set_at": b.set_at,
        "ended_at": b.ended_at,
        "reason": b.reason,
    }


@router.get("/antennas/{antenna_id}/health")
def antenna_health(antenna_id: int, session: SessionDep) -> dict[str, Any]:
    return health_records.antenna_health(session, antenna_id)


@router.get("/sites/{site_id}/check")
def site_check(
    site_id: int,
    session: SessionDep,
    since: Annotated[str, Query(description="an event id of the site, or an ISO date/time")],
) -> dict[str, Any]:
    return sitecheck.site_check(session, site_id, since)


@router.get("/board")
def status_board(session: SessionDep, settings: SettingsDep) -> dict[str, Any]:
    return board_service.board(session, settings)
