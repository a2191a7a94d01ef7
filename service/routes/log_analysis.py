"""Data-logger checks of real shifts: POST /v1/log-analysis."""

from __future__ import annotations

from fastapi import APIRouter
from starlette.responses import Response

from service.http.deps import JsonBody
from service.http.json_route import JsonBodyRoute
from service.http.openapi import PROBLEM_RESPONSES
from service.http.responses import FastJSONResponse
from service.mapping.log_analysis import (
    LOG_FIELDS,
    check_logged_pass,
    log_analysis_document,
    log_summary,
)
from service.schemas.log_analysis import LogAnalysisRequest, LogAnalysisResponse

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["log analysis"], route_class=JsonBodyRoute)


@router.post(
    "/log-analysis",
    operation_id="create_log_analysis",
    summary="Check a logged pass: was each shift early, late or about right?",
    response_model=LogAnalysisResponse,
    responses=PROBLEM_RESPONSES,
)
async def create_log_analysis(body: LogAnalysisRequest, _json: JsonBody) -> Response:
    """Gears engaged (from the rpm-to-speed ratio, or acceleration dips without rpm), every
    shift with its times, speeds, rpm and accelerations before and after, the empirical
    crossover of the two gears' logged acceleration, and whether the shift came early,
    late or about right; warnings, cautions and a printable summary."""
    checked = check_logged_pass(body)
    analysis, log, model = checked.analysis, checked.log, checked.model
    doc = log_analysis_document(analysis, log, checked.text, model, body.units, LOG_FIELDS)
    summary = log_summary(analysis, log, body.units, body.reference, model)
    return FastJSONResponse({"reference": body.reference, **doc, "summary": summary})
