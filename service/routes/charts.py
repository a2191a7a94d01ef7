"""POST /v1/charts/tractive-force: tractive force by gear as SVG or PNG, by Accept."""

from __future__ import annotations

import enum
from typing import Annotated, Any

from fastapi import APIRouter, Query, Request
from starlette.responses import Response

from service.http.deps import JsonBody
from service.http.negotiation import inline_disposition, negotiate
from service.http.openapi import PROBLEM_RESPONSES
from service.mapping.shift_plan import compute_shift_plan
from service.output.chart_data import tractive_force_chart
from service.output.png_chart import ChartFormat, render_chart
from service.schemas.common import Problem
from service.schemas.shift_plan import ShiftPlanRequest

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["charts"])

OFFERED = (ChartFormat.SVG.value, ChartFormat.PNG.value)  # SVG: missing Accept, */*, JSON
_EXTENSIONS = {ChartFormat.SVG: "svg", ChartFormat.PNG: "png"}


class ImageName(enum.StrEnum):
    """Chart formats by name (``?format=``)."""

    SVG = "svg"
    PNG = "png"


ImageQuery = Annotated[
    ImageName | None,
    Query(description="The format, overriding the Accept header: `svg` (default) or `png`."),
]
RESPONSES: dict[int | str, dict[str, Any]] = {
    200: {
        "description": "The chart: SVG (default, also for `Accept: application/json` or "
        "`*/*`) or PNG.",
        "content": {
            ChartFormat.SVG.value: {"schema": {"type": "string"}},
            ChartFormat.PNG.value: {"schema": {"type": "string", "format": "binary"}},
        },
    },
    406: {"model": Problem, "description": "The Accept header allows neither image type."},
    **PROBLEM_RESPONSES,
}


@router.post(
    "/charts/tractive-force",
    operation_id="create_tractive_force_chart",
    summary="Chart of tractive force by gear against road speed",
    response_class=Response,
    responses=RESPONSES,
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
    names = {
        ImageName.SVG.value: ChartFormat.SVG.value,
        ImageName.PNG.value: ChartFormat.PNG.value,
    }
    fmt = ChartFormat(negotiate(request.headers.get("accept"), format, names, OFFERED))
    chart = tractive_force_chart(compute_shift_plan(body))
    image = render_chart(chart, fmt)
    headers = {
        "Vary": "Accept",
        "Content-Disposition": inline_disposition(
            "tractive-force", body.reference, _EXTENSIONS[fmt]
        ),
    }
    return Response(image, media_type=fmt.value, headers=headers)
