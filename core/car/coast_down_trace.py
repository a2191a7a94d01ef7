"""The speed trace a coast-down fit draws through one logged run.

For given road-load coefficients the coasting car follows
``dv/dt = g(v) = -(F0 + F1*v + F2*v**2) / m_e``; only its start speed is left to choose.
The start speed that best matches the logged speed (least squares) is found by Gauss-Newton
steps: for an autonomous equation the sensitivity of the trace to its start is
``dv(t)/dv0 = g(v(t)) / g(v0)`` exactly, so each step costs one integration and the logged
speed is never differentiated. With the start at its best the trace is the run's fitted
curve, to draw against the logged samples.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from core.car.coast_down import coast_down_speed
from core.errors import FitError

__all__ = ["CoastDownTrace", "coast_down_trace"]

FloatArray = NDArray[np.float64]
MAX_STEPS = 6
MIN_POINTS, MAX_POINTS = 2, 2000


@dataclass(frozen=True)
class CoastDownTrace:
    """One run's fitted speed trace.

    Attributes
    ----------
    start_speed_m_s : float
        Start speed of the trace that best matches the logged speed [m/s].
    time_s : ndarray, shape (points,)
        Evenly spaced times from the run's first to its last sample [s].
    speed_m_s : ndarray, shape (points,)
        Fitted speed at those times [m/s].
    residual_rms_m_s : float
        RMS of logged minus fitted speed at the logged times [m/s].
    """

    start_speed_m_s: float
    time_s: FloatArray
    speed_m_s: FloatArray
    residual_rms_m_s: float


def _rate(v: FloatArray, coefficients: FloatArray, mass_kg: float) -> FloatArray:
    f0, f1, f2 = coefficients
    return np.asarray(-(f0 + f1 * v + f2 * v * np.abs(v)) / mass_kg, np.float64)


def _check(t: FloatArray, v: FloatArray, c: FloatArray, mass_kg: float, points: int) -> None:
    if t.ndim != 1 or t.shape != v.shape:
        raise FitError("`speed_m_s` must match `time_s` in length", parameter="speed_m_s")
    if t.size < MIN_POINTS:
        raise FitError(
            f"`time_s` must hold at least {MIN_POINTS} samples, got {t.size}", parameter="time_s"
        )
    if not (np.all(np.isfinite(t)) and np.all(np.isfinite(v))):
        raise FitError("`time_s` and `speed_m_s` must be finite", parameter="time_s")
    if np.any(np.diff(t) <= 0.0):
        raise FitError("`time_s` must be strictly increasing", parameter="time_s")
    if c.shape != (3,) or not np.all(np.isfinite(c)) or np.any(c < 0.0) or c.sum() <= 0.0:
        raise FitError(
            "`coefficients` must be F0, F1, F2 >= 0, not all zero", parameter="coefficients"
        )
    if not math.isfinite(mass_kg) or mass_kg <= 0.0:
        raise FitError(
            f"`equivalent_mass_kg` must be > 0, got {mass_kg:g}", parameter="equivalent_mass_kg"
        )
    if not MIN_POINTS <= points <= MAX_POINTS:
        raise FitError(
            f"`points` must be {MIN_POINTS} to {MAX_POINTS}, got {points}", parameter="points"
        )


def coast_down_trace(
    time_s: ArrayLike,
    speed_m_s: ArrayLike,
    coefficients: ArrayLike,
    equivalent_mass_kg: float,
    points: int = 121,
) -> CoastDownTrace:
    """The fitted trace of one logged coast-down for given coefficients.

    Parameters
    ----------
    time_s : array_like, shape (n,)
        Logged times [s], strictly increasing.
    speed_m_s : array_like, shape (n,)
        Logged road speed [m/s].
    coefficients : array_like, shape (3,)
        ``F0`` [N], ``F1`` [N*s/m], ``F2`` [N*s^2/m^2], each >= 0.
    equivalent_mass_kg : float
        Mass plus rotating parts referred to the road [kg], > 0.
    points : int, optional
        Times of the returned trace, evenly spaced over the run (2 to 2000).

    Returns
    -------
    CoastDownTrace

    Raises
    ------
    FitError
        Mismatched or unordered samples, negative coefficients or a mass <= 0.

    Examples
    --------
    >>> t = np.linspace(0.0, 60.0, 61)
    >>> v = coast_down_speed(t, 30.0, [150.0, 0.0, 0.4], 1200.0)
    >>> logged = v.copy()
    >>> logged[0] += 1.0  # a bad first sample does not move the start
    >>> round(coast_down_trace(t, logged, [150.0, 0.0, 0.4], 1200.0).start_speed_m_s, 1)
    30.0
    """
    t = np.asarray(time_s, dtype=np.float64)
    v = np.asarray(speed_m_s, dtype=np.float64)
    c = np.asarray(coefficients, dtype=np.float64)
    _check(t, v, c, equivalent_mass_kg, points)
    v0 = max(float(v[0]), 1e-3)
    for _ in range(MAX_STEPS):
        model = coast_down_speed(t, v0, c, equivalent_mass_kg)
        start_rate = float(_rate(np.array([v0]), c, equivalent_mass_kg)[0])
        sensitivity = _rate(model, c, equivalent_mass_kg) / start_rate
        step = float(np.dot(sensitivity, v - model) / np.dot(sensitivity, sensitivity))
        v0 = max(v0 + step, 1e-3)
        if abs(step) <= 1e-9 * v0:
            break
    model = coast_down_speed(t, v0, c, equivalent_mass_kg)
    grid = np.linspace(float(t[0]), float(t[-1]), points)
    return CoastDownTrace(
        start_speed_m_s=v0,
        time_s=grid,
        speed_m_s=coast_down_speed(grid, v0, c, equivalent_mass_kg),
        residual_rms_m_s=float(np.sqrt(np.mean((v - model) ** 2))),
    )
