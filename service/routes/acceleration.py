"""POST /v1/acceleration-run: timed runs of a described car."""

from __future__ import annotations

from fastapi import APIRouter
from starlette.responses import Response

from core import Coupling, ShiftCriterion, drive_model, optimal_shift_rpm, planned_shift_rpm
from core import run_report as simulate_report
from core.runreport import QUARTER_MILE_M
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
from service.present_run import run_document, run_summary
from service.responses import FastJSONResponse
from service.schemas.acceleration import AccelerationRunRequest, AccelerationRunResponse
from service.units import Quantity, to_si
from service.vehicle_builders import LAUNCH_FIELDS, VEHICLE_FIELDS, build_launch, build_vehicle

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["acceleration run"])
FIELDS = {
    **ENGINE_FIELDS,
    **DRIVETRAIN_FIELDS,
    **VEHICLE_FIELDS,
    **LAUNCH_FIELDS,
    "shift_rpm": "shifts.rpm",
    "start_speed_m_s": "run.start_speed",
}
# simulated runs the shift search may spend: fixed, so the same request gets the same answer
SEARCH_BUDGET = {Coupling.CLUTCH: 120, Coupling.CONVERTER: 60}


@router.post(
    "/acceleration-run",
    operation_id="create_acceleration_run",
    summary="Timed acceleration run: 60 ft to 1/4 mile, 0-60 mph, top speed",
    response_model=AccelerationRunResponse,
    responses=PROBLEM_RESPONSES,
)
async def create_acceleration_run(body: AccelerationRunRequest, _json: JsonBody) -> Response:
    """Simulate a full-throttle run of a described car (road load, rotating inertia,
    traction with weight transfer, clutch or converter launch, shift time) and time it
    like a strip and a road test."""
    u, run = body.units, body.run
    curve = build_curve(body.engine.curve, u)
    drivetrain, tire = build_drivetrain(body.drivetrain), build_tire(body.drivetrain.tire, u)
    vehicle, launch = build_vehicle(body.vehicle, u), build_launch(body.launch, curve, u)
    speed = Quantity.SPEED
    rollout = 0.3048 if run.rollout is None else to_si(run.rollout, Quantity.LENGTH, u)
    with core_fields(FIELDS):
        model = drive_model(
            curve, drivetrain, tire, vehicle, launch, rev_limit_rpm=body.engine.rev_limit_rpm
        )
        crit = body.shifts.criterion
        rpm = (
            body.shifts.rpm if crit == "custom" else planned_shift_rpm(model, ShiftCriterion(crit))
        )
        finish_d = (
            None
            if run.finish_distance is None
            else to_si(run.finish_distance, Quantity.DISTANCE, u)
        )
        finish_v = None if run.finish_speed is None else to_si(run.finish_speed, speed, u)
        if finish_d is None and finish_v is None:
            finish_d = QUARTER_MILE_M
        report = simulate_report(
            model,
            [] if rpm is None else rpm,
            start_speed_m_s=to_si(run.start_speed, speed, u),
            rollout_m=rollout,
            finish_distance_m=finish_d,
            finish_speed_m_s=finish_v,
            extra_distances_m=[to_si(d, Quantity.DISTANCE, u) for d in run.extra_distances],
            extra_speeds_m_s=[
                (to_si(i.start, speed, u), to_si(i.end, speed, u))
                for i in run.extra_speed_intervals
            ],
        )
        optimal = None
        if body.shifts.optimise:
            optimal = optimal_shift_rpm(
                model,
                report.run.shift_rpm,
                start_speed_m_s=to_si(run.start_speed, speed, u),
                rollout_m=rollout,
                finish_distance_m=finish_d if finish_v is None else None,
                finish_speed_m_s=finish_v,
                max_evaluations=SEARCH_BUDGET[launch.coupling],
            )
    doc = run_document(report, model, optimal, crit, u, run.trace_points, FIELDS)
    summary = run_summary(report, optimal, u, body.reference)
    return FastJSONResponse({"reference": body.reference, **doc, "summary": summary})
