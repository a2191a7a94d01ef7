"""POST /v1/final-drive-sweep: candidate final drive ratios ranked, all simulated at once."""

from __future__ import annotations

from fastapi import APIRouter
from starlette.responses import Response

from core.choice.sweep import sweep_final_drives
from core.choice.sweep_spec import SweepObjective
from core.runs.milestones import STANDARD_ROLLOUT_M
from service.http.deps import JsonBody
from service.http.openapi import PROBLEM_RESPONSES
from service.http.responses import FastJSONResponse
from service.mapping.final_drive import sweep_document, sweep_summary
from service.mapping.inputs import build_curve, build_drivetrain, build_tire, core_fields
from service.mapping.setups import (
    SWEEP_FIELDS,
    check_ratio_floor,
    sweep_candidates,
    sweep_constraints,
    sweep_cruise_target,
)
from service.mapping.vehicle import build_launch, build_vehicle
from service.schemas.final_drive import FinalDriveSweepRequest, FinalDriveSweepResponse
from service.schemas.vehicle import LaunchIn
from service.units import Quantity, to_si

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["final drive sweep"])


@router.post(
    "/final-drive-sweep",
    operation_id="create_final_drive_sweep",
    summary="Rank final drive ratios by 1/4 mile, 0-60, top speed or cruise rpm",
    response_model=FinalDriveSweepResponse,
    responses=PROBLEM_RESPONSES,
)
async def create_final_drive_sweep(body: FinalDriveSweepRequest, _json: JsonBody) -> Response:
    """Every candidate ratio simulated together: a table ranked by the objective, the best
    listed ratio meeting the constraints (and why each other one fails), and the
    continuous optimum between the listed ratios, with a printable summary."""
    u = body.units
    check_ratio_floor(body.drivetrain)
    curve = build_curve(body.engine.curve, u)
    drivetrain, tire = build_drivetrain(body.drivetrain), build_tire(body.drivetrain.tire, u)
    vehicle = None if body.vehicle is None else build_vehicle(body.vehicle, u)
    launch = None if vehicle is None else build_launch(body.launch or LaunchIn(), curve, u)
    limits = sweep_constraints(body.constraints, u)
    rollout = (
        STANDARD_ROLLOUT_M if body.rollout is None else to_si(body.rollout, Quantity.LENGTH, u)
    )
    with core_fields({**SWEEP_FIELDS, "final_drive_ratio": "ratios"}):
        sweep = sweep_final_drives(
            curve,
            drivetrain,
            tire,
            sweep_candidates(body),
            SweepObjective(body.objective),
            vehicle=vehicle,
            launch=launch,
            rev_limit_rpm=body.engine.rev_limit_rpm,
            shift_rpm=body.shift_rpm,
            constraints=limits,
            cruise_target=sweep_cruise_target(body),
            rollout_m=rollout,
        )
    doc = sweep_document(sweep, limits, u, SWEEP_FIELDS)
    summary = sweep_summary(sweep, limits, u, body.reference)
    return FastJSONResponse({"reference": body.reference, **doc, "summary": summary})
