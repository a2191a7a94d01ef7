"""Shift-window requests to a core drive model in SI, the windows found, and the windows
to their response document and an 80-column printable summary."""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

from core import Notice, drive_model
from core.runs.report import QUARTER_MILE_M
from core.shifts.window import ShiftWindow, ShiftWindows, shift_windows
from service.mapping.acceleration import RUN_FIELDS, SEARCH_BUDGET
from service.mapping.documents import notices_out
from service.mapping.inputs import (
    build_curve,
    build_drivetrain,
    build_tire,
    core_fields,
    rollout_m,
)
from service.mapping.vehicle import build_launch, build_vehicle
from service.output.cautions import CAUTIONS
from service.output.sheets import summary_sheet, wrap_text
from service.schemas.shift_window import ShiftWindowRequest
from service.units import Quantity, UnitSystem, from_si, to_si, unit_labels

__all__ = [
    "SHIFT_WINDOW_FIELDS",
    "SHIFT_WINDOW_METHOD",
    "WindowStudy",
    "find_shift_windows",
    "shift_window_document",
    "shift_window_summary",
    "window_line",
]

SHIFT_WINDOW_FIELDS: Mapping[str, str] = {
    **RUN_FIELDS,
    "tolerance_s": "tolerance",
    "points": "points",
    "rollout_m": "run.rollout",
    "finish": "run",
}

SHIFT_WINDOW_METHOD = (
    "Each gear change is tried at every rpm of a grid across its usable range with the "
    "other changes at their time-optimal rpm; the loss is the simulated time to the finish "
    "less the time-optimal run's. The window is where the loss stays within the "
    "tolerance, edges interpolated between grid points and rounded inward to 50 rpm."
)


@dataclass(frozen=True)
class WindowStudy:
    """The windows found, the rev limit [rpm] they were found under, and the finish in
    the caller's words (``1/4 mile (1,320.0 ft)``, ``to 60 mph``)."""

    windows: ShiftWindows
    rev_limit_rpm: float
    finish: str


def _finish_words(distance_m: float | None, speed_m_s: float | None, u: UnitSystem) -> str:
    lab = unit_labels(u)
    if speed_m_s is not None:
        return f"to {from_si(speed_m_s, Quantity.SPEED, u):g} {lab['speed']}"
    d = float(distance_m or 0.0)
    shown = f"{from_si(d, Quantity.DISTANCE, u):,.1f} {lab['distance']}"
    return f"1/4 mile ({shown})" if abs(d - QUARTER_MILE_M) < 1e-6 else shown


def find_shift_windows(body: ShiftWindowRequest) -> WindowStudy:
    """What POST /v1/shift-window computes (core errors become 422 problems)."""
    u, run = body.units, body.run
    curve = build_curve(body.engine.curve, u)
    drivetrain, tire = build_drivetrain(body.drivetrain), build_tire(body.drivetrain.tire, u)
    vehicle, launch = build_vehicle(body.vehicle, u), build_launch(body.launch, curve, u)
    rollout = rollout_m(run.rollout, u)
    finish_v = None if run.finish_speed is None else to_si(run.finish_speed, Quantity.SPEED, u)
    finish_d = None
    if finish_v is None:
        finish_d = (
            QUARTER_MILE_M
            if run.finish_distance is None
            else to_si(run.finish_distance, Quantity.DISTANCE, u)
        )
    with core_fields(SHIFT_WINDOW_FIELDS, u):
        model = drive_model(
            curve, drivetrain, tire, vehicle, launch, rev_limit_rpm=body.engine.rev_limit_rpm
        )
        result = shift_windows(
            model,
            start_speed_m_s=to_si(run.start_speed, Quantity.SPEED, u),
            rollout_m=rollout,
            finish_distance_m=finish_d,
            finish_speed_m_s=finish_v,
            tolerance_s=body.tolerance,
            points=body.points,
            max_search_evaluations=SEARCH_BUDGET[launch.coupling],
        )
    return WindowStudy(result, model.rev_limit_rpm, _finish_words(finish_d, finish_v, u))


def window_line(w: ShiftWindow, tolerance_s: float, rev_limit_rpm: float) -> str:
    """The window as a driver remembers it: ``2-3: anywhere 6,300-6,750 rpm costs ...``."""
    change = f"{w.from_gear}-{w.to_gear}"
    if not w.reached:
        return f"{change}: after the finish; its shift rpm does not matter here"
    low = min(math.ceil(w.low_rpm / 50.0) * 50.0, w.best_rpm)
    high = max(math.floor(w.high_rpm / 50.0) * 50.0, w.best_rpm)
    if w.high_rpm >= rev_limit_rpm - 0.5:
        high = rev_limit_rpm
    limit = " (the rev limit)" if high >= rev_limit_rpm - 0.5 else ""
    return (
        f"{change}: anywhere {low:,.0f}-{high:,.0f} rpm{limit} costs under "
        f"{tolerance_s:g} s; best {w.best_rpm:,.0f}"
    )


def window_notices(result: ShiftWindows) -> list[Notice]:
    """Warnings: changes after the finish."""
    return [
        Notice(
            "shift_after_finish",
            f"The {w.from_gear}-{w.to_gear} change comes after the finish; no window.",
        )
        for w in result.windows
        if not w.reached
    ]


def shift_window_document(
    study: WindowStudy, units: UnitSystem, fields: Mapping[str, str]
) -> dict[str, Any]:
    """The body of a shift-window response, without reference and summary."""
    result, rev_limit_rpm, finish = study.windows, study.rev_limit_rpm, study.finish
    notices = window_notices(result)
    return {
        "units": unit_labels(units),
        "finish": finish,
        "best_time": round(result.optimal.time_s, 4),
        "best_shift_rpm": [round(float(x), 1) for x in result.optimal.shift_rpm],
        "tolerance": result.tolerance_s,
        "windows": [
            {
                "from_gear": w.from_gear,
                "to_gear": w.to_gear,
                "reached": w.reached,
                "best_rpm": round(w.best_rpm, 1),
                "low_rpm": round(w.low_rpm, 1),
                "high_rpm": round(w.high_rpm, 1),
                "rpm": [round(float(r), 1) for r in w.rpm],
                "loss": [round(float(x), 4) if math.isfinite(x) else None for x in w.loss_s],
                "line": window_line(w, result.tolerance_s, rev_limit_rpm),
            }
            for w in result.windows
        ],
        "evaluations": result.evaluations,
        "method": SHIFT_WINDOW_METHOD,
        "warnings": notices_out(notices, fields, units),
        "cautions": list(CAUTIONS),
    }


def shift_window_summary(
    doc: Mapping[str, Any], result: ShiftWindows, units: UnitSystem, reference: str | None
) -> str:
    """The windows as a short printable sheet: 80 columns, printable ASCII."""
    body = [
        f"Finish: {doc['finish']}   best time {doc['best_time']:.3f} s",
        "",
        *[w["line"] for w in doc["windows"]],
        "",
        *wrap_text("Method: " + SHIFT_WINDOW_METHOD),
    ]
    return summary_sheet("GEARWORK SHIFT WINDOW", reference, body, window_notices(result), units)
