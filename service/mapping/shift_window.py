"""Shift windows to their response document and an 80-column printable summary."""

from __future__ import annotations

import math
from collections.abc import Mapping
from typing import Any

from core import Notice
from core.shifts.window import ShiftWindow, ShiftWindows
from service.mapping.documents import notices_out
from service.output.cautions import CAUTIONS
from service.output.sheets import summary_sheet, wrap_text
from service.units import UnitSystem, unit_labels

__all__ = [
    "SHIFT_WINDOW_METHOD",
    "shift_window_document",
    "shift_window_summary",
    "window_line",
]

SHIFT_WINDOW_METHOD = (
    "Each gear change is tried at every rpm of a grid across its usable range with the "
    "other changes at their time-optimal rpm; the loss is the simulated time to the finish "
    "less the time-optimal run's. The window is where the loss stays within the "
    "tolerance, edges interpolated between grid points and rounded inward to 50 rpm."
)


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
    result: ShiftWindows,
    rev_limit_rpm: float,
    finish: str,
    units: UnitSystem,
    fields: Mapping[str, str],
) -> dict[str, Any]:
    """The body of a shift-window response, without reference and summary."""
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
        "warnings": notices_out(notices, fields),
        "cautions": list(CAUTIONS),
    }


def shift_window_summary(
    doc: Mapping[str, Any], result: ShiftWindows, reference: str | None
) -> str:
    """The windows as a short printable sheet: 80 columns, printable ASCII."""
    body = [
        f"Finish: {doc['finish']}   best time {doc['best_time']:.3f} s",
        "",
        *[w["line"] for w in doc["windows"]],
        "",
        *wrap_text("Method: " + SHIFT_WINDOW_METHOD),
    ]
    return summary_sheet("GEARWORK SHIFT WINDOW", reference, body, window_notices(result))
