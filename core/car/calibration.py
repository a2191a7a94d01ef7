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

import dataclasses
import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray
from scipy.optimize import least_squares

from core.car.calibration_pass import FitWindow, StartKind, fit_window, launch_bounds
from core.car.calibration_report import (
    POOR_MATCH_RMS_M_S,
    GearResidual,
    figure_notices,
    gear_residuals,
)
from core.car.vehicle import Coupling, RotatingInertia, Vehicle
from core.engine.curves import CurveSource
from core.errors import FitError, SimulationError
from core.logs.pass_data import PassLog
from core.runs.simulate import DriveModel, RunResult, simulate_run
from core.shifts.plan import Notice

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

MASS_FACTOR_BOUNDS = (0.2, 5.0)
"""Bounds of the mass factor ``k`` [-] (also capped so the inertias stay in range)."""
EFFICIENCY_BOUNDS = (0.4, 1.0)
"""Bounds of the driveline efficiency [-], the range the drivetrain accepts."""
DRAG_AREA_BOUNDS_M2 = (0.01, 30.0)
"""Bounds of the drag area [m^2]."""
PRIOR_SPEED_M_S = 0.1
"""Weight of a prior: the speed error [m/s] one prior width is worth."""
MASS_FACTOR_WIDTH = 0.5
EFFICIENCY_WIDTH = 0.10
DRAG_AREA_WIDTH_SHARE = 0.5
DRAG_AREA_WIDTH_FLOOR_M2 = 0.1
MAX_EVALUATIONS = 40
_ENGINE_MAX, _WHEELS_MAX = 10.0, 200.0  # [kg*m^2] the inertia ranges of RotatingInertia
_RULE_ENGINE, _RULE_WHEELS = 0.0025, 0.04  # the mass-factor rule 1.04 + 0.0025*N^2


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


def base_inertia(model: DriveModel) -> RotatingInertia:
    """The caller's rotating parts, or the inertias equal to the mass-factor rule [kg*m^2]."""
    if model.vehicle.inertia is not None:
        return model.vehicle.inertia
    mr2 = model.vehicle.mass_kg * model.tire.rolling_radius_m**2
    return RotatingInertia(_RULE_ENGINE * mr2, 0.0, _RULE_WHEELS * mr2)


@dataclass(frozen=True)
class _Problem:
    """The fixed parts of a calibration: the car, the log window, priors and scales."""

    model: DriveModel
    window: FitWindow
    inertia: RotatingInertia
    density: float
    fit_efficiency: bool
    prior: FloatArray  # k, eta, CdA
    width: FloatArray
    low: FloatArray  # bounds of all four parameters (k, eta, CdA, nuisance)
    high: FloatArray
    cover_m: float

    def free(self) -> NDArray[np.bool_]:
        return np.array([True, self.fit_efficiency, True, True])

    def variant(self, x: FloatArray) -> DriveModel:
        """The car with mass factor, efficiency and drag area ``x[:3]``."""
        base = self.model
        j = self.inertia
        k = float(x[0])
        inertia = RotatingInertia(j.engine_kg_m2 * k, j.driveshaft_kg_m2 * k, j.wheels_kg_m2 * k)
        load = dataclasses.replace(
            base.vehicle.road_load, quadratic_n_s2_m2=0.5 * self.density * float(x[2])
        )
        vehicle = dataclasses.replace(base.vehicle, inertia=inertia, road_load=load)
        gears = base.drivetrain.gear_count
        eff = np.full(gears, float(x[1])) if self.fit_efficiency else base.efficiency
        model = dataclasses.replace(
            base,
            vehicle=vehicle,
            efficiency=eff,
            effective_mass_kg=vehicle.effective_mass_kg(base.drivetrain, base.tire),
            decoupled_mass_kg=vehicle.decoupled_mass_kg(base.drivetrain, base.tire),
        )
        if base.launch.coupling is Coupling.CONVERTER:  # the map does not depend on x
            model.__dict__["converter_map"] = base.converter_map
        return model

    def simulate(self, x: FloatArray) -> tuple[RunResult, float]:
        """The simulated pass and the log time of its start [s]."""
        w = self.window
        standing = w.start is StartKind.STANDING
        run = simulate_run(
            self.variant(x),
            w.shift_rpm,
            start_speed_m_s=0.0 if standing else float(x[3]),
            start_gear=w.start_gear,
            cover_distance_m=self.cover_m,
        )
        return run, w.start_time_s + (float(x[3]) if standing else 0.0)

    def predicted(self, x: FloatArray) -> FloatArray:
        """Simulated speed at the logged times [m/s]; zero where the car cannot run."""
        try:
            run, t0 = self.simulate(x)
        except SimulationError:
            return np.zeros(self.window.time_s.size)
        v0 = 0.0 if self.window.start is StartKind.STANDING else float(x[3])
        return np.interp(self.window.time_s - t0, run.time_s, run.speed_m_s, left=v0)

    def residuals(self, x: FloatArray) -> FloatArray:
        data = self.predicted(x) - self.window.speed_m_s
        prior = PRIOR_SPEED_M_S * (x[:3] - self.prior) / self.width
        return np.concatenate([data, prior[self.free()[:3]]])


