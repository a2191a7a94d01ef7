"""Acceleration-run benchmark: a standing quarter mile with a converter and six gears.

Every figure is a ratio against a baseline measured in the same process and the same run:
``GET /healthz`` answered in process (what a request costs before any computation), and
one quarter-mile run of the same car (for the reports, the batch of one and the shift
search). Figures are medians of interleaved rounds; they are printed, never asserted (the
machine is shared). Run with ``make bench`` or ``python -m bench.acceleration_run``.

The shift search is timed as the service runs it for a request with ``optimise`` and the
default criterion: seeded with the net-acceleration plan, named so, that the run used.

Targets (issue 12): the quarter-mile run with converter and six gears <= 5x healthz; the
time-optimal shift search <= 30 runs' worth; a batch of one (the batched runs with a single
candidate) <= 1.15 quarter-mile runs, a single run being a batch of one.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import numpy as np
from numpy.typing import NDArray

from bench.common import demo_drive_model, healthz_call, interleaved_ms
from core import (
    ShiftCriterion,
    optimal_shift_rpm,
    planned_shift_rpm,
    run_report,
    simulate_run,
)
from core.runs.batch import batch_runs
from core.runs.drive_model import DriveModel
from core.runs.milestones import STANDARD_DISTANCES
from core.runs.report import QUARTER_MILE_M
from service.mapping.acceleration import SEARCH_BUDGET

DATA = Path(__file__).resolve().parent.parent / "tests" / "data"
ROUNDS = 9


def _model(name: str) -> tuple[DriveModel, NDArray[np.float64]]:
    model = demo_drive_model(name)
    return model, planned_shift_rpm(model, ShiftCriterion.NET_ACCELERATION)


def _figures(model: DriveModel, rpm: NDArray[np.float64], healthz: Callable[[], object]) -> None:
    cover = QUARTER_MILE_M + 0.3048
    budget = SEARCH_BUDGET[model.launch.coupling]
    final = np.array([model.drivetrain.final_drive_ratio])
    quarter_only = STANDARD_DISTANCES[4:5]

    def search() -> object:
        return optimal_shift_rpm(
            model,
            rpm,
            start_speed_m_s=0.0,
            rollout_m=0.3048,
            finish_distance_m=QUARTER_MILE_M,
            finish_speed_m_s=None,
            max_evaluations=budget,
            initial_name=ShiftCriterion.NET_ACCELERATION.value,
        )

    cases = {
        "healthz in process": (healthz, 40),
        "quarter-mile run": (lambda: simulate_run(model, rpm, cover_distance_m=cover), 20),
        "full run report": (lambda: run_report(model, rpm), 10),
        "batch of one": (lambda: batch_runs(model, final, rpm, distances=quarter_only), 20),
        "net-acceleration plan": (
            lambda: planned_shift_rpm(model, ShiftCriterion.NET_ACCELERATION),
            10,
        ),
        "shift search": (search, 1),
    }
    f = interleaved_ms(cases, ROUNDS)
    for key, ms in f.items():
        print(f"   {key:<24} {ms:9.3f} ms")
    base, run = f["healthz in process"], f["quarter-mile run"]
    print(f"   quarter-mile run / healthz       {run / base:6.1f}x   (target <= 5)")
    print(f"   full run report / healthz        {f['full run report'] / base:6.1f}x")
    print(
        f"   batch of one / quarter-mile run  {f['batch of one'] / run:6.2f}x   (target <= 1.15)"
    )
    print(
        f"   shift search / quarter-mile run  {f['shift search'] / run:6.1f} runs' worth"
        f"   (target <= 30; budget {budget} runs)"
    )


def main() -> None:
    healthz, close = healthz_call()
    try:
        for name, label in (
            ("demo_wagon_converter_us", "converter, six gears"),
            ("demo_sedan_run_metric", "clutch, six gears"),
        ):
            model, rpm = _model(name)
            print(f"{label} ({name}); medians of {ROUNDS} interleaved rounds")
            _figures(model, rpm, healthz)
    finally:
        close()


if __name__ == "__main__":
    main()
