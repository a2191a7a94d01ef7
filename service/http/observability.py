"""Request ids, one structured JSON log line per request, and Prometheus metrics.

``RequestObservability`` is pure ASGI middleware (no ``BaseHTTPMiddleware``: no extra task
per request, nothing buffered). For every HTTP request it

- takes the request id from an incoming ``X-Request-ID`` when it is 1 to 128 characters
  of ``A-Z a-z 0-9 . _ : -`` starting with a letter or digit, and otherwise makes one
  (32 hex digits); the id is sent back in ``X-Request-ID`` and is in every log line
  written while the request runs;
- counts the request and times it in Prometheus metrics labelled by method, *route
  template* (``/v1/shift-plan``, never the raw path; ``unmatched`` for unknown paths) and
  status;
- writes one JSON line to stdout: time, method, route, status, duration, bytes sent and
  request id; never a body, a query string or a header value. Successful probes and
  scrapes (``/healthz``, ``/readyz``, ``/metrics``) are counted but not logged.

An exception that escapes the application before an answer started is logged with its
traceback and the request id, and answered with a 500 problem document.

With several uvicorn workers each process keeps its own counters. Set
``PROMETHEUS_MULTIPROC_DIR`` to an empty writable directory before start (the container
does) and ``/metrics`` sums every worker's figures.
"""

from __future__ import annotations

import contextvars
import datetime
import logging
import os
import re
import sys
import time
import uuid
from collections.abc import Iterable
from typing import Any, TextIO

import orjson
from prometheus_client import (
    CollectorRegistry,
    Counter,
    Gauge,
    Histogram,
    disable_created_metrics,
    generate_latest,
)
from prometheus_client.exposition import CONTENT_TYPE_LATEST
from prometheus_client.multiprocess import MultiProcessCollector
from prometheus_client.openmetrics.exposition import CONTENT_TYPE_LATEST as OPENMETRICS_TYPE
from prometheus_client.openmetrics.exposition import generate_latest as openmetrics_latest
from starlette.types import ASGIApp, Message, Receive, Scope, Send

from service.http.problems import problem_response

__all__ = [
    "METRICS_CONTENT_TYPE",
    "OPENMETRICS_TYPE",
    "JsonFormatter",
    "Metrics",
    "RequestObservability",
    "configure_logging",
    "current_request_id",
    "route_template",
]

METRICS_CONTENT_TYPE = CONTENT_TYPE_LATEST
_VALID_ID = re.compile(rb"^[A-Za-z0-9][A-Za-z0-9._:-]{0,127}$")
_REQUEST_ID: contextvars.ContextVar[str | None] = contextvars.ContextVar(
    "gearwork_request_id", default=None
)
_METHODS = frozenset({"GET", "HEAD", "POST", "PUT", "PATCH", "DELETE", "OPTIONS"})
_QUIET = frozenset({"/healthz", "/readyz", "/metrics"})
_WAIT_BUCKETS = (0.001, 0.005, 0.01, 0.05, 0.1, 0.25, 0.5, 1, 2, 3, 4, 5, 6, 8, 10, 30)
_BUCKETS = (0.0005, 0.001, 0.0025, 0.005, 0.01, 0.025, 0.05, 0.1, 0.25, 0.5, 1.0, 2.5, 5.0)
CLIENT_CLOSED = 499  # no answer started: the client went away first (nginx's convention)

_access_log = logging.getLogger("gearwork.access")
_error_log = logging.getLogger("gearwork.errors")


def current_request_id() -> str | None:
    """The id of the request being served in this task, if any."""
    return _REQUEST_ID.get()


def _incoming_id(headers: list[tuple[bytes, bytes]]) -> str | None:
    for name, value in headers:
        if name == b"x-request-id":
            return value.decode("ascii") if _VALID_ID.match(value) else None
    return None


def route_patterns(routes: Iterable[Any]) -> list[tuple[re.Pattern[str], str]]:
    """(path regex, template) of every route, routers included through FastAPI's
    ``effective_route_contexts`` where it has them."""
    out: list[tuple[re.Pattern[str], str]] = []
    for route in routes:
        contexts = getattr(route, "effective_route_contexts", None)
        for item in contexts() if callable(contexts) else (route,):
            regex, path = getattr(item, "path_regex", None), getattr(item, "path", None)
            if isinstance(regex, re.Pattern) and isinstance(path, str) and path:
                out.append((regex, path))
    return out


