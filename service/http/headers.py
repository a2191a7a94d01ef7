"""Response headers for web callers: caching, Vary, nosniff; CORS with problem details.

``ResponseHeaders`` (pure ASGI) sets on every answer:

- ``X-Content-Type-Options: nosniff``;
- calculation results (POST under ``/v1/``, 200 or 304): ``Cache-Control: private,
  no-cache`` (kept, but revalidated with the ``ETag`` through ``If-None-Match``), or
  ``private, max-age=N`` when ``GEARWORK_RESULT_MAX_AGE_S`` is N > 0, and
  ``Vary: Accept, Accept-Encoding``: the body depends on the request body, on ``Accept``
  and on the encoding;
- errors (status 400 and up) and the probes (``/healthz``, ``/readyz``, ``/metrics``):
  ``Cache-Control: no-store``;
- a gzipped answer's strong ``ETag`` becomes weak (``W/"..."``): the tag names the
  content, not the encoded bytes (RFC 9110, 8.8.3);
- HTML reports and SVG charts (``text/html`` or ``image/svg+xml`` under ``/v1/``):
  ``Content-Security-Policy`` ``DOCUMENT_CSP``: no script, no fetch, nothing from
  elsewhere, only their own inline styles and data: images, never framed; a document
  opened from a shop's job system cannot run or load anything.

``ProblemCORS`` is Starlette's CORS middleware whose refused preflight is a 403 problem
document instead of plain text.
"""

from __future__ import annotations

from starlette.datastructures import Headers
from starlette.middleware.cors import CORSMiddleware
from starlette.types import ASGIApp, Message, Receive, Scope, Send

from service.http.problems import problem_response

__all__ = ["DOCUMENT_CSP", "ProblemCORS", "ResponseHeaders", "merge_vary"]

DOCUMENT_CSP = (
    b"default-src 'none'; style-src 'unsafe-inline'; img-src data:; base-uri 'none'; "
    b"form-action 'none'; frame-ancestors 'none'"
)
_DOCUMENTS = (b"text/html", b"image/svg+xml")
_NO_STORE = b"no-store"
_PROBES = frozenset({"/healthz", "/readyz", "/metrics"})


def merge_vary(values: list[bytes]) -> bytes:
    """One ``Vary`` value from several, each field name once, first spelling kept.

    >>> merge_vary([b"Accept-Encoding", b"origin", b"Accept, Origin"])
    b'Accept-Encoding, origin, Accept'
    """
    seen: dict[bytes, bytes] = {}
    for value in values:
        for part in value.split(b","):
            name = part.strip()
            if name and name.lower() not in seen:
                seen[name.lower()] = name
    return b", ".join(seen.values())


class ResponseHeaders:
    """Cache and content headers on every answer (see the module doc)."""

    def __init__(self, app: ASGIApp, *, result_max_age_s: int, prefix: str = "/v1/") -> None:
        self.app = app
        self.prefix = prefix
        self.result_cache_control = (
            b"private, no-cache"
            if result_max_age_s <= 0
            else b"private, max-age=%d" % result_max_age_s
        )

    async def __call__(self, scope: Scope, receive: Receive, send: Send) -> None:
        if scope["type"] != "http":
            await self.app(scope, receive, send)
            return
        path: str = scope.get("path", "")
        is_result = scope["method"] == "POST" and path.startswith(self.prefix)
        is_probe = path in _PROBES

        async def send_with_headers(message: Message) -> None:
            if message["type"] == "http.response.start":
                message = {**message, "headers": self._headers(message, is_result, is_probe)}
            await send(message)

        await self.app(scope, receive, send_with_headers)

    def _headers(
        self, message: Message, is_result: bool, is_probe: bool
    ) -> list[tuple[bytes, bytes]]:
        status = int(message["status"])
        out: list[tuple[bytes, bytes]] = []
        vary: list[bytes] = []
        gzipped = False
        has_cache_control = False
        document = False
        for name, value in message.get("headers", ()):
            if name == b"vary":
                vary.append(value)
                continue
            if name == b"content-encoding" and value == b"gzip":
                gzipped = True
            elif name == b"cache-control":
                has_cache_control = True
            elif name == b"content-type":
                document = value.split(b";")[0].strip().lower() in _DOCUMENTS
            out.append((name, value))
        if document and is_result:
            out.append((b"content-security-policy", DOCUMENT_CSP))
        if gzipped:
            out = [(n, b"W/" + v if n == b"etag" and v.startswith(b'"') else v) for n, v in out]
        out.append((b"x-content-type-options", b"nosniff"))
        if status >= 400 or is_probe:
            out = [(n, v) for n, v in out if n != b"cache-control"]
            out.append((b"cache-control", _NO_STORE))
        elif is_result and status in (200, 304):
            if not has_cache_control:
                out.append((b"cache-control", self.result_cache_control))
            vary.append(b"Accept, Accept-Encoding")
        if vary:
            out.append((b"vary", merge_vary(vary)))
        return out


class ProblemCORS(CORSMiddleware):
    """CORS for configured origins; a refused preflight is a 403 problem document."""

    async def __call__(self, scope: Scope, receive: Receive, send: Send) -> None:
        if scope["type"] != "http":
            await self.app(scope, receive, send)
            return
        headers = Headers(scope=scope)
        if (
            scope["method"] == "OPTIONS"
            and "origin" in headers
            and "access-control-request-method" in headers
        ):
            response = self.preflight_response(request_headers=headers)
            if response.status_code >= 400:
                refused = bytes(response.body).decode().removeprefix("Disallowed CORS ")
                response = problem_response(
                    403,
                    f"Cross-origin request refused: {refused} not allowed.",
                    scope.get("path", ""),
                    slug="cors-refused",
                    headers={
                        k: v
                        for k, v in response.headers.items()
                        if k.lower() not in ("content-length", "content-type")
                    },
                )
            await response(scope, receive, send)
            return
        await self.simple_response(scope, receive, send, request_headers=headers)
