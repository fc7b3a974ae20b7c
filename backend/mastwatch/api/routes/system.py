"""GET /healthz: the process is up, the database answers and its schema is current."""

from __future__ import annotations

from fastapi import APIRouter, Request
from fastapi.responses import JSONResponse
from sqlalchemy import text
from sqlalchemy.exc import SQLAlchemyError

from mastwatch.api.errors import error_body
from mastwatch.db.migrate import DatabaseNotCurrent, check_current, current_revision

router = APIRouter(tags=["system"])


@router.get(
    "/healthz",
    summary="Liveness and readiness",
    responses={503: {"description": "database unreachable or migrations behind"}},
)
def healthz(request: Request) -> JSONResponse:
    engine = request.app.state.engine
    try:
        with engine.connect() as conn:
            conn.execute(text("SELECT 1"))
    except SQLAlchemyError as exc:
        body = error_body(f"database unreachable: {type(exc).__name__}")
        return JSONResponse({**body, "database": "unreachable"}, status_code=503)
    try:
        check_current(engine)
    except DatabaseNotCurrent as exc:
        return JSONResponse({**error_body(str(exc)), "database": "behind"}, status_code=503)
    return JSONResponse(
        {
            "status": "ok",
            "database": "ok",
            "revision": current_revision(engine),
            "changes_need_token": request.app.state.settings.keeper_token is not None,
        }
    )
