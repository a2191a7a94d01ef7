"""The ASGI application: ``service.app:app``."""

from __future__ import annotations

from fastapi import FastAPI
from starlette.middleware.gzip import GZipMiddleware

from service.cache import ResultCache
from service.headers import ProblemCORS, ResponseHeaders
from service.limits import BodySizeLimit, InFlightLimit
from service.observability import Metrics, RequestObservability, configure_logging
from service.openapi import build_openapi
from service.problems import install_problem_handlers
from service.routes import (
    acceleration,
    charts,
    chassis,
    comparison,
    demo,
    design,
    dyno,
    health,
    log_analysis,
    reports,
    sheets,
    shift_plan,
    sweep,
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


def create_app() -> FastAPI:
    """Build the application with its routes, limits, headers, metrics and error handlers."""
    settings = get_settings()
    configure_logging(settings.log_level)
    metrics = Metrics() if settings.metrics else None
    app = FastAPI(
        title="gearwork",
        version="0.1.0",
        description=DESCRIPTION,
        openapi_tags=[
            {"name": "shift plan", "description": "Per-gear force and shift points."},
            {"name": "acceleration run", "description": "Timed runs of a described car."},
            {"name": "dyno", "description": "Correction to standard air; dyno-file import."},
            {"name": "chassis dyno", "description": "Wheel and engine figures by gear."},
            {"name": "log analysis", "description": "Data-logger checks of real shifts."},
            {"name": "comparison", "description": "Setups side by side."},
            {"name": "final drive sweep", "description": "Rank final-drive ratios."},
            {"name": "gear design", "description": "Gear spacing; speedometer correction."},
            {
                "name": "reports",
                "description": "Printable sheets (HTML, text, PDF) of every answer.",
            },
            {"name": "charts", "description": "Charts of tractive force."},
            {"name": "health", "description": "Liveness and readiness."},
        ],
    )
    app.include_router(health.router)
    app.include_router(shift_plan.router)
    app.include_router(acceleration.router)
    app.include_router(dyno.router)
    for module in (comparison, sweep, design, reports, sheets, charts, log_analysis, chassis):
        app.include_router(module.router)
    app.include_router(demo.router)
    install_problem_handlers(app)
    app.state.metrics = metrics
    # Each add_middleware wraps what was added before it, so the last is outermost. From
    # the outside in: request id, metrics and access log see every answer; cache headers
    # and one merged Vary go on the final (possibly gzipped) answer; CORS headers go on
    # errors too; a busy worker refuses before reading a body; gzip sits outside the
    # result cache, which keeps plain bodies; the size limit runs before the cache reads
    # the body.
    app.add_middleware(
        ResultCache,
        max_entries=settings.cache_entries,
        max_bytes=settings.cache_max_bytes,
        on_outcome=None if metrics is None else metrics.cache_outcome,
    )
    app.add_middleware(BodySizeLimit, max_bytes=settings.max_body_bytes)
    if settings.gzip_level > 0:
        app.add_middleware(
            GZipMiddleware,
            minimum_size=settings.gzip_min_bytes,
            compresslevel=settings.gzip_level,
        )
    app.add_middleware(
        InFlightLimit,
        max_in_flight=settings.max_in_flight,
        retry_after_s=settings.retry_after_s,
    )
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

    def openapi() -> dict[str, object]:
        return build_openapi(app)

    app.openapi = openapi  # type: ignore[method-assign]
    return app


app = create_app()
