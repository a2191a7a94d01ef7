"""Data-logger checks of real shifts: POST /v1/log-analysis."""

from __future__ import annotations

from fastapi import APIRouter
from starlette.responses import Response

from core.logs.check import analyse_pass
from service.http.deps import JsonBody
from service.http.openapi import PROBLEM_RESPONSES
from service.http.responses import FastJSONResponse
from service.mapping.inputs import build_drivetrain, build_tire, core_fields
from service.mapping.log_analysis import (
    LOG_FIELDS,
    build_pass_log,
    log_analysis_document,
    log_summary,
    model_shifts,
)
from service.schemas.log_analysis import LogAnalysisRequest, LogAnalysisResponse

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["log analysis"])


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
    units, opts = body.units, body.options
    drivetrain = build_drivetrain(body.drivetrain)
    tire = build_tire(body.drivetrain.tire, units)
    log, text = build_pass_log(body.log, units)
    model = model_shifts(body, drivetrain, tire)
    with core_fields(LOG_FIELDS):
        analysis = analyse_pass(
            log,
            drivetrain,
            tire,
            rev_limit_rpm=model.rev_limit_rpm,
            start_gear=opts.start_gear,
            tolerance=opts.tolerance_percent / 100.0,
            smoothing_window_s=opts.smoothing_window,
        )
    doc = log_analysis_document(analysis, log, text, model, units, LOG_FIELDS)
    summary = log_summary(analysis, log, units, body.reference, model)
    return FastJSONResponse({"reference": body.reference, **doc, "summary": summary})
