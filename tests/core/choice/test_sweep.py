"""Tests of the final-drive sweep: the batched runs against the one-car model candidate by
candidate, closed forms (landing rpm, crossover, cruise rpm, the cruise-target optimum),
ranking, constraints and the errors a sweep raises.

Every car here is invented demo data.
"""

from __future__ import annotations

import dataclasses
import itertools

import numpy as np
import pytest
from numpy.testing import assert_allclose

from core.car.road_load import RoadLoad
from core.car.traction import AxleGeometry, DriveLayout
from core.car.vehicle import Coupling, Launch, RotatingInertia, Vehicle
from core.choice.batch_drive import batch_top_speed, candidate_masses
from core.choice.sweep import FinalDriveSweep, sweep_final_drives
from core.choice.sweep_spec import (
    CruiseTarget,
    Rejection,
    SweepConstraints,
    SweepObjective,
    final_drive_range,
)
from core.converter.tables import TorqueConverter
from core.driveline.drivetrain import Drivetrain, make_drivetrain
from core.driveline.tires import tire_from_diameter
from core.engine.curves import Interpolation, TorqueCurve, torque_curve_from_torque
from core.errors import DrivetrainError, SimulationError
from core.runs.batch import batch_runs
from core.runs.drive_model import DriveModel, drive_model
from core.runs.milestones import STANDARD_DISTANCES, STANDARD_SPEEDS
from core.runs.performance import top_speed
from core.runs.report import run_report
from core.runs.simulate import simulate_run
from core.shifts.plan import shift_plan

INCH_M = 0.0254
MPH = 0.44704
BATCH_RTOL = 1e-9  # the batched runs agree with the one-car runs to rounding
CURVE = torque_curve_from_torque(
    [1000, 2000, 3000, 4000, 5000, 6000, 6800],
    [220, 260, 290, 305, 300, 275, 240],
)
GEARS = [3.36, 2.07, 1.43, 1.0, 0.84, 0.56]
TIRE = tire_from_diameter(26.0 * INCH_M, rolling_factor=0.98)
GEOMETRY = AxleGeometry.from_front_weight_share(2.7, 0.52, 0.54)


def car(
    *,
    mass_kg: float = 1600.0,
    grade_percent: float = 0.0,
    friction: float = 1.0,
    inertia: RotatingInertia | None = None,
    drag_area_m2: float = 0.65,
) -> Vehicle:
    """An invented rear-drive coupe."""
    load = RoadLoad.from_constant_rolling(mass_kg, drag_area_m2, 1.2, 0.012, grade_percent)
    return Vehicle(mass_kg, load, GEOMETRY, DriveLayout.REAR, friction, inertia=inertia)


CONVERTER = TorqueConverter.from_stall(2.1, stall_k_factor=130.0, lockup=False)
LAUNCHES = [
    pytest.param(Launch(launch_rpm=3200.0, shift_time_s=0.3), car(), id="clutch"),
    pytest.param(
        Launch(Coupling.CONVERTER, converter=CONVERTER, lockup_gears=frozenset({3, 4, 5, 6})),
        car(inertia=RotatingInertia(0.3, 0.03, 5.0)),
        id="converter-lockup",
    ),
    pytest.param(
        Launch(launch_rpm=2500.0, shift_time_s=0.0), car(friction=0.6), id="no-shift-time"
    ),
    pytest.param(Launch(), car(drag_area_m2=2.5), id="drag-held"),
]
CANDIDATES = np.array([1.8, 2.6, 3.08, 3.42, 3.73, 4.1, 4.56, 5.38, 6.5, 8.0])


def model_with(
    final: float, vehicle: Vehicle, launch: Launch, gears: list[float] = GEARS
) -> DriveModel:
    return drive_model(
        CURVE, make_drivetrain(gears, final, efficiency=0.88), TIRE, vehicle, launch
    )


def crossover_rpm(model: DriveModel) -> np.ndarray:
    plan = shift_plan(model.curve, model.drivetrain, model.tire, rev_limit_rpm=model.rev_limit_rpm)
    return np.array([s.shift_rpm for s in plan.shifts])


