"""The service's endpoints called in process, without HTTP: a thin adapter for the CLI.

Each endpoint family is named once (``ENDPOINTS``) by the path of its JSON route and, where
the service has them, its report and chart routes. The handler is looked up on the
application's own routes, the request model is read off the handler's signature, the body
is validated by that model, and errors go through the application's own exception
handlers, so a command answers exactly what the endpoint answers (the same JSON bytes, the
same problem details) and later changes to schemas, presenters or reports flow through.
"""

from __future__ import annotations

import asyncio
import inspect
import json
from collections.abc import Callable, Coroutine, Iterator, Mapping
from dataclasses import dataclass, field
from functools import cache
from typing import Any, get_type_hints
from urllib.parse import urlencode

import orjson
from fastapi import FastAPI
from fastapi.exceptions import RequestValidationError
from fastapi.routing import APIRoute
from pydantic import BaseModel, TypeAdapter, ValidationError
from starlette.requests import Request
from starlette.responses import Response
from starlette.routing import BaseRoute

__all__ = [
    "ENDPOINTS",
    "FORMAT_MEDIA",
    "Answer",
    "Endpoint",
    "call_endpoint",
    "endpoint_named",
]

# --format -> the media type asked for in the Accept header of a report or chart route
FORMAT_MEDIA = {
    "json": "application/json",
    "text": "text/plain",
    "html": "text/html",
    "pdf": "application/pdf",
    "svg": "image/svg+xml",
    "png": "image/png",
}


@dataclass(frozen=True)
class Endpoint:
    """One endpoint family as the command line sees it.

    Attributes
    ----------
    name : str
        The subcommand (``shift-plan``, ``run`` ...), also the batch endpoint name.
    path : str
        The JSON route.
    aliases : tuple of str
        Other names a batch line may use (the route's own last path segment).
    report : str or None
        The printable report route (text, HTML, PDF), when there is one.
    chart : str or None
        The chart route (SVG, PNG), when there is one.
    raw_body : bool
        The body is a file's text (dyno import), not JSON.
    """

    name: str
    path: str
    aliases: tuple[str, ...] = ()
    report: str | None = None
    chart: str | None = None
    raw_body: bool = False
    formats: tuple[str, ...] = field(default=("json",))


def _family(
    name: str,
    path: str,
    *aliases: str,
    report: str | None = None,
    chart: str | None = None,
    raw_body: bool = False,
) -> Endpoint:
    formats = ["json", "text"]
    if report is not None:
        formats += ["html", "pdf"]
    if chart is not None:
        formats += ["svg", "png"]
    return Endpoint(name, path, aliases, report, chart, raw_body, tuple(formats))


ENDPOINTS: tuple[Endpoint, ...] = (
    _family(
        "shift-plan",
        "/v1/shift-plan",
        report="/v1/reports/shift-plan",
        chart="/v1/charts/tractive-force",
    ),
    _family(
        "run", "/v1/acceleration-run", "acceleration-run", report="/v1/reports/acceleration-run"
    ),
    _family("compare", "/v1/comparison", "comparison", report="/v1/reports/comparison"),
    _family(
        "sweep",
        "/v1/final-drive-sweep",
        "final-drive-sweep",
        report="/v1/reports/final-drive-sweep",
    ),
    _family("spacing", "/v1/gear-spacing", "gear-spacing", report="/v1/reports/gear-spacing"),
    _family(
        "speedometer",
        "/v1/speedometer-correction",
        "speedometer-correction",
        report="/v1/reports/speedometer-correction",
    ),
    _family(
        "dyno-correct",
        "/v1/dyno-correction",
        "dyno-correction",
        report="/v1/reports/dyno-correction",
    ),
    _family("import", "/v1/torque-curves/import", "torque-curves-import", raw_body=True),
    _family("log-check", "/v1/log-analysis", "log-analysis", report="/v1/reports/log-analysis"),
    _family(
        "chassis",
        "/v1/chassis-dyno/convert",
        "chassis-dyno-convert",
        report="/v1/reports/chassis-dyno",
    ),
    _family(
        "coast-down",
        "/v1/road-load/coast-down",
        "road-load-coast-down",
        report="/v1/reports/road-load/coast-down",
    ),
    _family("shift-window", "/v1/shift-window", report="/v1/reports/shift-window"),
    _family(
        "weather",
        "/v1/weather-correction",
        "weather-correction",
        report="/v1/reports/weather-correction",
    ),
    _family(
        "calibrate",
        "/v1/calibration/pass",
        "calibration-pass",
        report="/v1/reports/calibration/pass",
    ),
)


