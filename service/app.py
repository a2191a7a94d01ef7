"""The ASGI application: ``service.app:app``."""

from __future__ import annotations

import contextlib
import signal
import threading
from collections.abc import AsyncIterator
from types import ModuleType
from typing import Any

from fastapi import FastAPI

from service.http.admission import Admission, AdmissionGate, CalculationSlots
from service.http.affinity import pin_worker
from service.http.cache import ResultCache
from service.http.compression import OffLoopGZip
from service.http.docs import install_docs
from service.http.headers import ProblemCORS, ResponseHeaders
from service.http.limits import BodySizeLimit
from service.http.observability import Metrics, RequestObservability, configure_logging
from service.http.openapi import build_openapi
from service.http.problems import install_problem_handlers
from service.routes import (
    acceleration,
    calibration,
    charts,
    chassis,
    coastdown,
    comparison,
    demo,
    dyno,
    final_drive,
    gear_design,
    health,
    log_analysis,
    reports,
    shift_plan,
    shift_window,
    weather,
)
from service.settings import get_settings

__all__ = ["app", "create_app"]

DESCRIPTION = """\
Gearing and shift-point calculations for tuning shops, parts sellers and racers: from a
measured torque curve and a drivetrain, the wheel torque and tractive force in every gear,
the shift rpm for each gear change and the rpm the engine falls to after it.

Every endpoint is stateless and deterministic. Errors are RFC 9457 problem details naming
the offending field. Results advise on rpm and speed: respect the maker's rev limits and
component ratings, run only on closed courses or sanctioned tracks, obey local laws, and
defer to qualified professionals.

Every answer carries an `X-Request-ID` (the caller's, when it sends a valid one). A busy
worker answers 503 with `Retry-After`. Results carry an `ETag`; send it back in
`If-None-Match` to get 304 without a body.
"""

OPENAPI_TAGS: list[dict[str, Any]] = [
    {"name": "shift plan", "description": "Per-gear force and shift points."},
    {"name": "acceleration run", "description": "Timed runs of a described car."},
    {"name": "dyno", "description": "Correction to standard air; dyno-file import."},
    {"name": "chassis dyno", "description": "Wheel and engine figures by gear."},
    {"name": "log analysis", "description": "Data-logger checks of real shifts."},
    {"name": "comparison", "description": "Setups side by side."},
    {"name": "final drive sweep", "description": "Rank final-drive ratios."},
    {"name": "gear design", "description": "Gear spacing; speedometer correction."},
    {"name": "road load", "description": "Road load fitted to coast-downs."},
    {"name": "shift window", "description": "What each shift rpm costs."},
    {"name": "weather", "description": "Density altitude; slips between weathers."},
    {"name": "calibration", "description": "The car fitted to a logged pass."},
    {
        "name": "reports",
        "description": "Printable sheets (HTML, text, PDF) of every answer.",
    },
    {"name": "charts", "description": "Charts of tractive force."},
    {"name": "health", "description": "Liveness and readiness."},
]
# in the order their routes are matched and listed
ROUTERS: tuple[ModuleType, ...] = (
    health,
    shift_plan,
    acceleration,
    dyno,
    comparison,
    final_drive,
    gear_design,
    reports,
    charts,
    log_analysis,
    chassis,
    coastdown,
    shift_window,
    weather,
    calibration,
    demo,
)


def _drain_on_signals(admission: Admission) -> None:
    """Chain a handler before the server's own on SIGTERM/SIGINT: from then on this
    worker refuses new calculations and /readyz answers 503, while what it accepted is
    still answered (the server stops accepting and waits for it). Only the main thread
    may set signal handlers: elsewhere (an app run inside a test) nothing is chained."""
    if threading.current_thread() is not threading.main_thread():
        return
    for sig in (signal.SIGTERM, signal.SIGINT):
        previous = signal.getsignal(sig)
        if not callable(previous):
            continue

        def handler(signum: int, frame: object, previous: object = previous) -> None:
            admission.begin_draining()
            if callable(previous):
                previous(signum, frame)

        signal.signal(sig, handler)


def _add_middleware(app: FastAPI, admission: Admission, metrics: Metrics | None) -> None:
    """The middleware stack around the routes, from the settings."""
    settings = get_settings()
    # Each add_middleware wraps what was added before it, so the last is outermost. From
    # the outside in: request id, metrics and access log see every answer; cache headers
    # and one merged Vary go on the final (possibly gzipped) answer; CORS headers go on
    # errors too; the admission gate refuses at once when the queue is full and bounds
    # the time to send a body; gzip sits outside the result cache, which keeps plain
    # bodies; the size limit runs before the cache reads the body; a calculation that
    # the cache cannot answer waits for a slot and runs on the slot's thread.
    app.add_middleware(CalculationSlots, admission=admission)
    app.add_middleware(
        ResultCache,
        max_entries=settings.cache_entries,
        max_bytes=settings.cache_max_bytes,
        on_outcome=None if metrics is None else metrics.cache_outcome,
    )
    app.add_middleware(BodySizeLimit, max_bytes=settings.max_body_bytes)
    if settings.gzip_level > 0:
        app.add_middleware(
            OffLoopGZip,
            minimum_size=settings.gzip_min_bytes,
            compresslevel=settings.gzip_level,
        )
    app.add_middleware(AdmissionGate, admission=admission)
    if settings.cors_origins:
        app.add_middleware(
            ProblemCORS,
            allow_origins=settings.cors_origins,
            allow_methods=["GET", "POST"],
            allow_headers=["Content-Type", "Accept", "If-None-Match", "X-Request-ID"],
            expose_headers=["ETag", "X-Request-ID", "Retry-After"],
            max_age=settings.cors_max_age_s,
        )
    app.add_middleware(ResponseHeaders, result_max_age_s=settings.result_max_age_s)
    app.add_middleware(RequestObservability, metrics=metrics, log_requests=settings.request_log)


def create_app() -> FastAPI:
    """Build the application with its routes, limits, headers, metrics and error handlers."""
    settings = get_settings()
    configure_logging(settings.log_level)
    metrics = Metrics() if settings.metrics else None
    admission = Admission(
        slots=settings.calc_slots,
        queue=settings.queue_limit,
        budget_s=settings.wait_budget_s,
        client_timeout_s=settings.client_timeout_s,
        retry_after_s=settings.retry_after_s,
        switch_interval_s=settings.switch_interval_s,
        metrics=metrics,
    )

    @contextlib.asynccontextmanager
    async def lifespan(_: FastAPI) -> AsyncIterator[None]:
        _drain_on_signals(admission)  # the server has installed its handlers by now
        if settings.pin_cpu:
            pin_worker()
        yield

    app = FastAPI(
        # FastAPI's OpenTelemetry hooks look for a configured SDK on every request
        telemetry=None if settings.otel else {"tracing": False, "metrics": False, "logs": False},
        lifespan=lifespan,
        docs_url=None,
        redoc_url=None,
        title="gearwork",
        version="0.1.0",
        description=DESCRIPTION,
        openapi_tags=OPENAPI_TAGS,
    )
    for module in ROUTERS:
        app.include_router(module.router)
    install_problem_handlers(app)
    if settings.docs:
        install_docs(app)
    app.state.metrics = metrics
    app.state.admission = admission
    _add_middleware(app, admission, metrics)

    def openapi() -> dict[str, object]:
        return build_openapi(app)

    app.openapi = openapi  # type: ignore[method-assign]
    return app


app = create_app()
