"""Matching a torque converter to an engine: stall speed and operating points.

At wide-open throttle the engine settles where its torque equals what the converter
absorbs, ``T_engine(n) = (n/K(SR))**2`` with ``SR = n_turbine/n``; the converter then
multiplies that torque by ``TR(SR)``. With the turbine held (``SR = 0``) the speed is the
stall speed.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray
from scipy.optimize import brentq

from core.checks import require_positive
from core.converter.tables import TorqueConverter
from core.errors import CurveError, VehicleError

__all__ = [
    "ConverterOperatingPoints",
    "EngineTorqueFn",
    "converter_operating_points",
    "stall_speed_rpm",
]

FloatArray = NDArray[np.float64]
EngineTorqueFn = Callable[[FloatArray], FloatArray]
"""Vectorised wide-open-throttle engine torque [N*m] at engine speeds [rpm], shape (n,)."""

_BISECTION_STEPS = 28  # brackets narrow to (rpm_max - rpm_min) / 2**28, below 1e-4 rpm


def _fail(name: str, condition: str) -> VehicleError:
    return VehicleError(f"`{name}` {condition}", parameter=name)


@dataclass(frozen=True, eq=False)
class ConverterOperatingPoints:
    """Where engine and converter settle at each turbine speed.

    Attributes
    ----------
    engine_rpm : ndarray, shape (n,)
        Engine (impeller) speed [rpm].
    speed_ratio : ndarray, shape (n,)
        Turbine over engine speed [-]; 1 when locked.
    input_torque_nm : ndarray, shape (n,)
        Torque into the converter from the engine [N*m].
    output_torque_nm : ndarray, shape (n,)
        Torque out of the turbine [N*m].
    torque_ratio : ndarray, shape (n,)
        Output over input torque [-]; 1 when locked.
    efficiency : ndarray, shape (n,)
        ``speed_ratio*torque_ratio`` [-]; 1 when locked.
    locked : ndarray of bool, shape (n,)
        Whether the lock-up clutch is closed.
    """

    engine_rpm: FloatArray
    speed_ratio: FloatArray
    input_torque_nm: FloatArray
    output_torque_nm: FloatArray
    torque_ratio: FloatArray
    efficiency: FloatArray
    locked: NDArray[np.bool_]


def _check_rpm_bounds(rpm_min: float, rpm_max: float) -> None:
    require_positive(rpm_min, "rpm_min", VehicleError)
    require_positive(rpm_max, "rpm_max", VehicleError)
    if rpm_max <= rpm_min:
        raise _fail("rpm_max", f"must be > `rpm_min` {rpm_min:g}, got {rpm_max:g}")


def _engine_torque(engine_torque_fn: EngineTorqueFn, rpm: FloatArray) -> FloatArray:
    torque = np.asarray(engine_torque_fn(rpm), dtype=np.float64)
    if torque.shape != rpm.shape:
        raise CurveError(
            f"`engine_torque_fn` must return shape {rpm.shape}, got {torque.shape}",
            parameter="engine_torque_fn",
        )
    if not np.all(np.isfinite(torque)):
        raise CurveError(
            "`engine_torque_fn` must return finite torque", parameter="engine_torque_fn"
        )
    return torque


def stall_speed_rpm(
    converter: TorqueConverter,
    engine_torque_fn: EngineTorqueFn,
    *,
    rpm_min: float,
    rpm_max: float,
) -> float:
    """Engine speed at stall, where ``T_engine(n) = (n/K(0))**2``.

    Parameters
    ----------
    converter : TorqueConverter
        The converter; only ``K(0)`` matters.
    engine_torque_fn : callable
        Vectorised engine torque [N*m] at engine speeds [rpm].
    rpm_min, rpm_max : float
        Engine speed range over which the torque is known [rpm], 0 < rpm_min < rpm_max.

    Returns
    -------
    float
        Stall speed [rpm], found with ``scipy.optimize.brentq``.

    Raises
    ------
    VehicleError
        If the stall speed lies outside ``[rpm_min, rpm_max]``.

    Examples
    --------
    >>> from core.converter.tables import TorqueConverter
    >>> c = TorqueConverter.from_stall(2.0, stall_k_factor=100.0)
    >>> round(stall_speed_rpm(c, lambda n: 0 * n + 400.0, rpm_min=800, rpm_max=7000), 6)
    2000.0
    """
    _check_rpm_bounds(rpm_min, rpm_max)
    stall_k = float(converter.k_factor[0])

    def surplus(rpm: float) -> float:
        torque = _engine_torque(engine_torque_fn, np.array([rpm], dtype=np.float64))
        return float(torque[0]) - (rpm / stall_k) ** 2

    low, high = surplus(rpm_min), surplus(rpm_max)
    if low <= 0.0:
        raise VehicleError(
            f"stall speed lies at or below `rpm_min` {rpm_min:g}: the converter absorbs "
            f"{(rpm_min / stall_k) ** 2:g} N*m there",
            parameter="converter",
        )
    if high >= 0.0:
        raise VehicleError(
            f"stall speed lies at or above `rpm_max` {rpm_max:g}: the converter absorbs only "
            f"{(rpm_max / stall_k) ** 2:g} N*m there",
            parameter="converter",
        )
    return float(brentq(surplus, rpm_min, rpm_max, xtol=1e-9, rtol=4 * np.finfo(float).eps))


def converter_operating_points(
    converter: TorqueConverter,
    turbine_rpm: ArrayLike,
    engine_torque_fn: EngineTorqueFn,
    *,
    rpm_min: float,
    rpm_max: float,
) -> ConverterOperatingPoints:
    """Engine speed and torques at wide-open throttle for each turbine speed.

    Solves ``T_engine(n) = (n/K(n_t/n))**2`` for ``n`` in ``[max(n_t, rpm_min), rpm_max]`` by
    bisection on the whole array at once (a fixed 28 halvings). Where no root lies in that
    bracket the engine is held at the end it is pushed against:

    * if the converter already absorbs the engine's torque at the lower end (at ``SR = 1``,
      or at ``rpm_min`` for slow turbines), the engine runs there and delivers its full
      torque;
    * if it cannot absorb the engine's torque even at ``rpm_max``, the engine is held at
      ``rpm_max`` (the rev limiter) and delivers what the converter absorbs.

    With a lock-up clutch, a point whose speed ratio reaches ``lockup_speed_ratio`` (and whose
    turbine turns at least ``rpm_min``) is locked: engine speed equals turbine speed and the
    engine's torque passes 1:1. Output torque is ``TR(SR)`` times input torque.

    Parameters
    ----------
    converter : TorqueConverter
        The converter.
    turbine_rpm : array_like, shape (n,)
        Turbine (converter output) speed [rpm], 0..rpm_max.
    engine_torque_fn : callable
        Vectorised engine torque [N*m] at engine speeds [rpm]; called only inside
        ``[rpm_min, rpm_max]``.
    rpm_min, rpm_max : float
        Engine speed range over which the torque is known [rpm], 0 < rpm_min < rpm_max.

    Returns
    -------
    ConverterOperatingPoints
        Arrays of shape (n,).

    Raises
    ------
    VehicleError
        If a turbine speed is negative, not finite or above ``rpm_max``.
    CurveError
        If ``engine_torque_fn`` returns the wrong shape or non-finite values.

    Examples
    --------
    >>> from core.converter.tables import TorqueConverter
    >>> c = TorqueConverter.from_stall(2.0, stall_k_factor=100.0, coupling_speed_ratio=0.8,
    ...                                k_factor_rise=0.0)
    >>> p = converter_operating_points(c, [0.0, 1000.0, 1800.0], lambda n: 0 * n + 400.0,
    ...                                rpm_min=800.0, rpm_max=7000.0)
    >>> p.engine_rpm.round(6).tolist(), p.output_torque_nm.round(6).tolist()
    ([2000.0, 2000.0, 1800.0], [800.0, 550.0, 400.0])
    """
    _check_rpm_bounds(rpm_min, rpm_max)
    turbine = np.atleast_1d(np.asarray(turbine_rpm, dtype=np.float64))
    if turbine.ndim != 1:
        raise _fail("turbine_rpm", f"must be 1-D, got shape {turbine.shape}")
    bad = np.flatnonzero(~np.isfinite(turbine) | (turbine < 0.0) | (turbine > rpm_max))
    if bad.size:
        index = int(bad[0])
        raise _fail(
            f"turbine_rpm[{index}]",
            f"must lie in [0, rpm_max = {rpm_max:g}], got {turbine[index]}",
        )

    def surplus(engine_rpm: FloatArray) -> FloatArray:
        absorbed = (engine_rpm / converter.k_factor_at(turbine / engine_rpm)) ** 2
        return _engine_torque(engine_torque_fn, engine_rpm) - absorbed

    low = np.maximum(turbine, rpm_min)
    high = np.full_like(turbine, rpm_max)
    pinned_low = surplus(low) <= 0.0
    pinned_high = ~pinned_low & (surplus(high) >= 0.0)
    below, above = low.copy(), high.copy()
    for _ in range(_BISECTION_STEPS):
        middle = 0.5 * (below + above)
        rising = surplus(middle) > 0.0
        below = np.where(rising, middle, below)
        above = np.where(rising, above, middle)
    engine = np.where(pinned_low, low, np.where(pinned_high, high, 0.5 * (below + above)))
    speed_ratio = turbine / engine
    torque_in = _engine_torque(engine_torque_fn, engine)
    absorbed = (engine / converter.k_factor_at(speed_ratio)) ** 2
    torque_in = np.where(pinned_high, absorbed, torque_in)
    torque_ratio = converter.torque_ratio_at(speed_ratio)

    lockup = converter.lockup_speed_ratio
    if lockup is None:
        locked = np.zeros(turbine.shape, dtype=np.bool_)
    else:
        locked = (speed_ratio >= lockup) & (turbine >= rpm_min)
    if np.any(locked):
        locked_torque = _engine_torque(engine_torque_fn, np.clip(turbine, rpm_min, rpm_max))
        engine = np.where(locked, turbine, engine)
        speed_ratio = np.where(locked, 1.0, speed_ratio)
        torque_in = np.where(locked, locked_torque, torque_in)
        torque_ratio = np.where(locked, 1.0, torque_ratio)
    return ConverterOperatingPoints(
        engine_rpm=engine,
        speed_ratio=speed_ratio,
        input_torque_nm=torque_in,
        output_torque_nm=torque_ratio * torque_in,
        torque_ratio=torque_ratio,
        efficiency=speed_ratio * torque_ratio,
        locked=locked,
    )
