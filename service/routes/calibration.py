"""The car fitted to a logged full-throttle pass.

POST /v1/calibration/pass.
"""

from __future__ import annotations

from fastapi import APIRouter
from starlette.responses import Response

from service.http.deps import JsonBody
from service.http.json_route import JsonBodyRoute
from service.http.openapi import PROBLEM_RESPONSES
from service.http.responses import FastJSONResponse
from service.mapping.calibration import (
    calibrate_request,
    calibration_document,
    calibration_summary,
)
from service.schemas.calibration import CalibrationRequest, CalibrationResponse

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["calibration"], route_class=JsonBodyRoute)


@router.post(
    "/calibration/pass",
    operation_id="create_pass_calibration",
    summary="Mass factor, driveline efficiency and drag area fitted to a logged pass",
    response_model=CalibrationResponse,
    responses=PROBLEM_RESPONSES,
)
async def create_pass_calibration(body: CalibrationRequest, _json: JsonBody) -> Response:
    """Simulate the logged pass with the run's integrator, shifting where the log shifted,
    and fit the mass factor, efficiency and drag area so the simulated speed matches the
    logged one; each figure with its standard uncertainty, the residuals gear by gear, and
    the calibrated `vehicle` and `drivetrain` blocks."""
    fit, density = calibrate_request(body)
    doc = calibration_document(body, fit, density)
    summary = calibration_summary(doc, fit, body.units, body.reference)
    return FastJSONResponse({"reference": body.reference, **doc, "summary": summary})
