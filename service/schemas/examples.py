"""Invented example requests shown in the OpenAPI document (and used by schemathesis as
positive cases). The cars are demo scenarios, not real vehicles or dyno sheets."""

from __future__ import annotations

from typing import Any

__all__ = ["ACCELERATION_RUN_EXAMPLE", "SHIFT_PLAN_EXAMPLE"]

SHIFT_PLAN_EXAMPLE: dict[str, Any] = {
    "units": "us",
    "reference": "WO-2291",
    "engine": {
        "curve": {
            "rpm": [1500, 2000, 2500, 3000, 3500, 4000, 4500, 5000, 5500, 6000, 6500, 7000],
            "torque": [262, 281, 300, 318, 331, 338, 340, 333, 318, 296, 268, 236],
        },
        "rev_limit_rpm": 7000,
    },
    "drivetrain": {
        "gear_ratios": [3.1, 2.05, 1.48, 1.16, 0.94, 0.79],
        "final_drive_ratio": 3.55,
        "efficiency": 0.87,
        "tire": {"size": "255/40R18"},
    },
}

ACCELERATION_RUN_EXAMPLE: dict[str, Any] = {
    "units": "metric",
    "reference": "RUN-0412",
    "engine": {
        "curve": {
            "rpm": [1000, 1500, 2000, 2500, 3000, 3500, 4000, 4500, 5000, 5500, 6000, 6500],
            "torque": [180, 205, 228, 246, 258, 265, 268, 266, 258, 244, 224, 198],
        },
        "rev_limit_rpm": 6500,
    },
    "drivetrain": {
        "gear_ratios": [3.58, 2.02, 1.35, 1.02, 0.82, 0.68],
        "final_drive_ratio": 3.94,
        "efficiency": 0.9,
        "tire": {"size": "215/55R17"},
    },
    "vehicle": {
        "mass": 1520,
        "front_weight_share": 0.6,
        "wheelbase": 2720,
        "cg_height": 540,
        "drive": "front",
        "friction_coefficient": 0.95,
        "road_load": {"drag_coefficient": 0.3, "frontal_area": 2.25, "rolling_coefficient": 0.011},
        "air": {"temperature": 20, "altitude": 150, "relative_humidity": 50},
    },
    "launch": {"coupling": "clutch", "launch_rpm": 2800, "shift_time": 0.3},
}
