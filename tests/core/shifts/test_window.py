"""Shift windows: the loss curve against the time-optimal run. The car is invented."""

from __future__ import annotations

import numpy as np
import pytest

from core.car.road_load import RoadLoad
from core.car.traction import AxleGeometry, DriveLayout
from core.car.vehicle import Launch, Vehicle
from core.driveline.drivetrain import make_drivetrain
from core.driveline.tires import tire_from_diameter
from core.engine.curves import torque_curve_from_torque
from core.errors import SimulationError
from core.runs.drive_model import DriveModel, drive_model
from core.shifts.window import ShiftWindows, shift_windows

QUARTER_MILE_M = 402.336  # 1320 ft, exact by definition of the foot


def invented_car() -> DriveModel:
    curve = torque_curve_from_torque(
        [1500.0, 3000.0, 4500.0, 5500.0, 6500.0, 7200.0],
        [180.0, 230.0, 260.0, 250.0, 215.0, 180.0],
    )
    load = RoadLoad.from_coast_down(1250.0, 140.0, 0.0, 0.38)
    car = Vehicle(1250.0, load, AxleGeometry(2.6, 0.5, 1.3), DriveLayout.REAR, 5.0)
    drivetrain = make_drivetrain([3.2, 2.1, 1.5, 1.15], 3.9, efficiency=0.9)
    return drive_model(
        curve, drivetrain, tire_from_diameter(0.63), car, Launch(), rev_limit_rpm=7200.0
    )


@pytest.fixture(scope="module")
def windows() -> ShiftWindows:
    return shift_windows(
        invented_car(),
        start_speed_m_s=0.0,
        rollout_m=0.3048,
        finish_distance_m=QUARTER_MILE_M,
        finish_speed_m_s=None,
        points=13,
        max_search_evaluations=60,
    )


def test_loss_is_zero_at_the_time_optimal_shift(windows: ShiftWindows) -> None:
    # the loss is measured from the time-optimal run (core.runs.performance.optimal_shift_rpm)
    for w in windows.windows:
        if w.reached:
            at_best = w.loss_s[np.flatnonzero(w.rpm == w.best_rpm)[0]]
            assert at_best == pytest.approx(0.0, abs=1e-12)


def test_minimum_of_the_loss_curve_agrees_with_the_time_optimal_run(
    windows: ShiftWindows,
) -> None:
    # no grid shift beats the optimum by more than the search's own tolerance (ftol 1e-6
    # relative on ~13 s): the optimum is the curve's minimum
    reached = [w for w in windows.windows if w.reached]
    assert reached
    for w in reached:
        assert float(np.min(w.loss_s)) >= -2e-3
        assert w.low_rpm <= w.best_rpm <= w.high_rpm


def test_loss_grows_on_both_sides_of_the_optimum(windows: ShiftWindows) -> None:
    # moving away from the best rpm never saves time, and the next grid point on each side
    # of an interior optimum costs time
    interior = 0
    for w in windows.windows:
        if not w.reached:
            continue
        k = int(np.flatnonzero(w.rpm == w.best_rpm)[0])
        assert np.all(np.diff(w.loss_s[: k + 1]) <= 1e-9)
        assert np.all(np.diff(w.loss_s[k:]) >= -1e-9)
        assert w.loss_s[k - 1] > 0.0
        if k + 1 < w.rpm.size:
            interior += 1
            assert w.loss_s[k + 1] > 0.0
        assert w.low_rpm < w.high_rpm
    assert interior >= 1


def test_tolerance_outside_its_range_is_rejected() -> None:
    with pytest.raises(SimulationError, match="tolerance_s"):
        shift_windows(
            invented_car(),
            start_speed_m_s=0.0,
            rollout_m=0.3,
            finish_distance_m=100.0,
            finish_speed_m_s=None,
            tolerance_s=0.0,
        )
