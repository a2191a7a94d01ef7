"""Tests of core.runs.performance: top speed, cruise rpm, gradeability, net-acceleration shifts
and time-optimal shift rpms, against closed forms where one exists.

Every car here is invented demo data.
"""

from __future__ import annotations

import itertools
import math

import numpy as np
import pytest
from numpy.testing import assert_allclose

from core.car.road_load import RoadLoad
from core.car.traction import AxleGeometry, DriveLayout
from core.car.vehicle import Launch, RotatingInertia, Vehicle
from core.driveline.drivetrain import make_drivetrain
from core.driveline.tires import tire_from_diameter
from core.engine.curves import TorqueCurve, torque_curve_from_torque
from core.runs.drive_model import DriveModel, drive_model
from core.runs.milestones import time_at_distance, time_at_speed
from core.runs.performance import (
    ShiftCriterion,
    acceleration_shift_points,
    acceleration_shifts,
    cruise_rpm,
    gradeability_by_gear,
    optimal_shift_rpm,
    planned_shift_rpm,
    top_speed,
)
from core.runs.simulate import simulate_run
from core.shifts.best import ShiftReason
from core.shifts.plan import shift_plan
from core.shifts.search import search_shift_rpm

G = 9.80665  # standard gravity [m/s^2], scipy.constants.g
GEOMETRY = AxleGeometry(2.6, 0.5, 1.3)
TIRE_26_IN = tire_from_diameter(26.0 * 0.0254)
FLAT_TORQUE_NM = 300.0
QUARTER_MILE_M = 402.336


def flat_curve() -> TorqueCurve:
    return torque_curve_from_torque([1000.0, 4000.0, 7000.0], [FLAT_TORQUE_NM] * 3)


def coast_down_car(
    f0_n: float,
    f2_n_s2_m2: float,
    *,
    mass_kg: float = 1200.0,
    grade_percent: float = 0.0,
    inertia: RotatingInertia | None = None,
) -> Vehicle:
    """A car with coast-down road load F0 + F2*v^2 and grip that never limits (mu 5, rear
    drive: only front-wheel lift, 2.6 W, caps it)."""
    load = RoadLoad.from_coast_down(mass_kg, f0_n, 0.0, f2_n_s2_m2, grade_percent)
    return Vehicle(mass_kg, load, GEOMETRY, DriveLayout.REAR, 5.0, inertia=inertia)


def flat_model(
    vehicle: Vehicle, gear_ratios: list[float], *, efficiency: float = 1.0
) -> DriveModel:
    drivetrain = make_drivetrain(gear_ratios, 3.0, efficiency=efficiency)
    return drive_model(flat_curve(), drivetrain, TIRE_26_IN, vehicle, Launch())


# --- top speed -------------------------------------------------------------------------


def test_drag_limited_top_speed_is_the_root_of_force_equals_road_load() -> None:
    # closed form: with constant drive force F in top gear, F = F0 + F2*v^2 at
    # v = sqrt((F - F0)/F2); F = T*Ntf/r (efficiency 1)
    f0, f2 = 150.0, 0.5
    model = flat_model(coast_down_car(f0, f2), [3.0, 2.0, 1.0])
    force = FLAT_TORQUE_NM * 3.0 / TIRE_26_IN.rolling_radius_m
    expected = math.sqrt((force - f0) / f2)
    assert expected < model.speed_at_rpm(2, model.rev_limit_rpm)  # drag comes first
    top = top_speed(model)
    assert top.limited_by == "drag"
    assert top.gear == 3
    assert_allclose(top.speed_m_s, expected, rtol=1e-4)
    assert_allclose(top.by_gear_m_s[2], expected, rtol=1e-4)
    # the lower gears run out of revs first
    lower = [model.speed_at_rpm(g, model.rev_limit_rpm) for g in (0, 1)]
    assert_allclose(top.by_gear_m_s[:2], lower, rtol=1e-12)


def test_top_gear_that_reaches_the_rev_limit_before_drag_reports_rev_limit() -> None:
    model = flat_model(coast_down_car(0.0, 0.1), [3.0, 2.0, 1.5])
    force = FLAT_TORQUE_NM * 4.5 / TIRE_26_IN.rolling_radius_m
    assert math.sqrt(force / 0.1) > model.speed_at_rpm(2, model.rev_limit_rpm)
    top = top_speed(model)
    assert top.limited_by == "rev_limit"
    assert top.gear == 3
    assert_allclose(top.speed_m_s, model.speed_at_rpm(2, 7000.0), rtol=1e-12)


