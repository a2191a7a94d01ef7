"""POST /v1/final-drive-sweep: candidate final drive ratios ranked, all simulated at once."""

from __future__ import annotations

from fastapi import APIRouter
from starlette.responses import Response

from service.http.deps import JsonBody
from service.http.json_route import JsonBodyRoute
from service.http.openapi import PROBLEM_RESPONSES
from service.http.responses import FastJSONResponse
from service.mapping.final_drive import (
    SWEEP_FIELDS,
    sweep_document,
    sweep_ratios,
    sweep_summary,
)
from service.schemas.final_drive import FinalDriveSweepRequest, FinalDriveSweepResponse

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["final drive sweep"], route_class=JsonBodyRoute)


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
    swept = sweep_ratios(body)
    doc = sweep_document(swept.sweep, swept.limits, body.units, SWEEP_FIELDS)
    summary = sweep_summary(swept.sweep, swept.limits, body.units, body.reference)
    return FastJSONResponse({"reference": body.reference, **doc, "summary": summary})
