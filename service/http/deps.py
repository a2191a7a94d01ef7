"""Shared request dependencies as ``Annotated`` aliases."""

from __future__ import annotations

from typing import Annotated

from fastapi import Depends, Request

from service.http.problems import ProblemError
from service.settings import Settings, get_settings

__all__ = ["JsonBody", "SettingsDep", "declares_json", "require_json_body"]


def declares_json(content_type: str) -> bool:
    """Whether a Content-Type value (RFC 9110, section 8.3) names JSON: ``application/json``
    or a ``+json`` suffix, any case, parameters ignored. A value that is not one
    ``type/subtype`` reads as ``text/plain``, as the standard library's ``email`` parser
    reads it (the tests hold the two together).

    >>> declares_json("Application/JSON; charset=utf-8"), declares_json("text/json")
    (True, False)
    """
    media = content_type.split(";", 1)[0].strip().lower()
    if media.count("/") != 1:
        return False
    maintype, subtype = media.split("/")
    return maintype == "application" and (subtype == "json" or subtype.endswith("+json"))


async def require_json_body(request: Request) -> None:
    """Reject a body declared as anything but JSON with 415 (a missing type is read as JSON)."""
    declared = request.headers.get("content-type")
    if not declared:
        return
    if declares_json(declared):
        return
    raise ProblemError(
        415,
        f"The body must be JSON (Content-Type: application/json), got {declared[:60]!r}; "
        "with curl use --json or -H 'Content-Type: application/json'.",
    )


JsonBody = Annotated[None, Depends(require_json_body)]
SettingsDep = Annotated[Settings, Depends(get_settings)]
