"""Routes that take one JSON body: parsed once and validated by the request model on the
common path, with FastAPI's own handling for everything else.

A calculation endpoint's signature is a request model and the ``JsonBody`` check
(``create_shift_plan(body: ShiftPlanRequest, _json: JsonBody)``). For such a route FastAPI
would, on every request, build a request object and two exit stacks, parse the JSON with
the standard library, solve the dependency graph and validate the parsed body through a
type adapter. ``JsonBodyRoute`` answers a request whose ``Content-Type`` declares JSON and
whose body parses and validates by calling the endpoint with the validated model at once
and sending its response; an error the endpoint raises goes up to the application's
exception middleware, which holds the same handlers FastAPI's route would use.

Any other request (no or another content type, an empty body, a body that does not parse
or validate) goes through FastAPI's handler unchanged, with the body replayed, so every
refusal, problem document and message is the one FastAPI's path gives: the quick path
only ever answers what that path would accept, with the same model validation of the same
parsed document. The body is parsed by pydantic-core's ``from_json``, which reads every
number, string and object of a body it accepts as the standard library does (integers of
any size exactly, floats correctly rounded, the last of repeated keys); a body it refuses
(a lone surrogate escape, say) goes the FastAPI way.

Routes with any other parameter (a query, the request, a header) are left to FastAPI
entirely. The OpenAPI document is built from the route as before, so it does not change.
"""

from __future__ import annotations

import functools
import inspect
import typing
from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

from fastapi.dependencies.models import Dependant
from fastapi.routing import APIRoute
from pydantic import BaseModel
from pydantic_core import from_json
from starlette.responses import Response
from starlette.types import ASGIApp, Receive, Scope, Send

from service.http.body import no_body, read_body, replayed
from service.http.deps import declares_json, require_json_body

__all__ = ["JsonBodyRoute", "quick_body"]


@dataclass(frozen=True)
class QuickBody:
    """How to call an endpoint that takes one request model and the JSON check only."""

    model: type[BaseModel]
    body_name: str
    check_names: tuple[str, ...]


def _no_other_params(dependant: Dependant) -> bool:
    return not (
        dependant.path_params
        or dependant.query_params
        or dependant.header_params
        or dependant.cookie_params
        or dependant.request_param_name
        or dependant.websocket_param_name
        or dependant.http_connection_param_name
        or dependant.response_param_name
        or dependant.background_tasks_param_name
        or dependant.security_scopes_param_name
    )


def quick_body(dependant: Dependant) -> QuickBody | None:
    """The quick call of a route's endpoint, or None when it takes anything but one
    request model (not embedded) and ``require_json_body`` checks."""
    if len(dependant.body_params) != 1 or not _no_other_params(dependant):
        return None
    field = dependant.body_params[0]
    model = field.field_info.annotation
    if not (isinstance(model, type) and issubclass(model, BaseModel)):
        return None
    if getattr(field.field_info, "embed", False) or field.alias != field.name:
        return None
    checks = dependant.dependencies
    if any(d.call is not require_json_body or d.name is None for d in checks):
        return None
    names = tuple(str(d.name) for d in checks)
    return QuickBody(model, field.name, names)


def _validated(model: type[BaseModel], raw: bytes) -> BaseModel | None:
    """The body as the request model, or None when it does not parse or validate (the
    caller then takes FastAPI's path, which says why)."""
    try:
        return model.model_validate(from_json(raw))
    except Exception:
        return None


def _answers_response(call: Callable[..., Any]) -> bool:
    """Whether an endpoint is a coroutine function annotated to return a ``Response``
    (so FastAPI would send what it returns as it is)."""
    if not inspect.iscoroutinefunction(call):
        return False
    try:
        answer = typing.get_type_hints(call).get("return")
    except (NameError, TypeError):  # pragma: no cover - an annotation that does not resolve
        return False
    return isinstance(answer, type) and issubclass(answer, Response)


def _declares_json(scope: Scope) -> bool:
    """Whether the request's first ``Content-Type`` (as Starlette's headers read it)
    declares JSON."""
    for name, value in scope["headers"]:
        if name == b"content-type":
            declared = value.decode("latin-1")
            return bool(declared) and declares_json(declared)
    return False


class JsonBodyRoute(APIRoute):
    """An API route whose JSON-body endpoint is called at once with the validated model on
    the common path (see the module docstring).

    Such a request skips FastAPI's request object, exit stacks and per-route exception
    wrapper as well: an error raised by the endpoint goes up to the application's exception
    middleware, whose handlers are the same ones.
    """

    def __init__(self, path: str, endpoint: Callable[..., Any], **kwargs: Any) -> None:
        super().__init__(path, endpoint, **kwargs)
        self._quick = self._quick_app()

    def _quick_app(self) -> ASGIApp | None:
        call = self.endpoint
        quick = quick_body(self.dependant)
        if quick is None or self.max_body_size is not None or not _answers_response(call):
            return None
        model, body_name = quick.model, quick.body_name
        checks = dict.fromkeys(quick.check_names)
        full = functools.partial(APIRoute.handle, self)

        async def app(scope: Scope, receive: Receive, send: Send) -> None:
            if _declares_json(scope):
                raw = await read_body(receive)
                body = _validated(model, raw) if raw else None
                if body is not None:
                    response = await call(**{body_name: body}, **checks)
                    await response(scope, receive, send)
                    return
                receive = no_body if raw is None else replayed(raw)
            await full(scope, receive, send)

        return app

    async def handle(self, scope: Scope, receive: Receive, send: Send) -> None:
        if self._quick is not None and scope["method"] in (self.methods or ()):
            await self._quick(scope, receive, send)
            return
        await super().handle(scope, receive, send)
