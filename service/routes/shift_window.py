"""What each gear change's shift rpm costs to the finish.

POST /v1/shift-window.
"""

from __future__ import annotations

from fastapi import APIRouter
from starlette.responses import Response

from service.http.deps import JsonBody
from service.http.json_route import JsonBodyRoute
from service.http.openapi import PROBLEM_RESPONSES
from service.http.responses import FastJSONResponse
from service.mapping.shift_window import (
    SHIFT_WINDOW_FIELDS,
    find_shift_windows,
    shift_window_document,
    shift_window_summary,
)
from service.schemas.shift_window import ShiftWindowRequest, ShiftWindowResponse

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["shift window"], route_class=JsonBodyRoute)


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
    study = find_shift_windows(body)
    doc = shift_window_document(study, body.units, SHIFT_WINDOW_FIELDS)
    summary = shift_window_summary(doc, study.windows, body.units, body.reference)
    return FastJSONResponse({"reference": body.reference, **doc, "summary": summary})
