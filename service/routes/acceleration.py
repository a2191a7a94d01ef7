"""POST /v1/acceleration-run: timed runs of a described car."""

from __future__ import annotations

from fastapi import APIRouter
from starlette.responses import Response

from service.http.deps import JsonBody
from service.http.json_route import JsonBodyRoute
from service.http.openapi import PROBLEM_RESPONSES
from service.http.responses import FastJSONResponse
from service.mapping.acceleration import compute_acceleration_run, run_summary
from service.schemas.acceleration import AccelerationRunRequest, AccelerationRunResponse

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["acceleration run"], route_class=JsonBodyRoute)


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
    done = compute_acceleration_run(body)
    summary = run_summary(done.report, done.optimal, body.units, body.reference)
    return FastJSONResponse({**done.document, "summary": summary})
