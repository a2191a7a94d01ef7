"""A request body as ASGI messages: read whole, replayed to the application, or none."""

from __future__ import annotations

from starlette.types import Message, Receive

__all__ = ["no_body", "read_body", "replayed"]


async def read_body(receive: Receive) -> bytes | None:
    """The whole body, or None when the client went away before sending it."""
    chunks = []
    while True:
        message = await receive()
        if message["type"] != "http.request":
            return None
        chunks.append(message.get("body", b""))
        if not message.get("more_body", False):
            return b"".join(chunks)


def replayed(body: bytes) -> Receive:
    """A receive channel that hands the application ``body`` once, then a disconnect."""
    sent = False

    async def receive() -> Message:
        nonlocal sent
        if not sent:
            sent = True
            return {"type": "http.request", "body": body, "more_body": False}
        return {"type": "http.disconnect"}

    return receive


async def no_body() -> Message:
    """The receive channel of an answer that reads nothing: the client is gone."""
    return {"type": "http.disconnect"}
