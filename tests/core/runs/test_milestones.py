"""Tests of core.runs.milestones: strip timing of a run against the closed forms of uniform
acceleration, the drag-strip conventions, and an empirical sanity band for a whole car.

Every car here is invented demo data.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from numpy.testing import assert_allclose
from scipy import constants

from core.car.road_load import RoadLoad
from core.car.traction import AxleGeometry, DriveLayout
from core.car.vehicle import Launch, RotatingInertia, Vehicle
from core.driveline.drivetrain import make_drivetrain
from core.driveline.tires import tire_from_diameter, tire_from_size
from core.engine.curves import torque_curve_from_torque
from core.runs.batch_timing import TRAP_WINDOW_M
from core.runs.drive_model import drive_model
from core.runs.milestones import (
    STANDARD_DISTANCES,
    STANDARD_SPEEDS,
    speed_at_distance,
    time_at_distance,
    time_at_speed,
    timed_distance,
    timed_speed,
)
from core.runs.simulate import RunResult, simulate_run
from core.shifts.plan import shift_plan
from core.units import FOOT_M

MPH = constants.mile / constants.hour  # 0.44704 m/s
ROLLOUT_M = 0.29  # about 11.5 in (common practice: roughly a foot, tire-dependent)
QUARTER_MILE_M = 1320.0 * FOOT_M
ACCEL = 5.0  # [m/s^2]
# The clock takes the acceleration as constant between trace points, which is exact here
# (closed form: uniform acceleration), so only rounding is left.
TIMING_RTOL = 1e-9


def reached(value: float | None) -> float:
    """A milestone the run must have reached (None means it did not)."""
    assert value is not None
    return value


def uniform_acceleration_run(*, start_speed_m_s: float = 0.0) -> RunResult:
    """A car with constant acceleration ACCEL: constant force (flat torque, clutch launch
    inside the curve), no road load, no rotating inertia, grip that never limits. One gear
    with its rev limit at 73.3 m/s, above the quarter-mile speed of 63.5 m/s."""
    mass_kg, ratio = 1000.0, 3.0
    tire = tire_from_diameter(0.6)
    torque_nm = ACCEL * mass_kg * tire.rolling_radius_m / ratio
    curve = torque_curve_from_torque([1000.0, 4000.0, 7000.0], [torque_nm] * 3)
    vehicle = Vehicle(
        mass_kg,
        RoadLoad.from_coast_down(mass_kg, 0.0, 0.0, 0.0),
        AxleGeometry(2.6, 0.5, 1.3),
        DriveLayout.REAR,
        5.0,
        inertia=RotatingInertia(0.0, 0.0, 0.0),
    )
    model = drive_model(
        curve, make_drivetrain([1.0], ratio), tire, vehicle, Launch(launch_rpm=2000.0)
    )
    return simulate_run(
        model, [], start_speed_m_s=start_speed_m_s, cover_distance_m=QUARTER_MILE_M + 1.0
    )


def t_uniform(distance_m: float) -> float:
    """Time to cover ``distance_m`` from rest at ACCEL, t = sqrt(2x/a) [s]."""
    return math.sqrt(2.0 * distance_m / ACCEL)


@pytest.fixture(scope="module")
def run() -> RunResult:
    return uniform_acceleration_run()


def test_the_uniform_acceleration_trace_is_exact(run: RunResult) -> None:
    # closed form (Newton's second law, constant force): v = a*t, x = a*t^2/2 at every point
    assert_allclose(run.acceleration_m_s2[:-1], ACCEL, rtol=1e-12)
    assert_allclose(run.speed_m_s[:-1], ACCEL * run.time_s[:-1], rtol=1e-12)
    assert_allclose(run.distance_m[:-1], 0.5 * ACCEL * run.time_s[:-1] ** 2, rtol=1e-12)


def test_strip_distances_and_trap_window_follow_the_timing_conventions() -> None:
    # common practice: timers at 60, 330, 660 (1/8 mile), 1000 and 1320 ft (1/4 mile); trap
    # speed over the last 66 ft (1254-1320 ft, 594-660 ft); 1 ft = 0.3048 m exactly
    names = {name: (d, trap) for name, d, trap in STANDARD_DISTANCES}
    assert_allclose(names["60 ft"][0], 18.288, rtol=1e-15)
    assert_allclose(names["1/8 mile"][0], 201.168, rtol=1e-15)
    assert_allclose(names["1/4 mile"][0], constants.mile / 4.0, rtol=1e-15)
    assert [n for n, (_, trap) in names.items() if trap] == ["1/8 mile", "1/4 mile"]
    assert_allclose(TRAP_WINDOW_M, 66.0 * 0.3048, rtol=1e-15)
    speeds = {name: to for name, _, to in STANDARD_SPEEDS}
    assert_allclose(speeds["0-60 mph"], 26.8224, rtol=1e-15)
    assert_allclose(speeds["0-100 km/h"], 100.0 / 3.6, rtol=1e-15)


@pytest.mark.parametrize(
    ("name", "distance_ft"),
    [
        pytest.param("60 ft", 60.0, id="60-ft"),
        pytest.param("330 ft", 330.0, id="330-ft"),
        pytest.param("1/8 mile", 660.0, id="eighth-mile"),
        pytest.param("1000 ft", 1000.0, id="1000-ft"),
        pytest.param("1/4 mile", 1320.0, id="quarter-mile"),
    ],
)
def test_elapsed_time_after_rollout_matches_uniform_acceleration(
    run: RunResult, name: str, distance_ft: float
) -> None:
    # closed form (Newton's second law, constant a): the clock starts once the car has
    # rolled r (common practice), so ET over D is sqrt(2(D + r)/a) - sqrt(2r/a), and the
    # car crosses the line at sqrt(2a(D + r))
    d = distance_ft * FOOT_M
    timed = timed_distance(run, name, d, rollout_m=ROLLOUT_M, trap=False)
    assert timed.name == name
    assert timed.elapsed_s is not None
    assert_allclose(timed.elapsed_s, t_uniform(d + ROLLOUT_M) - t_uniform(ROLLOUT_M), TIMING_RTOL)
    assert_allclose(reached(timed.speed_m_s), math.sqrt(2.0 * ACCEL * (d + ROLLOUT_M)), rtol=1e-9)
    assert timed.trap_speed_m_s is None  # not asked for


@pytest.mark.parametrize(
    "distance_ft",
    [
        pytest.param(660.0, id="eighth-mile"),
        pytest.param(1320.0, id="quarter-mile"),
    ],
)
def test_trap_speed_is_the_average_over_the_last_66_ft(run: RunResult, distance_ft: float) -> None:
    # common practice: trap speed = 66 ft / (t(1320 ft) - t(1254 ft)) on the quarter mile
    # (594-660 ft on the eighth), timed from the rollout; times from the closed form t(x)
    d = distance_ft * FOOT_M
    timed = timed_distance(run, "trap", d, rollout_m=ROLLOUT_M, trap=True)
    window = 66.0 * FOOT_M
    expected = window / (t_uniform(d + ROLLOUT_M) - t_uniform(d + ROLLOUT_M - window))
    assert timed.trap_speed_m_s is not None
    assert_allclose(timed.trap_speed_m_s, expected, rtol=TIMING_RTOL)
    # the average over the window lies just below the speed at the line
    assert timed.speed_m_s is not None
    assert timed.trap_speed_m_s < timed.speed_m_s


def test_no_trap_speed_over_a_distance_shorter_than_the_trap_window(run: RunResult) -> None:
    timed = timed_distance(run, "60 ft", 60.0 * FOOT_M, rollout_m=ROLLOUT_M, trap=True)
    assert timed.elapsed_s is not None
    assert timed.trap_speed_m_s is None


def test_zero_to_sixty_mph_is_the_speed_over_the_acceleration(run: RunResult) -> None:
    # closed form: t = v/a with 60 mph = 26.8224 m/s (exact); less rollout subtracts the
    # time to roll r, sqrt(2r/a) (common practice for published 0-60 figures)
    timed = timed_speed(run, "0-60 mph", 0.0, 60.0 * MPH, rollout_m=ROLLOUT_M)
    assert timed.elapsed_s is not None
    assert timed.less_rollout_s is not None
    assert_allclose(timed.elapsed_s, 26.8224 / ACCEL, rtol=1e-12)
    assert_allclose(
        reached(timed.less_rollout_s), 26.8224 / ACCEL - t_uniform(ROLLOUT_M), TIMING_RTOL
    )
    assert_allclose(reached(time_at_speed(run, 26.8224)), 26.8224 / ACCEL, rtol=1e-12)


def test_speed_to_speed_time_is_the_speed_gain_over_the_acceleration(run: RunResult) -> None:
    # closed form: t = (v2 - v1)/a; no rollout applies between two speeds
    timed = timed_speed(run, "30-60 mph", 30.0 * MPH, 60.0 * MPH, rollout_m=ROLLOUT_M)
    assert timed.elapsed_s is not None
    assert_allclose(timed.elapsed_s, 30.0 * MPH / ACCEL, rtol=1e-12)
    assert timed.less_rollout_s is None


def test_time_and_speed_at_a_distance_follow_uniform_acceleration(run: RunResult) -> None:
    # closed form: t = sqrt(2x/a), v = sqrt(2ax), timed from the first motion
    for x in (10.0, 100.0, 400.0):
        assert_allclose(reached(time_at_distance(run, x)), t_uniform(x), rtol=1e-9)
        assert_allclose(reached(speed_at_distance(run, x)), math.sqrt(2.0 * ACCEL * x), rtol=1e-9)


def test_distances_and_speeds_the_run_never_reaches_give_none(run: RunResult) -> None:
    assert time_at_distance(run, 1000.0) is None
    assert speed_at_distance(run, 1000.0) is None
    assert time_at_distance(run, -1.0) is None
    assert time_at_speed(run, 80.0) is None  # above the rev-limit speed, 73.3 m/s
    far = timed_distance(run, "1000 m", 1000.0, rollout_m=ROLLOUT_M, trap=True)
    assert (far.elapsed_s, far.speed_m_s, far.trap_speed_m_s) == (None, None, None)
    fast = timed_speed(run, "0-180 mph", 0.0, 180.0 * MPH, rollout_m=ROLLOUT_M)
    assert (fast.elapsed_s, fast.less_rollout_s) == (None, None)


def test_rolling_start_above_the_from_speed_gives_none() -> None:
    rolling = uniform_acceleration_run(start_speed_m_s=20.0)
    from_rest = timed_speed(rolling, "0-60 mph", 0.0, 60.0 * MPH, rollout_m=0.0)
    assert (from_rest.elapsed_s, from_rest.less_rollout_s) == (None, None)
    from_40 = timed_speed(rolling, "40-60 mph", 40.0 * MPH, 60.0 * MPH, rollout_m=0.0)
    assert from_40.elapsed_s is None


def test_rolling_start_times_from_its_start_speed_without_rollout() -> None:
    # closed form: t = (v2 - v1)/a from the first point at or above v1
    rolling = uniform_acceleration_run(start_speed_m_s=20.0)
    timed = timed_speed(rolling, "50-80 mph", 50.0 * MPH, 80.0 * MPH, rollout_m=0.0)
    assert timed.elapsed_s is not None
    assert_allclose(timed.elapsed_s, 30.0 * MPH / ACCEL, rtol=1e-12)
    assert timed.less_rollout_s is None
    assert_allclose(reached(time_at_speed(rolling, 10.0)), 0.0, atol=0)  # already going faster


# --- empirical sanity band for a whole car ---------------------------------------------


def sedan_quarter_mile() -> tuple[float, float, float, float]:
    """ET [s] and trap [mph] of an invented plain sedan, with its weight [lb] and peak
    power [hp]: 1500 kg, about 146 kW, six gears, Cd*A 0.65 m^2, rolling 0.012, mu 0.9,
    front drive, mass factor for the rotating parts, 0.25 s shifts from the shift plan."""
    mass_kg = 1500.0
    rpm = np.arange(1000.0, 6501.0, 500.0)
    torque = np.array([170, 205, 235, 250, 258, 260, 258, 254, 250, 243, 232, 210.0])
    curve = torque_curve_from_torque(rpm, torque)
    drivetrain = make_drivetrain([3.6, 2.2, 1.5, 1.15, 0.92, 0.78], 3.7, efficiency=0.9)
    tire = tire_from_size("225/45R17", rolling_factor=0.97)
    vehicle = Vehicle(
        mass_kg,
        RoadLoad.from_constant_rolling(mass_kg, 0.65, 1.2, 0.012),
        AxleGeometry.from_front_weight_share(2.7, 0.55, 0.6),
        DriveLayout.FRONT,
        0.9,
    )
    model = drive_model(
        curve, drivetrain, tire, vehicle, Launch(launch_rpm=2500.0, shift_time_s=0.25)
    )
    plan = shift_plan(curve, drivetrain, tire)
    run = simulate_run(
        model, [s.shift_rpm for s in plan.shifts], cover_distance_m=QUARTER_MILE_M + ROLLOUT_M
    )
    timed = timed_distance(run, "1/4 mile", QUARTER_MILE_M, rollout_m=ROLLOUT_M, trap=True)
    assert timed.elapsed_s is not None
    assert timed.trap_speed_m_s is not None
    peak_w = float(curve.power_at(np.linspace(1000.0, 6500.0, 2001)).max())
    return (
        timed.elapsed_s,
        timed.trap_speed_m_s / MPH,
        mass_kg / constants.pound,
        peak_w / constants.hp,
    )


@pytest.mark.parametrize(
    ("et_constant", "trap_constant"),
    [
        pytest.param(6.290, 224.0, id="huntington-1958"),
        pytest.param(6.269, 230.0, id="fox-1973"),
    ],
)
def test_sedan_quarter_mile_lands_near_the_empirical_weight_to_power_estimates(
    et_constant: float, trap_constant: float
) -> None:
    # Empirical estimates from weight W [lb] and power P [hp]: ET = c1*(W/P)^(1/3), trap =
    # c2*(P/W)^(1/3), with c1, c2 = 6.290, 224 (R. Huntington, 1958) or 6.269, 230 (Fox,
    # Am. J. Phys., 1973), per REFERENCES.md. They are good to several per cent at best,
    # so this is a loose sanity band of 10 %, not a check of the integration.
    et, trap, weight_lb, power_hp = sedan_quarter_mile()
    assert_allclose(et, et_constant * (weight_lb / power_hp) ** (1.0 / 3.0), rtol=0.10)
    assert_allclose(trap, trap_constant * (power_hp / weight_lb) ** (1.0 / 3.0), rtol=0.10)
