"""The least-squares problem of a pass calibration: parameters, priors, bounds, residuals.

The parameters are ``x = (k, eta, CdA, s)``: the mass factor, the driveline efficiency, the
drag area [m^2] and the nuisance ``s``, the launch instant relative to the last sample at
rest [s] (standing start) or the start speed [m/s] (rolling start). Each trial rebuilds the
car with ``dataclasses.replace`` and runs :func:`core.runs.simulate.simulate_run`; the
simulated speed is read at the logged times. Each figure ``p`` with the caller's value ``p0``
adds the prior residual ``PRIOR_SPEED_M_S * (p - p0) / width``.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray
from scipy.optimize import least_squares

from core.car.calibration_pass import FitWindow, StartKind, launch_bounds
from core.car.vehicle import Coupling, RotatingInertia
from core.engine.curves import CurveSource
from core.errors import FitError, SimulationError
from core.runs.drive_model import DriveModel
from core.runs.simulate import RunResult, simulate_run

__all__ = [
    "DRAG_AREA_BOUNDS_M2",
    "DRAG_AREA_WIDTH_FLOOR_M2",
    "DRAG_AREA_WIDTH_SHARE",
    "EFFICIENCY_BOUNDS",
    "EFFICIENCY_WIDTH",
    "MASS_FACTOR_BOUNDS",
    "MASS_FACTOR_WIDTH",
    "MAX_EVALUATIONS",
    "PRIOR_SPEED_M_S",
    "CalibrationProblem",
    "base_inertia",
    "calibration_problem",
    "solve_calibration",
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


def base_inertia(model: DriveModel) -> RotatingInertia:
    """The caller's rotating parts, or the inertias equal to the mass-factor rule [kg*m^2]."""
    if model.vehicle.inertia is not None:
        return model.vehicle.inertia
    mr2 = model.vehicle.mass_kg * model.tire.rolling_radius_m**2
    return RotatingInertia(_RULE_ENGINE * mr2, 0.0, _RULE_WHEELS * mr2)


@dataclass(frozen=True)
class CalibrationProblem:
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


def calibration_problem(
    model: DriveModel, window: FitWindow, density: float
) -> CalibrationProblem:
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
    return CalibrationProblem(
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


def solve_calibration(problem: CalibrationProblem) -> tuple[FloatArray, FloatArray, FloatArray]:
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
