"""One logged shift: its times, speeds, rpm and accelerations, and the verdict on it.

Before and after the shift the acceleration is the median over ``AVERAGE_WINDOW_S``, ending
half a smoothing window before the shift begins and starting half a window plus
``core.logs.crossover.SETTLE_S`` after it ends (the filter blurs the dip by half its
window). The fits, the empirical crossover and the verdict are those of
:mod:`core.logs.crossover`; rpm figures come from speed, overall ratio and the speed
calibration, which the logged rpm itself is too noisy at a shift's edges to give.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from core.logs.crossover import (
    FIT_SPAN_AFTER,
    FIT_SPAN_BEFORE,
    ShiftVerdict,
    VerdictBasis,
    acceleration_fit,
    crossover,
    verdict,
)
from core.logs.signal import SampleSegment

__all__ = ["AVERAGE_WINDOW_S", "LoggedShift", "ShiftSignals", "measure_shift"]

FloatArray = NDArray[np.float64]

AVERAGE_WINDOW_S = 0.4  # [s]


@dataclass(frozen=True)
class LoggedShift:
    """One logged gear change and the verdict on it.

    Attributes
    ----------
    from_gear, to_gear : int
        Gear numbers, 1 for first.
    start_time_s, end_time_s : float
        When the shift began and ended [s].
    speed_before_m_s, speed_after_m_s : float
        Smoothed road speed at the start and end [m/s].
    rpm_before, rpm_after : float
        Engine speed in the old gear at the start and in the new gear at the end, from
        speed, ratio and the speed calibration [rpm].
    acceleration_before_m_s2, acceleration_after_m_s2 : float
        Median acceleration just before and just after [m/s^2].
    acceleration_min_m_s2 : float
        Lowest smoothed acceleration during the shift: the depth of the torque
        interruption [m/s^2].
    crossover_speed_m_s : float or None
        Empirical crossover speed [m/s].
    crossover_rpm : float or None
        The shift rpm it implies in the old gear [rpm].
    target_rpm : float or None
        The shift rpm the verdict compares with: the crossover's, or the rev limit [rpm].
    deviation : float or None
        Shift speed over target speed, less 1 [-].
    verdict : ShiftVerdict
    basis : VerdictBasis
    logged_rpm : tuple of float or None
        Lowest and highest engine speed logged in the gear being left, up to the shift
        (from speed, as ``crossover_rpm``) [rpm]; None for a downshift.
    crossover_extrapolated : bool
        Whether the crossover lies outside ``logged_rpm``: the fit was extrapolated to rpm
        the log never reached in that gear, so the crossover is an estimate.
    """

    from_gear: int
    to_gear: int
    start_time_s: float
    end_time_s: float
    speed_before_m_s: float
    speed_after_m_s: float
    rpm_before: float
    rpm_after: float
    acceleration_before_m_s2: float
    acceleration_after_m_s2: float
    acceleration_min_m_s2: float
    crossover_speed_m_s: float | None
    crossover_rpm: float | None
    target_rpm: float | None
    deviation: float | None
    verdict: ShiftVerdict
    basis: VerdictBasis
    logged_rpm: tuple[float, float] | None = None
    crossover_extrapolated: bool = False

    @property
    def duration_s(self) -> float:
        """Length of the shift, the torque interruption [s]."""
        return self.end_time_s - self.start_time_s


@dataclass(frozen=True)
class ShiftSignals:
    """The smoothed pass a shift is measured on.

    Attributes
    ----------
    time, speed, accel : ndarray, shape (n,)
        Even times [s], smoothed speed [m/s] and acceleration [m/s^2].
    half : int
        Half the smoothing window [samples].
    settle : int
        ``SETTLE_S`` [samples].
    average : int
        ``AVERAGE_WINDOW_S`` [samples].
    """

    time: FloatArray
    speed: FloatArray
    accel: FloatArray
    half: int
    settle: int
    average: int


def _median(values: FloatArray, fallback: float) -> float:
    return float(np.median(values)) if values.size else fallback


def measure_shift(
    a: SampleSegment,
    b: SampleSegment,
    bounds: tuple[int, int, float, float],
    sig: ShiftSignals,
    ratio_per_speed: FloatArray,
    limit_rpm: float | None,
    tolerance: float,
) -> LoggedShift:
    """Measure one gear change and judge it.

    Parameters
    ----------
    a, b : SampleSegment
        The segments before and after the change.
    bounds : tuple of (int, int, float, float)
        Index of the last sample before the shift and of the first after it, and the
        shift's start and end [s].
    sig : ShiftSignals
        The smoothed pass.
    ratio_per_speed : ndarray, shape (g,)
        Engine rpm per m/s of road speed in each gear, calibration included [rpm*s/m].
    limit_rpm : float or None
        Rev limit [rpm], if known.
    tolerance : float
        Half-width of the "about right" band [-].

    Returns
    -------
    LoggedShift
    """
    i_s, i_e, t_s, t_e = bounds
    t, v, acc, h = sig.time, sig.speed, sig.accel, sig.half
    v_s, v_e = float(np.interp(t_s, t, v)), float(np.interp(t_e, t, v))
    n_per_v_i, n_per_v_j = float(ratio_per_speed[a.gear - 1]), float(ratio_per_speed[b.gear - 1])
    lo = max(a.first, i_s - h - sig.average)
    before = _median(acc[lo : max(i_s - h, lo) + 1], float(acc[i_s]))
    start = min(i_e + h + sig.settle, b.last)
    after = _median(acc[start : min(start + sig.average, b.last) + 1], float(acc[i_e]))
    cross_speed: float | None = None
    target: float | None = None
    deviation: float | None = None
    result, basis = ShiftVerdict.UNDETERMINED, VerdictBasis.DOWNSHIFT
    logged: tuple[float, float] | None = None
    if b.gear > a.gear:
        span = v[a.first : i_s + 1]
        logged = (float(span.min()) * n_per_v_i, float(span.max()) * n_per_v_i)
        idx_i = np.arange(a.first + h + sig.settle, i_s - h + 1)
        idx_i = idx_i[v[idx_i] >= v_s * (1.0 - FIT_SPAN_BEFORE)]
        idx_j = np.arange(i_e + h + sig.settle, b.last - h + 1)
        idx_j = idx_j[v[idx_j] <= v_e * (1.0 + FIT_SPAN_AFTER)]
        fit_i = acceleration_fit(v[idx_i], acc[idx_i], v_s)
        fit_j = acceleration_fit(v[idx_j], acc[idx_j], v_s)
        basis = VerdictBasis.INSUFFICIENT_DATA
        if fit_i is not None and fit_j is not None:
            cross = crossover(fit_i, fit_j, v_s)
            cross_speed = cross.speed_m_s
            limit_speed = None if limit_rpm is None else limit_rpm / n_per_v_i
            result, basis, target, deviation = verdict(v_s, cross, limit_speed, tolerance)
    return LoggedShift(
        from_gear=a.gear,
        to_gear=b.gear,
        start_time_s=t_s,
        end_time_s=t_e,
        speed_before_m_s=v_s,
        speed_after_m_s=v_e,
        rpm_before=v_s * n_per_v_i,
        rpm_after=v_e * n_per_v_j,
        acceleration_before_m_s2=before,
        acceleration_after_m_s2=after,
        acceleration_min_m_s2=float(acc[i_s : i_e + 1].min()),
        crossover_speed_m_s=cross_speed,
        crossover_rpm=None if cross_speed is None else cross_speed * n_per_v_i,
        target_rpm=None if target is None else target * n_per_v_i,
        deviation=deviation,
        verdict=result,
        basis=basis,
        logged_rpm=logged,
        crossover_extrapolated=_outside(cross_speed, logged, n_per_v_i),
    )


def _outside(
    speed: float | None, logged: tuple[float, float] | None, rpm_per_speed: float
) -> bool:
    if speed is None or logged is None:
        return False
    rpm = speed * rpm_per_speed
    return not logged[0] * (1.0 - 1e-9) <= rpm <= logged[1] * (1.0 + 1e-9)
