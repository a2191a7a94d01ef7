"""ASGI middleware that bounds what one request body may cost before any parsing.

``BodySizeLimit``: a body over the limit is answered 413 (declared or streamed).

The work of each calculation is bounded by the request schema (at most 2000 curve points,
12 gears, 2000 table rows, fixed integration grids and a fixed search budget), so no
accepted input runs long; service.http.admission bounds how many wait and for how long, and
service.http.protocol bounds the request line and headers.
"""

from __future__ import annotations

import contextlib

from starlette.types import ASGIApp, Message, Receive, Scope, Send

from service.http.body import no_body
from service.http.problems import problem_response

__all__ = ["BodySizeLimit"]


class _BodyTooLargeError(Exception):
    pass


class BodySizeLimit:
    """Answer 413 to any request whose body exceeds ``max_bytes``.

    The declared ``Content-Length`` is checked first; a chunked body is counted as it
    streams in, so an undeclared oversize body is cut off too.
    """

    def __init__(self, app: ASGIApp, max_bytes: int) -> None:
        self.app = app
        self.max_bytes = max_bytes

    async def __call__(self, scope: Scope, receive: Receive, send: Send) -> None:
        if scope["type"] != "http":
            await self.app(scope, receive, send)
            return
        path = scope.get("path", "")
        for name, value in scope.get("headers", []):
            if name == b"content-length":
                try:
                    declared = int(value)
                except ValueError:
                    declared = 0
                if declared > self.max_bytes:
                    await self._reject(path, scope, send)
                    return
        seen = 0
        exceeded = False
        started = False

        async def counted_receive() -> Message:
            nonlocal seen, exceeded
            message = await receive()
            if message["type"] == "http.request":
                seen += len(message.get("body", b""))
                if seen > self.max_bytes:
                    exceeded = True
                    raise _BodyTooLargeError
            return message

        async def guarded_send(message: Message) -> None:
            nonlocal started
            if exceeded:
                return  # the app's answer to a cut-off body is replaced by the 413
            if message["type"] == "http.response.start":
                started = True
            await send(message)

        with contextlib.suppress(_BodyTooLargeError):
            await self.app(scope, counted_receive, guarded_send)
        if exceeded and not started:
            await self._reject(path, scope, send)

    async def _reject(self, path: str, scope: Scope, send: Send) -> None:
        response = problem_response(
            413, f"The request body exceeds the limit of {self.max_bytes} bytes.", path
        )
        await response(scope, no_body, send)
