"""POST /v1/comparison: a base setup and its variants side by side, with deltas."""

from __future__ import annotations

from fastapi import APIRouter
from starlette.responses import Response

from service.http.deps import JsonBody
from service.http.json_route import JsonBodyRoute
from service.http.openapi import PROBLEM_RESPONSES
from service.http.responses import FastJSONResponse
from service.mapping.comparison import COMPARISON_FIELDS, compare_setups, comparison_document
from service.output.comparison_summary import comparison_summary
from service.schemas.comparison import ComparisonRequest, ComparisonResponse

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["comparison"], route_class=JsonBodyRoute)


@router.post(
    "/comparison",
    operation_id="create_comparison",
    summary="Compare a setup with up to eight variants (axle ratio, tires, gears, mass...)",
    response_model=ComparisonResponse,
    responses=PROBLEM_RESPONSES,
)
async def create_comparison(body: ComparisonRequest, _json: JsonBody) -> Response:
    """Shift rpms and where they land, speed at the rev limit in each gear, cruise rpm,
    and with the car described top speed, 60 ft, 1/8 and 1/4 mile times and traps and
    0-60 mph, for the base setup and each variant, with each variant's change against the
    base and a printable summary."""
    comparison = compare_setups(body)
    doc = comparison_document(comparison, body.units, COMPARISON_FIELDS)
    summary = comparison_summary(comparison, body.units, body.reference)
    return FastJSONResponse(
        {
            "reference": body.reference,
            "shift_criterion": body.shift_criterion,
            **doc,
            "summary": summary,
        }
    )
