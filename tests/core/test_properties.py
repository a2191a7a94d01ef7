"""Properties that hold for every valid input, checked with hypothesis.

Fixed seed (``derandomize``), no example database and a bounded number of examples (40,
or GEARWORK_FUZZ_EXAMPLES for a long run), so the run is the same every time and stays
quick.
"""

from __future__ import annotations

import os
from typing import Any

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st
from numpy.testing import assert_allclose

from core import (
    Interpolation,
    ShiftPlan,
    engine_rpm_at_speed,
    make_drivetrain,
    road_speed_m_s,
    shift_plan,
    tire_from_diameter,
    torque_curve_from_torque,
)
from service.units import Quantity, UnitSystem, from_si, to_si
from tests.conftest import ApiClient

EXAMPLES = int(os.environ.get("GEARWORK_FUZZ_EXAMPLES", "40"))
BOUNDED = settings(max_examples=EXAMPLES, derandomize=True, database=None, deadline=None)


@st.composite
def cars(draw: st.DrawFn) -> dict[str, Any]:
    """A curve (SI), gear set, final drive, tire diameter and rev limit, all plausible."""
    n = draw(st.integers(3, 12))
    start = draw(st.floats(800, 3000))
    steps = draw(st.lists(st.floats(200, 1500), min_size=n - 1, max_size=n - 1))
    rpm = np.concatenate([[start], start + np.cumsum(steps)])
    torque = draw(st.lists(st.floats(20, 800), min_size=n, max_size=n))
    gears = [draw(st.floats(2.5, 5.0))]
    for _ in range(draw(st.integers(1, 7))):
        gears.append(gears[-1] * draw(st.floats(0.55, 0.9)))
    rev_limit = draw(st.none() | st.floats(float(rpm[0]) + 100.0, float(rpm[-1]) * 1.1))
    return {
        "rpm": rpm,
        "torque_nm": np.array(torque),
        "interpolation": draw(st.sampled_from(list(Interpolation))),
        "gears": gears,
        "final_drive": draw(st.floats(2.0, 6.0)),
        "efficiency": draw(st.floats(0.8, 1.0)),
        "diameter_m": draw(st.floats(0.5, 0.9)),
        "rev_limit_rpm": rev_limit,
    }


def _plan(car: dict[str, Any], final_drive: float | None = None) -> ShiftPlan:
    curve = torque_curve_from_torque(
        car["rpm"], car["torque_nm"], interpolation=car["interpolation"]
    )
    drivetrain = make_drivetrain(
        car["gears"], final_drive or car["final_drive"], efficiency=car["efficiency"]
    )
    return shift_plan(
        curve,
        drivetrain,
        tire_from_diameter(car["diameter_m"]),
        rev_limit_rpm=car["rev_limit_rpm"],
    )


@BOUNDED
@given(cars())
def test_rpm_after_every_shift_is_below_the_shift_rpm(car: dict[str, Any]) -> None:
    # the next gear's ratio is lower, so at the same road speed the engine turns slower:
    # rpm_after = shift_rpm * G_next / G_current (common practice; Gillespie ch. 2)
    plan = _plan(car)
    for shift in plan.shifts:
        assert shift.rpm_after < shift.shift_rpm
        ratio = car["gears"][shift.to_gear - 1] / car["gears"][shift.from_gear - 1]
        assert_allclose(shift.rpm_after, shift.shift_rpm * ratio, rtol=1e-12)


@BOUNDED
@given(cars())
def test_shift_rpm_lies_between_curve_start_and_rev_limit(car: dict[str, Any]) -> None:
    plan = _plan(car)
    for shift in plan.shifts:
        assert car["rpm"][0] * (1 - 1e-12) <= shift.shift_rpm <= plan.rev_limit_rpm * (1 + 1e-12)
    assert plan.rev_limit_rpm <= car["rpm"][-1]


@BOUNDED
@given(cars(), st.floats(0.5, 2.0))
def test_wheel_force_scales_linearly_with_final_drive(car: dict[str, Any], k: float) -> None:
    # wheel torque = engine torque x gear ratio x final drive x efficiency (common practice;
    # Gillespie ch. 2), so every force in every gear scales with the final drive
    base = _plan(car)
    scaled = _plan(car, final_drive=car["final_drive"] * k)
    for a, b in zip(base.gears, scaled.gears, strict=True):
        assert_allclose(b.tractive_force_n, k * a.tractive_force_n, rtol=1e-12)
        assert_allclose(b.speed_m_s, a.speed_m_s / k, rtol=1e-12)


