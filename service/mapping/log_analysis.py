"""Log-analysis requests to a core pass log (and the model's shift rpm) in SI, and a
checked pass to its response document and an 80-column printable summary."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

from core import Drivetrain, Tire, acceleration_shifts, drive_model, shift_plan
from core.errors import LogDataError
from core.logs.check import PassAnalysis, analyse_pass
from core.logs.pass_data import AccelerationUnit, PassLog, SpeedUnit, pass_log
from core.logs.shift import LoggedShift
from core.logs.text import LogText, read_log_text
from core.units import STANDARD_GRAVITY_M_S2 as G  # accelerations are reported in g
from service.http.problems import ProblemError
from service.mapping.documents import notice_text, notices_out
from service.mapping.inputs import build_curve, build_drivetrain, build_tire, core_fields
from service.mapping.vehicle import CAR_FIELDS, build_launch, build_vehicle
from service.output.cautions import CAUTIONS, SHORT_CAUTION
from service.output.sheets import printable, title_line, wrap_text
from service.schemas.log_analysis import LogAnalysisRequest, LogIn
from service.schemas.vehicle import LaunchIn
from service.units import Quantity, UnitSystem, from_si, unit_labels

__all__ = [
    "LOG_FIELDS",
    "VERDICT_RULE",
    "CheckedPass",
    "ModelShifts",
    "build_pass_log",
    "check_logged_pass",
    "log_analysis_document",
    "log_summary",
    "model_shifts",
]

VERDICT_RULE = (
    "Verdict: the crossover is where the next gear's logged acceleration, fitted against "
    "speed and extrapolated back, meets this gear's, extrapolated forward; the target is "
    "the crossover or the rev limit if that comes first. About right within the tolerance "
    "of the target speed (the same share in rpm), or where both gears pull alike at the "
    "shift; early below, late above."
)


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
    with core_fields(LOG_FIELDS, units):
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
    with core_fields(CAR_FIELDS, units):
        plan = shift_plan(curve, drivetrain, tire, rev_limit_rpm=limit)
        if body.vehicle is None:
            rpm = [s.shift_rpm for s in plan.shifts]
            return ModelShifts(rpm, "tractive_force", plan.rev_limit_rpm)
        vehicle = build_vehicle(body.vehicle, units)
        launch = build_launch(LaunchIn(), curve, units)
        model = drive_model(curve, drivetrain, tire, vehicle, launch, rev_limit_rpm=limit)
        rpm = [c.shift_rpm for c in acceleration_shifts(model)]
        return ModelShifts(rpm, "net_acceleration", model.rev_limit_rpm)


@dataclass(frozen=True)
class CheckedPass:
    """A logged pass checked: the analysis, the pass, the text's reading (None for
    arrays) and the model's shifts it was judged against."""

    analysis: PassAnalysis
    log: PassLog
    text: LogText | None
    model: ModelShifts


def check_logged_pass(body: LogAnalysisRequest) -> CheckedPass:
    """What POST /v1/log-analysis computes (core errors become 422 problems)."""
    units, opts = body.units, body.options
    drivetrain = build_drivetrain(body.drivetrain)
    tire = build_tire(body.drivetrain.tire, units)
    log, text = build_pass_log(body.log, units)
    model = model_shifts(body, drivetrain, tire)
    with core_fields(LOG_FIELDS, units):
        analysis = analyse_pass(
            log,
            drivetrain,
            tire,
            rev_limit_rpm=model.rev_limit_rpm,
            start_gear=opts.start_gear,
            tolerance=opts.tolerance_percent / 100.0,
            smoothing_window_s=opts.smoothing_window,
        )
    return CheckedPass(analysis, log, text, model)


def _speed(v: float | None, units: UnitSystem) -> float | None:
    return None if v is None else round(from_si(v, Quantity.SPEED, units), 2)


def _rpm(n: float | None) -> float | None:
    return None if n is None else round(n, 0)


