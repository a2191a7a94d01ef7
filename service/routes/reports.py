"""POST /v1/reports/...: printable reports as text, HTML or PDF, by the Accept header."""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from fastapi import APIRouter, Request
from starlette.concurrency import run_in_threadpool
from starlette.responses import Response

from service.chart_data import RunChart, TractiveForceChart, run_chart, tractive_force_chart
from service.charts import svg_markup
from service.computations import compute_acceleration_run, compute_shift_plan
from service.deps import JsonBody
from service.negotiation import inline_disposition, require_media_type
from service.openapi import PROBLEM_RESPONSES
from service.report_html import render_html
from service.report_model import Report
from service.report_pdf import render_pdf
from service.report_run import acceleration_run_report
from service.report_text import render_text
from service.reports import shift_plan_report
from service.schemas.acceleration import AccelerationRunRequest
from service.schemas.common import Problem
from service.schemas.shift_plan import ShiftPlanRequest

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["reports"])

HTML, TEXT, PDF = "text/html", "text/plain", "application/pdf"
OFFERED = (HTML, TEXT, PDF)  # the first is the default for a missing Accept or */*
_EXTENSIONS = {HTML: "html", TEXT: "txt", PDF: "pdf"}
RESPONSES: dict[int | str, dict[str, Any]] = {
    200: {
        "description": "The report: one printable HTML page with print CSS, the tables, the "
        "cautions and an inline SVG chart (default); 80-column plain text; or PDF.",
        "content": {
            HTML: {"schema": {"type": "string"}},
            TEXT: {"schema": {"type": "string"}},
            PDF: {"schema": {"type": "string", "format": "binary"}},
        },
    },
    406: {"model": Problem, "description": "The Accept header allows none of the formats."},
    **PROBLEM_RESPONSES,
}


async def _respond(
    report: Report,
    chart: Callable[[], TractiveForceChart | RunChart],
    media: str,
    stem: str,
) -> Response:
    """Render in the chosen format; chart drawing runs on a worker thread."""
    if media == TEXT:
        content: bytes | str = render_text(report)
    elif media == HTML:
        drawn = chart()
        content = render_html(report, await run_in_threadpool(svg_markup, drawn))
    else:
        drawn = chart()
        content = await run_in_threadpool(render_pdf, report, drawn)
    headers = {
        "Vary": "Accept",
        "Content-Disposition": inline_disposition(stem, report.reference, _EXTENSIONS[media]),
    }
    return Response(content, media_type=media, headers=headers)


@router.post(
    "/reports/shift-plan",
    operation_id="create_shift_plan_report",
    summary="Printable shift plan: HTML, plain text or PDF",
    response_class=Response,
    responses=RESPONSES,
)
async def create_shift_plan_report(
    body: ShiftPlanRequest, request: Request, _json: JsonBody
) -> Response:
    """The shift plan of POST /v1/shift-plan as a document to hand a customer: the inputs
    used, gears, shifts, road speed and tractive force by gear, the cautions, and a chart.
    The Accept header picks `text/html` (default), `text/plain` or `application/pdf`."""
    media = require_media_type(request.headers.get("accept"), OFFERED)
    outcome = compute_shift_plan(body)
    return await _respond(
        shift_plan_report(outcome), lambda: tractive_force_chart(outcome), media, "shift-plan"
    )


@router.post(
    "/reports/acceleration-run",
    operation_id="create_acceleration_run_report",
    summary="Printable acceleration run: HTML, plain text or PDF",
    response_class=Response,
    responses=RESPONSES,
)
async def create_acceleration_run_report(
    body: AccelerationRunRequest, request: Request, _json: JsonBody
) -> Response:
    """The run of POST /v1/acceleration-run as a document: the inputs used, timed
    distances and speeds, shifts, top speed, the run over time, the cautions, and a chart
    of speed over time. The Accept header picks the format as for the shift-plan report."""
    media = require_media_type(request.headers.get("accept"), OFFERED)
    outcome = compute_acceleration_run(body)
    return await _respond(
        acceleration_run_report(outcome), lambda: run_chart(outcome), media, "acceleration-run"
    )