def test_top_speed_agrees_with_the_speed_a_run_settles_at() -> None:
    # simulate_run approaches the speed where the net acceleration falls to zero (found by
    # root finding on the force balance), the balance top_speed finds; the trace itself
    # stays below it
    model = flat_model(coast_down_car(150.0, 0.5), [3.0, 2.0, 1.0])
    run = simulate_run(model, [7000.0, 7000.0], cover_distance_m=4000.0)
    assert run.held_by == "drag"
    assert run.held_speed_m_s is not None
    top = top_speed(model)
    assert np.all(run.speed_m_s < run.held_speed_m_s)
    assert_allclose(run.held_speed_m_s, top.speed_m_s, rtol=1e-4)


def test_top_speed_counts_a_gear_that_is_weak_only_at_the_bottom_of_its_curve() -> None:
    # an invented peaky curve: 20 N*m at 2000 rpm, 300 N*m from 4000 rpm on. In top gear
    # (Ntf 3, r 0.3 m) the car pushes only 200 N at 2000 rpm against F0 = 250 N, but 3000 N
    # from 4000 rpm, so it holds sqrt((3000 - 250)/0.55) = 70.7 m/s (closed form as above),
    # below the 73.3 m/s of the rev limit; a simulated run gets there
    curve = torque_curve_from_torque([2000.0, 3000.0, 4000.0, 7000.0], [20, 150, 300, 300.0])
    f0, f2 = 250.0, 0.55
    vehicle = coast_down_car(f0, f2, inertia=RotatingInertia(0.0, 0.0, 0.0))
    drivetrain = make_drivetrain([3.0, 2.0, 1.0], 3.0)
    model = drive_model(curve, drivetrain, tire_from_diameter(0.6), vehicle, Launch())
    expected = math.sqrt((300.0 * 3.0 / 0.3 - f0) / f2)
    run = simulate_run(model, [7000.0, 7000.0], cover_distance_m=5000.0)
    assert run.held_speed_m_s is not None
    assert run.held_speed_m_s > 0.98 * expected
    top = top_speed(model)
    assert top.gear == 3
    assert top.limited_by == "drag"
    assert_allclose(top.speed_m_s, expected, rtol=1e-3)


# --- cruise rpm ------------------------------------------------------------------------


def test_cruise_rpm_matches_the_road_speed_formula_check_value() -> None:
    # REFERENCES.md (common practice): mph = rpm*tire_in/(overall*336.135), 336.135 =
    # 63360/(60*pi); 6000 rpm, 26 in tire, overall 3.0 -> 154.6996 mph (rounded, hence
    # rtol 1e-6)
    model = flat_model(coast_down_car(0.0, 0.0), [3.0, 2.0, 1.0])
    rpm = cruise_rpm(model, 154.6996 * 0.44704)
    assert rpm.shape == (3,)
    assert_allclose(rpm, [18000.0, 12000.0, 6000.0], rtol=1e-6)


@pytest.mark.parametrize(
    "mph",
    [
        pytest.param(30.0, id="30-mph"),
        pytest.param(70.0, id="70-mph"),
        pytest.param(120.0, id="120-mph"),
    ],
)
def test_cruise_rpm_inverts_the_road_speed_formula(mph: float) -> None:
    # REFERENCES.md (common practice): rpm = mph*overall*336.135/tire_in; 336.135 is
    # 63360/(60*pi) rounded to 6 digits, hence rtol 2e-6
    model = flat_model(coast_down_car(0.0, 0.0), [3.6, 2.2, 1.5, 1.1])
    expected = mph * model.drivetrain.overall_ratios * 336.135 / 26.0
    assert_allclose(cruise_rpm(model, mph * 0.44704), expected, rtol=2e-6)
    # the shop shortcut with 336 (common practice) is within 0.05 %
    assert_allclose(cruise_rpm(model, mph * 0.44704), expected * 336 / 336.135, rtol=5e-4)


# --- gradeability ----------------------------------------------------------------------


@pytest.mark.parametrize(
    ("f0_n", "grade_percent"),
    [
        pytest.param(0.0, 0.0, id="no-road-load"),
        pytest.param(180.0, 0.0, id="constant-rolling-force"),
        pytest.param(0.0, 8.0, id="grade-of-the-road-load-ignored"),
    ],
)
def test_gradeability_with_constant_spare_force_is_tan_of_asin(
    f0_n: float, grade_percent: float
) -> None:
    # closed form: a constant spare force F - F0 holds speed on the grade where
    # m*g*sin(theta) = F - F0, grade % = 100*tan(asin((F - F0)/(m*g))) (REFERENCES.md:
    # grade % = 100*tan(theta)); the road load's own grade term is not counted against it
    m = 1200.0
    vehicle = coast_down_car(f0_n, 0.0, mass_kg=m, grade_percent=grade_percent)
    model = flat_model(vehicle, [3.0, 2.0, 1.0], efficiency=0.9)
    force = FLAT_TORQUE_NM * np.array([9.0, 6.0, 3.0]) * 0.9 / TIRE_26_IN.rolling_radius_m
    assert np.all(force - f0_n < m * G)
    expected = 100.0 * np.tan(np.arcsin((force - f0_n) / (m * G)))
    assert_allclose(gradeability_by_gear(model), expected, rtol=1e-12)


