"""Tests of core.converter.matching: stall speed and converter operating points."""

from __future__ import annotations

import math

import numpy as np
import pytest
from numpy.testing import assert_allclose
from numpy.typing import NDArray
from scipy import constants
from scipy.optimize import brentq

from core.converter.matching import (
    ConverterOperatingPoints,
    EngineTorqueFn,
    converter_operating_points,
    stall_speed_rpm,
)
from core.converter.tables import TorqueConverter
from core.errors import CurveError, VehicleError

FloatArray = NDArray[np.float64]
LBF_FT_IN_NM = constants.pound_force * constants.foot  # scipy.constants
RPM_MIN, RPM_MAX = 1000.0, 7000.0


def flat_torque(level_nm: float) -> EngineTorqueFn:
    """A flat torque curve at ``level_nm`` [N*m]."""

    def torque(rpm: FloatArray) -> FloatArray:
        return np.full_like(rpm, level_nm)

    return torque


def humped_torque(rpm: FloatArray) -> FloatArray:
    """Invented demo curve: 300 N*m at both ends of 1000..7000 rpm, 450 N*m at 4000 rpm."""
    result: FloatArray = 300.0 + 150.0 * np.sin(math.pi * (rpm - 1000.0) / 6000.0)
    return result


def linear_torque(rpm: FloatArray) -> FloatArray:
    result: FloatArray = 520.0 - 0.04 * rpm
    return result


def test_stall_speed_matches_the_reference_check_value() -> None:
    # REFERENCES.md: K 144 rpm/sqrt(lbf*ft) (= 123.67 rpm/sqrt(N*m)) on a flat 300 lbf*ft
    # curve stalls at 2494.2 rpm; closed form n = K*sqrt(T). Units from scipy.constants.
    converter = TorqueConverter.from_stall(2.0, stall_k_factor=144.0 / math.sqrt(LBF_FT_IN_NM))
    torque_nm = 300.0 * LBF_FT_IN_NM
    stall = stall_speed_rpm(converter, flat_torque(torque_nm), rpm_min=RPM_MIN, rpm_max=RPM_MAX)
    assert_allclose(stall, 2494.2, rtol=2e-5)
    assert_allclose(stall, 144.0 * math.sqrt(300.0), rtol=1e-12)


def test_stall_speed_on_a_linear_curve_is_the_quadratic_root() -> None:
    # Closed form: (n/K)^2 = a - b*n gives n = K^2*(sqrt(b^2 + 4a/K^2) - b)/2.
    k, a, b = 110.0, 520.0, 0.04
    converter = TorqueConverter.from_stall(2.1, stall_k_factor=k)
    expected = k**2 * (math.sqrt(b**2 + 4.0 * a / k**2) - b) / 2.0
    stall = stall_speed_rpm(converter, linear_torque, rpm_min=RPM_MIN, rpm_max=RPM_MAX)
    assert_allclose(stall, expected, rtol=1e-12)


@pytest.mark.parametrize(
    ("k_factor", "message"),
    [
        pytest.param(20.0, "at or below `rpm_min`", id="converter-too-tight"),
        pytest.param(500.0, "at or above `rpm_max`", id="converter-too-loose"),
    ],
)
def test_stall_speed_outside_the_curve_range_is_rejected(k_factor: float, message: str) -> None:
    converter = TorqueConverter.from_stall(2.0, stall_k_factor=k_factor)
    with pytest.raises(VehicleError, match=message) as info:
        stall_speed_rpm(converter, humped_torque, rpm_min=RPM_MIN, rpm_max=RPM_MAX)
    assert info.value.parameter == "converter"


def test_flat_capacity_holds_the_stall_speed_until_lockup() -> None:
    # Closed form: with K flat up to coupling and a flat 400 N*m curve, n = K*sqrt(400) for
    # every turbine speed below SR_c*n; output torque = TR(SR)*400.
    converter = TorqueConverter.from_stall(
        2.0, stall_k_factor=100.0, coupling_speed_ratio=0.8, k_factor_rise=0.0
    )
    turbine = np.array([0.0, 500.0, 1000.0, 1500.0, 1599.0])
    points = converter_operating_points(
        converter, turbine, flat_torque(400.0), rpm_min=RPM_MIN, rpm_max=RPM_MAX
    )
    assert isinstance(points, ConverterOperatingPoints)
    assert_allclose(
        points.engine_rpm, np.full(5, 2000.0), rtol=1e-8
    )  # 28 bisection steps: ~1e-5 rpm
    assert_allclose(points.speed_ratio, turbine / 2000.0, rtol=1e-8)
    expected_tr = 2.0 - (turbine / 2000.0) / 0.8
    assert_allclose(points.output_torque_nm, 400.0 * expected_tr, rtol=1e-8)
    assert not points.locked.any()


def test_operating_points_agree_with_a_per_point_brentq_solution() -> None:
    # Reference: scipy.optimize.brentq solving T(n) = (n/K(n_t/n))^2 one point at a time.
    converter = TorqueConverter.from_stall(
        2.3, stall_k_factor=115.0, coupling_speed_ratio=0.87, lockup=False
    )
    turbine = np.linspace(0.0, 3500.0, 15)
    points = converter_operating_points(
        converter, turbine, humped_torque, rpm_min=RPM_MIN, rpm_max=RPM_MAX
    )

    def surplus(n: float, n_t: float) -> float:
        rpm = np.array([n])
        return float(humped_torque(rpm)[0] - (n / converter.k_factor_at(n_t / rpm)[0]) ** 2)

    expected = [brentq(surplus, max(n_t, RPM_MIN), RPM_MAX, args=(n_t,)) for n_t in turbine]
    assert_allclose(points.engine_rpm, expected, rtol=1e-8)
    assert_allclose(points.input_torque_nm, humped_torque(points.engine_rpm), rtol=1e-12)
    absorbed = (points.engine_rpm / converter.k_factor_at(points.speed_ratio)) ** 2
    assert_allclose(points.input_torque_nm, absorbed, rtol=1e-7)  # 28 bisection steps


