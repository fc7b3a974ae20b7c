"""One JSON error shape for every 4xx: ``{"detail": str, "line": int | null}``.

SweepFormatError          → 422, line = the file's 1-based line (or null)
AnalysisError / RFError   → 422
ServiceError subclasses   → their status (NotFound 404, Conflict 409, Invalid 422, ...)
RequestValidationError    → 422, detail names each bad field
HTTPException             → its status (404 unknown path, 405, 413 body too large)
"""

from __future__ import annotations

import logging
from typing import Any

from fastapi import FastAPI, Request
from fastapi.exceptions import RequestValidationError
from fastapi.responses import JSONResponse
from starlette.exceptions import HTTPException as StarletteHTTPException

from mastwatch.rf.errors import RFError, SweepFormatError
from mastwatch.services.errors import ServiceError

logger = logging.getLogger("mastwatch.api")


def error_body(detail: str, line: int | None = None) -> dict[str, Any]:
    return {"detail": detail, "line": line}


def error_response(status: int, detail: str, line: int | None = None) -> JSONResponse:
    return JSONResponse(error_body(detail, line), status_code=status)


def _field_path(loc: tuple[Any, ...] | list[Any]) -> str:
    parts = [str(p) for p in loc if p not in ("body", "query", "path", "header", "form")]
    return ".".join(parts) or "request"


def describe_validation(errors: list[Any]) -> str:
    """'name: Field required; itu_region: Input should be 1, 2 or 3' from pydantic errors."""
    return "; ".join(f"{_field_path(e.get('loc', ()))}: {e.get('msg', 'invalid')}" for e in errors)


async def _rf_error(_request: Request, exc: Exception) -> JSONResponse:
    assert isinstance(exc, RFError)
    line = exc.line if isinstance(exc, SweepFormatError) else None
    return error_response(422, exc.message, line)


async def _service_error(_request: Request, exc: Exception) -> JSONResponse:
    assert isinstance(exc, ServiceError)
    return error_response(exc.status_code, exc.message, exc.line)


async def _validation_error(_request: Request, exc: Exception) -> JSONResponse:
    assert isinstance(exc, RequestValidationError)
    return error_response(422, describe_validation(list(exc.errors())))


async def _http_error(_request: Request, exc: Exception) -> JSONResponse:
    assert isinstance(exc, StarletteHTTPException)
    detail = exc.detail if isinstance(exc.detail, str) else str(exc.detail)
    return JSONResponse(
        error_body(detail), status_code=exc.status_code, headers=getattr(exc, "headers", None)
    )


async def _internal_error(_request: Request, exc: Exception) -> JSONResponse:
    # A 5xx is always a bug: logged with its traceback, answered in the same shape.
    logger.error("unhandled error", exc_info=exc)
    return error_response(500, f"internal error ({type(exc).__name__}); this is a bug")


def install_error_handlers(app: FastAPI) -> None:
    app.add_exception_handler(RFError, _rf_error)
    app.add_exception_handler(ServiceError, _service_error)
    app.add_exception_handler(RequestValidationError, _validation_error)
    app.add_exception_handler(StarletteHTTPException, _http_error)
    app.add_exception_handler(Exception, _internal_error)
