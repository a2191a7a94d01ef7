"""ASGI middleware: gzip for callers that accept it, compressed off the event loop.

Starlette's ``GZipMiddleware`` compresses on the event loop, so a large answer (a long
trace, a sheet) holds up every other connection of the worker while it is squeezed. Here
the whole answer is gathered (every answer of this service is a bounded body sent at
once), and one large enough is compressed on a worker thread. The bytes are deterministic:
gzip's header carries no time stamp (``mtime=0``, RFC 1952 section 2.3.1 allows 0 for "no
time stamp"), so the same answer always gives the same compressed body.

Rules (as before): only when the request's ``Accept-Encoding`` names ``gzip``; never an
answer that already has a ``Content-Encoding``, or one smaller than ``minimum_size``;
``Vary: Accept-Encoding`` on every answer that could have been compressed.
"""

from __future__ import annotations

import gzip

import anyio.to_thread
from starlette.datastructures import Headers, MutableHeaders
from starlette.types import ASGIApp, Message, Receive, Scope, Send

__all__ = ["OffLoopGZip"]


def _accepts_gzip(scope: Scope) -> bool:
    """Whether the request's Accept-Encoding names gzip (without ``q=0``)."""
    for item in Headers(scope=scope).get("accept-encoding", "").split(","):
        coding, _, params = item.strip().partition(";")
        if coding.strip().lower() == "gzip":
            return params.replace(" ", "").lower() not in {"q=0", "q=0.0", "q=0.00", "q=0.000"}
    return False


class OffLoopGZip:
    """gzip large answers on a worker thread (see the module docstring)."""

    def __init__(self, app: ASGIApp, *, minimum_size: int = 1024, compresslevel: int = 5) -> None:
        self.app = app
        self.minimum_size = minimum_size
        self.compresslevel = compresslevel

    async def __call__(self, scope: Scope, receive: Receive, send: Send) -> None:
        if scope["type"] != "http" or not _accepts_gzip(scope):
            await self.app(scope, receive, send)
            return
        start: Message | None = None
        chunks: list[bytes] = []

        async def gather(message: Message) -> None:
            nonlocal start
            if message["type"] == "http.response.start":
                start = message
                return
            if message["type"] != "http.response.body" or start is None:
                await send(message)
                return
            chunks.append(message.get("body", b""))
            if not message.get("more_body", False):
                await self._send_whole(start, b"".join(chunks), send)

        await self.app(scope, receive, gather)

    async def _send_whole(self, start: Message, body: bytes, send: Send) -> None:
        headers = MutableHeaders(raw=list(start["headers"]))
        if "content-encoding" not in headers:
            headers.add_vary_header("Accept-Encoding")
            if len(body) >= self.minimum_size:
                body = await anyio.to_thread.run_sync(self._compress, body)
                headers["Content-Encoding"] = "gzip"
                headers["Content-Length"] = str(len(body))
        await send({**start, "headers": headers.raw})
        await send({"type": "http.response.body", "body": body, "more_body": False})

    def _compress(self, body: bytes) -> bytes:
        return gzip.compress(body, compresslevel=self.compresslevel, mtime=0)
