"""Liveness (/healthz), readiness (/readyz) and Prometheus metrics (/metrics).

``/metrics`` is left out of the OpenAPI document: it is for the scraper, in Prometheus's
text format, not for API callers.
"""

from __future__ import annotations

import logging
import math
from typing import Literal

from fastapi import APIRouter, Request
from pydantic import Field
from starlette.responses import Response

from core import Interpolation, make_drivetrain, shift_plan, tire_from_diameter
from core import torque_curve_from_torque as curve_from_torque
from service.http.admission import Admission
from service.http.negotiation import choose_media_type
from service.http.observability import METRICS_CONTENT_TYPE, OPENMETRICS_TYPE, Metrics
from service.http.problems import ProblemError, problem_response
from service.http.responses import FastJSONResponse
from service.schemas.common import ApiModel, Problem
from service.settings import get_settings

__all__ = ["not_ready_because", "probe_shift_rpm", "router"]

router = APIRouter(tags=["health"])
# a linear curve falling from 350 to 50 N*m over 1000-7000 rpm on ratios 3 and 2 shifts
# at (T0/c)*G1/(G1+G2) = 8000*3/5 = 4800 rpm (closed form, REFERENCES.md)
_PROBE_SHIFT_RPM = 4800.0
_log = logging.getLogger("gearwork.errors")
_TEXT, _OPENMETRICS = "text/plain", "application/openmetrics-text"


class Health(ApiModel):
    """Liveness document."""

    status: str = Field(description="`ok` while the process serves requests.")
    service: str = Field(description="Service name.")
    version: str = Field(description="Service version.")


class Readiness(ApiModel):
    """Readiness document."""

    status: Literal["ready"] = Field(description="`ready`: the worker computes correctly.")
    checks: dict[str, Literal["ok"]] = Field(description="Each check made and its outcome.")


@router.get("/healthz", operation_id="get_health", summary="Liveness check")
async def health() -> Health:
    """Answers while the process is up; touches nothing else."""
    return Health(status="ok", service="gearwork", version="0.1.0")


def probe_shift_rpm() -> float:
    """The shift rpm of the readiness self-check plan [rpm] (4800 when all is well)."""
    curve = curve_from_torque(
        [1000.0, 4000.0, 7000.0], [350.0, 200.0, 50.0], interpolation=Interpolation.LINEAR
    )
    plan = shift_plan(curve, make_drivetrain([3.0, 2.0], 1.0), tire_from_diameter(0.6))
    return plan.shifts[0].shift_rpm


def not_ready_because(request: Request) -> str | None:
    """Why this worker is not ready (saturated, draining, or its self-check failed), or
    None when it is."""
    admission: Admission | None = getattr(request.app.state, "admission", None)
    if admission is not None and admission.saturated():
        why = "is shutting down" if admission.draining else "is saturated (queue full)"
        return f"This worker {why}; not ready."
    try:
        ok = math.isclose(probe_shift_rpm(), _PROBE_SHIFT_RPM, rel_tol=1e-9)
    except Exception:  # any failure of the self-check means "not ready", never a 500
        _log.exception("readiness self-check failed")
        ok = False
    return None if ok else "The shift-plan self-check failed; this worker is not ready."


@router.get(
    "/readyz",
    operation_id="get_readiness",
    summary="Readiness check",
    response_model=Readiness,
    responses={503: {"model": Problem, "description": "Not ready; retry after a while."}},
)
async def readiness(request: Request) -> Response:
    """Ready when this worker computes a tiny shift plan and gets the known answer, and
    is neither saturated (every calculation slot busy and the queue full) nor draining
    for shutdown."""
    why = not_ready_because(request)
    if why is not None:
        return problem_response(
            503,
            why,
            request.url.path,
            slug="not-ready",
            headers={"Retry-After": str(get_settings().retry_after_s)},
        )
    return FastJSONResponse({"status": "ready", "checks": {"shift_plan": "ok"}})


@router.get("/metrics", include_in_schema=False)
async def metrics(request: Request) -> Response:
    """This service's counters and histograms: OpenMetrics text when the scraper asks for
    ``application/openmetrics-text``, else Prometheus's text format."""
    registry: Metrics | None = getattr(request.app.state, "metrics", None)
    if registry is None or not get_settings().metrics:
        raise ProblemError(404, "Metrics are turned off (GEARWORK_METRICS=false).")
    offered = (_TEXT, _OPENMETRICS)
    media = choose_media_type(request.headers.get("accept"), offered) or _TEXT
    if media == _OPENMETRICS:
        return Response(
            registry.render(openmetrics=True),
            media_type=OPENMETRICS_TYPE,
            headers={"Vary": "Accept"},
        )
    return Response(registry.render(), media_type=METRICS_CONTENT_TYPE, headers={"Vary": "Accept"})
