"""POST /v1/charts/tractive-force: tractive force by gear as SVG or PNG, by Accept."""

from __future__ import annotations

from fastapi import APIRouter, Request
from starlette.responses import Response

from service.http.deps import JsonBody
from service.mapping.shift_plan import compute_shift_plan
from service.output.chart_data import tractive_force_chart
from service.output.chart_response import CHART_RESPONSES, ImageQuery, chart_response
from service.schemas.shift_plan import ShiftPlanRequest

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["charts"])


@router.post(
    "/charts/tractive-force",
    operation_id="create_tractive_force_chart",
    summary="Chart of tractive force by gear against road speed",
    response_class=Response,
    responses=CHART_RESPONSES,
)
async def create_tractive_force_chart(
    body: ShiftPlanRequest,
    request: Request,
    _json: JsonBody,
    format: ImageQuery = None,  # the query parameter's public name
) -> Response:
    """Tractive force in every gear against road speed with the shift points marked, and
    with `vehicle` the road load and the traction limit; made to read in greyscale print.
    `?format=` or the Accept header picks `image/svg+xml` (default) or `image/png`."""
    return chart_response(
        request,
        lambda: tractive_force_chart(compute_shift_plan(body)),
        fmt=format,
        reference=body.reference,
        stem="tractive-force",
    )
