"""Pass calibration in the core: closed-form sanity, identity at the truth, warnings.

The car (a front-drive six-speed sedan) and its passes are invented: each pass is the
project's own integrator run with chosen figures, sampled like a logger, so the figures it
was run with are the truth the fit must return.
"""

from __future__ import annotations

import dataclasses
from functools import lru_cache

import numpy as np
import pytest
from numpy.testing import assert_allclose

from core.car.calibration import calibrate_pass
from core.car.calibration_pass import StartKind
from core.car.inertia import mass_factor
from core.car.road_load import RoadLoad
from core.car.traction import AxleGeometry, DriveLayout
from core.car.vehicle import Coupling, Launch, RotatingInertia, Vehicle
from core.driveline.drivetrain import make_drivetrain
from core.driveline.tires import Tire
from core.engine.curves import CurveSource, torque_curve_from_torque
from core.errors import FitError
from core.logs.pass_data import PassLog, SpeedUnit, pass_log
from core.runs.drive_model import DriveModel, drive_model
from core.runs.simulate import simulate_run

RHO = 1.2  # [kg/m^3]
MASS = 1520.0
RADIUS = 0.32
RATIOS = [3.58, 2.02, 1.35, 1.02, 0.82, 0.68]
SHIFTS = [6300.0, 6400.0, 6400.0, 6400.0, 6400.0]


def car(
    k: float = 1.0,
    eta: float = 0.9,
    cda: float = 0.65,
    *,
    ratios: list[float] | None = None,
    source: CurveSource = CurveSource.ENGINE,
    rule_of_thumb: bool = False,
) -> DriveModel:
    curve = torque_curve_from_torque(
        [1000, 1500, 2000, 2500, 3000, 3500, 4000, 4500, 5000, 5500, 6000, 6500],
        [180, 205, 228, 246, 258, 265, 268, 266, 258, 244, 224, 198],
        source=source,
    )
    drivetrain = make_drivetrain(ratios or RATIOS, 3.94, efficiency=eta)
    inertia = None if rule_of_thumb else RotatingInertia(0.2 * k, 0.05 * k, 3.2 * k)
    vehicle = Vehicle(
        MASS,
        RoadLoad.from_constant_rolling(MASS, cda, RHO, 0.011),
        AxleGeometry.from_front_weight_share(2.72, 0.54, 0.6),
        DriveLayout("front"),
        0.95,
        inertia=inertia,
    )
    launch = Launch(Coupling.CLUTCH, 2800.0, shift_time_s=0.3)
    return drive_model(curve, drivetrain, Tire(RADIUS), vehicle, launch, rev_limit_rpm=6500)


def logged(
    model: DriveModel,
    *,
    rate_hz: float = 20.0,
    noise_m_s: float = 0.0,
    seed: int = 0,
    start_speed_m_s: float = 0.0,
    start_gear: int | None = None,
    distance_m: float = 402.336,
) -> PassLog:
    """The run sampled at a logger's rate, with a second at rest before a standing start."""
    run = simulate_run(
        model,
        SHIFTS,
        start_speed_m_s=start_speed_m_s,
        start_gear=start_gear,
        cover_distance_m=distance_m,
    )
    t = np.arange(0.0, run.time_s[-1], 1.0 / rate_hz)
    v = np.interp(t, run.time_s, run.speed_m_s)
    rpm = np.interp(t, run.time_s, run.engine_rpm)
    if start_speed_m_s == 0.0:
        lead = np.arange(-1.0, 0.0, 1.0 / rate_hz)
        t, v, rpm = np.r_[lead, t], np.r_[0.0 * lead, v], np.r_[900.0 + 0.0 * lead, rpm]
    rng = np.random.default_rng(seed)
    v = np.maximum(v + rng.normal(0.0, noise_m_s, v.size), 0.0) if noise_m_s else v
    return pass_log(t + 1.0, v, speed_unit=SpeedUnit.M_S, rpm=rpm)


@lru_cache(maxsize=1)
def exact_pass() -> PassLog:
    return logged(car())


def test_mass_factor_one_reproduces_the_rule_of_thumb_mass_factor_exactly() -> None:
    # Gillespie ch. 2 / Wong: (m + Mr)/m = 1.04 + 0.0025*Ntf^2 (memory; REFERENCES.md checks
    # 10.5 -> 1.315625): the rule written as inertias Ie = 0.0025 m r^2, Iw = 0.04 m r^2 at
    # k = 1 gives the same effective mass in every gear and 1.04 m while the clutch slips
    model = car(rule_of_thumb=True)
    fit = calibrate_pass(logged(model), model, RHO)
    overall = np.asarray(RATIOS) * 3.94
    assert_allclose(fit.prior_effective_mass_kg, MASS * mass_factor(overall), rtol=1e-12)
    assert_allclose(fit.inertia.engine_kg_m2 / fit.mass_factor.value, 0.0025 * MASS * RADIUS**2)
    assert_allclose(fit.inertia.wheels_kg_m2 / fit.mass_factor.value, 0.04 * MASS * RADIUS**2)


