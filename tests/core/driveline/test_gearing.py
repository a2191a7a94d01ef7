"""Per-gear kinematics and force tables against the trade's formulas."""

from __future__ import annotations

import numpy as np
from numpy.testing import assert_allclose

from core import (
    engine_rpm_at_speed,
    make_drivetrain,
    road_speed_m_s,
    shift_plan,
    tire_from_diameter,
    torque_curve_from_torque,
)

INCH = 0.0254
MPH = 0.44704


def test_road_speed_matches_336_formula() -> None:
    # mph = rpm * tire_in / (overall_ratio * 336.135), 336.135 = 63360/(60*pi)
    # (REFERENCES.md): 6000 rpm, 26 in, overall 3.0 -> 154.6996 mph
    v = road_speed_m_s(6000.0, 3.0, 13 * INCH) / MPH
    assert_allclose(v, 154.6996, rtol=1e-6)
    assert_allclose(v, 6000 * 26 / (3.0 * 336.135), rtol=1e-6)


def test_road_speed_is_close_to_shop_shortcut() -> None:
    # the shop shortcut uses 336 (common practice): 154.762 mph, 0.04 % high
    v = float(road_speed_m_s(6000.0, 3.0, 13 * INCH)) / MPH
    assert abs(v - 154.762) / 154.762 < 5e-4


def test_engine_rpm_inverts_road_speed() -> None:
    rpm = np.array([1000.0, 4321.0, 7000.0])
    v = road_speed_m_s(rpm, 7.7, 0.31)
    assert_allclose(engine_rpm_at_speed(v, 7.7, 0.31), rpm, rtol=1e-12)


def test_gear_teeth_rule_gives_speed_and_torque() -> None:
    # common practice: a 15-tooth pinion driving a 45-tooth gear turns it at 15/45 of its
    # speed and, without losses, multiplies torque by 45/15
    drivetrain = make_drivetrain([45 / 15], 1.0)
    curve = torque_curve_from_torque([1000, 2000, 3000], [100.0, 100.0, 100.0])
    tire = tire_from_diameter(0.6)
    plan = shift_plan(curve, drivetrain, tire)
    g = plan.gears[0]
    assert_allclose(g.wheel_torque_nm, 3.0 * g.engine_torque_nm, rtol=1e-12)
    wheel_rpm = g.speed_m_s / tire.circumference_m * 60.0
    assert_allclose(wheel_rpm, g.rpm / 3.0, rtol=1e-12)


def test_wheel_torque_is_engine_torque_times_ratios_and_efficiency() -> None:
    # wheel torque = engine torque x gear x final drive, less losses (Gillespie ch. 2)
    curve = torque_curve_from_torque([1000, 3000, 5000], [300.0, 400.0, 350.0])
    d = make_drivetrain([2.66, 1.78, 1.30], 3.73, efficiency=[0.88, 0.89, 0.90])
    plan = shift_plan(curve, d, tire_from_diameter(0.66))
    for g, ratio, eff in zip(plan.gears, [2.66, 1.78, 1.30], [0.88, 0.89, 0.90], strict=True):
        assert_allclose(g.wheel_torque_nm, g.engine_torque_nm * ratio * 3.73 * eff, rtol=1e-12)
        assert_allclose(g.tractive_force_n, g.wheel_torque_nm / 0.33, rtol=1e-12)
        assert_allclose(g.wheel_power_w, g.tractive_force_n * g.speed_m_s, rtol=1e-12)


def test_table_ends_at_rev_limit_with_chosen_step() -> None:
    curve = torque_curve_from_torque([1000, 3000, 7000], [300.0, 400.0, 350.0])
    plan = shift_plan(
        curve,
        make_drivetrain([3.0, 2.0], 3.0),
        tire_from_diameter(0.6),
        rev_limit_rpm=6500,
        rpm_step=250,
    )
    rpm = plan.gears[0].rpm
    assert rpm[0] == 1000.0 and rpm[-1] == 6500.0
    assert_allclose(np.diff(rpm), 250.0, rtol=1e-12)


def test_plan_peaks_are_the_curve_at_its_peak_speeds() -> None:
    # kW = N*m * rpm / 9549.297 (REFERENCES.md: 60000/(2*pi)); PCHIP peaks at a sample
    curve = torque_curve_from_torque([1000, 3000, 5000, 7000], [300.0, 400.0, 380.0, 300.0])
    plan = shift_plan(curve, make_drivetrain([3.0, 2.0], 3.5), tire_from_diameter(0.66))
    assert plan.peak_torque_rpm == 3000.0
    assert_allclose(plan.peak_torque_nm, 400.0, rtol=1e-12)
    expected_kw = float(curve.torque_at([plan.peak_power_rpm])[0]) * plan.peak_power_rpm / 9549.297
    assert_allclose(plan.peak_power_w / 1000.0, expected_kw, rtol=1e-6)