@pytest.mark.parametrize(("launch", "vehicle"), LAUNCHES)
def test_batched_runs_equal_the_one_car_report_candidate_by_candidate(
    launch: Launch, vehicle: Vehicle
) -> None:
    base = model_with(3.55, vehicle, launch)
    shifts = crossover_rpm(base)
    runs = batch_runs(
        base, CANDIDATES, shifts, distances=STANDARD_DISTANCES, speeds=STANDARD_SPEEDS
    )
    top = batch_top_speed(base, CANDIDATES)
    for c, f in enumerate(CANDIDATES.tolist()):
        report = run_report(model_with(f, vehicle, launch), shifts)
        for batched, one in zip(runs.distances, report.distances, strict=True):
            for got, want in (
                (batched.elapsed_s[c], one.elapsed_s),
                (batched.speed_m_s[c], one.speed_m_s),
                (batched.trap_speed_m_s[c], one.trap_speed_m_s),
            ):
                if want is None:
                    assert np.isnan(got), (f, one.name)
                else:
                    assert_allclose(got, want, rtol=BATCH_RTOL, err_msg=f"{f} {one.name}")
        for batched_s, one_s in zip(runs.speeds, report.speeds, strict=True):
            for got, want in (
                (batched_s.elapsed_s[c], one_s.elapsed_s),
                (batched_s.less_rollout_s[c], one_s.less_rollout_s),
            ):
                if want is None:
                    assert np.isnan(got), (f, one_s.name)
                else:
                    assert_allclose(got, want, rtol=BATCH_RTOL, err_msg=f"{f} {one_s.name}")
        made = report.run.shifts
        assert_allclose(runs.rpm_after[c, : len(made)], [s.rpm_after for s in made], rtol=1e-12)
        assert np.all(np.isnan(runs.rpm_after[c, len(made) :]))
        assert_allclose(top.speed_m_s[c], report.top.speed_m_s, rtol=BATCH_RTOL)
        assert (int(top.gear[c]), top.limited_by[c]) == (report.top.gear, report.top.limited_by)
        assert runs.held_by[c] == report.run.held_by


def test_batched_quarter_mile_matches_a_plain_run_to_the_quarter_mile() -> None:
    # the acceptance check of the sweep: quarter-mile ET to 1e-6 relative or better
    launch, vehicle = Launch(launch_rpm=3000.0), car()
    base = model_with(3.55, vehicle, launch)
    shifts = crossover_rpm(base)
    quarter = [d for d in STANDARD_DISTANCES if d[0] == "1/4 mile"]
    runs = batch_runs(base, CANDIDATES, shifts, distances=quarter)
    for c, f in enumerate(CANDIDATES.tolist()):
        one = report_quarter(model_with(f, vehicle, launch), shifts)
        assert_allclose(runs.distances[0].elapsed_s[c], one, rtol=1e-6)


def report_quarter(model: DriveModel, shifts: np.ndarray) -> float:
    elapsed = run_report(model, shifts).finish.elapsed_s
    assert elapsed is not None
    return elapsed


def test_gear_entered_above_its_shift_speed_is_left_at_once_as_in_the_one_car_run() -> None:
    # a low second-gear shift rpm: third is entered above its own shift speed
    launch, vehicle = Launch(launch_rpm=2500.0), car()
    base = model_with(3.55, vehicle, launch)
    shifts = np.array([6500.0, 6500.0, 3000.0, 6500.0, 6500.0])
    runs = batch_runs(base, CANDIDATES[:4], shifts, distances=STANDARD_DISTANCES)
    assert np.any(runs.gears_left_at_once >= 1)
    for c, f in enumerate(CANDIDATES[:4].tolist()):
        want = report_quarter(model_with(f, vehicle, launch), shifts)
        assert_allclose(runs.distance("1/4 mile").elapsed_s[c], want, rtol=BATCH_RTOL)


def test_candidate_that_cannot_move_off_is_flagged_where_one_run_raises() -> None:
    # on a 30 % grade a tall axle cannot start; a short one can
    vehicle, launch = car(grade_percent=30.0), Launch(launch_rpm=4000.0)
    base = model_with(3.55, vehicle, launch)
    shifts = crossover_rpm(base)
    ratios = np.array([0.4, 6.0])
    runs = batch_runs(base, ratios, shifts, distances=STANDARD_DISTANCES[:1])
    assert runs.moved.tolist() == [False, True]
    assert np.isnan(runs.distances[0].elapsed_s[0]) and np.isfinite(runs.distances[0].elapsed_s[1])
    with pytest.raises(SimulationError, match="cannot move off"):
        simulate_run(model_with(0.4, vehicle, launch), shifts, cover_distance_m=20.0)


