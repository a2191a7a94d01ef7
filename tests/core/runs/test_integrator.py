"""Tests of the one run integrator (core.runs.integrator through core.runs.simulate.simulate_run):
long runs against closed forms of Newton's second law, a multi-gear run against an
independent ``scipy.integrate.solve_ivp`` integration in time, runs towards the
drag-limited speed, unreachable distances, the trace's acceleration, the speed where
traction stops limiting, rolling-start gears and the converter's operating-point table.

Every car here is invented demo data. Cars meant to match a closed form have no rotating
inertia, driveline efficiency 1 and a friction coefficient of 5, so the tires never limit.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np
import pytest
from numpy.testing import assert_allclose
from scipy.integrate import quad, solve_ivp

from core.car.road_load import RoadLoad
from core.car.traction import AxleGeometry, DriveLayout
from core.car.vehicle import Coupling, Launch, RotatingInertia, Vehicle
from core.converter.matching import converter_operating_points
from core.converter.tables import TorqueConverter
from core.driveline.drivetrain import make_drivetrain
from core.driveline.tires import tire_from_diameter
from core.engine.curves import (
    RPM_TO_RAD_S,
    Interpolation,
    torque_curve_from_power,
    torque_curve_from_torque,
)
from core.errors import SimulationError
from core.runs.batch import batch_finish_times
from core.runs.batch_timing import TRAP_WINDOW_M
from core.runs.drive_model import DriveModel, drive_model
from core.runs.milestones import (
    time_at_distance,
    time_at_speed,
    timed_distance,
)
from core.runs.performance import optimal_shift_rpm
from core.runs.report import run_report, sample_trace
from core.runs.simulate import simulate_run
from core.units import FOOT_M

GEOMETRY = AxleGeometry(2.6, 0.5, 1.3)
TIRE = tire_from_diameter(0.6)  # rolling radius 0.3 m
NO_INERTIA = RotatingInertia(0.0, 0.0, 0.0)
CLOSED_FORM_RTOL = 2e-3  # closed forms of Newton's second law: 0.2 %
ODE_RTOL = 5e-3  # the independent solve_ivp integration: 0.5 %
STANDING_MILE_M = 1609.344


def reached(value: float | None) -> float:
    """A figure the run must have reached (None means it did not)."""
    assert value is not None
    return value


def bare_car(mass_kg: float, f0_n: float, f2_n_s2_m2: float) -> Vehicle:
    load = RoadLoad.from_coast_down(mass_kg, f0_n, 0.0, f2_n_s2_m2)
    return Vehicle(mass_kg, load, GEOMETRY, DriveLayout.REAR, 5.0, inertia=NO_INERTIA)


# --- constant power with quadratic drag, over long distances ----------------------------

POWER_W, MASS_KG, DRAG_K, V0 = 90e3, 1200.0, 0.4, 12.0


def _power_model() -> DriveModel:
    # torque P/omega from 1000 to 7000 rpm through an overall 3.0 on a 0.3 m radius: the
    # rev limit (73.3 m/s) lies above the terminal speed (P/k)^(1/3) = 60.8 m/s
    rpm = np.linspace(1000.0, 7000.0, 121)
    curve = torque_curve_from_power(rpm, np.full(rpm.size, POWER_W))
    vehicle = bare_car(MASS_KG, 0.0, DRAG_K)
    return drive_model(curve, make_drivetrain([1.0], 3.0), TIRE, vehicle, Launch())


def _power_speed_at(x: float) -> float:
    """Closed form (Newton's second law, m*v*dv/dx = P/v*v - k*v^2*... ): from v0,
    x(v) = (m/(3k))*ln((P - k*v0^3)/(P - k*v^3)), inverted for v."""
    p, k, m = POWER_W, DRAG_K, MASS_KG
    return float(((p - (p - k * V0**3) * math.exp(-3.0 * k * x / m)) / k) ** (1.0 / 3.0))


def _power_time_at(x: float) -> float:
    """t(x) = int dx / v(x) over the closed form v(x) (quadrature by scipy.integrate.quad)."""
    return float(quad(lambda s: 1.0 / _power_speed_at(s), 0.0, x, epsabs=1e-12, limit=200)[0])


@pytest.mark.parametrize(
    "distance_m",
    [
        pytest.param(402.336, id="quarter-mile"),
        pytest.param(1000.0, id="1000-m"),
        pytest.param(STANDING_MILE_M, id="mile"),
        pytest.param(5000.0, id="5-km"),
    ],
)
def test_constant_power_with_drag_matches_the_closed_form_at_long_distances(
    distance_m: float,
) -> None:
    # closed form (REFERENCES.md, Newton's second law with F = P/v - k*v^2):
    # x(v) = (m/(3k))*ln(P/(P - k*v^3)) from rest, here from a rolling start at v0. The run
    # never freezes below the terminal speed: speed at the line, trap speed (66 ft before
    # the line, common practice) and elapsed time all follow it to 0.2 %
    model = _power_model()
    run = simulate_run(model, [], start_speed_m_s=V0, cover_distance_m=distance_m)
    timed = timed_distance(run, "line", distance_m, rollout_m=0.0, trap=True)
    line_speed = _power_speed_at(distance_m)
    trap = TRAP_WINDOW_M / (
        _power_time_at(distance_m) - _power_time_at(distance_m - TRAP_WINDOW_M)
    )
    assert_allclose(reached(timed.elapsed_s), _power_time_at(distance_m), rtol=CLOSED_FORM_RTOL)
    assert_allclose(reached(timed.speed_m_s), line_speed, rtol=CLOSED_FORM_RTOL)
    assert_allclose(reached(timed.trap_speed_m_s), trap, rtol=CLOSED_FORM_RTOL)
    # the car still accelerates at the line, so the trap average lies below the line speed
    assert reached(timed.trap_speed_m_s) < reached(timed.speed_m_s)


def test_constant_power_run_approaches_the_terminal_speed_and_never_passes_it() -> None:
    # terminal speed (P/k)^(1/3), where the closed form x(v) diverges
    model = _power_model()
    run = simulate_run(model, [], start_speed_m_s=V0, cover_distance_m=20_000.0)
    terminal = (POWER_W / DRAG_K) ** (1.0 / 3.0)
    assert run.held_by == "drag"
    assert_allclose(reached(run.held_speed_m_s), terminal, rtol=1e-9)
    assert np.all(run.speed_m_s <= terminal)
    assert np.all(np.diff(run.speed_m_s) >= 0.0)
    assert_allclose(
        reached(time_at_distance(run, 10_000.0)), _power_time_at(10_000.0), CLOSED_FORM_RTOL
    )


# --- constant force with quadratic drag, from standstill, over long distances ---------

FORCE_TORQUE_NM, FORCE_RATIO, FORCE_MASS_KG, FORCE_DRAG = 300.0, 3.5, 1000.0, 1.0


@pytest.mark.parametrize(
    "distance_m",
    [
        pytest.param(1000.0, id="1000-m"),
        pytest.param(STANDING_MILE_M, id="mile"),
    ],
)
def test_constant_force_with_drag_matches_the_closed_form_at_long_distances(
    distance_m: float,
) -> None:
    # closed form (REFERENCES.md, Newton's second law with F constant and drag k*v^2):
    # x = (m/k)*ln(cosh(t*sqrt(F*k)/m)), so t(X) = (m/sqrt(F*k))*arccosh(exp(k*X/m)) and
    # v(X) = vt*sqrt(1 - exp(-2*k*X/m)), vt = sqrt(F/k) = 59.2 m/s, below the rev limit
    curve = torque_curve_from_torque([1000.0, 4000.0, 8000.0], [FORCE_TORQUE_NM] * 3)
    vehicle = bare_car(FORCE_MASS_KG, 0.0, FORCE_DRAG)
    launch = Launch(coupling=Coupling.CLUTCH, launch_rpm=1000.0)
    model = drive_model(curve, make_drivetrain([1.0], FORCE_RATIO), TIRE, vehicle, launch)
    m, k = FORCE_MASS_KG, FORCE_DRAG
    force = FORCE_TORQUE_NM * FORCE_RATIO / TIRE.rolling_radius_m
    vt = math.sqrt(force / k)
    assert vt < model.speed_at_rpm(0, model.rev_limit_rpm)
    run = simulate_run(model, [], cover_distance_m=distance_m)

    def t_at(x: float) -> float:
        return m / math.sqrt(force * k) * math.acosh(math.exp(k * x / m))

    timed = timed_distance(run, "line", distance_m, rollout_m=0.0, trap=True)
    trap = TRAP_WINDOW_M / (t_at(distance_m) - t_at(distance_m - TRAP_WINDOW_M))
    assert_allclose(reached(timed.elapsed_s), t_at(distance_m), rtol=CLOSED_FORM_RTOL)
    v_line = vt * math.sqrt(1.0 - math.exp(-2.0 * k * distance_m / m))
    assert_allclose(reached(timed.speed_m_s), v_line, rtol=CLOSED_FORM_RTOL)
    assert_allclose(reached(timed.trap_speed_m_s), trap, rtol=CLOSED_FORM_RTOL)
    assert reached(timed.trap_speed_m_s) < reached(timed.speed_m_s)


# --- a multi-gear run against an independent integration in time ----------------------

SHIFT_TIME_S, LAUNCH_RPM = 0.35, 3200.0
GEARS, FINAL = (3.1, 2.0, 1.45, 1.1), 3.6
INERTIA = RotatingInertia(0.22, 0.06, 3.2)
F0, F1, F2, MASS = 180.0, 2.0, 0.42, 1450.0
SHIFTS = (6200.0, 6100.0, 6000.0)


def _geared_model() -> DriveModel:
    rpm = np.linspace(1000.0, 6800.0, 30)
    torque = 260.0 + 150.0 * np.sin(np.pi * (rpm - 1000.0) / 6800.0)
    curve = torque_curve_from_torque(rpm, torque)
    load = RoadLoad.from_coast_down(MASS, F0, F1, F2)
    vehicle = Vehicle(MASS, load, GEOMETRY, DriveLayout.REAR, 5.0, inertia=INERTIA)
    return drive_model(
        curve,
        make_drivetrain(list(GEARS), FINAL, efficiency=0.9),
        tire_from_diameter(0.64),
        vehicle,
        Launch(launch_rpm=LAUNCH_RPM, shift_time_s=SHIFT_TIME_S),
    )


def _reference_trace(model: DriveModel, end_time_s: float) -> tuple[np.ndarray, ...]:
    """The run integrated in time with scipy.integrate.solve_ivp (RK45, tight tolerances),
    written out here from the textbook model rather than from the drive model: Gillespie
    ch. 2, (M + Mr)*a = T*Ntf*eta/r - R(v) with Mr = (Ie*Ntf^2 + Id*Nf^2 + Iw)/r^2 (only
    Id and Iw while the clutch slips at the launch rpm), R = F0 + F1*v + F2*v^2; during a
    shift no drive and the bare mass coasts, m*a = -R(v)."""
    r = model.tire.rolling_radius_m
    ie, i_d, iw = INERTIA.engine_kg_m2, INERTIA.driveshaft_kg_m2, INERTIA.wheels_kg_m2

    def road(v: float) -> float:
        return F0 + F1 * v + F2 * v * v

    def rpm_of(v: float, gear: int) -> float:
        return v * GEARS[gear] * FINAL / r * 60.0 / (2.0 * math.pi)

    def driving(gear: int, launching: bool):  # type: ignore[no-untyped-def]
        ntf = GEARS[gear] * FINAL

        def rhs(_t: float, y: np.ndarray) -> list[float]:
            v = y[0]
            n = rpm_of(v, gear)
            slipping = launching and n < LAUNCH_RPM
            engine = LAUNCH_RPM if slipping else n
            torque = float(model.curve.torque_at([engine])[0])
            mr = (i_d * FINAL**2 + iw) / r**2 + (0.0 if slipping else ie * ntf**2 / r**2)
            return [(torque * ntf * 0.9 / r - road(v)) / (MASS + mr), v]

        return rhs

    ts, vs, xs = [np.array([0.0])], [np.array([0.0])], [np.array([0.0])]
    t0, y0 = 0.0, np.array([0.0, 0.0])
    for gear in range(len(GEARS)):

        def due(_t: float, y: np.ndarray, gear: int = gear) -> float:
            return rpm_of(y[0], gear) - SHIFTS[gear] if gear < len(SHIFTS) else 1.0

        due.terminal = True  # type: ignore[attr-defined]
        sol = solve_ivp(
            driving(gear, gear == 0),
            (t0, end_time_s),
            y0,
            events=due,
            rtol=1e-10,
            atol=1e-10,
            max_step=0.02,
        )
        ts.append(sol.t[1:])
        vs.append(sol.y[0, 1:])
        xs.append(sol.y[1, 1:])
        t0, y0 = float(sol.t[-1]), sol.y[:, -1]
        if gear == len(GEARS) - 1 or t0 >= end_time_s:
            break
        coast = solve_ivp(
            lambda _t, y: [-road(y[0]) / MASS, y[0]],
            (t0, t0 + SHIFT_TIME_S),
            y0,
            rtol=1e-10,
            atol=1e-10,
            max_step=0.01,
        )
        ts.append(coast.t[1:])
        vs.append(coast.y[0, 1:])
        xs.append(coast.y[1, 1:])
        t0, y0 = float(coast.t[-1]), coast.y[:, -1]
    return np.concatenate(ts), np.concatenate(vs), np.concatenate(xs)


def test_multi_gear_run_matches_an_independent_solve_ivp_integration() -> None:
    # independent reference: scipy.integrate.solve_ivp in time, the textbook equation of
    # motion written out in the test (Gillespie ch. 2), clutch launch, shift time and
    # rotating inertia included; the integrator works over speed. Target 0.5 %.
    model = _geared_model()
    run = simulate_run(model, list(SHIFTS), cover_distance_m=1000.0)
    t_ref, v_ref, x_ref = _reference_trace(model, float(run.time_s[-1]) + 1.0)
    assert [s.to_gear for s in run.shifts] == [2, 3, 4]
    for feet in (60.0, 330.0, 660.0, 1000.0, 1320.0):
        x = feet * FOOT_M
        expected = float(np.interp(x, x_ref, t_ref))
        assert_allclose(reached(time_at_distance(run, x)), expected, rtol=ODE_RTOL)
    for mph in (30.0, 60.0, 100.0):
        v = mph * 0.44704
        first = int(np.argmax(v_ref >= v))
        expected = float(np.interp(v, v_ref[first - 1 : first + 1], t_ref[first - 1 : first + 1]))
        assert_allclose(reached(time_at_speed(run, v)), expected, rtol=ODE_RTOL)
    # each shift begins where the engine reaches its shift rpm: v = n*(2*pi/60)*r/Ntf
    r = model.tire.rolling_radius_m
    starts = [
        n * 2.0 * math.pi / 60.0 * r / (g * FINAL) for n, g in zip(SHIFTS, GEARS, strict=False)
    ]
    assert_allclose([s.speed_m_s for s in run.shifts], starts, rtol=1e-9)


# --- unreachable distances -------------------------------------------------------------


def test_distance_past_a_gear_that_cannot_pull_is_reported_unreachable() -> None:
    # second gear (overall 0.8) pushes 300*0.8/0.3 = 800 N, less than the road load at the
    # 20 m/s first gear shifts at (F0 + k*v^2 = 200 + 2*400 = 1000 N): the run ends there
    curve = torque_curve_from_torque([1000.0, 4000.0, 7000.0], [300.0] * 3)
    vehicle = bare_car(1000.0, 200.0, 2.0)
    model = drive_model(curve, make_drivetrain([4.0, 0.8], 1.0), TIRE, vehicle, Launch())
    shift = 20.0 * 4.0 / (TIRE.rolling_radius_m * RPM_TO_RAD_S)
    report = run_report(model, [shift], finish_distance_m=2000.0)
    run = report.run
    assert any(n.code == "gear_cannot_pull" for n in run.notices)
    assert run.distance_m[-1] < 2000.0
    assert report.finish.elapsed_s is None
    assert time_at_distance(run, 2000.0) is None
    assert all(d.elapsed_s is None for d in report.distances if d.distance_m > run.distance_m[-1])


# --- the trace -------------------------------------------------------------------------


def test_trace_acceleration_is_its_own_speed_derivative() -> None:
    # the sampled acceleration is the derivative of the sampled speed wherever no shift or
    # limiter onset lies between neighbouring samples; it is the coasting deceleration
    # -R(v)/m inside a shift and zero while the rev limiter holds the car
    model = _geared_model()
    run = simulate_run(model, list(SHIFTS), cover_distance_m=8000.0)
    assert run.held_by == "rev_limit"
    trace = sample_trace(run, 4001, float(run.time_s[-1]))
    t, v, a = trace.time_s, trace.speed_m_s, trace.acceleration_m_s2
    events = [s.time_s for s in run.shifts] + [s.time_s + SHIFT_TIME_S for s in run.shifts]
    events.append(reached(time_at_speed(run, model.speed_at_rpm(0, LAUNCH_RPM))))  # clutch locks
    events.append(float(run.time_s[np.flatnonzero(run.acceleration_m_s2 == 0.0)[0]]))
    smooth = np.ones(t.size, dtype=bool)
    smooth[[0, -1]] = False
    for e in events:
        smooth &= np.abs(t - e) > 2.0 * (t[1] - t[0])
    dvdt = np.gradient(v, t)
    assert_allclose(dvdt[smooth], a[smooth], rtol=0.01, atol=0.01)
    for s in run.shifts:
        inside = (t > s.time_s) & (t < s.time_s + SHIFT_TIME_S)
        assert inside.any()
        coast = -model.vehicle.road_load.force_n(v[inside]) / MASS
        assert np.all(a[inside] < 0.0)
        assert_allclose(a[inside], coast, rtol=0.02)
    held = t > events[-1]
    assert held.any()
    assert np.all(a[held] == 0.0)


# --- where traction stops limiting -----------------------------------------------------


def test_traction_stops_limiting_where_the_drive_force_meets_the_limit() -> None:
    # a linearly falling torque T = T0 - c*n through one gear crosses the traction limit
    # F_lim (Gillespie ch. 2 form, as the model states it) at T(n*)*G/r = F_lim, so
    # n* = (T0 - F_lim*r/G)/c and v* = n* * (2*pi/60) * r/G (closed form); the report finds
    # it by root finding, not on its integration grid
    curve = torque_curve_from_torque(
        [1000.0, 4000.0, 7000.0], [600.0, 400.0, 200.0], interpolation=Interpolation.LINEAR
    )
    load = RoadLoad.from_coast_down(1200.0, 150.0, 0.0, 0.4)
    vehicle = Vehicle(1200.0, load, GEOMETRY, DriveLayout.REAR, 0.9, inertia=NO_INERTIA)
    launch = Launch(launch_rpm=1000.0)
    model = drive_model(curve, make_drivetrain([1.0], 4.0), TIRE, vehicle, launch)
    r, g, limit = TIRE.rolling_radius_m, 4.0, model.traction_limit_n
    c = 400.0 / 6000.0
    n_star = (600.0 + c * 1000.0 - limit * r / g) / c
    assert 1000.0 < n_star < 7000.0
    report = run_report(model, [])
    expected = n_star * RPM_TO_RAD_S * r / g
    assert_allclose(reached(report.traction_limited_to_m_s), expected, rtol=1e-9)


# --- rolling starts ---------------------------------------------------------------------


def test_rolling_start_defaults_to_the_lowest_gear_below_its_shift_rpm_and_can_be_chosen() -> None:
    model = _geared_model()
    v = model.speed_at_rpm(1, 5000.0)  # second gear at 5000 rpm; first is past 6200 rpm
    assert v > model.speed_at_rpm(0, SHIFTS[0])
    run = simulate_run(model, list(SHIFTS), start_speed_m_s=v, cover_distance_m=300.0)
    assert run.start_gear == 2
    assert run.gear[0] == 2
    chosen = simulate_run(
        model, list(SHIFTS), start_speed_m_s=v, start_gear=3, cover_distance_m=300.0
    )
    assert chosen.start_gear == 3
    assert chosen.gear[0] == 3
    assert_allclose(chosen.engine_rpm[0], model.coupled_rpm(2, np.array([v]))[0], rtol=1e-12)
    assert [s.from_gear for s in chosen.shifts] == [3]


@pytest.mark.parametrize(
    ("gear", "message"),
    [
        pytest.param(0, "must name a gear from 1 to 4", id="gear-zero"),
        pytest.param(5, "must name a gear from 1 to 4", id="above-top"),
        pytest.param(1, "above the rev limit", id="too-low-for-the-speed"),
    ],
)
def test_start_gear_that_does_not_fit_is_rejected(gear: int, message: str) -> None:
    model = _geared_model()
    v = model.speed_at_rpm(1, 5000.0) * 1.5
    with pytest.raises(SimulationError, match=message) as info:
        simulate_run(model, list(SHIFTS), start_speed_m_s=v, start_gear=gear, cover_distance_m=9.0)
    assert info.value.parameter == "start_gear"


# --- the converter's operating-point table ----------------------------------------------


def test_converter_table_matches_the_operating_points_solved_directly() -> None:
    # the table is solved once per car; between its nodes it is read by interpolation and
    # must agree with the bisection solution at each turbine speed to 0.1 %
    rpm = np.linspace(1000.0, 6500.0, 12)
    curve = torque_curve_from_torque(rpm, 380.0 + 60.0 * np.sin(rpm / 1200.0))
    converter = TorqueConverter.from_stall(2.2, stall_k_factor=120.0)
    load = RoadLoad.from_coast_down(1700.0, 200.0, 0.0, 0.45)
    vehicle = Vehicle(1700.0, load, GEOMETRY, DriveLayout.REAR, 3.0)
    launch = Launch(coupling=Coupling.CONVERTER, converter=converter)
    model = drive_model(curve, make_drivetrain([2.5, 1.5, 1.0], 3.2), TIRE, vehicle, launch)
    turbine = np.random.default_rng(7).uniform(0.0, model.rev_limit_rpm, 400)
    torque, engine = model.gearbox_input(0, turbine)
    exact = converter_operating_points(
        dataclasses.replace(converter, lockup_speed_ratio=None),
        turbine,
        curve.torque_at,
        rpm_min=curve.rpm_min,
        rpm_max=model.rev_limit_rpm,
    )
    assert_allclose(engine, exact.engine_rpm, rtol=1e-3)
    assert_allclose(torque, exact.output_torque_nm, rtol=1e-3)


# --- batched finish times and the shift search -------------------------------------------


@pytest.mark.parametrize(
    ("start", "distance", "speed"),
    [
        pytest.param(0.0, 402.336, None, id="standing-quarter"),
        pytest.param(0.0, None, 26.8224, id="standing-0-60-mph"),
        pytest.param(15.0, 500.0, None, id="rolling-500-m"),
    ],
)
def test_batched_finish_times_equal_single_runs_row_by_row(
    start: float, distance: float | None, speed: float | None
) -> None:
    # one integrator: each row of a batch is the single run with that row's shift rpms
    model = _geared_model()
    rows = np.array([SHIFTS, [5600.0, 6300.0, 5900.0], [6500.0, 5200.0, 6400.0]])
    times = batch_finish_times(
        model,
        rows,
        start_speed_m_s=start,
        rollout_m=FOOT_M,
        finish_distance_m=distance,
        finish_speed_m_s=speed,
    )
    rollout = FOOT_M if start == 0.0 else 0.0
    for row, batched in zip(rows, times, strict=True):
        run = simulate_run(
            model,
            row,
            start_speed_m_s=start,
            cover_distance_m=(distance or 0.0) + rollout,
            cover_speed_m_s=speed or 0.0,
        )
        if distance is not None:
            single = reached(time_at_distance(run, distance + rollout)) - (
                reached(time_at_distance(run, rollout)) if rollout else 0.0
            )
        else:
            single = reached(time_at_speed(run, speed or 0.0))
        assert_allclose(batched, single, rtol=1e-9)


def test_shift_search_is_never_slower_than_its_start_and_its_time_is_a_real_run() -> None:
    model = _geared_model()
    start = np.array([5000.0, 5000.0, 5000.0])
    best = optimal_shift_rpm(
        model,
        start,
        start_speed_m_s=0.0,
        rollout_m=FOOT_M,
        finish_distance_m=402.336,
        finish_speed_m_s=None,
        max_evaluations=160,
    )
    assert best.time_s < best.baseline_time_s
    assert best.evaluations <= 160
    run = simulate_run(model, best.shift_rpm, cover_distance_m=402.336 + FOOT_M)
    single = reached(time_at_distance(run, 402.336 + FOOT_M)) - reached(
        time_at_distance(run, FOOT_M)
    )
    assert_allclose(best.time_s, single, rtol=1e-9)
