"""Chassis-dyno helpers: wheel and engine figures, one gear's curve in the others.

POST /v1/chassis-dyno/convert.
"""

from __future__ import annotations

import numpy as np
from fastapi import APIRouter
from starlette.responses import Response

from core.driveline.chassis import MeasuredAt, chassis_conversion, efficiency_from_loss
from service.http.deps import JsonBody
from service.http.openapi import PROBLEM_RESPONSES
from service.http.responses import FastJSONResponse
from service.mapping.chassis import chassis_document, chassis_summary
from service.mapping.inputs import core_fields
from service.schemas.chassis import ChassisConversionRequest, ChassisConversionResponse
from service.units import Quantity, to_si

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["chassis dyno"])
FIELDS = {
    "rpm": "curve.rpm",
    "torque_nm": "curve.torque",
    "power_w": "curve.power",
    "loss_percent": "driveline.loss_percent",
    "measured_gear": "driveline.measured_gear",
    "fixed_loss_w": "driveline.fixed_loss",
}


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
    u, curve, loss = body.units, body.curve, body.driveline

    def si(values: list[float] | None, quantity: Quantity) -> np.ndarray | None:
        return None if values is None else to_si(np.asarray(values, np.float64), quantity, u)

    def si_one(value: float) -> float:
        return to_si(value, Quantity.POWER, u)

    per_gear = loss.gear_efficiencies is not None
    fields = {
        **FIELDS,
        "efficiency": "driveline.gear_efficiencies" if per_gear else "driveline.efficiency",
    }
    with core_fields(fields):
        efficiency: float | list[float]
        if loss.gear_efficiencies is not None:
            efficiency = loss.gear_efficiencies
        elif loss.efficiency is not None:
            efficiency = loss.efficiency
        else:
            efficiency = efficiency_from_loss(float(loss.loss_percent or 0.0))
        result = chassis_conversion(
            curve.rpm,
            measured_at=MeasuredAt(curve.measured_at),
            efficiency=efficiency,
            torque_nm=si(curve.torque, Quantity.TORQUE),
            power_w=si(curve.power, Quantity.POWER),
            measured_gear=loss.measured_gear,
            fixed_loss_w=0.0 if loss.fixed_loss is None else si_one(loss.fixed_loss),
        )
    doc = chassis_document(result, u, fields)
    summary = chassis_summary(result, u, body.reference)
    return FastJSONResponse({"reference": body.reference, **doc, "summary": summary})
