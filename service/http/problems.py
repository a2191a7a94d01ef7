"""RFC 9457 problem details for every error the service returns.

Each problem is ``application/problem+json`` with ``type``, ``title``, ``status``,
``detail``, ``instance`` (the request path), ``field`` (the first offending field, as a
dotted path with ``[i]`` indexes, e.g. ``engine.curve.rpm[3]``) and ``errors`` (every
offending field with its message). No stack trace ever reaches a caller.
"""

from __future__ import annotations

import logging
from collections.abc import Mapping, Sequence
from typing import Any

import orjson
from fastapi import FastAPI, Request
from fastapi.exceptions import RequestValidationError
from starlette.exceptions import HTTPException as StarletteHTTPException
from starlette.responses import Response

from core.errors import GearworkError

__all__ = [
    "PROBLEM_MEDIA_TYPE",
    "ProblemError",
    "field_path",
    "install_problem_handlers",
    "problem_response",
]

PROBLEM_MEDIA_TYPE = "application/problem+json"
_TYPE_BASE = "urn:gearwork:problem:"
_log = logging.getLogger("gearwork.errors")

_TITLES = {
    400: "Malformed request body",
    403: "Forbidden",
    404: "Not found",
    405: "Method not allowed",
    406: "Not acceptable",
    408: "Request timeout",
    412: "Precondition failed",
    413: "Request body too large",
    415: "Unsupported media type",
    422: "Invalid input",
    431: "Request header fields too large",
    503: "Service unavailable",
    500: "Internal error",
}
_SLUGS = {
    400: "malformed-body",
    403: "forbidden",
    404: "not-found",
    405: "method-not-allowed",
    406: "not-acceptable",
    408: "request-timeout",
    412: "precondition-failed",
    413: "body-too-large",
    415: "unsupported-media-type",
    422: "invalid-input",
    431: "headers-too-large",
    503: "unavailable",
    500: "internal-error",
}


class ProblemError(Exception):
    """Raised at the edge to answer with a problem document."""

    def __init__(
        self,
        status: int,
        detail: str,
        *,
        field: str | None = None,
        slug: str | None = None,
        errors: Sequence[Mapping[str, Any]] = (),
    ) -> None:
        super().__init__(detail)
        self.status = status
        self.detail = detail
        self.field = field
        self.slug = slug
        self.errors = list(errors)


def field_path(loc: Sequence[int | str]) -> str:
    """Dotted path with ``[i]`` indexes from a validation location, without ``body``.

    Union members that pydantic puts in a location (``constrained-float``, a tag such as
    ``per-gear``) are not fields and are left out.

    >>> field_path(("body", "engine", "curve", "rpm", 3))
    'engine.curve.rpm[3]'
    >>> field_path(("body", "drivetrain", "efficiency", "per-gear", 2))
    'drivetrain.efficiency[2]'
    """
    out = ""
    for part in loc:
        if part == "body" and not out:
            continue
        if isinstance(part, str) and not part.isidentifier():
            continue
        if isinstance(part, int):
            out += f"[{part}]"
        else:
            out += f".{part}" if out else str(part)
    return out


def problem_response(
    status: int,
    detail: str,
    instance: str,
    *,
    errors: Sequence[Mapping[str, Any]] = (),
    field: str | None = None,
    slug: str | None = None,
    headers: Mapping[str, str] | None = None,
) -> Response:
    """A problem-details response."""
    body: dict[str, Any] = {
        "type": _TYPE_BASE + (slug or _SLUGS.get(status, "error")),
        "title": _TITLES.get(status, "Error"),
        "status": status,
        "detail": detail,
        "instance": instance,
    }
    if field is None and errors:
        field = errors[0].get("field")
    if field is not None:
        body["field"] = field
    body["errors"] = list(errors) or ([{"field": field, "message": detail}] if field else [])
    return Response(
        orjson.dumps(body), status_code=status, media_type=PROBLEM_MEDIA_TYPE, headers=headers
    )


def _message(err: Mapping[str, Any]) -> str:
    msg = str(err.get("msg", "invalid value"))
    return msg.removeprefix("Value error, ")


async def _on_validation(request: Request, exc: Exception) -> Response:
    if not isinstance(exc, RequestValidationError):  # pragma: no cover - registration guard
        raise exc
    errs = list(exc.errors())
    if any(e.get("type") == "json_invalid" for e in errs):
        ctx = errs[0].get("ctx") or {}
        reason = ctx.get("error", "invalid JSON")
        return problem_response(400, f"The body is not valid JSON: {reason}.", request.url.path)
    items: list[dict[str, str]] = []
    for e in errs:  # one message per field: a union's other members add nothing
        field = field_path(e.get("loc", ()))
        if len(items) < 20 and all(i["field"] != field for i in items):
            items.append({"field": field, "message": _message(e)})
    first = items[0] if items else {"field": "", "message": "invalid input"}
    detail = f"`{first['field']}`: {first['message']}" if first["field"] else first["message"]
    if len(items) > 1:
        detail += f" (and {len(items) - 1} more)"
    return problem_response(422, detail, request.url.path, errors=items)


async def _on_core_error(request: Request, exc: Exception) -> Response:
    if not isinstance(exc, GearworkError):  # pragma: no cover - registration guard
        raise exc
    field = getattr(exc, "field_path", None) or exc.parameter
    return problem_response(422, exc.message, request.url.path, field=field)


async def _on_problem(request: Request, exc: Exception) -> Response:
    if not isinstance(exc, ProblemError):  # pragma: no cover - registration guard
        raise exc
    return problem_response(
        exc.status,
        exc.detail,
        request.url.path,
        field=exc.field,
        slug=exc.slug,
        errors=exc.errors,
    )


async def _on_http(request: Request, exc: Exception) -> Response:
    if not isinstance(exc, StarletteHTTPException):  # pragma: no cover - registration guard
        raise exc
    detail = exc.detail if isinstance(exc.detail, str) else _TITLES.get(exc.status_code, "")
    return problem_response(exc.status_code, detail, request.url.path, headers=exc.headers)


async def _on_unexpected(request: Request, exc: Exception) -> Response:
    _log.exception("unhandled error on %s", request.url.path)
    return problem_response(
        500, "The service failed to compute this request; it has been logged.", request.url.path
    )


def install_problem_handlers(app: FastAPI) -> None:
    """Register the handlers that turn every error into problem details."""
    app.add_exception_handler(RequestValidationError, _on_validation)
    app.add_exception_handler(GearworkError, _on_core_error)
    app.add_exception_handler(ProblemError, _on_problem)
    app.add_exception_handler(StarletteHTTPException, _on_http)
    app.add_exception_handler(Exception, _on_unexpected)
