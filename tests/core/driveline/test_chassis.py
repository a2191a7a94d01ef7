"""Tests of core.driveline.chassis against closed forms:
wheel = engine x efficiency at the same engine
rpm (common practice; Gillespie, Fundamentals of Vehicle Dynamics, ch. 2: wheel torque is
engine torque times the ratios less driveline losses), its inverse, and the per-gear
scaling eta_j / eta_k."""

from __future__ import annotations

import numpy as np
import pytest
from numpy.testing import assert_allclose

from core.driveline.chassis import (
    MeasuredAt,
    chassis_conversion,
    efficiency_from_loss,
    engine_from_wheel,
    wheel_from_engine,
)
from core.errors import CurveError, DrivetrainError

RPM = np.array([3000.0, 4500.0, 6000.0])
WHEEL_KW = np.array([100.0, 170.0, 200.0])


def test_wheel_power_is_engine_power_times_efficiency() -> None:
    # common practice (Gillespie ch. 2): 200 kW at the crank through 85 % -> 170 kW
    assert_allclose(wheel_from_engine([200.0], 0.85), [170.0], rtol=1e-12)
    assert_allclose(engine_from_wheel([170.0], 0.85), [200.0], rtol=1e-12)


def test_a_loss_in_per_cent_is_a_share_of_engine_power() -> None:
    assert efficiency_from_loss(15.0) == 0.85
    assert efficiency_from_loss(0.0) == 1.0


def test_engine_to_wheel_to_engine_is_the_identity() -> None:
    values = np.random.default_rng(11).uniform(0.0, 500e3, 200)
    for eta in (0.4, 0.83, 1.0):
        assert_allclose(engine_from_wheel(wheel_from_engine(values, eta), eta), values, rtol=1e-12)


def test_conversion_both_ways_round_trips_and_keeps_torque_and_power_consistent() -> None:
    there = chassis_conversion(
        RPM, measured_at=MeasuredAt.WHEELS, efficiency=0.87, power_w=WHEEL_KW * 1e3
    )
    back = chassis_conversion(
        RPM, measured_at=MeasuredAt.ENGINE, efficiency=0.87, power_w=there.engine_power_w
    )
    assert_allclose(back.wheel_power_w, WHEEL_KW * 1e3, rtol=1e-12)
    # kW = N*m * rpm / 9549.297 (60000 / (2*pi); REFERENCES.md units)
    assert_allclose(there.engine_torque_nm * RPM / 9549.297, there.engine_power_w / 1e3, rtol=1e-6)
    assert_allclose(there.engine_torque_nm / there.wheel_torque_nm, 1 / 0.87, rtol=1e-12)


def test_a_curve_given_as_torque_converts_like_power() -> None:
    torque = WHEEL_KW * 1e3 / (RPM * 2 * np.pi / 60)
    by_torque = chassis_conversion(
        RPM, measured_at=MeasuredAt.WHEELS, efficiency=0.9, torque_nm=torque
    )
    by_power = chassis_conversion(
        RPM, measured_at=MeasuredAt.WHEELS, efficiency=0.9, power_w=WHEEL_KW * 1e3
    )
    assert_allclose(by_torque.engine_power_w, by_power.engine_power_w, rtol=1e-12)


def test_a_curve_from_one_gear_maps_to_the_others_by_the_efficiency_ratio() -> None:
    etas = [0.86, 0.88, 0.9, 0.92]
    c = chassis_conversion(
        RPM,
        measured_at=MeasuredAt.WHEELS,
        efficiency=etas,
        power_w=WHEEL_KW * 1e3,
        measured_gear=3,
    )
    assert c.efficiency == 0.9
    assert c.wheel_power_by_gear_w is not None
    for j, eta in enumerate(etas):
        assert_allclose(c.wheel_power_by_gear_w[j], WHEEL_KW * 1e3 * eta / 0.9, rtol=1e-12)
    assert_allclose(c.engine_power_w, WHEEL_KW * 1e3 / 0.9, rtol=1e-12)
    assert "equal_efficiencies" not in {n.code for n in c.notices}


def test_equal_efficiencies_leave_the_curve_unchanged_in_every_gear() -> None:
    c = chassis_conversion(
        RPM,
        measured_at=MeasuredAt.WHEELS,
        efficiency=[0.88] * 5,
        power_w=WHEEL_KW,
        measured_gear=2,
    )
    assert c.wheel_power_by_gear_w is not None
    assert_allclose(c.wheel_power_by_gear_w, np.tile(WHEEL_KW, (5, 1)), rtol=1e-12)
    assert "equal_efficiencies" in {n.code for n in c.notices}


@pytest.mark.parametrize(
    ("kwargs", "error", "parameter"),
    [
        pytest.param({"rpm": [3000.0, 2000.0]}, CurveError, "rpm[1]", id="rpm-not-increasing"),
        pytest.param({"power_w": [1.0, -2.0, 3.0]}, CurveError, "power_w[1]", id="negative"),
        pytest.param({"power_w": [1.0, 2.0]}, CurveError, "power_w", id="lengths"),
        pytest.param({"efficiency": 0.2}, DrivetrainError, "efficiency", id="efficiency-low"),
        pytest.param(
            {"efficiency": [0.9, 0.9], "measured_gear": 3},
            DrivetrainError,
            "measured_gear",
            id="gear-not-listed",
        ),
        pytest.param({"measured_gear": 1}, DrivetrainError, "measured_gear", id="gear-alone"),
    ],
)
def test_bad_inputs_name_the_parameter(
    kwargs: dict[str, object], error: type[Exception], parameter: str
) -> None:
    args: dict[str, object] = {"rpm": RPM, "efficiency": 0.9, "power_w": WHEEL_KW, **kwargs}
    with pytest.raises(error, match=r"must|goes with|give") as err:
        chassis_conversion(measured_at=MeasuredAt.WHEELS, **args)  # type: ignore[arg-type]
    assert getattr(err.value, "parameter", None) == parameter


def test_a_loss_beyond_sixty_per_cent_is_rejected() -> None:
    with pytest.raises(DrivetrainError, match="loss_percent"):
        efficiency_from_loss(75.0)