def endpoint_named(name: str) -> Endpoint | None:
    """The endpoint family by subcommand name or alias, or None."""
    for ep in ENDPOINTS:
        if name == ep.name or name in ep.aliases:
            return ep
    return None


@dataclass(frozen=True)
class Answer:
    """What the endpoint answered: status, media type and the exact body bytes."""

    status: int
    media_type: str
    body: bytes

    @property
    def ok(self) -> bool:
        """True for a 2xx answer."""
        return 200 <= self.status < 300


@cache
def _app() -> FastAPI:
    from service.app import app  # the one application, with its routes and handlers

    return app


def _routes(routes: list[BaseRoute]) -> Iterator[APIRoute]:
    """Every API route, through included routers."""
    for route in routes:
        if isinstance(route, APIRoute):
            yield route
        inner = getattr(route, "original_router", None)  # a router included in the app
        if inner is not None:
            yield from _routes(list(inner.routes))


def _handler(path: str) -> Callable[..., Coroutine[Any, Any, Response]]:
    for route in _routes(list(_app().routes)):
        if route.path == path and "POST" in (route.methods or set()):
            endpoint: Callable[..., Coroutine[Any, Any, Response]] = route.endpoint
            return endpoint
    raise LookupError(f"the service has no POST route {path}")


@cache
def _signature(path: str) -> tuple[inspect.Signature, dict[str, Any]]:
    fn = _handler(path)
    return inspect.signature(fn), get_type_hints(fn, include_extras=True)


def _request(path: str, accept: str, query: Mapping[str, str], body: bytes, kind: str) -> Request:
    """A Request carrying what a handler may read: path, headers, query and body."""
    headers = [(b"accept", accept.encode()), (b"content-type", kind.encode())]
    scope = {
        "type": "http",
        "method": "POST",
        "path": path,
        "raw_path": path.encode(),
        "root_path": "",
        "scheme": "http",
        "server": ("cli", 0),
        "query_string": urlencode(dict(query)).encode(),
        "headers": headers,
        "app": _app(),
    }
    sent = False

    async def receive() -> dict[str, Any]:
        nonlocal sent
        if sent:
            return {"type": "http.disconnect"}
        sent = True
        return {"type": "http.request", "body": body, "more_body": False}

    return Request(scope, receive)


def _arguments(path: str, data: Any, request: Request, query: Mapping[str, str]) -> dict[str, Any]:
    """The handler's keyword arguments: the validated body, the request, query values."""
    sig, hints = _signature(path)
    kwargs: dict[str, Any] = {}
    for name, param in sig.parameters.items():
        hint = hints.get(name)
        if inspect.isclass(hint) and issubclass(hint, BaseModel):
            try:
                kwargs[name] = hint.model_validate(data)
            except ValidationError as exc:
                errs = [{**e, "loc": ("body", *e["loc"])} for e in exc.errors()]
                raise RequestValidationError(errs) from None
        elif hint is Request:
            kwargs[name] = request
        elif name in query and hint is not None:
            try:
                kwargs[name] = TypeAdapter(hint).validate_python(query[name])
            except ValidationError as exc:
                errs = [{**e, "loc": ("query", name, *e["loc"])} for e in exc.errors()]
                raise RequestValidationError(errs) from None
        elif param.default is not inspect.Parameter.empty:
            kwargs[name] = param.default
        else:
            kwargs[name] = None  # a dependency that only checks the request (JsonBody)
    return kwargs


