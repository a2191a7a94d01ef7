"""The ASGI application: ``service.app:app``."""

from __future__ import annotations

from fastapi import FastAPI

from service.cache import ResultCache
from service.limits import BodySizeLimit
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
"""


def create_app() -> FastAPI:
    """Build the application with its routes, limits and error handlers."""
    settings = get_settings()
    app = FastAPI(
        title="gearwork",
        version="0.1.0",
        description=DESCRIPTION,
        openapi_tags=[
            {"name": "shift plan", "description": "Per-gear force and shift points."},
            {"name": "acceleration run", "description": "Timed runs of a described car."},
            {"name": "dyno", "description": "Correction to standard air; dyno-file import."},
            {"name": "health", "description": "Liveness."},
        ],
    )
    app.include_router(health.router)
    app.include_router(shift_plan.router)
    app.include_router(acceleration.router)
    app.include_router(dyno.router)
    for module in (comparison, sweep, design, reports, charts, log_analysis, chassis, demo):
        app.include_router(module.router)
    install_problem_handlers(app)
    # outermost last: the size limit runs before the cache reads the body
    app.add_middleware(
        ResultCache, max_entries=settings.cache_entries, max_bytes=settings.cache_max_bytes
    )
    app.add_middleware(BodySizeLimit, max_bytes=settings.max_body_bytes)

    def openapi() -> dict[str, object]:
        return build_openapi(app)

    app.openapi = openapi  # type: ignore[method-assign]
    return app


app = create_app()
