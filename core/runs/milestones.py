"""Reading a run like a timing system: elapsed times at distances and speeds, trap speeds.

Drag-strip conventions (common practice): timers at 60, 330, 660 (1/8 mile), 1000 and
1320 ft (1/4 mile); a trap speed is the average speed over the last 66 ft before the line.
From a standstill the clock starts once the car has rolled ``rollout_m`` (about a foot,
tire-dependent), so a distance D is timed from x = rollout to x = rollout + D. Speed
milestones (0-60 mph, ...) are timed from the first motion, and also given with the
rollout time subtracted, as published road-test figures often are.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from core.runs.simulate import RunResult
from core.units import FOOT_M, KM_H_M_S, MPH_M_S

__all__ = [
    "STANDARD_DISTANCES",
    "STANDARD_ROLLOUT_M",
    "STANDARD_SPEEDS",
    "TRAP_WINDOW_M",
    "TimedDistance",
    "TimedSpeed",
    "speed_at_distance",
    "time_at_distance",
    "time_at_speed",
    "timed_distance",
    "timed_speed",
]

STANDARD_ROLLOUT_M = FOOT_M
"""Rollout of a standing start when the caller gives none [m] (one foot, common practice)."""
TRAP_WINDOW_M = 66.0 * FOOT_M
STANDARD_DISTANCES: tuple[tuple[str, float, bool], ...] = (
    ("60 ft", 60.0 * FOOT_M, False),
    ("330 ft", 330.0 * FOOT_M, False),
    ("1/8 mile", 660.0 * FOOT_M, True),
    ("1000 ft", 1000.0 * FOOT_M, False),
    ("1/4 mile", 1320.0 * FOOT_M, True),
    ("400 m", 400.0, False),
    ("1000 m", 1000.0, False),
)
"""Name, distance [m] and whether a trap speed is timed there."""

STANDARD_SPEEDS: tuple[tuple[str, float, float], ...] = (
    ("0-60 mph", 0.0, 60.0 * MPH_M_S),
    ("0-100 km/h", 0.0, 100.0 * KM_H_M_S),
    ("0-100 mph", 0.0, 100.0 * MPH_M_S),
)
"""Name, start and end speed [m/s]."""


def _passing(run: RunResult, distance_m: float) -> tuple[float, float] | None:
    """Time [s] and speed [m/s] as the run passes ``distance_m``, taking the acceleration
    as constant between trace points (exact for constant acceleration)."""
    x = run.distance_m
    if distance_m > x[-1] * (1 + 1e-12) or distance_m < 0.0:
        return None
    i = int(np.clip(np.searchsorted(x, distance_m, side="right") - 1, 0, x.size - 2))
    t0, t1 = float(run.time_s[i]), float(run.time_s[i + 1])
    v0, v1 = float(run.speed_m_s[i]), float(run.speed_m_s[i + 1])
    dx = distance_m - float(x[i])
    if t1 <= t0 or dx <= 0.0:
        return t0, v0
    a = (v1 - v0) / (t1 - t0)
    root = max(v0 * v0 + 2.0 * a * dx, 0.0) ** 0.5
    tau = 2.0 * dx / (v0 + root) if v0 + root > 0.0 else 0.0
    tau = min(tau, t1 - t0)
    return t0 + tau, v0 + a * tau


def time_at_distance(run: RunResult, distance_m: float) -> float | None:
    """Time [s] from the start of motion at which the run reaches ``distance_m`` [m]."""
    passing = _passing(run, distance_m)
    return None if passing is None else passing[0]


def speed_at_distance(run: RunResult, distance_m: float) -> float | None:
    """Road speed [m/s] as the run passes ``distance_m`` [m]."""
    passing = _passing(run, distance_m)
    return None if passing is None else passing[1]


def time_at_speed(run: RunResult, speed_m_s: float) -> float | None:
    """Time [s] at which the run first reaches ``speed_m_s`` [m/s], or None.

    Between two trace points that both accelerate, ``1/a`` is taken linear in speed, as
    the integrator's trapezoid rule does, so the time at a speed between them is
    quadratic in speed and meets both points; otherwise it is linear.
    """
    v = run.speed_m_s
    reached = np.flatnonzero(v >= speed_m_s)
    if reached.size == 0:
        return None
    k = int(reached[0])
    if k == 0:
        return float(run.time_s[0])
    v0, v1 = float(v[k - 1]), float(v[k])
    t0, t1 = float(run.time_s[k - 1]), float(run.time_s[k])
    a0, a1 = float(run.acceleration_m_s2[k - 1]), float(run.acceleration_m_s2[k])
    dv, s = v1 - v0, speed_m_s - v0
    if a0 > 0.0 and a1 > 0.0 and t1 > t0:
        shape = s / a0 + (1.0 / a1 - 1.0 / a0) * s * s / (2.0 * dv)
        return t0 + (t1 - t0) * shape / (0.5 * dv * (1.0 / a0 + 1.0 / a1))
    return t0 + s / dv * (t1 - t0)


@dataclass(frozen=True)
class TimedDistance:
    """Elapsed time over a distance.

    Attributes
    ----------
    name : str
        Label, e.g. ``"1/4 mile"``.
    distance_m : float
        Timed distance [m].
    elapsed_s : float or None
        Elapsed time [s]; None when the run did not get there.
    speed_m_s : float or None
        Speed crossing the line [m/s].
    trap_speed_m_s : float or None
        Average over the last 66 ft [m/s], where timed.
    """

    name: str
    distance_m: float
    elapsed_s: float | None
    speed_m_s: float | None
    trap_speed_m_s: float | None


@dataclass(frozen=True)
class TimedSpeed:
    """Elapsed time between two speeds.

    Attributes
    ----------
    name : str
        Label, e.g. ``"0-60 mph"``.
    from_m_s, to_m_s : float
        Speeds [m/s].
    elapsed_s : float or None
        Elapsed time [s]; None when the run did not reach ``to_m_s`` or started above
        ``from_m_s``.
    less_rollout_s : float or None
        For a start from rest: ``elapsed_s`` less the time to roll out.
    """

    name: str
    from_m_s: float
    to_m_s: float
    elapsed_s: float | None
    less_rollout_s: float | None


def timed_distance(
    run: RunResult, name: str, distance_m: float, *, rollout_m: float, trap: bool
) -> TimedDistance:
    """Time a distance the way a strip does.

    Parameters
    ----------
    run : RunResult
        The run.
    name : str
        Label.
    distance_m : float
        Distance from the point where the clock starts [m].
    rollout_m : float
        Distance rolled before the clock starts [m] (0 for a rolling start).
    trap : bool
        Whether to time the trap speed over the last 66 ft.

    Returns
    -------
    TimedDistance
    """
    start = time_at_distance(run, rollout_m)
    end = time_at_distance(run, rollout_m + distance_m)
    if start is None or end is None:
        return TimedDistance(name, distance_m, None, None, None)
    trap_speed = None
    if trap and distance_m > TRAP_WINDOW_M:
        entry = time_at_distance(run, rollout_m + distance_m - TRAP_WINDOW_M)
        if entry is not None and end > entry:
            trap_speed = TRAP_WINDOW_M / (end - entry)
    return TimedDistance(
        name, distance_m, end - start, speed_at_distance(run, rollout_m + distance_m), trap_speed
    )


def timed_speed(
    run: RunResult, name: str, from_m_s: float, to_m_s: float, *, rollout_m: float
) -> TimedSpeed:
    """Time between two speeds, first reach of each.

    Parameters
    ----------
    run : RunResult
        The run.
    name : str
        Label.
    from_m_s, to_m_s : float
        Speeds [m/s], ``from_m_s < to_m_s``.
    rollout_m : float
        Rollout of a start from rest [m]; 0 for a rolling start.

    Returns
    -------
    TimedSpeed
    """
    if run.speed_m_s[0] > from_m_s + 1e-9:
        return TimedSpeed(name, from_m_s, to_m_s, None, None)
    start = time_at_speed(run, from_m_s) if from_m_s > 0.0 else float(run.time_s[0])
    end = time_at_speed(run, to_m_s)
    if start is None or end is None:
        return TimedSpeed(name, from_m_s, to_m_s, None, None)
    less = None
    if from_m_s == 0.0 and run.speed_m_s[0] == 0.0:
        rolled = time_at_distance(run, rollout_m)
        less = None if rolled is None else end - rolled
    return TimedSpeed(name, from_m_s, to_m_s, end - start, less)
