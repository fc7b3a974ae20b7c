"""Reading an uploaded file part with the configured size limit (413 past it)."""

from __future__ import annotations

from fastapi import UploadFile

from mastwatch.api.limits import too_large_message
from mastwatch.services.errors import Invalid, TooLarge

CHUNK = 256 * 1024


def read_upload(file: UploadFile, limit: int) -> tuple[bytes, str]:
    """The part's bytes and file name; stops reading as soon as ``limit`` is passed."""
    chunks: list[bytes] = []
    total = 0
    while chunk := file.file.read(CHUNK):
        total += len(chunk)
        if total > limit:
            raise TooLarge(too_large_message(limit))
        chunks.append(chunk)
    if total == 0:
        raise Invalid("the uploaded file is empty")
    name = (file.filename or "").replace("\\", "/").rsplit("/", 1)[-1] or "sweep"
    return b"".join(chunks), name[:255]
