"""Road load from coast-downs: fit ``F(v) = F0 + F1*v + F2*v**2`` to the speed trace itself.

The car coasts in neutral, so its equivalent mass ``m_e`` (mass plus the rotating parts
referred to the road) slows under the road load alone::

    m_e * dv/dt = -(F0 + F1*v + F2*v**2)

The fit integrates this equation from a fitted start speed of every run and matches the
integrated speed to the logged speed at the logged times (``scipy.optimize.least_squares``),
so measured speed is never differentiated and its noise is averaged rather than amplified:
the procedure of SAE J2263 / J1263 in outline. Each run is fitted on its own (the three
coefficients and its start speed); the coefficients of the runs in each direction are
averaged, then the two directions, which cancels a constant grade and a steady wind as the
standards' paired runs in opposite directions do. Confidence intervals come from each run's
Jacobian at the solution (Gauss-Newton covariance ``s^2 (J^T J)^-1``), carried through the
averages, with Student's t.

Correction to reference conditions (SAE J1263 in outline; values from memory): the
aerodynamic term scales with air density, ``F2_ref = F2 * rho_ref / rho_test``; the rolling
terms with tire temperature, ``F0_ref = F0 * (1 + K0*(T - T_ref))`` and likewise ``F1``,
``K0 = 0.00864 /K``; reference 20 degC, 98.21 kPa, dry air. Wind and grade corrections of
the standards are left to the paired runs.
"""

from __future__ import annotations

import enum
import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray
from scipy import stats
from scipy.integrate import solve_ivp
from scipy.optimize import least_squares

from core.car.coast_down_reference import (
    ReferenceCorrection,
    reference_correction,
)
from core.errors import FitError
from core.notices import Notice
from core.units import KM_H_M_S, STANDARD_GRAVITY_M_S2

__all__ = [
    "EQUIVALENT_MASS_FACTOR",
    "CoastDownFit",
    "CoastDownRun",
    "CoastDownRunFit",
    "TravelDirection",
    "coast_down_speed",
    "fit_coast_down",
]

FloatArray = NDArray[np.float64]

EQUIVALENT_MASS_FACTOR = 1.03
"""Default equivalent mass over test mass in neutral [-] (common practice)."""
CONFIDENCE = 0.95
MIN_SAMPLES = 10
MIN_MASS_KG = 10.0  # lighter than any vehicle that coasts on a road
MAX_RUNS = 10
SHORT_SPAN_M_S = 40.0 * KM_H_M_S  # a run spanning less than 40 km/h separates the terms poorly
NOISY_RMS_M_S = KM_H_M_S  # residual above 1 km/h RMS: a noisy or disturbed run
WIDE_INTERVAL_SHARE = 0.10


class TravelDirection(enum.Enum):
    """Direction of a run along the test road; opposite runs cancel grade and wind."""

    OUT = "out"
    BACK = "back"


@dataclass(frozen=True)
class CoastDownRun:
    """One logged coast-down in neutral.

    Attributes
    ----------
    time_s : ndarray, shape (n,)
        Sample times [s], strictly increasing.
    speed_m_s : ndarray, shape (n,)
        Road speed at each time [m/s], > 0.
    direction : TravelDirection
        Direction of travel.
    """

    time_s: FloatArray
    speed_m_s: FloatArray
    direction: TravelDirection = TravelDirection.OUT


@dataclass(frozen=True)
class CoastDownRunFit:
    """One run's own fit and its agreement with the shared coefficients.

    Attributes
    ----------
    direction : TravelDirection
    samples : int
    duration_s, start_speed_m_s, end_speed_m_s : float
        Span of the run [s, m/s, m/s].
    coefficients : ndarray, shape (3,)
        The run fitted alone: ``F0`` [N], ``F1`` [N*s/m], ``F2`` [N*s^2/m^2].
    residual_rms_m_s : float
        RMS of logged minus fitted speed over the run [m/s].
    """

    direction: TravelDirection
    samples: int
    duration_s: float
    start_speed_m_s: float
    end_speed_m_s: float
    coefficients: FloatArray
    residual_rms_m_s: float


