"""Tests of the batched runs (core.runs.batch): however many runs go together, and however
the strip timer reads their blocks (a few kept and read whole, many read block by block,
many more driven ``ROW_BLOCK`` rows at a time), each run's figures are the same to
rounding. Every car here is invented demo data.
"""

from __future__ import annotations

import numpy as np
import pytest
from numpy.testing import assert_allclose

from core.car.road_load import RoadLoad
from core.car.traction import AxleGeometry, DriveLayout
from core.car.vehicle import Coupling, Launch, RotatingInertia, Vehicle
from core.converter.tables import TorqueConverter
from core.driveline.drivetrain import make_drivetrain
from core.driveline.tires import tire_from_diameter
from core.engine.curves import torque_curve_from_torque
from core.runs.batch import BatchRuns, batch_finish_times, batch_runs
from core.runs.drive_model import DriveModel, drive_model
from core.runs.integrator import ROW_BLOCK
from core.runs.milestones import STANDARD_DISTANCES, STANDARD_SPEEDS
from core.units import FOOT_M

BATCH_RTOL = 1e-9  # runs batched differently agree to rounding
CURVE = torque_curve_from_torque(
    [1000, 2000, 3000, 4000, 5000, 6000, 6800],
    [210, 255, 285, 300, 296, 270, 236],
)
SHIFTS = np.array([6300.0, 6200.0, 6100.0, 6000.0, 5900.0])
FEW = np.array([2.2, 3.1, 3.55, 4.1, 6.0])
CONVERTER = TorqueConverter.from_stall(2.0, stall_k_factor=135.0, lockup=False)


def _model(launch: Launch) -> DriveModel:
    """An invented rear-drive saloon with six gears."""
    load = RoadLoad.from_constant_rolling(1550.0, 0.7, 1.2, 0.012)
    geometry = AxleGeometry.from_front_weight_share(2.75, 0.53, 0.55)
    vehicle = Vehicle(
        1550.0, load, geometry, DriveLayout.REAR, 1.0, inertia=RotatingInertia(0.25, 0.04, 4.5)
    )
    drivetrain = make_drivetrain([3.4, 2.1, 1.45, 1.0, 0.82, 0.62], 3.55, efficiency=0.88)
    return drive_model(CURVE, drivetrain, tire_from_diameter(0.66), vehicle, launch)


LAUNCHES = [
    pytest.param(Launch(launch_rpm=3000.0, shift_time_s=0.25), id="clutch"),
    pytest.param(
        Launch(Coupling.CONVERTER, converter=CONVERTER, lockup_gears=frozenset({3, 4, 5, 6})),
        id="converter-lockup",
    ),
]


def _figures(runs: BatchRuns) -> list[np.ndarray]:
    """Every per-candidate figure of a batch, one array each."""
    out = [runs.held_speed_m_s, runs.shift_time_s, runs.shift_speed_m_s, runs.rpm_before]
    for d in runs.distances:
        out += [d.elapsed_s, d.speed_m_s, d.trap_speed_m_s]
    for s in runs.speeds:
        out += [s.elapsed_s, s.less_rollout_s]
    return out


@pytest.mark.parametrize("launch", LAUNCHES)
def test_candidates_in_row_blocks_equal_a_few_candidates_read_together(launch: Launch) -> None:
    # more than ROW_BLOCK candidates: driven block by block and timed block by block; the
    # same ratios in a batch of five are kept and timed whole
    model = _model(launch)
    many = np.resize(FEW, ROW_BLOCK + 37)  # each ratio lands in both row blocks
    big = batch_runs(model, many, SHIFTS, distances=STANDARD_DISTANCES, speeds=STANDARD_SPEEDS)
    few = batch_runs(model, FEW, SHIFTS, distances=STANDARD_DISTANCES, speeds=STANDARD_SPEEDS)
    index = np.arange(many.size) % FEW.size
    for got, want in zip(_figures(big), _figures(few), strict=True):
        assert_allclose(got, want[index], rtol=BATCH_RTOL, equal_nan=True)
    assert big.held_by == tuple(few.held_by[i] for i in index.tolist())
    assert_allclose(big.gears_left_at_once, few.gears_left_at_once[index])


@pytest.mark.parametrize("launch", LAUNCHES)
def test_a_batch_of_one_equals_its_row_in_a_batch(launch: Launch) -> None:
    model = _model(launch)
    few = batch_runs(model, FEW, SHIFTS, distances=STANDARD_DISTANCES, speeds=STANDARD_SPEEDS)
    for c, ratio in enumerate(FEW.tolist()):
        one = batch_runs(
            model, [ratio], SHIFTS, distances=STANDARD_DISTANCES, speeds=STANDARD_SPEEDS
        )
        for got, want in zip(_figures(one), _figures(few), strict=True):
            assert_allclose(got[0], want[c], rtol=BATCH_RTOL, equal_nan=True)


@pytest.mark.parametrize("start", [0.0, 12.0], ids=["standing", "rolling"])
def test_finish_times_of_many_rows_equal_those_of_each_row_alone(start: float) -> None:
    # twenty rows are read block by block, one row is kept and read whole
    model = _model(Launch(launch_rpm=3000.0, shift_time_s=0.25))
    rows = SHIFTS[None, :] - np.linspace(0.0, 1500.0, 20)[:, None]
    for distance, speed in ((402.336, None), (None, 44.704)):
        times = batch_finish_times(
            model,
            rows,
            start_speed_m_s=start,
            rollout_m=FOOT_M,
            finish_distance_m=distance,
            finish_speed_m_s=speed,
        )
        for row, batched in zip(rows, times, strict=True):
            alone = batch_finish_times(
                model,
                row,
                start_speed_m_s=start,
                rollout_m=FOOT_M,
                finish_distance_m=distance,
                finish_speed_m_s=speed,
            )
            assert_allclose(batched, alone[0], rtol=BATCH_RTOL)