def test_stall_point_of_the_solver_matches_stall_speed_and_multiplies_torque() -> None:
    converter = TorqueConverter.from_stall(2.2, stall_k_factor=115.0)
    points = converter_operating_points(
        converter, [0.0], humped_torque, rpm_min=RPM_MIN, rpm_max=RPM_MAX
    )
    stall = stall_speed_rpm(converter, humped_torque, rpm_min=RPM_MIN, rpm_max=RPM_MAX)
    assert_allclose(points.engine_rpm, [stall], rtol=1e-8)
    assert_allclose(points.output_torque_nm, 2.2 * points.input_torque_nm, rtol=1e-14)
    assert_allclose(points.efficiency, [0.0], atol=1e-15)


def test_lockup_makes_the_engine_follow_the_turbine_one_to_one() -> None:
    converter = TorqueConverter.from_stall(2.0, stall_k_factor=115.0, coupling_speed_ratio=0.87)
    turbine = np.array([3000.0, 4500.0, 6500.0])
    points = converter_operating_points(
        converter, turbine, humped_torque, rpm_min=RPM_MIN, rpm_max=RPM_MAX
    )
    assert points.locked.all()
    assert_allclose(points.engine_rpm, turbine, rtol=1e-15)
    assert_allclose(points.output_torque_nm, humped_torque(turbine), rtol=1e-15)
    assert_allclose(points.efficiency, np.ones(3), rtol=1e-15)


def test_without_lockup_the_converter_keeps_slipping_above_coupling() -> None:
    converter = TorqueConverter.from_stall(
        2.0, stall_k_factor=115.0, coupling_speed_ratio=0.87, lockup=False
    )
    points = converter_operating_points(
        converter, [3000.0, 4500.0], humped_torque, rpm_min=RPM_MIN, rpm_max=RPM_MAX
    )
    assert not points.locked.any()
    assert np.all((points.speed_ratio > 0.87) & (points.speed_ratio < 1.0))
    assert_allclose(points.torque_ratio, [1.0, 1.0], rtol=1e-15)
    assert_allclose(points.efficiency, points.speed_ratio, rtol=1e-15)


def test_a_converter_too_loose_for_the_engine_holds_it_at_the_rev_limit() -> None:
    # The converter absorbs only (7000/400)^2 = 306.25 N*m at rpm_max with the turbine held.
    converter = TorqueConverter.from_stall(2.0, stall_k_factor=400.0)
    points = converter_operating_points(
        converter, [0.0], flat_torque(420.0), rpm_min=RPM_MIN, rpm_max=RPM_MAX
    )
    assert_allclose(points.engine_rpm, [RPM_MAX], rtol=1e-15)
    assert_allclose(points.input_torque_nm, [306.25], rtol=1e-12)


def test_a_converter_too_tight_for_the_engine_holds_it_at_rpm_min() -> None:
    converter = TorqueConverter.from_stall(2.0, stall_k_factor=20.0)
    points = converter_operating_points(
        converter, [0.0, 300.0], humped_torque, rpm_min=RPM_MIN, rpm_max=RPM_MAX
    )
    assert_allclose(points.engine_rpm, [RPM_MIN, RPM_MIN], rtol=1e-15)
    assert_allclose(points.input_torque_nm, [300.0, 300.0], rtol=1e-12)
    assert_allclose(points.speed_ratio, [0.0, 0.3], rtol=1e-15)


@pytest.mark.parametrize(
    ("turbine", "parameter"),
    [
        pytest.param([100.0, -1.0], "turbine_rpm[1]", id="negative"),
        pytest.param([7000.5], "turbine_rpm[0]", id="above-rpm-max"),
        pytest.param([math.nan], "turbine_rpm[0]", id="nan"),
    ],
)
def test_invalid_turbine_speeds_are_rejected(turbine: list[float], parameter: str) -> None:
    converter = TorqueConverter.from_stall(2.0, stall_k_factor=115.0)
    with pytest.raises(VehicleError, match=r"must lie in \[0, rpm_max") as info:
        converter_operating_points(
            converter, turbine, humped_torque, rpm_min=RPM_MIN, rpm_max=RPM_MAX
        )
    assert info.value.parameter == parameter


def test_inverted_rpm_bounds_are_rejected() -> None:
    converter = TorqueConverter.from_stall(2.0, stall_k_factor=115.0)
    with pytest.raises(VehicleError, match="`rpm_max` must be > `rpm_min`"):
        converter_operating_points(converter, [0.0], humped_torque, rpm_min=5000, rpm_max=4000)


def test_a_torque_function_returning_the_wrong_shape_raises_a_curve_error() -> None:
    converter = TorqueConverter.from_stall(2.0, stall_k_factor=115.0)
    with pytest.raises(CurveError, match="must return shape") as info:
        converter_operating_points(
            converter, [0.0, 10.0], lambda rpm: np.ones(1), rpm_min=RPM_MIN, rpm_max=RPM_MAX
        )
    assert info.value.parameter == "engine_torque_fn"