def _problem(model: DriveModel, window: FitWindow, density: float) -> _Problem:
    inertia = base_inertia(model)
    fit_eff = model.curve.source is not CurveSource.CHASSIS
    gears = np.arange(window.start_gear - 1, window.last_gear)
    eta0 = float(np.mean(model.efficiency[gears])) if fit_eff else 1.0
    cda0 = 2.0 * model.vehicle.road_load.quadratic_n_s2_m2 / density
    k_high = MASS_FACTOR_BOUNDS[1]
    for value, cap in (
        (inertia.engine_kg_m2, _ENGINE_MAX),
        (inertia.driveshaft_kg_m2, _ENGINE_MAX),
        (inertia.wheels_kg_m2, _WHEELS_MAX),
    ):
        if value > 0.0:
            k_high = min(k_high, cap / value)
    k_high = max(k_high, 1.0)
    if window.start is StartKind.STANDING:
        lo_s, hi_s = launch_bounds(window)
    else:
        v = window.start_speed_m_s
        lo_s, hi_s = 0.8 * v, 1.2 * v + 0.1
    cda_lo, cda_hi = DRAG_AREA_BOUNDS_M2
    logged = float(np.sum(np.diff(window.time_s) * window.speed_m_s[1:]))
    return _Problem(
        model=model,
        window=window,
        inertia=inertia,
        density=density,
        fit_efficiency=fit_eff,
        prior=np.array([1.0, eta0, cda0]),
        width=np.array(
            [
                MASS_FACTOR_WIDTH,
                EFFICIENCY_WIDTH,
                max(DRAG_AREA_WIDTH_SHARE * cda0, DRAG_AREA_WIDTH_FLOOR_M2),
            ]
        ),
        low=np.array([MASS_FACTOR_BOUNDS[0], EFFICIENCY_BOUNDS[0], cda_lo, lo_s]),
        high=np.array([k_high, EFFICIENCY_BOUNDS[1], cda_hi, hi_s]),
        cover_m=1.5 * logged + 50.0,
    )


def _solve(problem: _Problem) -> tuple[FloatArray, FloatArray, FloatArray]:
    """Fitted parameters (all four), covariance of the free ones, and the start point."""
    free = problem.free()
    start = np.concatenate([problem.prior, [0.0]])
    if problem.window.start is StartKind.ROLLING:
        start[3] = problem.window.start_speed_m_s
    start = np.clip(start, problem.low, problem.high)
    x_all = start.copy()

    def fun(xf: FloatArray) -> FloatArray:
        x_all[free] = xf
        return problem.residuals(x_all)

    scale = np.concatenate([problem.width, [0.05 if free[3] else 1.0]])[free]
    with np.errstate(all="ignore"):
        fit = least_squares(
            fun,
            start[free],
            bounds=(problem.low[free], problem.high[free]),
            x_scale=scale,
            diff_step=1e-4,
            method="trf",
            max_nfev=MAX_EVALUATIONS,
        )
        x = start.copy()
        x[free] = fit.x
        n = problem.window.time_s.size
        dof = max(n - int(free.sum()), 1)
        s2 = float(np.sum(fit.fun[:n] ** 2)) / dof
        cov = s2 * np.linalg.pinv(fit.jac.T @ fit.jac)
    if not (np.all(np.isfinite(x)) and np.all(np.isfinite(cov))):
        raise FitError("the pass cannot be fitted: the model diverges", parameter="log")
    return x, np.asarray(cov, np.float64), start


def _figures(
    problem: _Problem, x: FloatArray, cov: FloatArray
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
            at_bound=bool(free[j])
            and min(x[j] - problem.low[j], problem.high[j] - x[j]) <= 1e-3 * span[j],
        )
        for j in range(3)
    ]
    return figures, np.clip(corr, -1.0, 1.0)


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
    problem = _problem(model, window, air_density_kg_m3)
    x, cov, start = _solve(problem)
    figures, corr = _figures(problem, x, cov)
    before = problem.predicted(start) - window.speed_m_s
    fitted = problem.predicted(x)
    resid = fitted - window.speed_m_s
    run, t0 = problem.simulate(x)
    calibrated = problem.variant(x)
    gears = gear_residuals(window, resid, run, t0)
    notes = [*window.notices, *figure_notices(figures, corr, window, model.launch, gears)]
    if float(np.sqrt(np.mean(resid**2))) > POOR_MATCH_RMS_M_S:
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
    elif np.ptp(model.efficiency) > 0.0:
        notes.append(
            Notice(
                "efficiency_one_value",
                "The efficiency is fitted as one value for every gear; the per-gear "
                "values given are its prior (their mean over the gears logged).",
                "efficiency",
            )
        )
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
