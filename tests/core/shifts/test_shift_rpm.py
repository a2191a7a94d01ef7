"""The one check of a caller's shift rpms (runs, batches and sweeps all use it)."""

from __future__ import annotations

import math

import numpy as np
import pytest
from numpy.testing import assert_allclose

from core.engine.curves import torque_curve_from_torque
from core.errors import SimulationError
from core.shifts.shift_rpm import checked_shift_rpm

CURVE = torque_curve_from_torque([1000.0, 4000.0, 7000.0], [200.0, 260.0, 220.0])


def test_shift_rpms_in_range_come_back_as_an_array() -> None:
    shifts = checked_shift_rpm(CURVE, 7000.0, 4, [6500.0, 6400.0, 7000.0])
    assert shifts.dtype == np.float64
    assert_allclose(shifts, [6500.0, 6400.0, 7000.0], rtol=0)


def test_one_shift_rpm_per_gear_change_is_required() -> None:
    with pytest.raises(
        SimulationError, match=r"`shift_rpm` must give one rpm per gear change \(3\), got 2"
    ) as info:
        checked_shift_rpm(CURVE, 7000.0, 4, [6500.0, 6400.0])
    assert info.value.parameter == "shift_rpm"


@pytest.mark.parametrize(
    ("shifts", "index"),
    [
        pytest.param([6500.0, 7000.1], 1, id="above-rev-limit"),
        pytest.param([1000.0, 6500.0], 0, id="at-curve-start"),
        pytest.param([6500.0, math.nan], 1, id="nan"),
    ],
)
def test_a_shift_rpm_outside_the_curve_or_above_the_rev_limit_is_named(
    shifts: list[float], index: int
) -> None:
    match = (
        rf"`shift_rpm\[{index}\]` must lie above the curve's first point \(1000\) "
        r"and at most the rev limit \(7000\)"
    )
    with pytest.raises(SimulationError, match=match) as info:
        checked_shift_rpm(CURVE, 7000.0, 3, shifts)
    assert info.value.parameter == f"shift_rpm[{index}]"