def _shift(s: LoggedShift, model: ModelShifts, units: UnitSystem) -> dict[str, Any]:
    adjacent = s.to_gear == s.from_gear + 1 and s.from_gear <= len(model.rpm)
    return {
        "from_gear": s.from_gear,
        "to_gear": s.to_gear,
        "start_time": round(s.start_time_s, 3),
        "end_time": round(s.end_time_s, 3),
        "duration": round(s.duration_s, 3),
        "speed_before": _speed(s.speed_before_m_s, units),
        "speed_after": _speed(s.speed_after_m_s, units),
        "rpm_before": _rpm(s.rpm_before),
        "rpm_after": _rpm(s.rpm_after),
        "acceleration_before": round(s.acceleration_before_m_s2 / G, 3),
        "acceleration_after": round(s.acceleration_after_m_s2 / G, 3),
        "acceleration_min": round(s.acceleration_min_m_s2 / G, 3),
        "crossover_speed": _speed(s.crossover_speed_m_s, units),
        "crossover_rpm": _rpm(s.crossover_rpm),
        "target_rpm": _rpm(s.target_rpm),
        "deviation_percent": None if s.deviation is None else round(100.0 * s.deviation, 2),
        "verdict": s.verdict.value,
        "basis": s.basis.value,
        "model_shift_rpm": _rpm(model.rpm[s.from_gear - 1]) if adjacent else None,
        "logged_rpm": None if s.logged_rpm is None else [_rpm(x) for x in s.logged_rpm],
        "crossover_extrapolated": s.crossover_extrapolated,
    }


def log_analysis_document(
    analysis: PassAnalysis,
    log: PassLog,
    text: LogText | None,
    model: ModelShifts,
    units: UnitSystem,
    fields: Mapping[str, str],
) -> dict[str, Any]:
    """The body of a log-analysis response, without reference and summary."""
    return {
        "units": unit_labels(units),
        "gears_from": analysis.gears_from.value,
        "smoothing_window": round(analysis.smoothing_window_s, 4),
        "tolerance_percent": round(100.0 * analysis.tolerance, 3),
        "rev_limit_rpm": model.rev_limit_rpm,
        "model_criterion": model.criterion,
        "log": {
            "source": "arrays" if text is None else "text",
            "samples": log.samples,
            "duration": round(float(log.time_s[-1] - log.time_s[0]), 3),
            "sample_rate": round(1.0 / analysis.interval_s, 3),
            "channels": list(log.channels),
            "delimiter": None if text is None else text.delimiter.value,
            "columns": None
            if text is None
            else {c.quantity.value: c.header for c in text.columns},
            "analysed_from": round(analysis.analysed_from_s, 3),
            "analysed_until": round(analysis.analysed_until_s, 3),
            "speed_calibration": None
            if analysis.speed_calibration is None
            else round(analysis.speed_calibration, 5),
        },
        "segments": [
            {
                "gear": g.gear,
                "start_time": round(g.start_time_s, 3),
                "end_time": round(g.end_time_s, 3),
                "start_speed": _speed(g.start_speed_m_s, units),
                "end_speed": _speed(g.end_speed_m_s, units),
                "samples": g.samples,
            }
            for g in analysis.segments
        ],
        "shifts": [_shift(s, model, units) for s in analysis.shifts],
        "warnings": notices_out(analysis.notices, fields, units),
        "cautions": list(CAUTIONS),
    }


def _verdict_text(s: LoggedShift) -> str:
    word = s.verdict.value.replace("_", " ")
    mark = "*" if s.basis.value == "rev_limit" else ""
    if s.deviation is None or s.verdict.value == "about_right":
        return word + mark
    return f"{word} {100.0 * s.deviation:+.0f}%{mark}"