@pytest.mark.parametrize(
    "inertia",
    [
        pytest.param(None, id="mass-factor"),
        pytest.param(RotatingInertia(0.25, 0.04, 6.0), id="inertias"),
    ],
)
def test_candidate_masses_equal_the_vehicle_methods(inertia: RotatingInertia | None) -> None:
    vehicle = car(inertia=inertia)
    base = model_with(3.55, vehicle, Launch())
    effective, decoupled = candidate_masses(base, CANDIDATES)
    for c, f in enumerate(CANDIDATES.tolist()):
        dt = dataclasses.replace(base.drivetrain, final_drive_ratio=f)
        assert_allclose(effective[c], vehicle.effective_mass_kg(dt, TIRE), rtol=1e-13)
        assert_allclose(decoupled[c], vehicle.decoupled_mass_kg(dt, TIRE), rtol=1e-13)


def test_batched_top_speed_equals_the_one_car_top_speed_with_a_weak_overdrive() -> None:
    # a heavy drag area: the tall top gears top out on drag, the short ones at the limiter
    vehicle = car(drag_area_m2=3.0)
    base = model_with(3.55, vehicle, Launch())
    top = batch_top_speed(base, CANDIDATES)
    for c, f in enumerate(CANDIDATES.tolist()):
        one = top_speed(model_with(f, vehicle, Launch()))
        assert_allclose(top.speed_m_s[c], one.speed_m_s, rtol=BATCH_RTOL)
        assert_allclose(top.by_gear_m_s[c], one.by_gear_m_s, rtol=BATCH_RTOL)
        assert top.limited_by[c] == one.limited_by


# --- closed forms -------------------------------------------------------------------------


def linear_curve() -> TorqueCurve:
    # T = 400 - 0.05 n, sampled linearly from 1000 to 7000 rpm
    return torque_curve_from_torque(
        [1000.0, 4000.0, 7000.0], [350.0, 200.0, 50.0], interpolation=Interpolation.LINEAR
    )


@pytest.mark.parametrize("final", [pytest.param(2.5, id="2.5"), pytest.param(4.3, id="4.3")])
def test_crossover_shift_and_landing_match_the_closed_form_for_any_final_drive(
    final: float,
) -> None:
    # closed form (REFERENCES.md): T = T0 - c*n between overall ratios G1 > G2 crosses at
    # n1 = (T0/c)*G1/(G1 + G2) and lands at n1*G2/G1; the final drive cancels
    gears = [3.0, 2.0, 1.5]
    dt = make_drivetrain(gears, 3.55)
    sweep = sweep_final_drives(
        linear_curve(),
        dt,
        TIRE,
        [final, final + 0.5],
        SweepObjective.CRUISE_RPM_TARGET,
        cruise_target=CruiseTarget(30.0, 3000.0),
    )
    t0_over_c = 400.0 / 0.05
    expected = [t0_over_c * a / (a + b) for a, b in itertools.pairwise(gears)]
    assert_allclose(sweep.shift_rpm, expected, rtol=1e-9)
    assert_allclose(
        sweep.landing_rpm, sweep.shift_rpm * np.array([2.0 / 3.0, 1.5 / 2.0]), rtol=1e-12
    )


def test_cruise_rpm_matches_the_336_formula() -> None:
    # common practice (REFERENCES.md): mph = rpm * D_in / (overall * 336.135), 336.135 =
    # 63360/(60*pi), so rpm = mph * overall * 336.135 / D_in
    tire = tire_from_diameter(26.0 * INCH_M)
    dt = make_drivetrain(GEARS, 3.73)
    sweep = sweep_final_drives(
        CURVE,
        dt,
        tire,
        CANDIDATES,
        SweepObjective.CRUISE_RPM_TARGET,
        cruise_target=CruiseTarget(70.0 * MPH, 2000.0),
    )
    expected = 70.0 * GEARS[-1] * CANDIDATES * (63360.0 / (60.0 * np.pi)) / 26.0
    assert_allclose(sweep.cruise_rpm, expected, rtol=1e-12)
    assert_allclose(sweep.objective_value, np.abs(expected - 2000.0), rtol=1e-12)


def test_cruise_target_optimum_is_the_closed_form_ratio() -> None:
    # closed form from the 336.135 formula: f = rpm * D_in / (mph * 336.135 * top_gear)
    tire = tire_from_diameter(28.0 * INCH_M)
    dt = make_drivetrain(GEARS, 3.73)
    ratios = final_drive_range(2.5, 5.0, 0.1)
    sweep = sweep_final_drives(
        CURVE,
        dt,
        tire,
        ratios,
        SweepObjective.CRUISE_RPM_TARGET,
        cruise_target=CruiseTarget(65.0 * MPH, 2100.0),
    )
    exact = 2100.0 * 28.0 / (65.0 * (63360.0 / (60.0 * np.pi)) * GEARS[-1])
    assert sweep.optimum is not None
    assert sweep.optimum.bounds[0] <= exact <= sweep.optimum.bounds[1]
    assert_allclose(sweep.optimum.final_drive_ratio, exact, atol=2e-3)
    assert abs(float(ratios[sweep.order[0]]) - exact) <= 0.05 + 1e-12