def test_a_pass_run_with_the_callers_own_figures_returns_them() -> None:
    # closed form: at the truth every speed residual is zero, so the least-squares optimum
    # (and the priors' optimum) is the truth itself
    fit = calibrate_pass(exact_pass(), car(), RHO)
    assert_allclose(fit.mass_factor.value, 1.0, rtol=0.02)
    assert_allclose(fit.efficiency.value, 0.9, rtol=0.002)
    assert_allclose(fit.drag_area.value, 0.65, rtol=0.02)
    assert fit.start is StartKind.STANDING
    assert_allclose(fit.launch_time_s, 1.0, atol=0.03)
    assert fit.residual_rms_m_s < 0.05
    assert [g.gear for g in fit.gears] == [1, 2, 3, 4]


def test_calibrated_drag_term_is_half_rho_times_the_fitted_drag_area() -> None:
    # Gillespie ch. 2: aerodynamic drag DA = 0.5 * rho * Cd * A * V^2
    fit = calibrate_pass(exact_pass(), car(k=1.0, eta=0.88, cda=0.5), RHO)
    quadratic = fit.vehicle.road_load.quadratic_n_s2_m2
    assert_allclose(quadratic, 0.5 * RHO * fit.drag_area.value, rtol=1e-12)
    assert fit.residual_rms_before_m_s > fit.residual_rms_m_s


def test_a_noisy_pass_recovers_known_figures_within_three_sigma() -> None:
    truth = car(k=1.4, eta=0.85, cda=0.75)
    log = logged(truth, noise_m_s=0.1, seed=3)
    fit = calibrate_pass(log, car(), RHO)
    for figure, true in ((fit.mass_factor, 1.4), (fit.efficiency, 0.85), (fit.drag_area, 0.75)):
        assert abs(figure.value - true) <= 3.0 * figure.std_error, figure
        assert 0.0 < figure.std_error < 0.1 * true, figure
    assert fit.correlation.shape == (3, 3)
    assert_allclose(np.diag(fit.correlation), 1.0)
    assert_allclose(fit.correlation, fit.correlation.T)


def test_a_rolling_start_is_fitted_from_its_first_sample() -> None:
    truth = car(k=1.2, eta=0.87, cda=0.7)
    log = logged(truth, start_speed_m_s=15.0, start_gear=2, distance_m=600.0)
    fit = calibrate_pass(log, car(), RHO)
    assert fit.start is StartKind.ROLLING
    assert fit.gears[0].gear == 2
    assert_allclose(fit.start_speed_m_s, 15.0, rtol=0.01)
    assert_allclose(fit.efficiency.value, 0.87, rtol=0.01)
    assert_allclose(fit.mass_factor.value, 1.2, rtol=0.1)


def test_a_chassis_curve_holds_the_efficiency_and_says_so() -> None:
    model = car(source=CurveSource.CHASSIS)
    fit = calibrate_pass(logged(model), model, RHO)
    assert not fit.efficiency.fitted and fit.efficiency.std_error == 0.0
    assert fit.efficiency.value == 1.0
    assert "efficiency_not_fitted" in {n.code for n in fit.notices}


def test_logged_gears_that_skip_one_of_the_drivetrains_stop_the_fit_with_a_warning() -> None:
    # the caller's gearbox has an extra ratio between first and second: the log goes from
    # its gear 1 to its gear 3
    caller = car(ratios=[3.58, 2.6, 2.02, 1.35, 1.02, 0.82])
    fit = calibrate_pass(exact_pass(), caller, RHO)
    assert "logged_gears_disagree" in {n.code for n in fit.notices}
    assert [g.gear for g in fit.gears] == [1]
    assert "one_gear" in {n.code for n in fit.notices}


def test_a_short_pass_is_flagged() -> None:
    fit = calibrate_pass(logged(car(), distance_m=25.0), car(), RHO)
    codes = {n.code for n in fit.notices}
    assert "pass_too_short" in codes


def test_a_log_that_never_moves_is_refused() -> None:
    t = np.arange(40) * 0.05
    log = pass_log(t, np.zeros(40), speed_unit=SpeedUnit.M_S, rpm=np.full(40, 900.0))
    with pytest.raises(FitError, match="no full-throttle pass"):
        calibrate_pass(log, car(), RHO)


def test_air_density_out_of_range_is_refused() -> None:
    with pytest.raises(FitError, match="air_density_kg_m3"):
        calibrate_pass(exact_pass(), car(), 0.0)


def test_a_converter_car_keeps_its_converter_map_across_trials() -> None:
    from core.converter.tables import TorqueConverter

    base = car()
    converter = TorqueConverter.from_stall(
        2.0, stall_speed_rpm=2400.0, stall_engine_torque_nm=240.0, lockup=False
    )
    launch = Launch(Coupling.CONVERTER, converter=converter, lockup_gears=frozenset({3, 4, 5, 6}))
    model = dataclasses.replace(base, launch=launch)
    fit = calibrate_pass(logged(model), model, RHO)
    assert_allclose(fit.efficiency.value, 0.9, rtol=0.01)
    assert fit.residual_rms_m_s < 0.1


def test_a_log_without_rpm_finds_its_gears_from_the_dips_and_is_fitted() -> None:
    truth = car(k=1.3, eta=0.86, cda=0.72)
    log = logged(truth, noise_m_s=0.05, seed=1)
    speed_only = pass_log(log.time_s, log.speed_m_s, speed_unit=SpeedUnit.M_S)
    fit = calibrate_pass(speed_only, car(), RHO)
    assert "no_rpm" in {n.code for n in fit.notices}
    for figure, true in ((fit.mass_factor, 1.3), (fit.efficiency, 0.86), (fit.drag_area, 0.72)):
        assert abs(figure.value - true) <= 3.0 * figure.std_error, figure