@dataclass(frozen=True)
class CoastDownFit:
    """Road-load coefficients fitted to coast-downs.

    Attributes
    ----------
    coefficients : ndarray, shape (3,)
        ``F0`` [N], ``F1`` [N*s/m], ``F2`` [N*s^2/m^2] in the test conditions.
    low, high : ndarray, shape (3,)
        Bounds of the 95 % confidence interval of each coefficient, same units.
    residual_rms_m_s, residual_max_m_s : float
        RMS and largest absolute speed residual of the runs' own fits [m/s].
    equivalent_mass_kg : float
        Equivalent mass used [kg].
    runs : tuple of CoastDownRunFit
    reference : ReferenceCorrection
    drag_area_m2 : float
        ``2*F2_ref/rho_ref`` [m^2].
    rolling_coefficient : float
        ``F0_ref/(m*g)`` [-], with driveline drag in neutral included.
    notices : tuple of Notice
    """

    coefficients: FloatArray
    low: FloatArray
    high: FloatArray
    residual_rms_m_s: float
    residual_max_m_s: float
    equivalent_mass_kg: float
    runs: tuple[CoastDownRunFit, ...]
    reference: ReferenceCorrection
    drag_area_m2: float
    rolling_coefficient: float
    notices: tuple[Notice, ...]


def coast_down_speed(
    time_s: ArrayLike,
    start_speed_m_s: float,
    coefficients: ArrayLike,
    equivalent_mass_kg: float,
) -> FloatArray:
    """Speed of a coasting car at the given times, by integrating its equation of motion.

    Parameters
    ----------
    time_s : array_like, shape (n,)
        Times [s], increasing; the first is the start.
    start_speed_m_s : float
        Speed at the first time [m/s].
    coefficients : array_like, shape (3,)
        ``F0`` [N], ``F1`` [N*s/m], ``F2`` [N*s^2/m^2].
    equivalent_mass_kg : float
        Mass plus rotating parts referred to the road [kg].

    Returns
    -------
    ndarray, shape (n,)
        Speed [m/s].
    """
    t = np.asarray(time_s, dtype=np.float64)
    f0, f1, f2 = (float(c) for c in np.asarray(coefficients, np.float64))

    def rate(_t: float, v: FloatArray) -> FloatArray:
        return -(f0 + f1 * v + f2 * v * np.abs(v)) / equivalent_mass_kg

    sol = solve_ivp(
        rate, (float(t[0]), float(t[-1])), [start_speed_m_s], t_eval=t, rtol=1e-8, atol=1e-8
    )
    return np.asarray(sol.y[0], dtype=np.float64)


def _check_run(run: CoastDownRun, k: int) -> None:
    t, v = run.time_s, run.speed_m_s
    if t.shape != v.shape or t.ndim != 1:
        raise FitError(f"`speed[{k}]` must match `time[{k}]` in length", parameter=f"runs[{k}]")
    if t.size < MIN_SAMPLES:
        raise FitError(
            f"`runs[{k}]` must have at least {MIN_SAMPLES} samples, got {t.size}",
            parameter=f"runs[{k}]",
        )
    if not (np.all(np.isfinite(t)) and np.all(np.isfinite(v))):
        raise FitError(f"`runs[{k}]` must hold finite numbers", parameter=f"runs[{k}]")
    if np.any(np.diff(t) <= 0.0):
        raise FitError(f"`time[{k}]` must be strictly increasing", parameter=f"runs[{k}]")
    if np.any(v <= 0.0):
        raise FitError(f"`speed[{k}]` must be > 0 throughout", parameter=f"runs[{k}]")
    if v[-1] >= v[0]:
        raise FitError(f"`runs[{k}]` must slow down (end below start)", parameter=f"runs[{k}]")


