"""POST /v1/shift-plan: gear tables and shift points from a curve and a drivetrain."""

from __future__ import annotations

from fastapi import APIRouter
from starlette.responses import Response

from service.http.deps import JsonBody
from service.http.json_route import JsonBodyRoute
from service.http.openapi import PROBLEM_RESPONSES
from service.http.responses import FastJSONResponse
from service.mapping.shift_plan import compute_shift_plan
from service.output.shift_plan_summary import shift_plan_summary
from service.schemas.shift_plan import ShiftPlanRequest, ShiftPlanResponse

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["shift plan"], route_class=JsonBodyRoute)


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
    a printable summary with the cautions. With a vehicle: net-acceleration shifts on
    request, top speed, gradeability and cruise rpm."""
    done = compute_shift_plan(body)
    summary = shift_plan_summary(
        done.plan, done.curve, done.drivetrain, done.tire, body.units, body.reference
    )
    return FastJSONResponse({**done.document, "summary": summary})