@BOUNDED
@given(
    st.lists(st.floats(0, 30000), min_size=1, max_size=20),
    st.floats(0.01, 10),
    st.floats(0.3, 50.0),
    st.floats(0.1, 1.5),
)
def test_road_speed_is_linear_in_rpm(
    rpm: list[float], a: float, overall: float, radius: float
) -> None:
    # v = (2*pi/60) * rpm * r / N (Gillespie ch. 2): proportional to rpm, and rpm back
    n = np.array(rpm)
    v = road_speed_m_s(n, overall, radius)
    assert_allclose(road_speed_m_s(a * n, overall, radius), a * v, rtol=1e-12)
    assert_allclose(v, n * 2 * np.pi / 60 * radius / overall, rtol=1e-12)
    assert_allclose(engine_rpm_at_speed(v, overall, radius), n, rtol=1e-12, atol=1e-9)


@BOUNDED
@given(
    st.sampled_from(list(Quantity)),
    st.sampled_from(list(UnitSystem)),
    st.lists(st.floats(-1e6, 1e6), min_size=1, max_size=10),
)
def test_unit_conversion_round_trips(
    quantity: Quantity, system: UnitSystem, values: list[float]
) -> None:
    x = np.array(values)
    assert_allclose(from_si(to_si(x, quantity, system), quantity, system), x, rtol=1e-9, atol=1e-9)
    assert_allclose(to_si(from_si(x, quantity, system), quantity, system), x, rtol=1e-9, atol=1e-9)
    first = float(x[0])
    assert_allclose(from_si(to_si(first, quantity, system), quantity, system), first, atol=1e-9)


def _request(car: dict[str, Any], system: UnitSystem) -> dict[str, Any]:
    torque = from_si(car["torque_nm"], Quantity.TORQUE, system)
    return {
        "units": system.value,
        "engine": {
            "curve": {
                "rpm": car["rpm"].tolist(),
                "torque": torque.tolist(),
                "interpolation": car["interpolation"].value,
            },
            "rev_limit_rpm": car["rev_limit_rpm"],
        },
        "drivetrain": {
            "gear_ratios": car["gears"],
            "final_drive_ratio": car["final_drive"],
            "efficiency": car["efficiency"],
            "tire": {"diameter": from_si(car["diameter_m"], Quantity.LENGTH, system)},
        },
    }


@settings(max_examples=max(EXAMPLES // 2, 1), derandomize=True, database=None, deadline=None)
@given(cars())
def test_shift_plan_is_the_same_in_us_and_metric_units(
    api: ApiClient, car: dict[str, Any]
) -> None:
    metric = api.post("/v1/shift-plan", json=_request(car, UnitSystem.METRIC))
    us = api.post("/v1/shift-plan", json=_request(car, UnitSystem.US))
    assert metric.status_code == us.status_code == 200, (metric.text, us.text)
    m, u = metric.json(), us.json()
    assert [s["reason"] for s in m["shifts"]] == [s["reason"] for s in u["shifts"]]

    def column(doc: dict[str, Any], key: str) -> Any:
        return np.array([s[key] for s in doc["shifts"]], dtype=float)

    def us_from_metric(values: Any, quantity: Quantity) -> Any:
        return from_si(to_si(values, quantity, UnitSystem.METRIC), quantity, UnitSystem.US)

    # responses are rounded (rpm 0.1, speed 0.01, force 0.1), hence the absolute tolerances
    assert_allclose(column(u, "shift_rpm"), column(m, "shift_rpm"), rtol=1e-6, atol=0.11)
    assert_allclose(column(u, "rpm_after"), column(m, "rpm_after"), rtol=1e-6, atol=0.11)
    speed = us_from_metric(column(m, "shift_speed"), Quantity.SPEED)
    assert_allclose(column(u, "shift_speed"), speed, rtol=1e-6, atol=0.02)
    force = us_from_metric(column(m, "force_before"), Quantity.FORCE)
    assert_allclose(column(u, "force_before"), force, rtol=1e-6, atol=0.1)
    top_m = np.array([g["max_speed"] for g in m["gears"]])
    top_u = np.array([g["max_speed"] for g in u["gears"]])
    assert_allclose(top_u, us_from_metric(top_m, Quantity.SPEED), rtol=1e-6, atol=0.02)