def route_template(scope: Scope, patterns: list[tuple[re.Pattern[str], str]]) -> str:
    """The route template a request matched (``/v1/shift-plan``), else ``unmatched``.

    The router records the route in the scope; a request answered before routing (a
    cached result, 304, 413, 503) is matched against ``patterns`` here.
    """
    path = getattr(scope.get("route"), "path", None)
    if isinstance(path, str) and path:
        return path
    raw = scope.get("path", "")
    for regex, template in patterns:
        if regex.match(raw):
            return template
    return "unmatched"


class JsonFormatter(logging.Formatter):
    """One JSON object per record: ts, level, logger, message, request_id, extra fields."""

    def format(self, record: logging.LogRecord) -> str:
        doc: dict[str, Any] = {
            "ts": datetime.datetime.fromtimestamp(record.created, datetime.UTC).isoformat(
                timespec="milliseconds"
            ),
            "level": record.levelname.lower(),
            "logger": record.name,
            "message": record.getMessage(),
        }
        request_id = _REQUEST_ID.get()
        if request_id is not None:
            doc["request_id"] = request_id
        fields = getattr(record, "fields", None)
        if isinstance(fields, dict):
            doc.update(fields)
        if record.exc_info:
            doc["exception"] = self.formatException(record.exc_info)
        return orjson.dumps(doc, default=str).decode()


class _StdoutHandler(logging.StreamHandler[TextIO]):
    """Writes to whatever ``sys.stdout`` is at the time (test runners swap it)."""

    _gearwork = True

    def __init__(self) -> None:
        super().__init__(sys.stdout)

    @property
    def stream(self) -> TextIO:
        return sys.stdout

    @stream.setter
    def stream(self, value: TextIO) -> None:
        pass


def configure_logging(level: str) -> None:
    """Send the ``gearwork`` loggers to stdout as JSON lines (once per process)."""
    logger = logging.getLogger("gearwork")
    if not any(getattr(h, "_gearwork", False) for h in logger.handlers):
        handler = _StdoutHandler()
        handler.setFormatter(JsonFormatter())
        logger.addHandler(handler)
    logger.setLevel(level.upper())
    logger.propagate = False


class Metrics:
    """The service's Prometheus metrics, in a registry of their own.

    Names: ``gearwork_http_requests_total`` and ``gearwork_http_errors_total`` (status 400
    and up) by method, route and status; ``gearwork_http_request_duration_seconds`` by
    method and route; ``gearwork_http_requests_in_flight``;
    ``gearwork_result_cache_total`` by outcome (hit, miss, not_modified);
    ``gearwork_calculations_waiting`` (queue depth) and ``gearwork_calculations_running``;
    ``gearwork_calculation_wait_seconds`` from arrival to a slot or a refusal, by outcome
    (admitted, queue_full, budget, draining, body_timeout).
    """

    def __init__(self) -> None:
        disable_created_metrics()  # type: ignore[no-untyped-call]  # no *_created series
        self.multiprocess_dir = os.environ.get("PROMETHEUS_MULTIPROC_DIR") or None
        if self.multiprocess_dir is not None:
            os.makedirs(self.multiprocess_dir, exist_ok=True)
        self.registry = CollectorRegistry()
        labels = ("method", "route", "status")
        self.requests = Counter(
            "gearwork_http_requests", "HTTP requests answered.", labels, registry=self.registry
        )
        self.errors = Counter(
            "gearwork_http_errors",
            "HTTP requests answered with status 400 or above.",
            labels,
            registry=self.registry,
        )
        self.duration = Histogram(
            "gearwork_http_request_duration_seconds",
            "Time from request start to the end of the answer [s].",
            ("method", "route"),
            buckets=_BUCKETS,
            registry=self.registry,
        )
        self.in_flight = Gauge(
            "gearwork_http_requests_in_flight",
            "Requests being served now.",
            registry=self.registry,
            multiprocess_mode="livesum",
        )
        self.cache = Counter(
            "gearwork_result_cache",
            "Result-cache lookups of calculation requests by outcome.",
            ("outcome",),
            registry=self.registry,
        )
        self.waiting = Gauge(
            "gearwork_calculations_waiting",
            "Calculation requests waiting for a slot (queue depth).",
            registry=self.registry,
            multiprocess_mode="livesum",
        )
        self.running = Gauge(
            "gearwork_calculations_running",
            "Calculations holding a slot.",
            registry=self.registry,
            multiprocess_mode="livesum",
        )
        self.wait = Histogram(
            "gearwork_calculation_wait_seconds",
            "Time from a calculation request's arrival to its slot or its refusal [s].",
            ("outcome",),
            buckets=_WAIT_BUCKETS,
            registry=self.registry,
        )
        self._children: dict[tuple[str, str, int], tuple[Any, Any, Any]] = {}

    def observe(self, method: str, route: str, status: int, seconds: float) -> None:
        """Count one answered request and its duration."""
        key = (method, route, status)
        children = self._children.get(key)
        if children is None:
            code = str(status)
            error = self.errors.labels(method, route, code) if status >= 400 else None
            children = (
                self.requests.labels(method, route, code),
                self.duration.labels(method, route),
                error,
            )
            self._children[key] = children
        children[0].inc()
        children[1].observe(seconds)
        if children[2] is not None:
            children[2].inc()

    def cache_outcome(self, outcome: str) -> None:
        """Count one result-cache lookup (``hit``, ``miss`` or ``not_modified``)."""
        self.cache.labels(outcome).inc()

    def queue_changed(self, waiting: int, computing: int) -> None:
        """Set the queue depth and the calculations running."""
        self.waiting.set(waiting)
        self.running.set(computing)

    def waited(self, seconds: float, outcome: str) -> None:
        """Record one admission decision and how long the request had waited [s]."""
        self.wait.labels(outcome).observe(seconds)

    def render(self, openmetrics: bool = False) -> bytes:
        """The Prometheus text format, or OpenMetrics text when ``openmetrics``; every
        worker's figures in multiprocess mode."""
        write = openmetrics_latest if openmetrics else generate_latest
        if self.multiprocess_dir is None:
            return write(self.registry)
        registry = CollectorRegistry()
        MultiProcessCollector(registry, path=self.multiprocess_dir)  # type: ignore[no-untyped-call]
        return write(registry)


