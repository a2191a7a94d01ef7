"""POST /v1/reports/<answer>: a printable sheet of every other advising answer.

Each sheet endpoint takes the same body as its JSON endpoint, runs that endpoint's handler
(so the sheet and the JSON agree to the digit and share every check and error), and
prints the document it answers with through the one sheet template per format.
"""

from __future__ import annotations

from collections.abc import Awaitable, Callable
from dataclasses import dataclass
from typing import Any

import orjson
from fastapi import APIRouter, Request
from starlette.responses import Response

from service.http.deps import JsonBody
from service.output.chart_data_track import PlotChart, coast_down_chart, shift_window_chart
from service.output.model import Report, Section, with_inputs
from service.output.sheet_response import (
    SHEET_RESPONSES,
    AppendixQuery,
    FormatQuery,
    sheet_response,
)
from service.output.sheets_calibration import calibration_chart, calibration_report
from service.output.sheets_choice import (
    comparison_report,
    spacing_report,
    speedometer_report,
    sweep_report,
)
from service.output.sheets_coast_down import coast_down_inputs, coast_down_report
from service.output.sheets_shop import chassis_report, dyno_correction_report, log_check_report
from service.output.sheets_track import (
    shift_window_inputs,
    shift_window_report,
    weather_inputs,
    weather_report,
)
from service.routes import (
    calibration,
    chassis,
    coastdown,
    comparison,
    dyno,
    final_drive,
    gear_design,
    log_analysis,
    shift_window,
    weather,
)
from service.schemas.calibration import CalibrationRequest
from service.schemas.chassis import ChassisConversionRequest
from service.schemas.coastdown import CoastDownRequest
from service.schemas.comparison import ComparisonRequest
from service.schemas.dyno import DynoCorrectionRequest
from service.schemas.final_drive import FinalDriveSweepRequest
from service.schemas.gear_design import GearSpacingRequest, SpeedometerRequest
from service.schemas.log_analysis import LogAnalysisRequest
from service.schemas.shift_window import ShiftWindowRequest
from service.schemas.weather import WeatherCorrectionRequest
from service.units import UnitSystem

__all__ = ["SHEETS", "router"]

router = APIRouter(prefix="/v1/reports", tags=["reports"])


@dataclass(frozen=True)
class Sheet:
    """One sheet endpoint: its path, the JSON handler it prints, and the sheet builder;
    optionally the inputs part read from the request and the chart (request, document)."""

    path: str
    name: str
    title: str
    model: type[Any]
    answer: Callable[[Any, None], Awaitable[Response]]
    build: Callable[[dict[str, Any], UnitSystem], Report]
    inputs: Callable[[Any], Section] | None = None
    chart: Callable[[Any, dict[str, Any]], PlotChart | None] | None = None


SHEETS = (
    Sheet(
        "comparison",
        "comparison",
        "setups side by side",
        ComparisonRequest,
        comparison.create_comparison,
        comparison_report,
    ),
    Sheet(
        "final-drive-sweep",
        "final_drive_sweep",
        "candidate final drives ranked",
        FinalDriveSweepRequest,
        final_drive.create_final_drive_sweep,
        sweep_report,
    ),
    Sheet(
        "gear-spacing",
        "gear_spacing",
        "gear sets and where each shift lands",
        GearSpacingRequest,
        gear_design.create_gear_spacing,
        spacing_report,
    ),
    Sheet(
        "speedometer-correction",
        "speedometer_correction",
        "speedometer and odometer after a tire or axle change",
        SpeedometerRequest,
        gear_design.create_speedometer_correction,
        speedometer_report,
    ),
    Sheet(
        "log-analysis",
        "log_check",
        "each logged shift against its target",
        LogAnalysisRequest,
        log_analysis.create_log_analysis,
        log_check_report,
    ),
    Sheet(
        "dyno-correction",
        "dyno_correction",
        "correction factors to standard air",
        DynoCorrectionRequest,
        dyno.create_dyno_correction,
        dyno_correction_report,
    ),
    Sheet(
        "chassis-dyno",
        "chassis_conversion",
        "wheel and engine figures in every gear",
        ChassisConversionRequest,
        chassis.create_chassis_conversion,
        chassis_report,
    ),
    Sheet(
        "road-load/coast-down",
        "coast_down",
        "road load fitted to logged coast-downs",
        CoastDownRequest,
        coastdown.create_coast_down_fit,
        coast_down_report,
        coast_down_inputs,
        coast_down_chart,
    ),
    Sheet(
        "shift-window",
        "shift_window",
        "time lost against each shift rpm, and the window",
        ShiftWindowRequest,
        shift_window.create_shift_window,
        shift_window_report,
        shift_window_inputs,
        lambda _body, doc: shift_window_chart(doc),
    ),
    Sheet(
        "weather-correction",
        "weather_correction",
        "density altitude and a slip carried to other weather",
        WeatherCorrectionRequest,
        weather.create_weather_correction,
        weather_report,
        weather_inputs,
    ),
    Sheet(
        "calibration/pass",
        "pass_calibration",
        "the car fitted to a logged pass",
        CalibrationRequest,
        calibration.create_pass_calibration,
        calibration_report,
        None,
        lambda body, doc: calibration_chart(doc, body.units),
    ),
)


def _endpoint(sheet: Sheet) -> Callable[..., Awaitable[Response]]:
    async def endpoint(
        body: Any,
        request: Request,
        _json: JsonBody,
        format: FormatQuery = None,
        appendix: AppendixQuery = False,
    ) -> Response:
        answer = await sheet.answer(body, None)
        doc = orjson.loads(bytes(answer.body))
        report = sheet.build(doc, body.units)
        if sheet.inputs is not None:
            report = with_inputs(report, sheet.inputs(body))
        draw = sheet.chart
        return await sheet_response(
            request,
            report,
            chart=None if draw is None else lambda: draw(body, doc),
            fmt=format,
            appendix=appendix,
            job=body.job,
            units=body.units,
            stem=sheet.path.replace("/", "-"),
        )

    endpoint.__annotations__["body"] = sheet.model
    endpoint.__name__ = f"create_{sheet.name}_report"
    endpoint.__doc__ = (
        f"The answer of POST /v1/{sheet.path} as a printable sheet: {sheet.title}, with the "
        "key figures, the letterhead and the job block. `?format=` or the Accept header "
        "picks `text/html` (default), `text/plain` or `application/pdf`."
    )
    return endpoint


for _sheet in SHEETS:
    router.post(
        f"/{_sheet.path}",
        operation_id=f"create_{_sheet.name}_report",
        summary=f"Printable sheet: {_sheet.title}",
        response_class=Response,
        responses=SHEET_RESPONSES,
    )(_endpoint(_sheet))
