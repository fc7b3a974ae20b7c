"""POST /analyze: metrics of an uploaded file without storing anything (preview)."""

from __future__ import annotations

from typing import Annotated, Any, Literal

from fastapi import APIRouter, File, Form, UploadFile
from pydantic import BeforeValidator

from mastwatch.api.deps import SessionDep, SettingsDep
from mastwatch.api.schemas.records import Region
from mastwatch.api.schemas.sweeps import AnalyzeResult
from mastwatch.api.uploads import read_upload
from mastwatch.services import preview

router = APIRouter(tags=["analyze"])


def _region_from_form(value: object) -> object:
    # A multipart field is always text: "2" must reach Literal[1, 2, 3] as the int 2.
    # An empty field means "not given" (the default region); anything else is left for
    # the Literal to refuse with "Input should be 1, 2 or 3".
    if isinstance(value, str):
        text = value.strip()
        if not text:
            return None
        return int(text) if text in ("1", "2", "3") else text
    return value


FormRegion = Annotated[
    Region | None,
    BeforeValidator(_region_from_form),
    Form(description="ITU region of the band plan (1, 2 or 3); default: the setting"),
]


@router.post("/analyze", response_model=AnalyzeResult)
def analyze(
    session: SessionDep,
    settings: SettingsDep,
    file: Annotated[UploadFile, File()],
    reference_plane: Annotated[Literal["feedpoint", "line_input"], Form()] = "feedpoint",
    feedline: Annotated[
        str | None, Form(description="line-input sweeps: 'RG-213:30m' or 'RG-213:98.4ft:2'")
    ] = None,
    cable_type_id: Annotated[int | None, Form()] = None,
    length_m: Annotated[float | None, Form(gt=0)] = None,
    connectors: Annotated[int, Form(ge=0)] = 0,
    itu_region: FormRegion = None,
    max_points: Annotated[int, Form(ge=16, le=5000)] = preview.PREVIEW_POINTS,
    columns: Annotated[str | None, Form()] = None,
) -> dict[str, Any]:
    data, filename = read_upload(file, settings.max_upload_bytes)
    line = preview.resolve_feedline(session, feedline, cable_type_id, length_m, connectors)
    return preview.preview(
        session,
        data,
        filename,
        reference_plane=reference_plane,
        feedline=line,
        region=itu_region or settings.default_region,
        max_points=max_points,
        columns=columns,
    )
