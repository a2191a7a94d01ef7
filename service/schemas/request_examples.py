"""Invented example requests for the endpoints beyond the shift plan and the run.

Shown in the OpenAPI document (one per request schema) and sent by the generated-client
test. The cars, curves and shops are demo scenarios, not real vehicles or dyno sheets.
"""

from __future__ import annotations

from typing import Any

from service.schemas.examples import SHIFT_PLAN_EXAMPLE

__all__ = [
    "CHASSIS_EXAMPLE",
    "COMPARISON_EXAMPLE",
    "DYNO_CORRECTION_EXAMPLE",
    "GEAR_SPACING_EXAMPLE",
    "LOG_ANALYSIS_EXAMPLE",
    "SPEEDOMETER_EXAMPLE",
    "SWEEP_EXAMPLE",
]

_ENGINE: dict[str, Any] = SHIFT_PLAN_EXAMPLE["engine"]
_VEHICLE_US: dict[str, Any] = {
    "mass": 3450,
    "front_weight_share": 0.54,
    "wheelbase": 107,
    "cg_height": 20,
    "drive": "rear",
    "friction_coefficient": 1.3,
    "road_load": {"drag_coefficient": 0.34, "frontal_area": 22.0},
    "air": {"temperature": 68, "altitude": 500, "relative_humidity": 40},
}

COMPARISON_EXAMPLE: dict[str, Any] = {
    "units": "us",
    "reference": "PC-1187",
    "engine": _ENGINE,
    "drivetrain": {
        "gear_ratios": [3.1, 2.05, 1.48, 1.16, 0.94, 0.79],
        "ring_and_pinion": {"ring_teeth": 39, "pinion_teeth": 11},
        "efficiency": 0.87,
        "tire": {"size": "255/40R18"},
    },
    "cruise_speeds": [65, 75],
    "variants": [{"name": "41/11 gears", "final_drive_ratio": 3.727}],
}

SWEEP_EXAMPLE: dict[str, Any] = {
    "units": "us",
    "reference": "PC-1188",
    "engine": _ENGINE,
    "drivetrain": SHIFT_PLAN_EXAMPLE["drivetrain"],
    "vehicle": _VEHICLE_US,
    "ratios": [3.23, 3.55, 3.73, 4.1],
    "objective": "quarter_mile_et",
    "constraints": {"cruise": {"speed": 70, "max_rpm": 2600}},
}

GEAR_SPACING_EXAMPLE: dict[str, Any] = {
    "units": "us",
    "reference": "TB-0031",
    "spacing": {"first_ratio": 3.1, "top_ratio": 0.79, "gear_count": 6},
    "gear_ratios": [3.1, 2.05, 1.48, 1.16, 0.94, 0.79],
    "engine": _ENGINE,
}

SPEEDOMETER_EXAMPLE: dict[str, Any] = {
    "units": "us",
    "reference": "PC-1190",
    "original": {"tire": {"size": "P245/45R19"}, "final_drive_ratio": 3.23},
    "new": {"tire": {"size": "275/40R20"}, "final_drive_ratio": 3.73},
    "indicated_speeds": [30, 45, 60, 70],
    "indicated_distances": [1000, 12000],
}

LOG_ANALYSIS_EXAMPLE: dict[str, Any] = {
    "units": "metric",
    "reference": "LOG-0031",
    "log": {
        "text": "time [s];speed [km/h];rpm\n"
        + "".join(
            f"{t / 10:.1f};{min(20 * t / 10 + 10, 200):.1f};"
            f"{min(20 * t / 10 + 10, 200) * 3.2 * 3.9 * 1000 / 60 / 2.0106:.0f}\n"
            for t in range(30)
        )
    },
    "drivetrain": {
        "gear_ratios": [3.2, 2.1, 1.5, 1.15],
        "final_drive_ratio": 3.9,
        "efficiency": 0.9,
        "tire": {"diameter": 640.0},
    },
}

DYNO_CORRECTION_EXAMPLE: dict[str, Any] = {
    "units": "us",
    "reference": "DYNO-0108",
    "ambient": {"temperature": 86, "relative_humidity": 50, "station_pressure": 28.9},
    "standard": "sae_j1349_2004",
}

CHASSIS_EXAMPLE: dict[str, Any] = {
    "units": "metric",
    "reference": "DYNO-0107",
    "curve": {
        "measured_at": "wheels",
        "rpm": [2500, 3500, 4500, 5500, 6500],
        "power": [58.2, 95.0, 128.7, 146.3, 146.1],
    },
    "driveline": {"loss_percent": 10, "fixed_loss": 8},
}
