"""Calibrating the car to a logged full-throttle pass: mass factor, efficiency, drag area.

The pass is simulated with the project's one integrator (:func:`core.runs.simulate.simulate_run`,
shifting where the log shifted, :mod:`core.car.calibration_pass`) and the simulated speed is
compared with the logged speed at the logged times. ``scipy.optimize.least_squares`` (trust
region reflective, bounded, forward-difference Jacobian) adjusts three figures:

* the **mass factor** ``k``, a multiplier on the equivalent mass of the rotating parts, so
  the effective mass in gear ``g`` is ``m + k * Mr_g`` (Gillespie ch. 2,
  ``Mr = [Ie*Ntf**2 + Id*Nf**2 + Iw] / r**2``) and, while the clutch or converter slips,
  ``m + k * (Id*Nf**2 + Iw) / r**2``. ``Mr`` comes from the caller's inertias, or from the
  rule of thumb ``m*(0.04 + 0.0025*Ntf**2)`` written as the inertias that give it exactly
  (``Ie = 0.0025*m*r**2``, ``Id = 0``, ``Iw = 0.04*m*r**2``). The vehicle mass itself is
  taken as weighed. ``k = 1`` means the caller's rotating parts hold;
* the **driveline efficiency** ``eta``, one value for every gear (not fitted, and held at
  1, for a chassis curve, which is already net of driveline losses);
* the **drag area** ``CdA`` [m^2]: the road load's quadratic term is ``0.5*rho*CdA``; the
  rolling terms stay as given.

One nuisance parameter lines the simulation up with the log: the launch instant of a
standing start, or the start speed of a rolling one.

Priors: each figure ``p`` with the caller's value ``p0`` adds the residual
``PRIOR_SPEED_M_S * (p - p0) / width``, worth one logged sample ``PRIOR_SPEED_M_S`` (0.1 m/s)
off per prior width: 0.5 for ``k``, 0.10 for ``eta``, half the caller's drag area (at least
0.1 m^2) for ``CdA``. Against a few hundred samples that is a weak pull, enough to keep a
figure the pass cannot see near the caller's value.

Uncertainty: ``cov = s**2 (J^T J)^-1`` at the solution (Gauss-Newton), ``J`` the Jacobian of
all residuals (prior rows included) and ``s**2`` the sum of squared speed residuals over
their degrees of freedom (samples less fitted parameters). It assumes independent errors;
a model that misses a feature of the pass gives correlated residuals and a standard error
too small, which the per-gear residuals show.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from core.car.calibration_fit import (
    DRAG_AREA_BOUNDS_M2,
    EFFICIENCY_BOUNDS,
    MASS_FACTOR_BOUNDS,
    PRIOR_SPEED_M_S,
    CalibrationProblem,
    calibration_problem,
    solve_calibration,
)
from core.car.calibration_pass import FitWindow, StartKind, fit_window
from core.car.calibration_report import (
    POOR_MATCH_RMS_M_S,
    GearResidual,
    figure_notices,
    gear_residuals,
)
from core.car.vehicle import RotatingInertia, Vehicle
from core.errors import FitError, SimulationError
from core.logs.pass_data import PassLog
from core.notices import Notice
from core.runs.drive_model import DriveModel

__all__ = [
    "DRAG_AREA_BOUNDS_M2",
    "EFFICIENCY_BOUNDS",
    "MASS_FACTOR_BOUNDS",
    "PRIOR_SPEED_M_S",
    "FittedFigure",
    "PassCalibration",
    "calibrate_pass",
]

FloatArray = NDArray[np.float64]


@dataclass(frozen=True)
class FittedFigure:
    """One calibrated figure.

    Attributes
    ----------
    name : str
        ``mass_factor``, ``efficiency`` or ``drag_area``.
    value : float
        Fitted value [-, -, m^2].
    std_error : float
        Standard uncertainty from the Jacobian, same unit; 0 when not fitted.
    prior : float
        The caller's value the fit started from and is pulled towards.
    low_bound, high_bound : float
        Bounds of the fit.
    fitted : bool
        False when held (efficiency with a chassis curve).
    at_bound : bool
        The fit ended on a bound.
    """

    name: str
    value: float
    std_error: float
    prior: float
    low_bound: float
    high_bound: float
    fitted: bool
    at_bound: bool


@dataclass(frozen=True)
class PassCalibration:
    """A car calibrated to a logged pass.

    Attributes
    ----------
    mass_factor, efficiency, drag_area : FittedFigure
    correlation : ndarray, shape (3, 3)
        Correlation of mass factor, efficiency and drag area (0 off the diagonal for a
        figure not fitted).
    start : StartKind
    launch_time_s : float
        Log time of the simulation's start: the fitted launch instant (standing) or the
        first sample fitted (rolling) [s].
    start_speed_m_s : float
        Speed the simulation starts at: 0, or the fitted rolling start speed [m/s].
    time_s, logged_speed_m_s, fitted_speed_m_s : ndarray, shape (n,)
        The samples fitted and the calibrated model's speed there [s, m/s, m/s].
    residual_rms_m_s, residual_max_m_s : float
        Fitted minus logged speed, RMS and largest magnitude [m/s].
    residual_rms_before_m_s : float
        RMS with the caller's figures (nuisance at its first guess) [m/s].
    gears : tuple of GearResidual
    effective_mass_kg, prior_effective_mass_kg : ndarray, shape (g,)
        Mass plus rotating parts per gear, calibrated and the caller's [kg].
    inertia : RotatingInertia
        The calibrated rotating parts.
    vehicle : Vehicle
        The calibrated vehicle (inertia and drag replaced).
    shift_rpm : ndarray, shape (g - 1,)
        Shift rpm the simulation used [rpm].
    window : FitWindow
    notices : tuple of Notice
    """

    mass_factor: FittedFigure
    efficiency: FittedFigure
    drag_area: FittedFigure
    correlation: FloatArray
    start: StartKind
    launch_time_s: float
    start_speed_m_s: float
    time_s: FloatArray
    logged_speed_m_s: FloatArray
    fitted_speed_m_s: FloatArray
    residual_rms_m_s: float
    residual_max_m_s: float
    residual_rms_before_m_s: float
    gears: tuple[GearResidual, ...]
    effective_mass_kg: FloatArray
    prior_effective_mass_kg: FloatArray
    inertia: RotatingInertia
    vehicle: Vehicle
    shift_rpm: FloatArray
    window: FitWindow
    notices: tuple[Notice, ...]


def _figures(
    problem: CalibrationProblem, x: FloatArray, cov: FloatArray
) -> tuple[list[FittedFigure], FloatArray]:
    free = problem.free()
    index = np.cumsum(free) - 1
    sigma = np.zeros(4)
    sigma[free] = np.sqrt(np.maximum(np.diag(cov), 0.0))
    corr = np.eye(3)
    for a in range(3):
        for b in range(3):
            if a != b and free[a] and free[b] and sigma[a] > 0.0 and sigma[b] > 0.0:
                corr[a, b] = cov[index[a], index[b]] / (sigma[a] * sigma[b])
    names = ("mass_factor", "efficiency", "drag_area")
    span = problem.high - problem.low
    figures = [
        FittedFigure(
            name=names[j],
            value=float(x[j]),
            std_error=float(sigma[j]),
            prior=float(problem.prior[j]),
            low_bound=float(problem.low[j]),
            high_bound=float(problem.high[j]),
            fitted=bool(free[j]),
            at_bound=bool(
                free[j] and min(x[j] - problem.low[j], problem.high[j] - x[j]) <= 1e-3 * span[j]
            ),
        )
        for j in range(3)
    ]
    return figures, np.clip(corr, -1.0, 1.0)


def _model_notices(problem: CalibrationProblem, rms_m_s: float) -> list[Notice]:
    """Warnings on a poor match and on how the efficiency was treated."""
    notes = []
    if rms_m_s > POOR_MATCH_RMS_M_S:
        notes.append(
            Notice(
                "poor_match",
                "The calibrated model still misses the logged speed by more than the "
                "logger's noise (see the residuals gear by gear): wheelspin, a slipping "
                "clutch, a wrong curve or ratios; the figures absorb what they cannot explain.",
                "log",
            )
        )
    if not problem.fit_efficiency:
        notes.append(
            Notice(
                "efficiency_not_fitted",
                "The curve is a chassis curve, already net of driveline losses: "
                "efficiency is not fitted.",
                "efficiency",
            )
        )
    elif np.ptp(problem.model.efficiency) > 0.0:
        notes.append(
            Notice(
                "efficiency_one_value",
                "The efficiency is fitted as one value for every gear; the per-gear "
                "values given are its prior (their mean over the gears logged).",
                "efficiency",
            )
        )
    return notes


def calibrate_pass(
    log: PassLog,
    model: DriveModel,
    air_density_kg_m3: float,
    *,
    smoothing_window_s: float = 0.3,
    start_gear: int = 1,
) -> PassCalibration:
    """Fit mass factor, driveline efficiency and drag area to a logged full-throttle pass.

    Parameters
    ----------
    log : PassLog
        The logged pass (:func:`core.logs.pass_data.pass_log` or a logger text).
    model : DriveModel
        The car with the caller's figures (:func:`core.runs.simulate.drive_model`); its
        inertias, efficiency and drag are the priors.
    air_density_kg_m3 : float
        Air density of the road load's drag term [kg/m^3], > 0.
    smoothing_window_s : float
        Smoothing window of the log check that finds the gears and shifts [s].
    start_gear : int
        Gear of the first segment when no rpm is logged.

    Returns
    -------
    PassCalibration

    Raises
    ------
    FitError
        No pass in the log, or a fit that diverges.
    """
    if not (math.isfinite(air_density_kg_m3) and 0.1 <= air_density_kg_m3 <= 2.0):
        raise FitError(
            f"`air_density_kg_m3` must lie in [0.1, 2], got {air_density_kg_m3}",
            parameter="air_density_kg_m3",
        )
    window = fit_window(log, model, smoothing_window_s=smoothing_window_s, start_gear=start_gear)
    problem = calibration_problem(model, window, air_density_kg_m3)
    x, cov, start = solve_calibration(problem)
    figures, corr = _figures(problem, x, cov)
    before = problem.predicted(start) - window.speed_m_s
    fitted = problem.predicted(x)
    resid = fitted - window.speed_m_s
    try:
        run, t0 = problem.simulate(x)
    except SimulationError as exc:
        raise FitError(
            f"the car as described cannot drive the logged pass: {exc.message}", parameter="log"
        ) from exc
    calibrated = problem.variant(x)
    gears = gear_residuals(window, resid, run, t0)
    notes = [
        *window.notices,
        *figure_notices(figures, corr, window, model.launch, gears),
        *_model_notices(problem, float(np.sqrt(np.mean(resid**2)))),
    ]
    return PassCalibration(
        mass_factor=figures[0],
        efficiency=figures[1],
        drag_area=figures[2],
        correlation=corr,
        start=window.start,
        launch_time_s=t0,
        start_speed_m_s=0.0 if window.start is StartKind.STANDING else float(x[3]),
        time_s=window.time_s,
        logged_speed_m_s=window.speed_m_s,
        fitted_speed_m_s=fitted,
        residual_rms_m_s=float(np.sqrt(np.mean(resid**2))),
        residual_max_m_s=float(np.max(np.abs(resid))),
        residual_rms_before_m_s=float(np.sqrt(np.mean(before**2))),
        gears=gears,
        effective_mass_kg=calibrated.effective_mass_kg,
        prior_effective_mass_kg=model.effective_mass_kg,
        inertia=calibrated.vehicle.inertia or problem.inertia,
        vehicle=calibrated.vehicle,
        shift_rpm=window.shift_rpm,
        window=window,
        notices=tuple(notes),
    )
