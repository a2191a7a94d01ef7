"""Chassis-dyno helpers: wheel and engine figures, one gear's curve in the others.

POST /v1/chassis-dyno/convert.
"""

from __future__ import annotations

from fastapi import APIRouter
from starlette.responses import Response

from service.http.deps import JsonBody
from service.http.json_route import JsonBodyRoute
from service.http.openapi import PROBLEM_RESPONSES
from service.http.responses import FastJSONResponse
from service.mapping.chassis import (
    chassis_document,
    chassis_fields,
    chassis_summary,
    convert_chassis_curve,
)
from service.schemas.chassis import ChassisConversionRequest, ChassisConversionResponse

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["chassis dyno"], route_class=JsonBodyRoute)


@router.post(
    "/chassis-dyno/convert",
    operation_id="create_chassis_conversion",
    summary="Wheel power to an engine estimate and back; one gear's curve in the others",
    response_model=ChassisConversionResponse,
    responses=PROBLEM_RESPONSES,
)
async def create_chassis_conversion(body: ChassisConversionRequest, _json: JsonBody) -> Response:
    """Convert a curve between the wheels and the engine for a stated driveline loss
    (wheel = engine x efficiency at the same rpm), and with per-gear efficiencies give the
    wheel curve in every gear (scaled by eta_j / eta_k)."""
    result = convert_chassis_curve(body)
    doc = chassis_document(result, body.units, chassis_fields(body))
    summary = chassis_summary(result, body.units, body.reference)
    return FastJSONResponse({"reference": body.reference, **doc, "summary": summary})
