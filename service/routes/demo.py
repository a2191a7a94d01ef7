"""Reference web page at GET /demo: static HTML, JavaScript and CSS from service/static.

The page calls POST /v1/shift-plan, /v1/acceleration-run and /v1/speedometer-correction
from the browser and draws the answers itself; it needs no build step, has no inline script,
style or handler, and loads nothing from elsewhere (its Content-Security-Policy allows only
this origin). The routes are left out of the OpenAPI document: they serve a page, not
the API.
"""

from __future__ import annotations

import hashlib
from functools import lru_cache
from pathlib import Path

from fastapi import APIRouter, Request
from starlette.responses import Response

from service.http.problems import ProblemError

__all__ = ["router"]

router = APIRouter(tags=["demo"])

STATIC = Path(__file__).resolve().parent.parent / "static"
_TYPES = {
    "demo.html": "text/html; charset=utf-8",
    "demo.js": "text/javascript; charset=utf-8",
    "demo-form.js": "text/javascript; charset=utf-8",
    "demo.css": "text/css; charset=utf-8",
}
_CSP = (
    "default-src 'none'; script-src 'self'; style-src 'self'; img-src 'self' data:; "
    "connect-src 'self'; base-uri 'none'; form-action 'none'; frame-ancestors 'none'"
)


@lru_cache(maxsize=len(_TYPES))
def _asset(name: str) -> tuple[bytes, str]:
    """The file's bytes and a weak ETag of them, read once per process."""
    body = (STATIC / name).read_bytes()
    return body, 'W/"' + hashlib.sha256(body).hexdigest()[:20] + '"'


def _serve(name: str, request: Request) -> Response:
    body, etag = _asset(name)
    headers = {
        "ETag": etag,
        "Cache-Control": "no-cache",
        "Content-Security-Policy": _CSP,
        "Referrer-Policy": "no-referrer",
    }
    tags = request.headers.get("if-none-match", "")
    if etag in (t.strip() for t in tags.split(",")):
        return Response(status_code=304, headers=headers)
    return Response(body, media_type=_TYPES[name], headers=headers)


@router.get("/demo", include_in_schema=False)
async def demo_page(request: Request) -> Response:
    """The page: a curve, drivetrain and car in; chart, shifts, run and speedometer out."""
    return _serve("demo.html", request)


@router.get("/demo/{name}", include_in_schema=False)
async def demo_asset(name: str, request: Request) -> Response:
    """The page's scripts and style sheet."""
    if name not in _TYPES or name == "demo.html":
        raise ProblemError(404, f"No such demo asset: {name[:60]!r}.")
    return _serve(name, request)
