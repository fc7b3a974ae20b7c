"""Serving the browser frontend: the static files under ``frontend/`` and plotly.js.

    GET /                       frontend/index.html (the page shell; hash routing inside)
    GET /assets/{path}          frontend/<path> (CSS, ES modules), revalidated on each load
    GET /vendor/plotly.min.js   the plotly.js bundle of the installed ``plotly`` package,
                                gzip-compressed once in memory, cached for a year
    GET /ui/config              what the pages need to know about this server: the stale
                                age from settings and which optional API routes exist
                                (health, board, DTF, matching land in other issues), so
                                pages never probe for them with failing requests

No CDN and no build step: everything the pages need comes from this process, so the app
works at a field site with no internet. The router holds no business logic; the pages call
``/api/v1`` like any other client.
"""

from __future__ import annotations

import gzip
import hashlib
import mimetypes
import re
from functools import lru_cache
from pathlib import Path
from typing import Any

import plotly
from fastapi import APIRouter, HTTPException, Request
from fastapi.responses import FileResponse, Response

# The repository's frontend/ directory (the package is installed in editable mode).
FRONTEND_DIR = Path(__file__).resolve().parents[3] / "frontend"
PLOTLY_JS = Path(plotly.__file__).parent / "package_data" / "plotly.min.js"

# plotly.js is versioned by the installed package, so it may be cached for a long time;
# our own files change with the app and are revalidated (ETag) on every load.
LONG_CACHE = "public, max-age=31536000, immutable"
SHORT_CACHE = "no-cache"

# API routes other issues add; the pages hide what the server does not have yet.
OPTIONAL_ROUTES = {
    "board": "/api/v1/board",
    "health": "/api/v1/antennas/{antenna_id}/health",
    "baseline": "/api/v1/antennas/{antenna_id}/baseline",
    "check": "/api/v1/sites/{site_id}/check",
    "dtf": "/api/v1/sweeps/{sweep_id}/dtf",
    "match": "/api/v1/sweeps/{sweep_id}/match",
}

# ES modules must be served as JavaScript or the browser refuses to run them.
mimetypes.add_type("text/javascript", ".js")
mimetypes.add_type("text/css", ".css")
mimetypes.add_type("image/svg+xml", ".svg")


@lru_cache(maxsize=4)
def _compressed(path: Path) -> tuple[bytes, bytes, str]:
    """A file's bytes, its gzip form and an ETag, read and compressed once per process."""
    raw = path.read_bytes()
    return raw, gzip.compress(raw, compresslevel=6, mtime=0), hashlib.sha256(raw).hexdigest()[:16]


def _shape(path: str) -> str:
    """A route path with its parameter names blanked: /a/{x}/b and /a/{y}/b are one shape."""
    return re.sub(r"\{[^}]*\}", "{}", path)


def _accepts_gzip(request: Request) -> bool:
    return "gzip" in request.headers.get("accept-encoding", "").lower()


def _resolve(frontend_dir: Path, rel: str) -> Path:
    """The file under ``frontend_dir`` named by ``rel``; 404 for anything outside it."""
    root = frontend_dir.resolve()
    target = (root / rel).resolve()
    if not target.is_relative_to(root) or not target.is_file():
        raise HTTPException(status_code=404, detail=f"no frontend file {rel!r}")
    return target


def make_router(frontend_dir: Path = FRONTEND_DIR, plotly_js: Path = PLOTLY_JS) -> APIRouter:
    """The routes serving the frontend (include with ``app.include_router``)."""
    router = APIRouter(include_in_schema=False)

    def _gzipped(request: Request, path: Path, cache: str) -> Response:
        raw, packed, etag = _compressed(path)
        headers = {"Cache-Control": cache, "ETag": f'"{etag}"', "Vary": "Accept-Encoding"}
        if request.headers.get("if-none-match") == f'"{etag}"':
            return Response(status_code=304, headers=headers)
        media = mimetypes.guess_type(path.name)[0] or "application/octet-stream"
        if _accepts_gzip(request):
            headers["Content-Encoding"] = "gzip"
            return Response(packed, media_type=media, headers=headers)
        return Response(raw, media_type=media, headers=headers)

    @router.get("/")
    def index() -> FileResponse:
        return FileResponse(
            _resolve(frontend_dir, "index.html"), headers={"Cache-Control": SHORT_CACHE}
        )

    @router.get("/assets/{rel:path}")
    def asset(rel: str) -> FileResponse:
        path = _resolve(frontend_dir, rel)
        media = mimetypes.guess_type(path.name)[0]
        return FileResponse(path, media_type=media, headers={"Cache-Control": SHORT_CACHE})

    @router.get("/ui/config")
    def ui_config(request: Request) -> dict[str, Any]:
        paths = {_shape(p) for p in request.app.openapi().get("paths", {})}
        settings = getattr(request.app.state, "settings", None)
        return {
            "stale_after_days": getattr(settings, "stale_after_days", None),
            "features": {name: _shape(path) in paths for name, path in OPTIONAL_ROUTES.items()},
        }

    @router.get("/vendor/plotly.min.js")
    def plotly_bundle(request: Request) -> Response:
        if not plotly_js.is_file():
            raise HTTPException(status_code=404, detail=f"plotly.js not found at {plotly_js}")
        return _gzipped(request, plotly_js, LONG_CACHE)

    return router


router = make_router()
