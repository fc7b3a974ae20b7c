"""Request body limit, enforced while the body is read (not after it is all in memory).

A request whose Content-Length already exceeds the limit gets 413 before any byte is
read; a chunked or lying request is cut off as soon as the running count passes it.
The limit is the upload limit plus room for the multipart framing and form fields; the
upload route checks the file part against ``max_upload_bytes`` exactly.
"""

from __future__ import annotations

import json

from starlette.exceptions import HTTPException
from starlette.types import ASGIApp, Message, Receive, Scope, Send

FORM_OVERHEAD_BYTES = 64 * 1024


def too_large_message(limit: int) -> str:
    return f"the upload is larger than the limit of {limit} bytes ({limit / 1e6:.1f} MB)"


class BodyLimit:
    """Pure ASGI middleware: 413 for request bodies over ``file_limit + FORM_OVERHEAD_BYTES``."""

    def __init__(self, app: ASGIApp, file_limit: int) -> None:
        self.app = app
        self.file_limit = file_limit
        self.max_body = file_limit + FORM_OVERHEAD_BYTES

    async def __call__(self, scope: Scope, receive: Receive, send: Send) -> None:
        if scope["type"] != "http":
            await self.app(scope, receive, send)
            return
        length = dict(scope.get("headers", ())).get(b"content-length")
        if length is not None and length.isdigit() and int(length) > self.max_body:
            body = json.dumps({"detail": too_large_message(self.file_limit), "line": None})
            await send(
                {
                    "type": "http.response.start",
                    "status": 413,
                    "headers": [(b"content-type", b"application/json")],
                }
            )
            await send({"type": "http.response.body", "body": body.encode()})
            return
        received = 0

        async def limited_receive() -> Message:
            nonlocal received
            message = await receive()
            if message["type"] == "http.request":
                received += len(message.get("body", b""))
                if received > self.max_body:
                    # FastAPI re-raises HTTPException from body reading; our handler shapes it.
                    raise HTTPException(413, too_large_message(self.file_limit))
            return message

        await self.app(scope, limited_receive, send)