def _model_lines(analysis: PassAnalysis, model: ModelShifts | None) -> list[str]:
    """The model's shift rpm for each logged upshift, and the rule it comes from."""
    if model is None or not model.rpm:
        return []
    pairs = [
        f"{s.from_gear}-{s.to_gear} {model.rpm[s.from_gear - 1]:.0f}"
        for s in analysis.shifts
        if s.to_gear == s.from_gear + 1 and s.from_gear <= len(model.rpm)
    ]
    if not pairs:
        return []
    rule = (model.criterion or "").replace("_", " ")
    return wrap_text(f"Model shift rpm ({rule}): {', '.join(pairs)}.")


def _extrapolated_lines(analysis: PassAnalysis) -> list[str]:
    out = []
    for s in analysis.shifts:
        if s.crossover_extrapolated and s.logged_rpm is not None and s.crossover_rpm:
            out += wrap_text(
                f"^ {s.from_gear}-{s.to_gear}: crossover {s.crossover_rpm:.0f} rpm extrapolated "
                f"beyond the rpm logged in gear {s.from_gear} ({s.logged_rpm[0]:.0f}-"
                f"{s.logged_rpm[1]:.0f} rpm); an estimate only.",
                "  ",
            )
    return out


def log_summary(
    analysis: PassAnalysis,
    log: PassLog,
    units: UnitSystem,
    reference: str | None,
    model: ModelShifts | None = None,
) -> str:
    """The checked pass as a short printable sheet: 80 columns, printable ASCII."""
    spd = unit_labels(units)["speed"]
    lines = [title_line("GEARWORK LOG CHECK", reference)]
    source = "rpm and speed" if analysis.gears_from.value == "rpm" else "acceleration dips"
    lines += wrap_text(
        f"Log: {log.samples} samples over {log.time_s[-1] - log.time_s[0]:.2f} s "
        f"({', '.join(log.channels)}), analysed at {1.0 / analysis.interval_s:.3g} Hz from "
        f"{analysis.analysed_from_s:.2f} to {analysis.analysed_until_s:.2f} s; gears from "
        f"{source}; tolerance +-{100.0 * analysis.tolerance:.3g} %."
    )
    lines.append("")
    lines.append(f"Gear    From s      To s   Speed {spd}")
    for g in analysis.segments:
        v0 = from_si(g.start_speed_m_s, Quantity.SPEED, units)
        v1 = from_si(g.end_speed_m_s, Quantity.SPEED, units)
        lines.append(
            f"{g.gear:4d}{g.start_time_s:10.2f}{g.end_time_s:10.2f}   {v0:6.1f}-{v1:6.1f}"
        )
    lines.append("")
    lines.append(f"Shift    At s  Took s {spd:>6}   rpm  then  Accel g  After g  Cross  Verdict")
    for s in analysis.shifts:
        v = from_si(s.speed_before_m_s, Quantity.SPEED, units)
        cross = "     -" if s.crossover_rpm is None else f"{s.crossover_rpm:6.0f}"
        lines.append(
            f"{s.from_gear:>3d}-{s.to_gear:<2d}{s.start_time_s:7.2f}{s.duration_s:8.2f}"
            f"{v:7.1f}{s.rpm_before:6.0f}{s.rpm_after:6.0f}"
            f"{s.acceleration_before_m_s2 / G:9.2f}{s.acceleration_after_m_s2 / G:9.2f}"
            f" {cross}{'^' if s.crossover_extrapolated else ' '} {_verdict_text(s)}"
        )
    if not analysis.shifts:
        lines.append("  (no gear change found)")
    if any(s.basis.value == "rev_limit" for s in analysis.shifts):
        lines.append("  * against the rev limit, which comes before the crossover")
    lines += _extrapolated_lines(analysis)
    lines += _model_lines(analysis, model)
    lines.append("")
    lines += wrap_text(VERDICT_RULE)
    for n in analysis.notices:
        lines += wrap_text(f"Warning: {notice_text(n, units)}")
    lines += wrap_text(f"Caution: {SHORT_CAUTION}")
    return printable(lines)
