"""Road load from logged coast-downs.

POST /v1/road-load/coast-down.
"""

from __future__ import annotations

import numpy as np
from fastapi import APIRouter
from starlette.responses import Response

from core.car.coast_down import CoastDownRun, TravelDirection, fit_coast_down
from service.http.deps import JsonBody
from service.http.openapi import PROBLEM_RESPONSES
from service.http.responses import FastJSONResponse
from service.mapping.coastdown import coast_down_document, coast_down_summary
from service.mapping.inputs import core_fields
from service.schemas.coastdown import CoastDownRequest, CoastDownResponse
from service.units import Quantity, to_si

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["road load"])
FIELDS = {
    "mass_kg": "mass",
    "equivalent_mass_kg": "equivalent_mass",
    "runs": "runs",
    "temperature_k": "conditions.temperature",
    "pressure_pa": "conditions.pressure",
}


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
    u = body.units
    runs = [
        CoastDownRun(
            np.asarray(r.time, np.float64),
            to_si(np.asarray(r.speed, np.float64), Quantity.SPEED, u),
            TravelDirection(r.direction),
        )
        for r in body.runs
    ]
    c = body.conditions
    with core_fields(FIELDS):
        fit = fit_coast_down(
            runs,
            to_si(body.mass, Quantity.MASS, u),
            None
            if body.equivalent_mass is None
            else to_si(body.equivalent_mass, Quantity.MASS, u),
            temperature_k=None if c is None else to_si(c.temperature, Quantity.TEMPERATURE, u),
            pressure_pa=None if c is None else to_si(c.pressure, Quantity.PRESSURE, u),
            relative_humidity=0.0 if c is None else c.relative_humidity / 100.0,
        )
    doc = coast_down_document(fit, u, FIELDS)
    summary = coast_down_summary(doc, fit, body.reference)
    return FastJSONResponse({"reference": body.reference, **doc, "summary": summary})