# --- net-acceleration shifts -----------------------------------------------------------

T0, C = 520.0, 0.06  # T = T0 - C*n [N*m], invented linear curve
RATIOS = [3.6, 2.4, 1.7, 1.3]


def linear_model(vehicle: Vehicle) -> DriveModel:
    rpm = np.linspace(1000.0, 7000.0, 13)
    curve = torque_curve_from_torque(rpm, T0 - C * rpm)
    return drive_model(curve, make_drivetrain(RATIOS, 3.42), TIRE_26_IN, vehicle, Launch())


def test_net_acceleration_shifts_without_inertia_or_road_load_are_the_force_crossover() -> None:
    # closed form (REFERENCES.md): for T = T0 - c*n the wheel forces of G1 > G2 cross at
    # n1 = (T0/c)*G1/(G1 + G2); with no rotating inertia and no road load the net
    # accelerations are the forces over one mass and cross there too. The crossing is
    # interpolated in a 1/512 scan cell, hence rtol 1e-3.
    model = linear_model(coast_down_car(0.0, 0.0, inertia=RotatingInertia(0.0, 0.0, 0.0)))
    expected = [T0 / C * a / (a + b) for a, b in itertools.pairwise(RATIOS)]
    choices = acceleration_shifts(model)
    assert all(c.reason is ShiftReason.CROSSOVER for c in choices)
    assert_allclose([c.shift_rpm for c in choices], expected, rtol=1e-3)


@pytest.mark.parametrize(
    "inertia",
    [
        pytest.param(RotatingInertia(0.25, 0.05, 4.0), id="inertia-data"),
        pytest.param(None, id="mass-factor"),
    ],
)
def test_net_acceleration_shifts_with_rotating_inertia_come_at_or_below_the_force_crossover(
    inertia: RotatingInertia | None,
) -> None:
    # Gillespie ch. 2: the lower gear carries the larger equivalent mass, so at the force
    # crossover its net acceleration (F - R)/m_g already trails the next gear's
    rpm = np.linspace(1000.0, 7000.0, 13)
    curve = torque_curve_from_torque(rpm, T0 - C * rpm)
    vehicle = Vehicle(
        1400.0,
        RoadLoad.from_constant_rolling(1400.0, 0.7, 1.2, 0.012),
        GEOMETRY,
        DriveLayout.REAR,
        1.5,
        inertia=inertia,
    )
    model = drive_model(curve, make_drivetrain(RATIOS, 3.42), TIRE_26_IN, vehicle, Launch())
    plan = shift_plan(curve, model.drivetrain, TIRE_26_IN)
    by_force = np.array([s.shift_rpm for s in plan.shifts])
    by_acceleration = np.array([c.shift_rpm for c in acceleration_shifts(model)])
    assert np.all(by_acceleration <= by_force * (1.0 + 1e-9))
    assert np.all(by_acceleration < by_force - 50.0)  # and visibly so with this much inertia


# --- time-optimal shifts ---------------------------------------------------------------


def _optimised_car() -> DriveModel:
    rpm = np.linspace(1000.0, 7000.0, 13)
    curve = torque_curve_from_torque(rpm, 520.0 - 0.04 * rpm)
    vehicle = Vehicle(
        1400.0,
        RoadLoad.from_constant_rolling(1400.0, 0.7, 1.2, 0.012),
        GEOMETRY,
        DriveLayout.REAR,
        1.2,
    )
    launch = Launch(launch_rpm=3000.0, shift_time_s=0.3)
    return drive_model(curve, make_drivetrain([3.0, 2.0, 1.5], 3.5), TIRE_26_IN, vehicle, launch)


