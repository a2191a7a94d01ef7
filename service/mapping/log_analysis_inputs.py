"""Build the core pass log (and the model's shift rpm) from a log-analysis request."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

from core import Drivetrain, Tire, acceleration_shifts, drive_model, shift_plan
from core.errors import LogDataError
from core.logs.pass_data import AccelerationUnit, PassLog, SpeedUnit, pass_log
from core.logs.text import LogText, read_log_text
from service.http.problems import ProblemError
from service.mapping.inputs import DRIVETRAIN_FIELDS, ENGINE_FIELDS, build_curve, core_fields
from service.mapping.vehicle import LAUNCH_FIELDS, VEHICLE_FIELDS, build_launch, build_vehicle
from service.schemas.log_analysis import LogAnalysisRequest, LogIn
from service.schemas.vehicle import LaunchIn
from service.units import UnitSystem

__all__ = ["LOG_FIELDS", "ModelShifts", "build_pass_log", "model_shifts"]

LOG_FIELDS: Mapping[str, str] = {
    "time": "log.time",
    "speed": "log.speed",
    "rpm": "log.rpm",
    "acceleration": "log.acceleration",
    "tolerance": "options.tolerance_percent",
    "smoothing_window_s": "options.smoothing_window",
    "start_gear": "options.start_gear",
    "rev_limit_rpm": "options.rev_limit_rpm",
}
_MODEL_FIELDS = {**ENGINE_FIELDS, **DRIVETRAIN_FIELDS, **VEHICLE_FIELDS, **LAUNCH_FIELDS}


def build_pass_log(body: LogIn, units: UnitSystem) -> tuple[PassLog, LogText | None]:
    """The core pass of the request's log, and the text's reading if text was sent.

    Text errors name ``log.text:line N, column M``; array errors the channel and index.
    """
    if body.text is not None:
        try:
            text = read_log_text(body.text)
        except LogDataError as exc:
            where = "log.text"
            if exc.line is not None:
                where += f":line {exc.line}" + (
                    "" if exc.column is None else f", column {exc.column}"
                )
            raise ProblemError(422, exc.message, field=where) from exc
        return text.log, text
    default = SpeedUnit.KM_H if units is UnitSystem.METRIC else SpeedUnit.MPH
    with core_fields(LOG_FIELDS):
        log = pass_log(
            body.time or [],
            body.speed or [],
            speed_unit=default if body.speed_unit is None else SpeedUnit(body.speed_unit),
            rpm=body.rpm,
            acceleration=body.acceleration,
            acceleration_unit=AccelerationUnit(body.acceleration_unit),
        )
    return log, None


@dataclass(frozen=True)
class ModelShifts:
    """The model's shift rpm per gear change, the criterion and the rev limit used.

    Attributes
    ----------
    rpm : list of float
        Shift rpm for each gear change (empty without an engine) [rpm].
    criterion : str or None
        ``tractive_force`` or ``net_acceleration``; None without an engine.
    rev_limit_rpm : float or None
        Rev limit the verdicts use [rpm].
    """

    rpm: list[float]
    criterion: str | None
    rev_limit_rpm: float | None


def model_shifts(body: LogAnalysisRequest, drivetrain: Drivetrain, tire: Tire) -> ModelShifts:
    """Shift rpm of the wheel-force plan, or of net acceleration with a vehicle."""
    if body.engine is None:
        return ModelShifts([], None, body.options.rev_limit_rpm)
    units = body.units
    curve = build_curve(body.engine.curve, units)
    limit = body.engine.rev_limit_rpm or body.options.rev_limit_rpm
    with core_fields(_MODEL_FIELDS):
        plan = shift_plan(curve, drivetrain, tire, rev_limit_rpm=limit)
        if body.vehicle is None:
            rpm = [s.shift_rpm for s in plan.shifts]
            return ModelShifts(rpm, "tractive_force", plan.rev_limit_rpm)
        vehicle = build_vehicle(body.vehicle, units)
        launch = build_launch(LaunchIn(), curve, units)
        model = drive_model(curve, drivetrain, tire, vehicle, launch, rev_limit_rpm=limit)
        rpm = [c.shift_rpm for c in acceleration_shifts(model)]
        return ModelShifts(rpm, "net_acceleration", model.rev_limit_rpm)
