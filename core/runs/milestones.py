"""Reading a run like a timing system: elapsed times at distances and speeds, trap speeds.

Drag-strip conventions (common practice): timers at 60, 330, 660 (1/8 mile), 1000 and
1320 ft (1/4 mile); a trap speed is the average speed over the last 66 ft before the line.
From a standstill the clock starts once the car has rolled ``rollout_m`` (about a foot,
tire-dependent), so a distance D is timed from x = rollout to x = rollout + D. Speed
milestones (0-60 mph, ...) are timed from the first motion, and also given with the
rollout time subtracted, as published road-test figures often are.

A single run is timed as a batch of one by the strip timer of :mod:`core.runs.batch_timing`,
so a run and a sweep of many runs read their times the same way.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from core.runs.batch_timing import (
    TraceProbes,
    probe_distances,
    probe_speeds,
    timed_distances,
    timed_speeds,
)
from core.runs.simulate import RunResult
from core.units import FOOT_M, KM_H_M_S, MPH_M_S

__all__ = [
    "STANDARD_DISTANCES",
    "STANDARD_ROLLOUT_M",
    "STANDARD_SPEEDS",
    "TimedDistance",
    "TimedSpeed",
    "speed_at_distance",
    "strip_times",
    "time_at_distance",
    "time_at_speed",
    "timed_distance",
    "timed_speed",
]

STANDARD_ROLLOUT_M = FOOT_M
"""Rollout of a standing start when the caller gives none [m] (one foot, common practice)."""
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


_MOVED = np.ones(1, dtype=np.bool_)


def _probes(run: RunResult, distances: ArrayLike, speeds: ArrayLike) -> TraceProbes:
    """The strip timer's probes read over one run: the whole trace as one block (distance
    never falls), or for speeds, in blocks along which speed does not fall (a shift's
    coast or a slowing car starts a new block)."""
    probes = TraceProbes(
        1, np.asarray(distances, dtype=np.float64), np.asarray(speeds, dtype=np.float64)
    )
    probes.add_trace(run.time_s, run.speed_m_s, run.distance_m, run.acceleration_m_s2)
    return probes


def _value(a: NDArray[np.float64]) -> float | None:
    value = float(a[0])
    return None if np.isnan(value) else value


def time_at_distance(run: RunResult, distance_m: float) -> float | None:
    """Time [s] from the start of motion at which the run reaches ``distance_m`` [m], taking
    the acceleration as constant between trace points (exact for constant acceleration)."""
    if distance_m < 0.0:
        return None
    return _value(_probes(run, [distance_m], []).passing()[0][:, 0])


def speed_at_distance(run: RunResult, distance_m: float) -> float | None:
    """Road speed [m/s] as the run passes ``distance_m`` [m]."""
    if distance_m < 0.0:
        return None
    return _value(_probes(run, [distance_m], []).passing()[1][:, 0])


def time_at_speed(run: RunResult, speed_m_s: float) -> float | None:
    """Time [s] at which the run first reaches ``speed_m_s`` [m/s], or None.

    Between two trace points that both accelerate, ``1/a`` is taken linear in speed, as
    the integrator's trapezoid rule does, so the time at a speed between them is
    quadratic in speed and meets both points; otherwise it is linear.
    """
    return _value(_probes(run, [], [speed_m_s]).reaching()[:, 0])


def strip_times(
    run: RunResult,
    distances: Sequence[tuple[str, float, bool]],
    speeds: Sequence[tuple[str, float, float]],
    *,
    rollout_m: float,
) -> tuple[tuple[TimedDistance, ...], tuple[TimedSpeed, ...]]:
    """Time distances and speed intervals of one run the way a strip does.

    Parameters
    ----------
    run : RunResult
        The run.
    distances : sequence of (str, float, bool)
        Name, distance from where the clock starts [m] and whether to time the trap speed
        over the last 66 ft, as :data:`STANDARD_DISTANCES`.
    speeds : sequence of (str, float, float)
        Name, start and end speed [m/s] (start below end), as :data:`STANDARD_SPEEDS`;
        each timed between the first reach of either speed.
    rollout_m : float
        Distance rolled before the clock starts [m] (0 for a rolling start).

    Returns
    -------
    tuple of TimedDistance, tuple of TimedSpeed
        In the order asked.
    """
    probes = _probes(run, probe_distances(rollout_m, distances), probe_speeds(speeds))
    timed_d = tuple(
        TimedDistance(
            t.name,
            t.distance_m,
            _value(t.elapsed_s),
            _value(t.speed_m_s),
            _value(t.trap_speed_m_s),
        )
        for t in timed_distances(probes, distances, _MOVED)
    )
    timed_v = tuple(
        TimedSpeed(t.name, t.from_m_s, t.to_m_s, _value(t.elapsed_s), _value(t.less_rollout_s))
        for t in timed_speeds(probes, speeds, _MOVED)
    )
    return timed_d, timed_v


def timed_distance(
    run: RunResult, name: str, distance_m: float, *, rollout_m: float, trap: bool
) -> TimedDistance:
    """Time one distance the way a strip does (see :func:`strip_times`).

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
    return strip_times(run, [(name, distance_m, trap)], [], rollout_m=rollout_m)[0][0]


def timed_speed(
    run: RunResult, name: str, from_m_s: float, to_m_s: float, *, rollout_m: float
) -> TimedSpeed:
    """Time between two speeds, first reach of each (see :func:`strip_times`).

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
    return strip_times(run, [], [(name, from_m_s, to_m_s)], rollout_m=rollout_m)[1][0]
