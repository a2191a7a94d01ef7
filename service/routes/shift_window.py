"""What each gear change's shift rpm costs to the finish.

POST /v1/shift-window.
"""

from __future__ import annotations

from fastapi import APIRouter
from starlette.responses import Response

from core import drive_model
from core.runs.milestones import STANDARD_ROLLOUT_M
from core.runs.report import QUARTER_MILE_M
from core.shifts.window import shift_windows
from service.http.deps import JsonBody
from service.http.openapi import PROBLEM_RESPONSES
from service.http.responses import FastJSONResponse
from service.mapping.calculations import RUN_FIELDS, SEARCH_BUDGET
from service.mapping.inputs import build_curve, build_drivetrain, build_tire, core_fields
from service.mapping.shift_window import shift_window_document, shift_window_summary
from service.mapping.vehicle import build_launch, build_vehicle
from service.schemas.shift_window import ShiftWindowRequest, ShiftWindowResponse
from service.units import Quantity, UnitSystem, from_si, to_si, unit_labels

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["shift window"])
FIELDS = {
    **RUN_FIELDS,
    "tolerance_s": "tolerance",
    "points": "points",
    "rollout_m": "run.rollout",
    "finish": "run",
}


def _finish_words(distance_m: float | None, speed_m_s: float | None, u: UnitSystem) -> str:
    lab = unit_labels(u)
    if speed_m_s is not None:
        return f"to {from_si(speed_m_s, Quantity.SPEED, u):g} {lab['speed']}"
    d = float(distance_m or 0.0)
    shown = f"{from_si(d, Quantity.DISTANCE, u):,.1f} {lab['distance']}"
    return f"1/4 mile ({shown})" if abs(d - QUARTER_MILE_M) < 1e-6 else shown


@router.post(
    "/shift-window",
    operation_id="create_shift_window",
    summary="Time lost to the finish against each shift rpm, and the window within a tolerance",
    response_model=ShiftWindowResponse,
    responses=PROBLEM_RESPONSES,
)
async def create_shift_window(body: ShiftWindowRequest, _json: JsonBody) -> Response:
    """For each gear change, simulate the run with that change at each rpm across its usable
    range (the other changes at their time-optimal rpm) and give the time lost to the finish
    and the span of rpm that costs less than the tolerance."""
    u, run = body.units, body.run
    curve = build_curve(body.engine.curve, u)
    drivetrain, tire = build_drivetrain(body.drivetrain), build_tire(body.drivetrain.tire, u)
    vehicle, launch = build_vehicle(body.vehicle, u), build_launch(body.launch, curve, u)
    rollout = STANDARD_ROLLOUT_M if run.rollout is None else to_si(run.rollout, Quantity.LENGTH, u)
    finish_v = None if run.finish_speed is None else to_si(run.finish_speed, Quantity.SPEED, u)
    finish_d = None
    if finish_v is None:
        finish_d = (
            QUARTER_MILE_M
            if run.finish_distance is None
            else to_si(run.finish_distance, Quantity.DISTANCE, u)
        )
    with core_fields(FIELDS):
        model = drive_model(
            curve, drivetrain, tire, vehicle, launch, rev_limit_rpm=body.engine.rev_limit_rpm
        )
        result = shift_windows(
            model,
            start_speed_m_s=to_si(run.start_speed, Quantity.SPEED, u),
            rollout_m=rollout,
            finish_distance_m=finish_d,
            finish_speed_m_s=finish_v,
            tolerance_s=body.tolerance,
            points=body.points,
            max_search_evaluations=SEARCH_BUDGET[launch.coupling],
        )
    finish = _finish_words(finish_d, finish_v, u)
    doc = shift_window_document(result, model.rev_limit_rpm, finish, u, FIELDS)
    summary = shift_window_summary(doc, result, body.reference)
    return FastJSONResponse({"reference": body.reference, **doc, "summary": summary})