def test_final_drive_range_includes_both_ends() -> None:
    assert_allclose(
        final_drive_range(3.08, 4.56, 0.37), [3.08, 3.45, 3.82, 4.19, 4.56], rtol=1e-12
    )
    assert final_drive_range(3.5, 3.5, 0.1).tolist() == [3.5]


# --- ranking, constraints, optimum --------------------------------------------------------


def clutch_sweep(
    objective: SweepObjective,
    *,
    constraints: SweepConstraints | None = None,
    shift_rpm: list[float] | None = None,
) -> FinalDriveSweep:
    dt = make_drivetrain(GEARS, 3.55, efficiency=0.88)
    return sweep_final_drives(
        CURVE,
        dt,
        TIRE,
        final_drive_range(2.8, 4.6, 0.2),
        objective,
        vehicle=car(),
        launch=Launch(launch_rpm=3200.0),
        constraints=constraints,
        shift_rpm=shift_rpm,
    )


@pytest.mark.parametrize(
    ("objective", "descending"),
    [
        pytest.param(SweepObjective.QUARTER_MILE_ET, False, id="quarter"),
        pytest.param(SweepObjective.EIGHTH_MILE_ET, False, id="eighth"),
        pytest.param(SweepObjective.ZERO_TO_60_MPH, False, id="zero-to-60"),
        pytest.param(SweepObjective.ZERO_TO_100_KMH, False, id="zero-to-100"),
        pytest.param(SweepObjective.TOP_SPEED, True, id="top-speed"),
    ],
)
def test_candidates_are_ranked_by_the_objective(
    objective: SweepObjective, descending: bool
) -> None:
    sweep = clutch_sweep(objective)
    values = sweep.objective_value[sweep.order]
    assert np.all(np.diff(values) <= 0.0) if descending else np.all(np.diff(values) >= 0.0)
    assert sweep.rank[sweep.order[0]] == 1
    opt = sweep.optimum
    best = float(values[0])
    assert opt is not None
    assert opt.bounds[0] <= opt.final_drive_ratio <= opt.bounds[1]
    assert (opt.objective_value >= best) if descending else (opt.objective_value <= best)


def test_cruise_limit_rejects_the_short_ratios_and_the_best_passing_one_is_chosen() -> None:
    limits = SweepConstraints(max_cruise_rpm=2300.0, cruise_speed_m_s=120.0 / 3.6)
    sweep = clutch_sweep(SweepObjective.QUARTER_MILE_ET, constraints=limits)
    too_high = sweep.cruise_rpm > 2300.0
    assert too_high.any() and not too_high.all()
    for c, why in enumerate(sweep.rejections):
        assert (Rejection.CRUISE_RPM_TOO_HIGH in why) == bool(too_high[c])
    passing = [c for c in sweep.order.tolist() if not too_high[c]]
    assert sweep.best_index == passing[0]


def test_top_speed_and_landing_limits_reject_candidates() -> None:
    limits = SweepConstraints(min_top_speed_m_s=1000.0, min_rpm_after_shift=6000.0)
    sweep = clutch_sweep(SweepObjective.TOP_SPEED, constraints=limits)
    assert sweep.best_index is None
    for why in sweep.rejections:
        assert {Rejection.TOP_SPEED_TOO_LOW, Rejection.RPM_AFTER_SHIFT_TOO_LOW} <= set(why)


def test_callers_shift_rpms_are_used_for_every_candidate() -> None:
    sweep = clutch_sweep(SweepObjective.QUARTER_MILE_ET, shift_rpm=[6000.0] * 5)
    assert sweep.shift_rpm.tolist() == [6000.0] * 5
    assert sweep.runs is not None
    rpm_before = sweep.runs.rpm_before
    assert_allclose(rpm_before[np.isfinite(rpm_before)], 6000.0, rtol=1e-9)


# --- errors -------------------------------------------------------------------------------


def plain_drivetrain(gears: int = 6) -> Drivetrain:
    return make_drivetrain([3.0 - 0.2 * g for g in range(gears)], 3.55)


TARGET = CruiseTarget(30.0, 2500.0)


