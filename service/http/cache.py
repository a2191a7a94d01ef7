"""ASGI middleware: deterministic POST results cached by a digest of the request.

Every calculation endpoint is a pure function of its path and body, so the same request
always gets the same answer. A retailer's page re-sends the configurations buyers flip
between; a shop's job system re-sends a work order. The middleware keys each POST under
``/v1/`` by SHA-256 of everything the answer depends on: the path, the whole query string
(``?units=us`` and ``?units=metric`` are different results), the content type, the
Accept header (the negotiated format) and the body. It keeps successful answers in a
bounded LRU (entry count and total bytes), and sends every 200 with an ``ETag`` of that
digest, so a caller holding the tag can send ``If-None-Match`` and get 304 with no body.
The tag is weak (``W/"..."``): it names the result, which is the same whether it is sent
plain or gzipped. ``If-None-Match`` is compared weakly (RFC 9110, 13.1.2) against a list
of tags, strong or weak. ``If-None-Match: *`` ("only if no representation exists") is
always false for a calculation, and RFC 9110 13.1.2 answers a false condition on a
method other than GET or HEAD with 412, so it gets a 412 problem without computing.
Set ``GEARWORK_CACHE_ENTRIES=0`` to turn the store off (the ETag stays).
"""

from __future__ import annotations

import hashlib
from collections import OrderedDict
from collections.abc import Callable
from dataclasses import dataclass

from starlette.types import ASGIApp, Message, Receive, Scope, Send

from service.http.body import read_body, replayed
from service.http.problems import problem_response

__all__ = ["ResultCache", "etag_matches"]

_VERSION = b"gearwork/0.1.0;key=2"  # key=2: the query string is part of the key


@dataclass(frozen=True)
class _Entry:
    status: int
    headers: list[tuple[bytes, bytes]]
    body: bytes


def etag_matches(if_none_match: bytes, etag: bytes) -> bool:
    """Whether an ``If-None-Match`` list names ``etag`` by weak comparison (``*`` is
    handled apart: see the module doc).

    >>> etag_matches(b'"a", W/"b"', b'"b"'), etag_matches(b'"a"', b'"b"')
    (True, False)
    """
    opaque = etag.removeprefix(b"W/")
    return any(part.strip().removeprefix(b"W/") == opaque for part in if_none_match.split(b","))


class ResultCache:
    """Cache and tag deterministic POST results.

    Parameters
    ----------
    app : ASGI app
        The wrapped application.
    max_entries : int
        Most results kept; 0 keeps none.
    max_bytes : int
        Most response bytes kept in all.
    prefix : str
        Only POSTs under this path prefix are considered.
    on_outcome : callable, optional
        Called with ``"hit"``, ``"miss"`` or ``"not_modified"`` for every lookup (metrics).
    """

    def __init__(
        self,
        app: ASGIApp,
        max_entries: int,
        max_bytes: int,
        prefix: str = "/v1/",
        on_outcome: Callable[[str], None] | None = None,
    ):
        self.app = app
        self.max_entries = max_entries
        self.max_bytes = max_bytes
        self.prefix = prefix
        self.on_outcome = on_outcome
        self._store: OrderedDict[bytes, _Entry] = OrderedDict()
        self._bytes = 0

    async def __call__(self, scope: Scope, receive: Receive, send: Send) -> None:
        if (
            scope["type"] != "http"
            or scope["method"] != "POST"
            or not scope["path"].startswith(self.prefix)
        ):
            await self.app(scope, receive, send)
            return
        headers = dict(scope["headers"])
        if_none_match = headers.get(b"if-none-match")
        if if_none_match is not None and if_none_match.strip() == b"*":
            response = problem_response(
                412,
                "If-None-Match: * asks for an answer only where none exists; a calculation "
                "always has one (RFC 9110, 13.1.2). Send the ETag of an earlier answer "
                "instead.",
                scope["path"],
                field="If-None-Match",
            )
            await response(scope, receive, send)
            return
        body = await read_body(receive)
        if body is None:
            return  # client went away
        digest = hashlib.sha256(_VERSION)
        for part in (
            scope["path"].encode(),
            bytes(scope.get("query_string", b"")),
            headers.get(b"content-type", b""),
            headers.get(b"accept", b""),
            body,
        ):
            digest.update(len(part).to_bytes(8, "little"))
            digest.update(part)
        key = digest.digest()
        etag = b'W/"' + digest.hexdigest()[:32].encode() + b'"'
        if if_none_match is not None and etag_matches(if_none_match, etag):
            self._count("not_modified")
            await send(
                {"type": "http.response.start", "status": 304, "headers": [(b"etag", etag)]}
            )
            await send({"type": "http.response.body", "body": b""})
            return
        entry = self._store.get(key)
        if entry is not None:
            self._count("hit")
            self._store.move_to_end(key)
            await self._send(send, entry)
            return
        self._count("miss")
        await self._compute(scope, body, send, key, etag)

    def _count(self, outcome: str) -> None:
        if self.on_outcome is not None:
            self.on_outcome(outcome)

    async def _compute(
        self, scope: Scope, body: bytes, send: Send, key: bytes, etag: bytes
    ) -> None:
        status = 0
        out_headers: list[tuple[bytes, bytes]] = []
        parts: list[bytes] = []

        async def capture(message: Message) -> None:
            nonlocal status, out_headers
            if message["type"] == "http.response.start":
                status = int(message["status"])
                out_headers = list(message.get("headers", []))
                if status == 200:
                    out_headers.append((b"etag", etag))
                # a copy goes on: outer middleware (gzip) edits header lists in place
                message = {**message, "headers": list(out_headers)}
            elif message["type"] == "http.response.body":
                parts.append(message.get("body", b""))
            await send(message)

        await self.app(scope, replayed(body), capture)
        size = sum(len(p) for p in parts)
        if status == 200 and self.max_entries > 0 and size <= self.max_bytes // 8:
            self._store[key] = _Entry(status, out_headers, b"".join(parts))
            self._bytes += size
            while len(self._store) > self.max_entries or self._bytes > self.max_bytes:
                _, old = self._store.popitem(last=False)
                self._bytes -= len(old.body)

    @staticmethod
    async def _send(send: Send, entry: _Entry) -> None:
        await send(
            {"type": "http.response.start", "status": entry.status, "headers": list(entry.headers)}
        )
        await send({"type": "http.response.body", "body": entry.body})
