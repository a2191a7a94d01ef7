"""GET /docs: Swagger UI served from the installed ``swagger-ui-bundle-v2`` package.

Nothing is fetched from a CDN, so the page works on a shop's network without internet.
The page holds no inline script (its start-up script is a file served here), and every
answer carries a Content-Security-Policy that allows only this origin.
``GEARWORK_DOCS=false`` leaves the routes out.
"""

from __future__ import annotations

import hashlib
from functools import lru_cache

from fastapi import FastAPI, Request
from starlette.responses import Response
from swagger_ui_bundle import swagger_ui_path

from service.http.problems import ProblemError

__all__ = ["CSP", "install_docs"]

CSP = (
    "default-src 'none'; script-src 'self'; style-src 'self' 'unsafe-inline'; "
    "img-src 'self' data:; font-src 'self' data:; connect-src 'self'; base-uri 'none'; "
    "form-action 'none'; frame-ancestors 'none'"
)
_PAGE = b"""<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<title>gearwork API</title>
<link rel="stylesheet" href="/docs/swagger-ui.css">
</head>
<body>
<div id="swagger-ui"></div>
<script src="/docs/swagger-ui-bundle.js"></script>
<script src="/docs/start.js"></script>
</body>
</html>
"""
_START = b"""window.addEventListener("load", function () {
  window.ui = SwaggerUIBundle({
    url: "/openapi.json",
    dom_id: "#swagger-ui",
    deepLinking: true,
    presets: [SwaggerUIBundle.presets.apis],
    layout: "BaseLayout"
  });
});
"""
_TYPES = {
    "swagger-ui.css": "text/css; charset=utf-8",
    "swagger-ui-bundle.js": "text/javascript; charset=utf-8",
    "start.js": "text/javascript; charset=utf-8",
}


@lru_cache(maxsize=len(_TYPES) + 1)
def _asset(name: str) -> tuple[bytes, str]:
    """The file's bytes and a weak ETag of them, read once per process."""
    if name == "":
        body = _PAGE
    elif name == "start.js":
        body = _START
    else:
        body = (swagger_ui_path / name).read_bytes()
    return body, 'W/"' + hashlib.sha256(body).hexdigest()[:20] + '"'


def _serve(name: str, media: str, request: Request) -> Response:
    body, etag = _asset(name)
    headers = {
        "ETag": etag,
        "Cache-Control": "no-cache",
        "Content-Security-Policy": CSP,
        "Referrer-Policy": "no-referrer",
    }
    if etag in (t.strip() for t in request.headers.get("if-none-match", "").split(",")):
        return Response(status_code=304, headers=headers)
    return Response(body, media_type=media, headers=headers)


def install_docs(app: FastAPI) -> None:
    """Add GET /docs and its assets to ``app`` (left out of the OpenAPI document)."""

    @app.get("/docs", include_in_schema=False)
    async def docs_page(request: Request) -> Response:
        return _serve("", "text/html; charset=utf-8", request)

    @app.get("/docs/{name}", include_in_schema=False)
    async def docs_asset(name: str, request: Request) -> Response:
        if name not in _TYPES:
            raise ProblemError(404, f"No such docs asset: {name[:60]!r}.")
        return _serve(name, _TYPES[name], request)
