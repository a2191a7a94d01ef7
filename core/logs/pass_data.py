"""A logged pass: the channels a data logger records, checked and converted to SI.

A pass is time with road speed, plus engine speed and/or longitudinal acceleration when the
logger has them. :func:`pass_log` takes the channels in the logger's own units (the units
of a log's channels are named here, in one table, for both the JSON arrays and the
delimited text of :mod:`core.logs.text`), validates them and returns SI arrays.
:func:`uniform_samples` puts them on an even time grid for the filters of
:mod:`core.logs.signal`.
"""

from __future__ import annotations

import enum
import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from core.errors import LogDataError
from core.notices import Notice
from core.units import KM_H_M_S, MPH_M_S, STANDARD_GRAVITY_M_S2

__all__ = [
    "MAX_SAMPLES",
    "MIN_SAMPLES",
    "AccelerationUnit",
    "PassLog",
    "SpeedUnit",
    "TimeUnit",
    "UniformSamples",
    "pass_log",
    "uniform_samples",
]

FloatArray = NDArray[np.float64]

MIN_SAMPLES = 20
MAX_SAMPLES = 20_000
MIN_INTERVAL_S = 0.001  # [s] median sample interval at most 1000 Hz ...
MAX_INTERVAL_S = 0.5  # [s] ... and at least 2 Hz
MAX_DURATION_S = 3600.0
MAX_SPEED_M_S = 150.0
MAX_RPM = 30_000.0
MAX_ACCELERATION_M_S2 = 5.0 * STANDARD_GRAVITY_M_S2
GAP_FACTOR = 5.0  # a step over 5 median intervals (and over 0.25 s) is reported as a gap
_MAX_GRID = 2 * MAX_SAMPLES


class TimeUnit(enum.Enum):
    """Unit of a log's time channel; ``si_factor`` converts to seconds."""

    S = "s"
    MS = "ms"

    @property
    def si_factor(self) -> float:
        """Multiplier to seconds [s]."""
        return 1.0 if self is TimeUnit.S else 0.001


class SpeedUnit(enum.Enum):
    """Unit of a log's road-speed channel; ``si_factor`` converts to m/s."""

    KM_H = "km/h"
    MPH = "mph"
    M_S = "m/s"

    @property
    def si_factor(self) -> float:
        """Multiplier to metres per second [m/s] (1 mph = 0.44704 m/s exactly)."""
        return {SpeedUnit.KM_H: KM_H_M_S, SpeedUnit.MPH: MPH_M_S, SpeedUnit.M_S: 1.0}[self]


class AccelerationUnit(enum.Enum):
    """Unit of a log's longitudinal-acceleration channel; ``si_factor`` converts to m/s^2."""

    G = "g"
    M_S2 = "m/s^2"

    @property
    def si_factor(self) -> float:
        """Multiplier to m/s^2 (standard gravity 9.80665 m/s^2 for ``g``)."""
        return STANDARD_GRAVITY_M_S2 if self is AccelerationUnit.G else 1.0


@dataclass(frozen=True)
class PassLog:
    """A validated logged pass in SI units.

    Attributes
    ----------
    time_s : ndarray, shape (n,)
        Sample times [s], strictly increasing.
    speed_m_s : ndarray, shape (n,)
        Road speed [m/s].
    rpm : ndarray, shape (n,) or None
        Engine speed [rpm], when logged.
    acceleration_m_s2 : ndarray, shape (n,) or None
        Longitudinal acceleration [m/s^2], when logged.
    notices : tuple of Notice
        Gaps in the log and other remarks.
    """

    time_s: FloatArray
    speed_m_s: FloatArray
    rpm: FloatArray | None
    acceleration_m_s2: FloatArray | None
    notices: tuple[Notice, ...]

    @property
    def samples(self) -> int:
        """Number of samples."""
        return int(self.time_s.size)

    @property
    def channels(self) -> tuple[str, ...]:
        """Names of the logged channels: time, speed, then rpm and acceleration if logged."""
        out = ["time", "speed"]
        if self.rpm is not None:
            out.append("rpm")
        if self.acceleration_m_s2 is not None:
            out.append("acceleration")
        return tuple(out)


def _channel(values: ArrayLike, name: str, size: int | None) -> FloatArray:
    arr = np.asarray(values, dtype=np.float64)
    if arr.ndim != 1:
        raise LogDataError(
            f"`{name}` must be a 1-D sequence, got {arr.ndim} dimensions", parameter=name
        )
    if size is None:
        if not MIN_SAMPLES <= arr.size <= MAX_SAMPLES:
            raise LogDataError(
                f"`{name}` must hold {MIN_SAMPLES} to {MAX_SAMPLES} samples, got {arr.size}",
                parameter=name,
            )
    elif arr.size != size:
        raise LogDataError(
            f"`{name}` must hold one value per `time` sample ({size}), got {arr.size}",
            parameter=name,
        )
    bad = np.flatnonzero(~np.isfinite(arr))
    if bad.size:
        i = int(bad[0])
        raise LogDataError(f"`{name}[{i}]` must be finite, got {arr[i]}", parameter=f"{name}[{i}]")
    return arr


def _in_range(arr: FloatArray, name: str, low: float, high: float, unit: str) -> None:
    bad = np.flatnonzero((arr < low) | (arr > high))
    if bad.size:
        i = int(bad[0])
        raise LogDataError(
            f"`{name}[{i}]` must lie in [{low:g}, {high:g}] {unit}, got {arr[i]:g}",
            parameter=f"{name}[{i}]",
        )


