"""Sweeps: upload (multipart), list, read, delete, plot arrays, original file, export."""

from __future__ import annotations

from datetime import datetime
from typing import Annotated, Any, Literal

from fastapi import APIRouter, File, Form, Query, Response, UploadFile, status
from pydantic import TypeAdapter

from mastwatch.api.deps import SessionDep, SettingsDep
from mastwatch.api.schemas.sweeps import (
    SweepData,
    SweepDetail,
    SweepPublic,
    SweepsPage,
    SweepUpdate,
    UploadResult,
)
from mastwatch.api.uploads import read_upload
from mastwatch.db.models import Sweep as SweepRow
from mastwatch.services import ingest, sweeps

router = APIRouter(tags=["sweeps"])
UPLOAD_JSON = TypeAdapter(UploadResult)

PlaneParam = Literal["measured", "feedpoint"]


def detail(row: SweepRow, **extra: Any) -> dict[str, Any]:
    public = SweepPublic.model_validate(row).model_dump()
    return {**public, "metrics": sweeps.plane_metrics(row), **extra}


@router.post(
    "/antennas/{antenna_id}/sweeps",
    status_code=status.HTTP_201_CREATED,
    response_model=UploadResult,
    responses={
        200: {"description": "the same file was already stored for this antenna"},
        413: {"description": "file over the upload limit"},
        422: {"description": "not a readable sweep file (detail and line)"},
    },
)
def upload_sweep(
    antenna_id: int,
    session: SessionDep,
    settings: SettingsDep,
    file: Annotated[UploadFile, File(description="Touchstone (.s1p/.s2p) or CSV sweep")],
    measured_at: Annotated[
        datetime | None,
        Form(description="when it was measured; naive = site's local time; default: the file's"),
    ] = None,
    reference_plane: Annotated[Literal["feedpoint", "line_input"], Form()] = "feedpoint",
    operator: Annotated[str, Form(max_length=100)] = "",
    conditions: Annotated[str, Form()] = "",
    notes: Annotated[str, Form()] = "",
    columns: Annotated[str | None, Form(description="CSV column spec, e.g. freq:MHz,re,im")] = None,
) -> Response:
    data, filename = read_upload(file, settings.max_upload_bytes)
    meta = ingest.UploadMeta(measured_at, reference_plane, operator, conditions, notes, columns)
    result = ingest.ingest_sweep(session, antenna_id, data, filename, meta)
    if not result.created:
        doc = detail(result.sweep, duplicate=True)
    else:
        public = SweepPublic.model_validate(result.sweep).model_dump()
        doc = {**public, "metrics": result.extra["metrics"], "duplicate": False}
    # Validated and encoded in pydantic-core in one pass (the default response path
    # encodes the same document a second time in Python).
    return Response(
        UPLOAD_JSON.dump_json(UPLOAD_JSON.validate_python(doc)),
        status_code=status.HTTP_201_CREATED if result.created else status.HTTP_200_OK,
        media_type="application/json",
    )


@router.get("/antennas/{antenna_id}/sweeps", response_model=SweepsPage)
def list_sweeps(
    antenna_id: int,
    session: SessionDep,
    limit: Annotated[int, Query(ge=1, le=500)] = 50,
    offset: Annotated[int, Query(ge=0)] = 0,
    since: datetime | None = None,
    until: datetime | None = None,
) -> SweepsPage:
    """Newest first. ``since``/``until`` bound measured_at (ISO 8601 with zone)."""
    page = sweeps.list_sweeps(
        session, antenna_id, limit=limit, offset=offset, since=since, until=until
    )
    return SweepsPage(
        items=[SweepPublic.model_validate(r) for r in page.items],
        total=page.total,
        limit=page.limit,
        offset=page.offset,
    )


@router.get("/sweeps/{sweep_id}", response_model=SweepDetail)
def get_sweep(sweep_id: int, session: SessionDep) -> dict[str, Any]:
    return detail(sweeps.get_sweep(session, sweep_id))


@router.patch("/sweeps/{sweep_id}", response_model=SweepDetail)
def update_sweep(sweep_id: int, body: SweepUpdate, session: SessionDep) -> dict[str, Any]:
    """Change the sweep's time, operator, conditions or notes (the data stays as uploaded)."""
    return detail(sweeps.update_sweep(session, sweep_id, body.model_dump(exclude_unset=True)))


@router.delete("/sweeps/{sweep_id}", status_code=status.HTTP_204_NO_CONTENT)
def delete_sweep(sweep_id: int, session: SessionDep) -> Response:
    sweeps.delete_sweep(session, sweep_id)
    return Response(status_code=status.HTTP_204_NO_CONTENT)


@router.get("/sweeps/{sweep_id}/data", response_model=SweepData)
def sweep_data(
    sweep_id: int,
    session: SessionDep,
    max_points: Annotated[int | None, Query(ge=16, le=200_000)] = None,
) -> dict[str, Any]:
    """Arrays for plots at both planes; ``max_points`` decimates, keeping min and band edges."""
    return sweeps.sweep_data(session, sweep_id, max_points)


def _attachment(filename: str) -> dict[str, str]:
    from urllib.parse import quote

    safe = filename.replace('"', "")
    ascii_name = safe.encode("ascii", "replace").decode().replace("?", "_")
    value = f"attachment; filename=\"{ascii_name}\"; filename*=UTF-8''{quote(safe)}"
    return {"Content-Disposition": value}


@router.get(
    "/sweeps/{sweep_id}/file",
    response_class=Response,
    responses={200: {"content": {"application/octet-stream": {}}}},
)
def sweep_file(sweep_id: int, session: SessionDep) -> Response:
    """The original uploaded bytes, unchanged, under the original file name."""
    data, filename = sweeps.original_file(session, sweep_id)
    return Response(data, media_type="application/octet-stream", headers=_attachment(filename))


@router.get(
    "/sweeps/{sweep_id}/touchstone",
    response_class=Response,
    responses={200: {"content": {"text/plain": {}}}},
)
def sweep_touchstone(
    sweep_id: int, session: SessionDep, plane: PlaneParam = "measured"
) -> Response:
    """Touchstone v1 (``# Hz S RI R z0``) at the measured or the feedpoint plane."""
    text, filename = sweeps.export_touchstone(session, sweep_id, plane)
    return Response(text, media_type="text/plain; charset=utf-8", headers=_attachment(filename))