class RequestObservability:
    """Request id, metrics and one access-log line per HTTP request (see the module doc)."""

    def __init__(self, app: ASGIApp, *, metrics: Metrics | None, log_requests: bool) -> None:
        self.app = app
        self.metrics = metrics
        self.log_requests = log_requests
        self._patterns: list[tuple[re.Pattern[str], str]] | None = None

    async def __call__(self, scope: Scope, receive: Receive, send: Send) -> None:
        if scope["type"] != "http":
            await self.app(scope, receive, send)
            return
        request_id = _incoming_id(scope["headers"]) or uuid.uuid4().hex
        token = _REQUEST_ID.set(request_id)
        scope.setdefault("state", {})["request_id"] = request_id
        id_header = (b"x-request-id", request_id.encode("ascii"))
        status = CLIENT_CLOSED
        started = False
        sent = 0

        async def send_with_id(message: Message) -> None:
            nonlocal status, started, sent
            if message["type"] == "http.response.start":
                started = True
                status = int(message["status"])
                message = {**message, "headers": [*message.get("headers", ()), id_header]}
            elif message["type"] == "http.response.body":
                sent += len(message.get("body", b""))
            await send(message)

        metrics = self.metrics
        if metrics is not None:
            metrics.in_flight.inc()
        t0 = time.perf_counter()
        try:
            await self.app(scope, receive, send_with_id)
        except Exception:
            if started:
                raise
            _error_log.exception("unhandled error")
            response = problem_response(
                500,
                "The service failed to compute this request; it has been logged.",
                scope.get("path", ""),
            )
            await response(scope, receive, send_with_id)
        finally:
            seconds = time.perf_counter() - t0
            method = scope["method"] if scope["method"] in _METHODS else "OTHER"
            if self._patterns is None:
                self._patterns = route_patterns(getattr(scope.get("app"), "routes", ()))
            route = route_template(scope, self._patterns)
            if metrics is not None:
                metrics.in_flight.dec()
                metrics.observe(method, route, status, seconds)
            if self.log_requests and not (status < 400 and route in _QUIET):
                _access_log.info(
                    "request",
                    extra={
                        "fields": {
                            "method": method,
                            "route": route,
                            "status": status,
                            "duration_ms": round(seconds * 1e3, 3),
                            "bytes": sent,
                        }
                    },
                )
            _REQUEST_ID.reset(token)