def pass_log(
    time: ArrayLike,
    speed: ArrayLike,
    *,
    speed_unit: SpeedUnit,
    rpm: ArrayLike | None = None,
    acceleration: ArrayLike | None = None,
    acceleration_unit: AccelerationUnit = AccelerationUnit.G,
    time_unit: TimeUnit = TimeUnit.S,
) -> PassLog:
    """Validate a logged pass given in the logger's units and convert it to SI.

    Parameters
    ----------
    time : array_like, shape (n,)
        Sample times [``time_unit``], strictly increasing; 20 to 20000 samples, a median
        interval of 1 ms to 0.5 s, at most an hour in all.
    speed : array_like, shape (n,)
        Road speed [``speed_unit``], 0 to 150 m/s.
    speed_unit : SpeedUnit
        Unit of ``speed``.
    rpm : array_like, shape (n,), optional
        Engine speed [rpm], 0 to 30000.
    acceleration : array_like, shape (n,), optional
        Longitudinal acceleration [``acceleration_unit``], forward positive, within 5 g.
    acceleration_unit : AccelerationUnit
        Unit of ``acceleration``.
    time_unit : TimeUnit
        Unit of ``time``.

    Returns
    -------
    PassLog

    Raises
    ------
    LogDataError
        Naming the channel and the first sample at fault (``"time[12]"``).

    Examples
    --------
    >>> log = pass_log(np.arange(20) * 0.05, np.linspace(0, 36, 20), speed_unit=SpeedUnit.KM_H)
    >>> round(float(log.speed_m_s[-1]), 3), log.channels
    (10.0, ('time', 'speed'))
    """
    t_raw = _channel(time, "time", None)
    n = t_raw.size
    v_raw = _channel(speed, "speed", n)
    steps = np.diff(t_raw)
    bad = np.flatnonzero(steps <= 0.0)
    if bad.size:
        i = int(bad[0]) + 1
        raise LogDataError(
            f"`time` must be strictly increasing: time[{i}] = {t_raw[i]:g} follows "
            f"time[{i - 1}] = {t_raw[i - 1]:g}",
            parameter=f"time[{i}]",
        )
    t = t_raw * time_unit.si_factor
    interval = float(np.median(np.diff(t)))
    if not MIN_INTERVAL_S * (1 - 1e-6) <= interval <= MAX_INTERVAL_S * (1 + 1e-6):
        raise LogDataError(
            f"`time` must have a median sample interval of {MIN_INTERVAL_S:g} to "
            f"{MAX_INTERVAL_S:g} s (1000 to 2 Hz), got {interval:g} s",
            parameter="time",
        )
    if t[-1] - t[0] > MAX_DURATION_S:
        raise LogDataError(
            f"`time` must span at most {MAX_DURATION_S:g} s, got {t[-1] - t[0]:g} s",
            parameter="time",
        )
    top = MAX_SPEED_M_S / speed_unit.si_factor
    _in_range(v_raw, "speed", 0.0, top, speed_unit.value)
    rpm_arr = None
    if rpm is not None:
        rpm_arr = _channel(rpm, "rpm", n)
        _in_range(rpm_arr, "rpm", 0.0, MAX_RPM, "rpm")
    acc = None
    if acceleration is not None:
        acc_raw = _channel(acceleration, "acceleration", n)
        limit = MAX_ACCELERATION_M_S2 / acceleration_unit.si_factor
        _in_range(acc_raw, "acceleration", -limit, limit, acceleration_unit.value)
        acc = acc_raw * acceleration_unit.si_factor
    notes = []
    gap = max(GAP_FACTOR * interval, 0.25)
    gaps = np.flatnonzero(np.diff(t) > gap)
    if gaps.size:
        k = int(gaps[0])
        notes.append(
            Notice(
                "log_gap",
                f"The log has {gaps.size} gap(s) longer than {gap:.2g} s, the first "
                f"{t[k + 1] - t[k]:.2f} s long after t = {t_raw[k]:g}; the channels are "
                "interpolated linearly across.",
                "time",
            )
        )
    return PassLog(t, v_raw * speed_unit.si_factor, rpm_arr, acc, tuple(notes))


@dataclass(frozen=True)
class UniformSamples:
    """A pass on an even time grid.

    Attributes
    ----------
    time_s : ndarray, shape (m,)
        Evenly spaced times [s].
    interval_s : float
        Grid spacing [s]: the log's median interval, coarsened if the grid would exceed
        40000 points.
    speed_m_s : ndarray, shape (m,)
        Road speed [m/s].
    rpm : ndarray, shape (m,) or None
        Engine speed [rpm].
    acceleration_m_s2 : ndarray, shape (m,) or None
        Logged longitudinal acceleration [m/s^2].
    """

    time_s: FloatArray
    interval_s: float
    speed_m_s: FloatArray
    rpm: FloatArray | None
    acceleration_m_s2: FloatArray | None


def uniform_samples(log: PassLog) -> UniformSamples:
    """Resample a pass linearly (``numpy.interp``) onto an even grid at its median interval.

    Parameters
    ----------
    log : PassLog
        The pass.

    Returns
    -------
    UniformSamples
    """
    t = log.time_s
    interval = float(np.median(np.diff(t)))
    span = float(t[-1] - t[0])
    points = math.floor(span / interval + 1e-9) + 1
    if points > _MAX_GRID:
        points = _MAX_GRID
        interval = span / (points - 1)
    grid = t[0] + interval * np.arange(points)

    def on_grid(values: FloatArray | None) -> FloatArray | None:
        return None if values is None else np.interp(grid, t, values)

    speed = np.interp(grid, t, log.speed_m_s)
    return UniformSamples(grid, interval, speed, on_grid(log.rpm), on_grid(log.acceleration_m_s2))