def _start_guess(runs: Sequence[CoastDownRun], mass_kg: float, me: float) -> FloatArray:
    drop = sum(float(r.speed_m_s[0] - r.speed_m_s[-1]) for r in runs)
    span = sum(float(r.time_s[-1] - r.time_s[0]) for r in runs)
    mean_force = me * drop / span
    f0 = min(0.012 * mass_kg * STANDARD_GRAVITY_M_S2, 0.5 * mean_force)
    v2 = float(np.mean(np.concatenate([r.speed_m_s**2 for r in runs])))
    return np.array([f0, 0.0, max((mean_force - f0) / v2, 1e-3)])


def _least_squares(
    run: CoastDownRun, me: float, mass_kg: float
) -> tuple[FloatArray, FloatArray, FloatArray, float]:
    """One run: coefficients and start speed, their covariance, residuals, degrees of freedom."""
    guess = _start_guess([run], mass_kg, me)
    x0 = np.concatenate([guess, [float(run.speed_m_s[0])]])

    def residuals(x: FloatArray) -> FloatArray:
        return coast_down_speed(run.time_s, x[3], x[:3], me) - run.speed_m_s

    scale = np.concatenate([np.maximum(guess, [1.0, 0.1, 0.01]), [1.0]])
    with np.errstate(all="ignore"):
        fit = least_squares(
            residuals, x0, bounds=(0.0, np.inf), x_scale=scale, method="trf", max_nfev=100
        )
        dof = float(max(fit.fun.size - x0.size, 1))
        cov = (2.0 * float(fit.cost) / dof) * np.linalg.pinv(fit.jac.T @ fit.jac)
    if not (np.all(np.isfinite(fit.x)) and np.all(np.isfinite(cov))):
        raise FitError("a run cannot be fitted: the model diverges", parameter="runs")
    return np.asarray(fit.x, np.float64), np.asarray(cov, np.float64), -fit.fun, dof


def _direction_average(
    runs: Sequence[CoastDownRun], xs: Sequence[FloatArray], covs: Sequence[FloatArray]
) -> tuple[FloatArray, FloatArray]:
    """Mean of the direction means of the coefficients, and its covariance."""
    means, mean_covs = [], []
    for d in TravelDirection:
        idx = [k for k, r in enumerate(runs) if r.direction is d]
        if idx:
            means.append(np.mean([xs[k][:3] for k in idx], axis=0))
            mean_covs.append(sum(covs[k][:3, :3] for k in idx) / len(idx) ** 2)
    value = np.mean(means, axis=0)
    cov = sum(mean_covs) / len(means) ** 2
    return np.asarray(value, np.float64), np.asarray(cov, np.float64)


def _run_fit(run: CoastDownRun, x: FloatArray, resid: FloatArray) -> CoastDownRunFit:
    return CoastDownRunFit(
        direction=run.direction,
        samples=int(run.time_s.size),
        duration_s=float(run.time_s[-1] - run.time_s[0]),
        start_speed_m_s=float(run.speed_m_s[0]),
        end_speed_m_s=float(run.speed_m_s[-1]),
        coefficients=x[:3],
        residual_rms_m_s=float(np.sqrt(np.mean(resid**2))),
    )


def _notices(runs: Sequence[CoastDownRunFit], value: FloatArray, half: FloatArray) -> list[Notice]:
    out: list[Notice] = []
    for k, r in enumerate(runs):
        if r.start_speed_m_s - r.end_speed_m_s < SHORT_SPAN_M_S or r.samples < 3 * MIN_SAMPLES:
            out.append(
                Notice(
                    "run_too_short",
                    f"Run {k + 1} spans too little speed or too "
                    "few samples to separate the terms well; coast from higher "
                    "to lower speed.",
                    f"runs[{k}]",
                )
            )
        if r.residual_rms_m_s > NOISY_RMS_M_S:
            out.append(
                Notice(
                    "run_too_noisy",
                    f"Run {k + 1} departs from the fitted "
                    "road load by more than the noise limit; check for wind "
                    "gusts, traffic, braking or a poor speed signal.",
                    f"runs[{k}]",
                )
            )
    if len({r.direction for r in runs}) < 2:
        out.append(
            Notice(
                "one_direction",
                "All runs go the same way, so grade and wind "
                "are not cancelled; add runs in the opposite direction.",
            )
        )
    if value[1] <= 0.0:
        out.append(
            Notice(
                "linear_term_at_zero",
                "F1 fitted at its lower bound 0; the data do not support a linear term.",
            )
        )
    for j, name in ((0, "F0"), (2, "F2")):
        if half[j] > WIDE_INTERVAL_SHARE * value[j]:
            out.append(
                Notice(
                    "wide_interval",
                    f"The confidence interval of {name} is "
                    "wider than 10 % of its value; add or lengthen runs.",
                )
            )
    return out


