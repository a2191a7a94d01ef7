"""ASGI middleware that bounds what one request may cost before any parsing.

- ``BodySizeLimit``: a body over the limit is answered 413 (declared or streamed).
- ``InFlightLimit``: a worker holds at most so many requests at once; beyond that the
  answer is 503 with ``Retry-After``, at once, instead of a queue that grows without end.

The work of each calculation is bounded by the request schema (at most 2000 curve points,
12 gears, 2000 table rows, fixed integration grids and a fixed search budget), so no
accepted input runs long; these two limits bound what arrives and how much waits.
"""

from __future__ import annotations

import contextlib

from anyio.lowlevel import checkpoint
from starlette.types import ASGIApp, Message, Receive, Scope, Send

from service.problems import problem_response

__all__ = ["BodySizeLimit", "InFlightLimit"]


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
        await response(scope, _empty_receive, send)


async def _empty_receive() -> Message:
    return {"type": "http.disconnect"}


class InFlightLimit:
    """Answer 503 (problem details, ``Retry-After``) beyond ``max_in_flight`` requests.

    Calculations are CPU-bound and run one at a time on a worker's event loop, so the
    requests in flight are mostly waiting; capping them caps the wait. Each admitted
    request yields once to the event loop before it runs, so every request already
    received is counted. Probes and scrapes (``exempt`` paths) are never refused, so a
    busy worker is not taken for a dead one.

    Parameters
    ----------
    app : ASGI app
        The wrapped application.
    max_in_flight : int
        Most requests held at once; 0 turns the limit off.
    retry_after_s : int
        Seconds sent in ``Retry-After``.
    exempt : frozenset of str
        Paths never refused.
    """

    def __init__(
        self,
        app: ASGIApp,
        max_in_flight: int,
        retry_after_s: int,
        exempt: frozenset[str] = frozenset({"/healthz", "/readyz", "/metrics"}),
    ) -> None:
        self.app = app
        self.max_in_flight = max_in_flight
        self.retry_after_s = retry_after_s
        self.exempt = exempt
        self.in_flight = 0

    async def __call__(self, scope: Scope, receive: Receive, send: Send) -> None:
        if (
            scope["type"] != "http"
            or self.max_in_flight <= 0
            or scope.get("path", "") in self.exempt
        ):
            await self.app(scope, receive, send)
            return
        if self.in_flight >= self.max_in_flight:
            response = problem_response(
                503,
                f"The service is busy ({self.max_in_flight} requests in hand); retry after "
                f"{self.retry_after_s} s.",
                scope.get("path", ""),
                slug="busy",
                headers={"Retry-After": str(self.retry_after_s)},
            )
            await response(scope, _empty_receive, send)
            return
        self.in_flight += 1
        try:
            # Let the requests that arrived meanwhile reach this counter before this one
            # computes: handlers do not yield while they compute, so without this pause
            # each request would run to its end first and the count would never pass 1.
            await checkpoint()
            await self.app(scope, receive, send)
        finally:
            self.in_flight -= 1