@pytest.mark.parametrize(
    ("ratios", "gears", "objective", "target", "limits", "shifts", "error", "match"),
    [
        pytest.param([], 6, None, TARGET, None, None, DrivetrainError, "one or more", id="none"),
        pytest.param(
            [3.0, -1.0], 6, None, TARGET, None, None, DrivetrainError, r"ratio\[1\]", id="negative"
        ),
        pytest.param(
            [3.5] * 201, 6, None, TARGET, None, None, DrivetrainError, "at most 200", id="too-many"
        ),
        pytest.param(
            [3.5] * 150, 12, None, TARGET, None, None, DrivetrainError, "1200", id="too-much-work"
        ),
        pytest.param(
            [3.5],
            6,
            SweepObjective.QUARTER_MILE_ET,
            TARGET,
            None,
            None,
            SimulationError,
            "vehicle",
            id="objective-needs-vehicle",
        ),
        pytest.param(
            [3.5], 6, None, None, None, None, SimulationError, "cruise_target", id="no-target"
        ),
        pytest.param(
            [3.5],
            6,
            None,
            TARGET,
            SweepConstraints(max_cruise_rpm=3000.0),
            None,
            SimulationError,
            "together",
            id="half-cruise-limit",
        ),
        pytest.param(
            [3.5],
            6,
            None,
            TARGET,
            SweepConstraints(min_rpm_after_shift=-5.0),
            None,
            SimulationError,
            "min_rpm_after_shift",
            id="negative-limit",
        ),
        pytest.param(
            [3.5],
            6,
            None,
            TARGET,
            SweepConstraints(min_top_speed_m_s=50.0),
            None,
            SimulationError,
            "vehicle",
            id="top-speed-limit-needs-vehicle",
        ),
        pytest.param(
            [3.5], 6, None, TARGET, None, [6000.0], SimulationError, "per gear change", id="count"
        ),
        pytest.param(
            [3.5], 6, None, TARGET, None, [9000.0] * 5, SimulationError, r"rpm\[0\]", id="above"
        ),
    ],
)
def test_bad_sweeps_are_rejected(
    ratios: list[float],
    gears: int,
    objective: SweepObjective | None,
    target: CruiseTarget | None,
    limits: SweepConstraints | None,
    shifts: list[float] | None,
    error: type[Exception],
    match: str,
) -> None:
    with pytest.raises(error, match=match):
        sweep_final_drives(
            CURVE,
            plain_drivetrain(gears),
            TIRE,
            ratios,
            objective or SweepObjective.CRUISE_RPM_TARGET,
            cruise_target=target,
            constraints=limits,
            shift_rpm=shifts,
        )


@pytest.mark.parametrize(
    ("low", "high", "step", "match"),
    [
        pytest.param(4.0, 3.0, 0.1, "`high`", id="reversed"),
        pytest.param(3.0, 4.0, 0.0, "`step`", id="zero-step"),
        pytest.param(2.0, 6.0, 0.01, "at most 200", id="too-many"),
        pytest.param(0.0, 4.0, 0.1, "final_drive_ratio", id="zero-low"),
    ],
)
def test_bad_ranges_are_rejected(low: float, high: float, step: float, match: str) -> None:
    with pytest.raises(DrivetrainError, match=match):
        final_drive_range(low, high, step)


@pytest.mark.parametrize(
    "launch", [LAUNCHES[0].values[0], LAUNCHES[1].values[0]], ids=["clutch", "converter"]
)
def test_optimum_value_equals_the_one_car_run_at_the_ratio_found(launch: Launch) -> None:
    # the optimum is searched with batches of runs; the one-car run at the ratio it found
    # times the quarter mile the same, to rounding
    dt = make_drivetrain(GEARS, 3.55, efficiency=0.88)
    vehicle = car(inertia=RotatingInertia(0.3, 0.03, 5.0))
    sweep = sweep_final_drives(
        CURVE,
        dt,
        TIRE,
        final_drive_range(2.8, 4.6, 0.2),
        SweepObjective.QUARTER_MILE_ET,
        vehicle=vehicle,
        launch=launch,
    )
    opt = sweep.optimum
    assert opt is not None
    assert opt.bounds[0] <= opt.final_drive_ratio <= opt.bounds[1]
    assert opt.objective_value <= float(np.nanmin(sweep.objective_value))
    model = model_with(opt.final_drive_ratio, vehicle, launch)
    elapsed = run_report(model, sweep.shift_rpm).finish.elapsed_s
    assert elapsed is not None
    assert_allclose(opt.objective_value, elapsed, rtol=BATCH_RTOL)
