"""POST /v1/shift-plan: gear tables and shift points from a curve and a drivetrain."""

from __future__ import annotations

import dataclasses

from fastapi import APIRouter
from starlette.responses import Response

from core import acceleration_shift_points, drive_model, shift_plan
from service.builders import (
    DRIVETRAIN_FIELDS,
    ENGINE_FIELDS,
    build_curve,
    build_drivetrain,
    build_tire,
    core_fields,
)
from service.deps import JsonBody
from service.openapi import PROBLEM_RESPONSES
from service.present import performance_document, shift_plan_document
from service.responses import FastJSONResponse
from service.schemas.shift_plan import ShiftPlanRequest, ShiftPlanResponse
from service.schemas.vehicle import LaunchIn
from service.summary import shift_plan_summary
from service.units import Quantity, to_si
from service.vehicle_builders import LAUNCH_FIELDS, VEHICLE_FIELDS, build_launch, build_vehicle

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["shift plan"])
FIELDS = {
    **ENGINE_FIELDS,
    **DRIVETRAIN_FIELDS,
    **VEHICLE_FIELDS,
    **LAUNCH_FIELDS,
    "rpm_step": "table.rpm_step",
}


@router.post(
    "/shift-plan",
    operation_id="create_shift_plan",
    summary="Shift points and per-gear wheel force",
    response_model=ShiftPlanResponse,
    responses=PROBLEM_RESPONSES,
)
async def create_shift_plan(body: ShiftPlanRequest, _json: JsonBody) -> Response:
    """Wheel torque and tractive force in every gear across road speed, the shift rpm for
    each gear change (force crossover, else the rev limit), the rpm after each shift, and
    a printable summary with the cautions."""
    units = body.units
    curve = build_curve(body.engine.curve, units)
    drivetrain = build_drivetrain(body.drivetrain)
    tire = build_tire(body.drivetrain.tire, units)
    with core_fields(FIELDS):
        plan = shift_plan(
            curve,
            drivetrain,
            tire,
            rev_limit_rpm=body.engine.rev_limit_rpm,
            rpm_step=body.table.rpm_step,
        )
    performance = None
    if body.vehicle is not None:
        vehicle = build_vehicle(body.vehicle, units)
        launch = build_launch(body.launch or LaunchIn(), curve, units)
        with core_fields(FIELDS):
            model = drive_model(
                curve, drivetrain, tire, vehicle, launch, rev_limit_rpm=body.engine.rev_limit_rpm
            )
            speeds = [to_si(v, Quantity.SPEED, units) for v in body.cruise_speeds]
            performance = performance_document(model, plan, speeds, units)
            if body.shift_criterion == "net_acceleration":
                plan = dataclasses.replace(plan, shifts=acceleration_shift_points(model))
    doc = shift_plan_document(plan, curve, drivetrain, tire, units, FIELDS)
    summary = shift_plan_summary(plan, curve, drivetrain, tire, units, body.reference)
    return FastJSONResponse(
        {
            "reference": body.reference,
            **doc,
            "shift_criterion": body.shift_criterion,
            "performance": performance,
            "summary": summary,
        }
    )
