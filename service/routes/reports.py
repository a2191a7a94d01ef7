"""POST /v1/reports/<answer>: every advising answer as a printable sheet (HTML, text, PDF).

Each sheet takes the same body as its JSON endpoint. The shift plan and the run are printed
from their computations kept whole, with a chart; every other sheet runs its JSON endpoint's
handler (so the sheet and the JSON agree to the digit and share every check and error) and
prints the document it answers with. One table, ``SHEETS``, registers them all; each is
printed through the one sheet template per format.
"""

from __future__ import annotations

from collections.abc import Awaitable, Callable
from dataclasses import dataclass
from typing import Any

import orjson
from fastapi import APIRouter, Request
from starlette.responses import Response

from service.http.deps import JsonBody
from service.mapping.acceleration import compute_acceleration_run
from service.mapping.shift_plan import compute_shift_plan
from service.output.chart_data import run_chart, tractive_force_chart
from service.output.chart_data_track import PlotChart, coast_down_chart, shift_window_chart
from service.output.model import Report, Section, with_inputs
from service.output.run_report import acceleration_run_report
from service.output.sheet_response import (
    SHEET_RESPONSES,
    AppendixQuery,
    ChartMaker,
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
from service.output.shift_plan_report import shift_plan_report
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
from service.schemas.acceleration import AccelerationRunRequest
from service.schemas.calibration import CalibrationRequest
from service.schemas.chassis import ChassisConversionRequest
from service.schemas.coastdown import CoastDownRequest
from service.schemas.comparison import ComparisonRequest
from service.schemas.dyno import DynoCorrectionRequest
from service.schemas.final_drive import FinalDriveSweepRequest
from service.schemas.gear_design import GearSpacingRequest, SpeedometerRequest
from service.schemas.log_analysis import LogAnalysisRequest
from service.schemas.shift_plan import ShiftPlanRequest
from service.schemas.shift_window import ShiftWindowRequest
from service.schemas.weather import WeatherCorrectionRequest
from service.units import UnitSystem

__all__ = ["SHEETS", "Sheet", "SheetContent", "router"]

router = APIRouter(prefix="/v1/reports", tags=["reports"])


@dataclass(frozen=True)
class SheetContent:
    """What a sheet prints: the report, and the chart drawn on demand (None: no chart)."""

    report: Report
    chart: ChartMaker | None = None


Printer = Callable[[Any], Awaitable[SheetContent]]
Handler = Callable[[Any, None], Awaitable[Response]]  # a JSON endpoint's handler
Builder = Callable[[dict[str, Any], UnitSystem], Report]  # its document -> a report
Inputs = Callable[[Any], Section]  # the request -> the sheet's inputs part
Drawing = Callable[[Any, dict[str, Any]], PlotChart | None]  # request, document -> chart


@dataclass(frozen=True)
class Sheet:
    """One sheet endpoint: its path, operation, words in the schema, body and printer."""

    path: str
    name: str
    summary: str
    description: str
    model: type[Any]
    printed: Printer


def _printed_answer(
    handler: Handler, build: Builder, inputs: Inputs | None, draw: Drawing | None
) -> Printer:
    """A printer of the document the JSON endpoint's ``handler`` answers with; with
    ``inputs`` the sheet's inputs part is read from the request, with ``draw`` a chart."""

    async def printed(body: Any) -> SheetContent:
        answer = await handler(body, None)
        doc = orjson.loads(bytes(answer.body))
        report = build(doc, body.units)
        if inputs is not None:
            report = with_inputs(report, inputs(body))
        return SheetContent(report, None if draw is None else lambda: draw(body, doc))

    return printed


async def _shift_plan(body: ShiftPlanRequest) -> SheetContent:
    outcome = compute_shift_plan(body)
    return SheetContent(shift_plan_report(outcome), lambda: tractive_force_chart(outcome))


async def _acceleration_run(body: AccelerationRunRequest) -> SheetContent:
    outcome = compute_acceleration_run(body)
    return SheetContent(acceleration_run_report(outcome), lambda: run_chart(outcome))


def _answer_sheet(
    path: str,
    name: str,
    title: str,
    model: type[Any],
    handler: Handler,
    build: Builder,
    inputs: Inputs | None = None,
    draw: Drawing | None = None,
) -> Sheet:
    """The sheet of an answer printed from its JSON document."""
    return Sheet(
        path,
        name,
        f"Printable sheet: {title}",
        f"The answer of POST /v1/{path} as a printable sheet: {title}, with the key figures, "
        "the letterhead and the job block. `?format=` or the Accept header picks `text/html` "
        "(default), `text/plain` or `application/pdf`.",
        model,
        _printed_answer(handler, build, inputs, draw),
    )


SHEETS = (
    Sheet(
        "shift-plan",
        "shift_plan",
        "Printable shift plan: HTML, plain text or PDF",
        "The shift plan of POST /v1/shift-plan as a sheet to hand a customer: the key figures,\n"
        "a chart, gears and shifts, the inputs used and the cautions (one page for a plain "
        "plan);\nthe road speed and tractive force by gear in an appendix with "
        "`appendix=true`.\n`?format=` or the Accept header picks `text/html` (default), "
        "`text/plain` or\n`application/pdf`.",
        ShiftPlanRequest,
        _shift_plan,
    ),
    Sheet(
        "acceleration-run",
        "acceleration_run",
        "Printable acceleration run: HTML, plain text or PDF",
        "The run of POST /v1/acceleration-run as a sheet: the key figures, a chart of speed\n"
        "over time, timed distances and speeds, shifts, top speed, the inputs used and the\n"
        "cautions (two pages for the demo run); the run over time in an appendix with\n"
        "`appendix=true`. The format is picked as for the shift-plan report.",
        AccelerationRunRequest,
        _acceleration_run,
    ),
    _answer_sheet(
        "comparison",
        "comparison",
        "setups side by side",
        ComparisonRequest,
        comparison.create_comparison,
        comparison_report,
    ),
    _answer_sheet(
        "final-drive-sweep",
        "final_drive_sweep",
        "candidate final drives ranked",
        FinalDriveSweepRequest,
        final_drive.create_final_drive_sweep,
        sweep_report,
    ),
    _answer_sheet(
        "gear-spacing",
        "gear_spacing",
        "gear sets and where each shift lands",
        GearSpacingRequest,
        gear_design.create_gear_spacing,
        spacing_report,
    ),
    _answer_sheet(
        "speedometer-correction",
        "speedometer_correction",
        "speedometer and odometer after a tire or axle change",
        SpeedometerRequest,
        gear_design.create_speedometer_correction,
        speedometer_report,
    ),
    _answer_sheet(
        "log-analysis",
        "log_check",
        "each logged shift against its target",
        LogAnalysisRequest,
        log_analysis.create_log_analysis,
        log_check_report,
    ),
    _answer_sheet(
        "dyno-correction",
        "dyno_correction",
        "correction factors to standard air",
        DynoCorrectionRequest,
        dyno.create_dyno_correction,
        dyno_correction_report,
    ),
    _answer_sheet(
        "chassis-dyno",
        "chassis_conversion",
        "wheel and engine figures in every gear",
        ChassisConversionRequest,
        chassis.create_chassis_conversion,
        chassis_report,
    ),
    _answer_sheet(
        "road-load/coast-down",
        "coast_down",
        "road load fitted to logged coast-downs",
        CoastDownRequest,
        coastdown.create_coast_down_fit,
        coast_down_report,
        coast_down_inputs,
        coast_down_chart,
    ),
    _answer_sheet(
        "shift-window",
        "shift_window",
        "time lost against each shift rpm, and the window",
        ShiftWindowRequest,
        shift_window.create_shift_window,
        shift_window_report,
        shift_window_inputs,
        lambda _body, doc: shift_window_chart(doc),
    ),
    _answer_sheet(
        "weather-correction",
        "weather_correction",
        "density altitude and a slip carried to other weather",
        WeatherCorrectionRequest,
        weather.create_weather_correction,
        weather_report,
        weather_inputs,
    ),
    _answer_sheet(
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
        format: FormatQuery = None,  # the query parameter's public name
        appendix: AppendixQuery = False,
    ) -> Response:
        printed = await sheet.printed(body)
        return await sheet_response(
            request,
            printed.report,
            chart=printed.chart,
            fmt=format,
            appendix=appendix,
            job=body.job,
            units=body.units,
            stem=sheet.path.replace("/", "-"),
        )

    endpoint.__annotations__["body"] = sheet.model
    endpoint.__name__ = f"create_{sheet.name}_report"
    endpoint.__doc__ = sheet.description
    return endpoint


for _sheet in SHEETS:
    router.post(
        f"/{_sheet.path}",
        operation_id=f"create_{_sheet.name}_report",
        summary=_sheet.summary,
        response_class=Response,
        responses=SHEET_RESPONSES,
    )(_endpoint(_sheet))