@pytest.mark.parametrize(
    "initial",
    [
        pytest.param([7000.0, 7000.0], id="at-rev-limit"),
        pytest.param([5000.0, 5000.0], id="early"),
        pytest.param([6500.0, 4500.0], id="mixed"),
    ],
)
def test_optimal_shift_rpm_never_returns_a_time_above_its_baseline(initial: list[float]) -> None:
    model = _optimised_car()
    rollout = 0.29
    best = optimal_shift_rpm(
        model,
        np.array(initial),
        start_speed_m_s=0.0,
        rollout_m=rollout,
        finish_distance_m=QUARTER_MILE_M,
        finish_speed_m_s=None,
        max_evaluations=40,
    )
    assert best.time_s <= best.baseline_time_s
    assert np.all(best.shift_rpm <= model.rev_limit_rpm)
    assert best.evaluations >= 1
    # the time reported is the time of a run with the shift rpms returned
    run = simulate_run(model, best.shift_rpm, cover_distance_m=QUARTER_MILE_M + rollout)
    t_end = time_at_distance(run, QUARTER_MILE_M + rollout)
    t_start = time_at_distance(run, rollout)
    assert t_end is not None
    assert t_start is not None
    assert_allclose(best.time_s, t_end - t_start, rtol=1e-12)


def test_optimal_shift_rpm_to_a_speed_never_returns_a_time_above_its_baseline() -> None:
    model = _optimised_car()
    finish = 100.0 * 1000.0 / 3600.0  # 0-100 km/h
    best = optimal_shift_rpm(
        model,
        np.array([5000.0, 5000.0]),
        start_speed_m_s=0.0,
        rollout_m=0.0,
        finish_distance_m=None,
        finish_speed_m_s=finish,
        max_evaluations=40,
    )
    assert best.time_s <= best.baseline_time_s
    run = simulate_run(model, best.shift_rpm, cover_distance_m=0.0, cover_speed_m_s=finish)
    t_finish = time_at_speed(run, finish)
    assert t_finish is not None
    assert_allclose(best.time_s, t_finish, rtol=1e-12)


@pytest.mark.parametrize("criterion", list(ShiftCriterion), ids=lambda c: c.value)
def test_a_plan_named_after_its_criterion_seeds_the_search_as_that_plan_would(
    criterion: ShiftCriterion,
) -> None:
    # the caller's plan named after a criterion stands in for planning it again: the same
    # seeds (a seed equal to an earlier one is not run twice), the same answer
    model = _optimised_car()
    plan = planned_shift_rpm(model, criterion)
    named = optimal_shift_rpm(
        model,
        plan,
        start_speed_m_s=0.0,
        rollout_m=0.29,
        finish_distance_m=QUARTER_MILE_M,
        finish_speed_m_s=None,
        max_evaluations=40,
        initial_name=criterion.value,
    )
    seeds = [
        (criterion.value, plan),
        ("rev_limit", np.full(plan.size, model.rev_limit_rpm)),
        *((c.value, planned_shift_rpm(model, c)) for c in ShiftCriterion),
    ]
    planned = search_shift_rpm(
        model,
        seeds,
        start_speed_m_s=0.0,
        rollout_m=0.29,
        finish_distance_m=QUARTER_MILE_M,
        finish_speed_m_s=None,
        max_evaluations=40,
    )
    np.testing.assert_array_equal(named.shift_rpm, planned.shift_rpm)
    assert (named.time_s, named.baseline_time_s, named.evaluations) == (
        planned.time_s,
        planned.baseline_time_s,
        planned.evaluations,
    )
    assert (named.won_by, named.seeds) == (planned.won_by, planned.seeds)


def test_a_shift_forced_because_both_gears_are_on_grip_gets_its_own_reason() -> None:
    # Gillespie ch. 2: with both gears' drive force above the traction limit, each gear's net
    # acceleration is (F_traction - R)/m_g, so the gear with the smaller equivalent mass
    # (mass factor 1.04 + 0.0025*N^2, Gillespie) is quicker wherever it can run: the shift
    # comes where the next gear reaches the curve, reason traction_limit, not a crossover
    m = 1200.0
    load = RoadLoad.from_constant_rolling(m, 0.6, 1.2, 0.012)
    vehicle = Vehicle(m, load, GEOMETRY, DriveLayout.REAR, 0.3)
    model = flat_model(vehicle, [3.0, 2.0, 1.3])
    points = acceleration_shift_points(model)
    for p in points:
        assert p.reason is ShiftReason.TRACTION_LIMIT
        assert p.force_before_n > model.traction_limit_n
        assert p.force_after_n > model.traction_limit_n
        assert (p.crossings, p.overtake_rpm) == (0, ())
    # the next gear reaches the curve's first point (1000 rpm) at shift_rpm = 1000*G1/G2
    assert_allclose(points[0].shift_rpm, 1000.0 * 3.0 / 2.0, rtol=1e-9)