def fit_coast_down(
    runs: Sequence[CoastDownRun],
    mass_kg: float,
    equivalent_mass_kg: float | None = None,
    temperature_k: float | None = None,
    pressure_pa: float | None = None,
    relative_humidity: float = 0.0,
) -> CoastDownFit:
    """Fit road-load coefficients to logged coast-downs.

    Parameters
    ----------
    runs : sequence of CoastDownRun
        1 to 10 runs; the two directions are weighted equally.
    mass_kg : float
        Test mass [kg], > 0.
    equivalent_mass_kg : float, optional
        Mass plus rotating parts in neutral [kg]; default 1.03 x mass (common practice).
    temperature_k, pressure_pa : float, optional
        Ambient temperature [K] and station pressure [Pa] of the test; both needed for the
        correction to reference conditions.
    relative_humidity : float, optional
        Relative humidity of the test [0..1].

    Returns
    -------
    CoastDownFit

    Raises
    ------
    FitError
        No runs, too many, a run too short, times not increasing, or a run not slowing.
    """
    if not math.isfinite(mass_kg) or mass_kg < MIN_MASS_KG:
        raise FitError(
            f"`mass_kg` must be >= {MIN_MASS_KG:g}, got {mass_kg:g}", parameter="mass_kg"
        )
    me = EQUIVALENT_MASS_FACTOR * mass_kg if equivalent_mass_kg is None else equivalent_mass_kg
    if not math.isfinite(me) or me < mass_kg:
        raise FitError(
            f"`equivalent_mass_kg` must be >= `mass_kg` ({mass_kg:g}), got {me:g}",
            parameter="equivalent_mass_kg",
        )
    if not 1 <= len(runs) <= MAX_RUNS:
        raise FitError(f"`runs` must hold 1 to {MAX_RUNS} runs, got {len(runs)}", parameter="runs")
    for k, run in enumerate(runs):
        _check_run(run, k)
    solved = [_least_squares(r, me, mass_kg) for r in runs]
    value, cov = _direction_average(runs, [s[0] for s in solved], [s[1] for s in solved])
    dof = min(s[3] for s in solved)
    half = stats.t.ppf(0.5 + CONFIDENCE / 2.0, dof) * np.sqrt(np.maximum(np.diag(cov), 0.0))
    run_fits = tuple(_run_fit(r, s[0], s[2]) for r, s in zip(runs, solved, strict=True))
    resid = np.concatenate([s[2] for s in solved])
    ref = reference_correction(value, temperature_k, pressure_pa, relative_humidity)
    return CoastDownFit(
        coefficients=value,
        low=np.maximum(value - half, 0.0),
        high=value + half,
        residual_rms_m_s=float(np.sqrt(np.mean(resid**2))),
        residual_max_m_s=float(np.max(np.abs(resid))),
        equivalent_mass_kg=me,
        runs=run_fits,
        reference=ref,
        drag_area_m2=2.0 * float(ref.coefficients[2]) / ref.reference_density_kg_m3,
        rolling_coefficient=float(ref.coefficients[0]) / (mass_kg * STANDARD_GRAVITY_M_S2),
        notices=tuple(_notices(run_fits, value, half)),
    )
