"""Acceleration-run benchmark: one quarter-mile run with a converter and six gears.

Run with ``make bench``. Figures are printed, never asserted: the machine is shared.
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
from numpy.typing import NDArray

from bench.common import time_call
from core import (
    ShiftCriterion,
    drive_model,
    optimal_shift_rpm,
    planned_shift_rpm,
    run_report,
    simulate_run,
)
from core.runreport import QUARTER_MILE_M
from core.simulate import DriveModel
from service.builders import build_curve, build_drivetrain, build_tire
from service.schemas.acceleration import AccelerationRunRequest
from service.vehicle_builders import build_launch, build_vehicle

DATA = Path(__file__).resolve().parent.parent / "tests" / "data"


def _model(name: str) -> tuple[DriveModel, NDArray[np.float64]]:
    body = AccelerationRunRequest.model_validate(json.loads((DATA / f"{name}.json").read_text()))
    u = body.units
    curve = build_curve(body.engine.curve, u)
    model = drive_model(
        curve,
        build_drivetrain(body.drivetrain),
        build_tire(body.drivetrain.tire, u),
        build_vehicle(body.vehicle, u),
        build_launch(body.launch, curve, u),
        rev_limit_rpm=body.engine.rev_limit_rpm,
    )
    return model, planned_shift_rpm(model, ShiftCriterion.NET_ACCELERATION)


def _figures(model: DriveModel, rpm: NDArray[np.float64]) -> None:
    cover = QUARTER_MILE_M + 0.3048

    def quarter() -> object:
        return simulate_run(model, rpm, cover_distance_m=cover)

    def report() -> object:
        return run_report(model, rpm)

    def plan() -> object:
        return planned_shift_rpm(model, ShiftCriterion.NET_ACCELERATION)

    def search() -> object:
        return optimal_shift_rpm(
            model,
            rpm,
            start_speed_m_s=0.0,
            rollout_m=0.3048,
            finish_distance_m=QUARTER_MILE_M,
            finish_speed_m_s=None,
            max_evaluations=60,
        )

    print("   one quarter-mile run      ", time_call(quarter))
    print("   full report (to 1000 m)   ", time_call(report, runs=100))
    print("   net-acceleration shifts   ", time_call(plan, runs=100))
    print("   shift search (budget 60)  ", time_call(search, runs=5, warmup=1))


def main() -> None:
    for name, label in (
        ("demo_wagon_converter_us", "converter, six gears"),
        ("demo_sedan_run_metric", "clutch, six gears"),
    ):
        model, rpm = _model(name)
        print(f"{label} ({name})")
        _figures(model, rpm)


if __name__ == "__main__":
    main()
