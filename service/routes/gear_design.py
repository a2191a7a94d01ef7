"""POST /v1/gear-spacing and POST /v1/speedometer-correction: gear-set design helpers."""

from __future__ import annotations

from fastapi import APIRouter
from starlette.responses import Response

from service.http.deps import JsonBody
from service.http.json_route import JsonBodyRoute
from service.http.openapi import PROBLEM_RESPONSES
from service.http.responses import FastJSONResponse
from service.mapping.gear_design import (
    SPACING_FIELDS,
    gear_set_studies,
    spacing_document,
    speedometer_document,
    speedometer_study,
)
from service.output.gear_design_summary import spacing_summary, speedometer_summary
from service.schemas.gear_design import (
    GearSpacingRequest,
    GearSpacingResponse,
    SpeedometerRequest,
    SpeedometerResponse,
)

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["gear design"], route_class=JsonBodyRoute)


@router.post(
    "/gear-spacing",
    operation_id="create_gear_spacing",
    summary="Geometric and progressive gear sets; where each shift lands",
    response_model=GearSpacingResponse,
    responses=PROBLEM_RESPONSES,
)
async def create_gear_spacing(body: GearSpacingRequest, _json: JsonBody) -> Response:
    """Space a gear set between a first and a top ratio (geometric and progressive), and
    for those sets and any given set the rpm drop and landing rpm of each shift; with an
    engine curve, how far each landing lies from the torque and power peaks."""
    studies, max_factor, notices = gear_set_studies(body)
    doc = spacing_document(studies, max_factor, notices, body.units, SPACING_FIELDS)
    summary = spacing_summary(studies, notices, body.units, body.reference)
    return FastJSONResponse({"reference": body.reference, **doc, "summary": summary})


@router.post(
    "/speedometer-correction",
    operation_id="create_speedometer_correction",
    summary="Speedometer and odometer error after a tire or axle change",
    response_model=SpeedometerResponse,
    responses=PROBLEM_RESPONSES,
)
async def create_speedometer_correction(body: SpeedometerRequest, _json: JsonBody) -> Response:
    """Indicated against true speed and distance, the error in per cent, the factor the
    calibration needs and, for a mechanical drive, the driven gear that reads true."""
    study = speedometer_study(body)
    doc = speedometer_document(study, body.units)
    summary = speedometer_summary(study, body.units, body.reference)
    return FastJSONResponse({"reference": body.reference, **doc, "summary": summary})
