"""Shared request dependencies as ``Annotated`` aliases."""

from __future__ import annotations

from email.message import Message
from typing import Annotated

from fastapi import Depends, Request

from service.problems import ProblemError
from service.settings import Settings, get_settings

__all__ = ["JsonBody", "SettingsDep", "require_json_body"]


async def require_json_body(request: Request) -> None:
    """Reject a body declared as anything but JSON with 415 (a missing type is read as JSON)."""
    declared = request.headers.get("content-type")
    if not declared:
        return
    msg = Message()
    msg["content-type"] = declared
    subtype = msg.get_content_subtype()
    if msg.get_content_maintype() == "application" and (
        subtype == "json" or subtype.endswith("+json")
    ):
        return
    raise ProblemError(
        415,
        f"The body must be JSON (Content-Type: application/json), got {declared[:60]!r}; "
        "with curl use --json or -H 'Content-Type: application/json'.",
    )


JsonBody = Annotated[None, Depends(require_json_body)]
SettingsDep = Annotated[Settings, Depends(get_settings)]
