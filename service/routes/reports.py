"""POST /v1/reports/...: printable reports as text, HTML or PDF, by the Accept header."""

from __future__ import annotations

from fastapi import APIRouter, Request
from starlette.responses import Response

from service.http.deps import JsonBody
from service.mapping.acceleration import compute_acceleration_run
from service.mapping.shift_plan import compute_shift_plan
from service.output.chart_data import run_chart, tractive_force_chart
from service.output.run_report import acceleration_run_report
from service.output.sheet_response import (
    OFFERED,
    SHEET_RESPONSES,
    AppendixQuery,
    FormatQuery,
    sheet_response,
)
from service.output.shift_plan_report import shift_plan_report
from service.schemas.acceleration import AccelerationRunRequest
from service.schemas.shift_plan import ShiftPlanRequest

__all__ = ["OFFERED", "router"]

router = APIRouter(prefix="/v1", tags=["reports"])
RESPONSES = SHEET_RESPONSES


@router.post(
    "/reports/shift-plan",
    operation_id="create_shift_plan_report",
    summary="Printable shift plan: HTML, plain text or PDF",
    response_class=Response,
    responses=RESPONSES,
)
async def create_shift_plan_report(
    body: ShiftPlanRequest,
    request: Request,
    _json: JsonBody,
    format: FormatQuery = None,
    appendix: AppendixQuery = False,
) -> Response:
    """The shift plan of POST /v1/shift-plan as a sheet to hand a customer: the key figures,
    a chart, gears and shifts, the inputs used and the cautions (one page for a plain plan);
    the road speed and tractive force by gear in an appendix with `appendix=true`.
    `?format=` or the Accept header picks `text/html` (default), `text/plain` or
    `application/pdf`."""
    outcome = compute_shift_plan(body)
    return await sheet_response(
        request,
        shift_plan_report(outcome),
        chart=lambda: tractive_force_chart(outcome),
        fmt=format,
        appendix=appendix,
        job=body.job,
        units=body.units,
        stem="shift-plan",
    )


@router.post(
    "/reports/acceleration-run",
    operation_id="create_acceleration_run_report",
    summary="Printable acceleration run: HTML, plain text or PDF",
    response_class=Response,
    responses=RESPONSES,
)
async def create_acceleration_run_report(
    body: AccelerationRunRequest,
    request: Request,
    _json: JsonBody,
    format: FormatQuery = None,
    appendix: AppendixQuery = False,
) -> Response:
    """The run of POST /v1/acceleration-run as a sheet: the key figures, a chart of speed
    over time, timed distances and speeds, shifts, top speed, the inputs used and the
    cautions (two pages for the demo run); the run over time in an appendix with
    `appendix=true`. The format is picked as for the shift-plan report."""
    outcome = compute_acceleration_run(body)
    return await sheet_response(
        request,
        acceleration_run_report(outcome),
        chart=lambda: run_chart(outcome),
        fmt=format,
        appendix=appendix,
        job=body.job,
        units=body.units,
        stem="acceleration-run",
    )
