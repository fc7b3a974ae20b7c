"""GET /antennas/{id}/archive: the antenna's whole record as one zip (services/archive.py)."""

from __future__ import annotations

import tempfile

from fastapi import APIRouter
from fastapi.responses import StreamingResponse
from starlette.background import BackgroundTask

from mastwatch.api.deps import SessionDep
from mastwatch.api.schemas.records import AntennaPublic, EventPublic, SitePublic
from mastwatch.services import archive, events
from mastwatch.services.antennas import get_antenna

router = APIRouter(tags=["antennas"])

SPOOL_BYTES = 32 * 1024 * 1024
"""Archives up to this size are built in memory; larger ones spill to a temporary file."""
CHUNK = 64 * 1024


@router.get(
    "/antennas/{antenna_id}/archive",
    response_class=StreamingResponse,
    responses={200: {"content": {"application/zip": {}}, "description": "the record as zip"}},
)
def antenna_archive(antenna_id: int, session: SessionDep) -> StreamingResponse:
    """Every sweep file of the antenna byte for byte, its sweeps and metrics as CSV, and
    its record (site, feedline, events) as JSON."""
    antenna = get_antenna(session, antenna_id)
    record = {
        "antenna": AntennaPublic.model_validate(antenna).model_dump(mode="json"),
        "site": SitePublic.model_validate(antenna.site).model_dump(mode="json"),
        "events": [
            EventPublic.model_validate(e).model_dump(mode="json")
            for e in events.events_of(session, antenna)
        ],
    }
    name = archive.archive_name(antenna)
    spool = tempfile.SpooledTemporaryFile(max_size=SPOOL_BYTES)  # noqa: SIM115 (closed below)
    try:
        archive.write_archive(session, antenna, record, spool)
    except BaseException:
        spool.close()
        raise
    spool.seek(0)
    return StreamingResponse(
        iter(lambda: spool.read(CHUNK), b""),
        media_type="application/zip",
        headers={"Content-Disposition": f'attachment; filename="{name}"'},
        background=BackgroundTask(spool.close),
    )
