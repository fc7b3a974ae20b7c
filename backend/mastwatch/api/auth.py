"""Who may change the records: the keeper token.

Members read everything (the board, the plots, the verdicts) without logging in. When
the server has ``MASTWATCH_KEEPER_TOKEN`` set, every request that changes a record
(POST, PUT, PATCH, DELETE under /api/v1) must carry ``Authorization: Bearer <token>``;
without the setting the API stays open, for a trusted LAN, and the server says so at
start. ``POST /analyze`` stores nothing, so it stays open: members may check a file of
their own.

One shared secret, not accounts: a club has a few keepers who sweep, and a token is
what a laptop's outbox and a browser can both keep. The comparison is constant-time
(``hmac.compare_digest``) on SHA-256 digests of both: equal lengths, so neither the token
nor its length can be guessed from response times. The settings refuse a token that a
header cannot carry (RFC 6750 b64token characters only).
"""

from __future__ import annotations

import hashlib
import hmac

from fastapi import Depends, HTTPException, Request
from fastapi.security import HTTPAuthorizationCredentials, HTTPBearer

from mastwatch.settings import Settings

READ_METHODS = frozenset({"GET", "HEAD", "OPTIONS"})
OPEN_WRITES = frozenset({("POST", "/analyze")})
"""(method, route path) pairs that change nothing, though they are not reads. FastAPI
records an included route's path without the /api/v1 prefix."""

bearer = HTTPBearer(
    auto_error=False,
    scheme_name="keeper token",
    description="MASTWATCH_KEEPER_TOKEN of the server; needed to change records when set.",
)


def _digest(token: str) -> bytes:
    # Starlette decodes header values as Latin-1; any text encodes as UTF-8, so a stray
    # non-ASCII character in a sent token is just a wrong token, never an error.
    return hashlib.sha256(token.encode("utf-8")).digest()


def require_keeper(
    request: Request,
    credentials: HTTPAuthorizationCredentials | None = Depends(bearer),
) -> None:
    """Refuse (401) a change to the records without the keeper token, when one is set."""
    settings: Settings = request.app.state.settings
    if settings.keeper_token is None or request.method in READ_METHODS:
        return
    route = request.scope.get("route")
    if (request.method, getattr(route, "path", None)) in OPEN_WRITES:
        return
    challenge = {"WWW-Authenticate": "Bearer"}
    if credentials is None:
        raise HTTPException(
            401,
            "changing the records needs the keeper token: send the header "
            "'Authorization: Bearer <token>' (the server's MASTWATCH_KEEPER_TOKEN)",
            headers=challenge,
        )
    if not hmac.compare_digest(
        _digest(credentials.credentials), _digest(settings.keeper_token.get_secret_value())
    ):
        raise HTTPException(401, "the keeper token is not the server's", headers=challenge)
