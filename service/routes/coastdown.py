"""Road load from logged coast-downs.

POST /v1/road-load/coast-down.
"""

from __future__ import annotations

from fastapi import APIRouter
from starlette.responses import Response

from service.http.deps import JsonBody
from service.http.json_route import JsonBodyRoute
from service.http.openapi import PROBLEM_RESPONSES
from service.http.responses import FastJSONResponse
from service.mapping.coastdown import (
    COAST_DOWN_FIELDS,
    coast_down_document,
    coast_down_summary,
    fit_coast_downs,
)
from service.schemas.coastdown import CoastDownRequest, CoastDownResponse

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["road load"], route_class=JsonBodyRoute)


@router.post(
    "/road-load/coast-down",
    operation_id="create_coast_down_fit",
    summary="Road-load coefficients F0, F1, F2 fitted to logged coast-downs",
    response_model=CoastDownResponse,
    responses=PROBLEM_RESPONSES,
)
async def create_coast_down_fit(body: CoastDownRequest, _json: JsonBody) -> Response:
    """Fit F = F0 + F1 v + F2 v^2 to the speed traces of coast-downs in neutral by
    integrating the equation of motion, average the directions, correct to reference
    conditions and return a ready `vehicle.road_load` block."""
    fit = fit_coast_downs(body)
    doc = coast_down_document(fit, body.units, COAST_DOWN_FIELDS)
    summary = coast_down_summary(doc, fit, body.units, body.reference)
    return FastJSONResponse({"reference": body.reference, **doc, "summary": summary})
