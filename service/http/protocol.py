"""uvicorn's httptools protocol with limits on what a client sends before its request starts.

- The request line and headers together may hold at most ``max_header_bytes``
  (``GEARWORK_MAX_HEADER_BYTES``, 16 KiB) and at most ``max_headers`` fields
  (``GEARWORK_MAX_HEADERS``, 64); past either the answer is 431 and the connection closes.
  Bytes are counted as they arrive, so an endless header value is cut off after one read
  past the limit, never buffered whole.
- A request whose line and headers are not complete ``client_timeout_s`` after its first
  byte (``GEARWORK_CLIENT_TIMEOUT_S``, 10 s) is answered 408 and the connection closes;
  a connection that sends nothing is closed after the same time. (The body has the same
  deadline from the headers on: see service.http.admission.)

These answers are written by the protocol, before the application sees a request, so
they are plain problem documents without the application's headers.
"""

from __future__ import annotations

import asyncio

import orjson
from uvicorn.protocols.http.httptools_impl import HttpToolsProtocol

from service.settings import get_settings

__all__ = ["LimitedHttpProtocol"]

_REASONS = {408: b"Request Timeout", 431: b"Request Header Fields Too Large"}


class _HeaderLimitError(Exception):
    pass


def _problem(status: int, detail: str) -> bytes:
    slug = "request-timeout" if status == 408 else "headers-too-large"
    body = orjson.dumps(
        {
            "type": f"urn:gearwork:problem:{slug}",
            "title": _REASONS[status].decode(),
            "status": status,
            "detail": detail,
            "errors": [],
        }
    )
    head = (
        b"HTTP/1.1 %d %s\r\ncontent-type: application/problem+json\r\n"
        b"content-length: %d\r\ncache-control: no-store\r\nconnection: close\r\n\r\n"
        % (status, _REASONS[status], len(body))
    )
    return head + body


class LimitedHttpProtocol(HttpToolsProtocol):
    """HttpToolsProtocol that bounds header size, header count and the time to send them."""

    _header_bytes = 0
    _awaiting_headers = True
    _too_large = ""
    _timer: asyncio.TimerHandle | None = None

    def connection_made(self, transport: asyncio.Transport) -> None:  # type: ignore[override]
        super().connection_made(transport)
        settings = get_settings()
        self._max_bytes = settings.max_header_bytes
        self._max_count = settings.max_headers
        self._timeout = settings.client_timeout_s
        self._arm()

    def _arm(self) -> None:
        self._disarm()
        self._awaiting_headers = True
        self._header_bytes = 0
        self._timer = self.loop.call_later(self._timeout, self._headers_timed_out)

    def _disarm(self) -> None:
        if self._timer is not None:
            self._timer.cancel()
            self._timer = None

    def connection_lost(self, exc: Exception | None) -> None:
        self._disarm()
        super().connection_lost(exc)

    def _headers_timed_out(self) -> None:
        self._timer = None
        busy = self.cycle is not None and not self.cycle.response_complete
        if busy or not self._awaiting_headers or self.transport.is_closing():
            return
        if self._header_bytes:
            detail = f"The request headers did not arrive within {self._timeout:g} s."
            self.transport.write(_problem(408, detail))
        self.transport.close()

    def data_received(self, data: bytes) -> None:
        if self._awaiting_headers:
            self._header_bytes += len(data)
        super().data_received(data)
        if (
            self._awaiting_headers
            and self._header_bytes > self._max_bytes
            and not self.transport.is_closing()
        ):
            self._too_large = f"more than {self._max_bytes} bytes"
            self.send_400_response("")

    def on_url(self, url: bytes) -> None:
        super().on_url(url)
        if len(self.url) > self._max_bytes:
            self._too_large = f"a request line over {self._max_bytes} bytes"
            raise _HeaderLimitError

    def on_header(self, name: bytes, value: bytes) -> None:
        super().on_header(name, value)
        if len(self.headers) > self._max_count:
            self._too_large = f"more than {self._max_count} fields"
            raise _HeaderLimitError

    def on_headers_complete(self) -> None:
        size = len(self.url) + sum(len(n) + len(v) + 4 for n, v in self.headers)
        if size > self._max_bytes:
            self._too_large = f"more than {self._max_bytes} bytes"
            raise _HeaderLimitError
        self._awaiting_headers = False
        self._disarm()
        super().on_headers_complete()

    def on_response_complete(self) -> None:
        super().on_response_complete()
        if not self.transport.is_closing():
            self._arm()  # the next request on this connection gets the same deadline

    def send_400_response(self, msg: str) -> None:
        if not self._too_large:
            super().send_400_response(msg)
            return
        detail = f"The request headers hold {self._too_large}; send fewer or smaller headers."
        self.transport.write(_problem(431, detail))
        self.transport.close()
