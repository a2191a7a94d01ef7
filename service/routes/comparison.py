"""POST /v1/comparison: a base setup and its variants side by side, with deltas."""

from __future__ import annotations

from fastapi import APIRouter
from starlette.responses import Response

from core.choice.setups import setup_figures
from core.runs.performance import ShiftCriterion
from service.http.deps import JsonBody
from service.http.openapi import PROBLEM_RESPONSES
from service.http.responses import FastJSONResponse
from service.mapping.comparison import comparison_document, comparison_summary
from service.mapping.inputs import core_fields
from service.mapping.setups import COMPARISON_FIELDS, build_setups, renamed_fields
from service.schemas.comparison import ComparisonRequest, ComparisonResponse
from service.units import Quantity, to_si

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["comparison"])


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
    setups = build_setups(body)
    speeds = [to_si(v, Quantity.SPEED, body.units) for v in body.cruise_speeds]
    criterion = ShiftCriterion(body.shift_criterion)
    figures = []
    for named in setups:
        with renamed_fields(named.renames), core_fields(COMPARISON_FIELDS):
            figures.append(
                setup_figures(named.setup, criterion=criterion, cruise_speeds_m_s=speeds)
            )
    doc = comparison_document(setups, figures, speeds, body.units, COMPARISON_FIELDS)
    summary = comparison_summary(setups, figures, speeds, body.units, body.reference)
    return FastJSONResponse(
        {
            "reference": body.reference,
            "shift_criterion": body.shift_criterion,
            **doc,
            "summary": summary,
        }
    )