async def _problem(request: Request, exc: Exception) -> Response:
    """The application's own exception handler for this error (RFC 9457 problem details)."""
    handlers = _app().exception_handlers
    handler = next(
        (handlers[kind] for kind in type(exc).__mro__ if kind in handlers), handlers[Exception]
    )
    result = handler(request, exc)
    return await result if inspect.isawaitable(result) else result


class _NeedsLoopError(Exception):
    """A handler failed unexpectedly while stepped without an event loop: run it on one."""


def _run(make: Callable[[bool], Coroutine[Any, Any, Response]]) -> Response:
    """Run a handler coroutine to its end: stepped directly when it never suspends (the
    JSON endpoints compute without awaiting anything), else on a fresh event loop."""
    coro = make(True)
    try:
        coro.send(None)
    except StopIteration as done:
        response: Response = done.value
        return response
    except _NeedsLoopError:
        pass
    else:
        coro.close()
    with asyncio.Runner() as runner:
        return runner.run(make(False))


def _handled(exc: Exception) -> bool:
    """True when the app has a handler for this error other than the catch-all."""
    handlers = _app().exception_handlers
    return any(kind in handlers for kind in type(exc).__mro__ if kind is not Exception)


def _decode(raw: bytes) -> Any:
    """Parse JSON; on failure the error FastAPI gives (the standard library's message)."""
    try:
        return orjson.loads(raw)
    except orjson.JSONDecodeError:
        try:
            return json.loads(raw)
        except ValueError as exc:
            pos, msg = getattr(exc, "pos", 0), getattr(exc, "msg", str(exc))
            err = {
                "type": "json_invalid",
                "loc": ("body", pos),
                "msg": "JSON decode error",
                "input": {},
                "ctx": {"error": msg},
            }
            raise RequestValidationError([err]) from None


async def _answer(
    ep: Endpoint,
    path: str,
    data: Any,
    raw: bytes,
    fmt: str,
    query: Mapping[str, str],
    stepped: bool,
) -> Response:
    accept = FORMAT_MEDIA.get(fmt, "application/json")
    kind = "text/csv" if ep.raw_body else "application/json"
    request = _request(path, accept, query, raw, kind)
    try:
        if not ep.raw_body:
            data = _decode(raw) if data is None else data
        return await _handler(path)(**_arguments(path, data, request, query))
    except Exception as exc:  # every error becomes the service's problem details
        if stepped and not _handled(exc):
            raise _NeedsLoopError from exc  # e.g. work sent to a thread needs a loop
        return await _problem(request, exc)


def call_endpoint(
    ep: Endpoint,
    body: bytes | str | Any,
    *,
    fmt: str = "json",
    query: Mapping[str, str] | None = None,
) -> Answer:
    """Compute one request in process as the endpoint would, in the format asked for.

    Parameters
    ----------
    ep : Endpoint
        The endpoint family.
    body : bytes, str or parsed JSON
        The request body: JSON text (or the file's text for the dyno import), or an
        already-parsed JSON value.
    fmt : str
        ``json`` (the JSON route), ``text``, ``html``, ``pdf`` (the report route) or
        ``svg``, ``png`` (the chart route). Families without a report answer ``text`` with
        their JSON answer (the summary is taken from it by the caller).
    query : mapping, optional
        Query parameters of the route (e.g. ``units`` for the dyno import).

    Returns
    -------
    Answer
        Status, media type and body bytes exactly as the route answers.
    """
    query = dict(query or {})
    if isinstance(body, bytes | str):
        raw, data = (body.encode() if isinstance(body, str) else body), None
    else:  # already parsed: only a raw-text endpoint reads the body bytes
        raw, data = (orjson.dumps(body) if ep.raw_body else b""), body
    if fmt in {"html", "pdf"} or (fmt == "text" and ep.report is not None):
        path = ep.report or ep.path
    elif fmt in {"svg", "png"}:
        path = ep.chart or ep.path
    else:
        path = ep.path
    response = _run(lambda stepped: _answer(ep, path, data, raw, fmt, query, stepped))
    media = (response.media_type or "").split(";")[0]
    return Answer(response.status_code, media, bytes(response.body))
