"""Coast-down fit: synthetic coast-downs from known coefficients, and a closed form."""

from __future__ import annotations

import numpy as np
import pytest
from numpy.testing import assert_allclose

from core.car.coast_down import CoastDownRun, TravelDirection, coast_down_speed, fit_coast_down
from core.errors import FitError

MASS = 1500.0
ME = 1.03 * MASS
TRUE = (150.0, 1.2, 0.40)  # invented car: F0 [N], F1 [N*s/m], F2 [N*s^2/m^2]
G = 9.80665


def synthetic_run(
    direction: TravelDirection, extra_force_n: float, seed: int, noise_m_s: float = 0.05
) -> CoastDownRun:
    t = np.arange(0.0, 200.0, 0.1)
    f0, f1, f2 = TRUE
    v = coast_down_speed(t, 120.0 / 3.6, (f0 + extra_force_n, f1, f2), ME)
    keep = v > 15.0 / 3.6
    rng = np.random.default_rng(seed)
    noisy = v[keep] + rng.normal(0.0, noise_m_s, int(keep.sum()))
    return CoastDownRun(t[keep], noisy, direction)


def test_closed_form_without_linear_term_checks_the_integration() -> None:
    # closed form of m_e dv/dt = -(F0 + F2 v^2) (separable ODE, any calculus text):
    # t = m_e/sqrt(F0 F2) [atan(v0 sqrt(F2/F0)) - atan(v sqrt(F2/F0))]
    f0, f2, v0 = 150.0, 0.40, 33.0
    t = np.linspace(0.0, 60.0, 61)
    v = coast_down_speed(t, v0, (f0, 0.0, f2), ME)
    k = np.sqrt(f2 / f0)
    t_closed = ME / np.sqrt(f0 * f2) * (np.arctan(v0 * k) - np.arctan(v * k))
    assert_allclose(t_closed, t, rtol=1e-6, atol=1e-6)


def test_paired_noisy_runs_recover_the_coefficients() -> None:
    # a grade of 0.1 % adds +-m g 0.001 in opposite directions; the paired runs cancel it
    # (SAE J2263 in outline: runs in opposite directions averaged)
    grade = MASS * G * 0.001
    runs = [
        synthetic_run(TravelDirection.OUT, grade, 1),
        synthetic_run(TravelDirection.BACK, -grade, 2),
    ]
    fit = fit_coast_down(runs, MASS)
    assert_allclose(fit.coefficients[0], TRUE[0], rtol=0.02)
    assert_allclose(fit.coefficients[2], TRUE[2], rtol=0.02)
    assert fit.low[1] <= TRUE[1] <= fit.high[1]
    assert fit.residual_rms_m_s == pytest.approx(0.05, rel=0.2)
    assert not [n for n in fit.notices if n.code in ("run_too_short", "run_too_noisy")]


def test_reference_correction_scales_drag_by_density_and_rolling_by_temperature() -> None:
    # SAE J1263 in outline (from memory): F2 by rho_ref/rho, F0 and F1 by 1 + K0 (T - 20 degC)
    runs = [
        synthetic_run(TravelDirection.OUT, 0.0, 3),
        synthetic_run(TravelDirection.BACK, 0.0, 4),
    ]
    fit = fit_coast_down(runs, MASS, temperature_k=303.15, pressure_pa=95000.0)
    ref = fit.reference
    assert ref.applied
    assert_allclose(ref.rolling_factor, 1.0 + 0.00864 * 10.0, rtol=1e-12)
    assert_allclose(ref.coefficients[0], fit.coefficients[0] * ref.rolling_factor, rtol=1e-12)
    ratio = ref.reference_density_kg_m3 / ref.test_density_kg_m3
    assert_allclose(ref.coefficients[2], fit.coefficients[2] * ratio, rtol=1e-12)
    # ideal gas (scipy.constants-free textbook check): rho = p / (R_d T), R_d = 287.05 J/(kg K)
    assert_allclose(ref.reference_density_kg_m3, 98210.0 / (287.05 * 293.15), rtol=2e-3)
    assert_allclose(fit.drag_area_m2, 2.0 * ref.coefficients[2] / ref.reference_density_kg_m3)
    assert_allclose(fit.rolling_coefficient, ref.coefficients[0] / (MASS * G))


def test_short_noisy_single_direction_run_is_warned() -> None:
    run = synthetic_run(TravelDirection.OUT, 0.0, 5, noise_m_s=0.6)
    short = CoastDownRun(run.time_s[:200], run.speed_m_s[:200], run.direction)
    fit = fit_coast_down([short], MASS)
    codes = {n.code for n in fit.notices}
    assert {"run_too_short", "run_too_noisy", "one_direction"} <= codes


def test_run_that_speeds_up_is_rejected() -> None:
    t = np.arange(20.0)
    with pytest.raises(FitError, match="must slow down"):
        fit_coast_down([CoastDownRun(t, 10.0 + t)], MASS)


def test_equivalent_mass_below_mass_is_rejected() -> None:
    run = synthetic_run(TravelDirection.OUT, 0.0, 6)
    with pytest.raises(FitError, match="equivalent_mass_kg"):
        fit_coast_down([run], MASS, equivalent_mass_kg=MASS - 1.0)


def test_mass_below_any_vehicle_is_rejected() -> None:
    run = synthetic_run(TravelDirection.OUT, 0.0, 7)
    with pytest.raises(FitError, match="mass_kg"):
        fit_coast_down([run], 5e-324)
