"""A timed acceleration run: the simulated trace read off at the strip's and the caller's
distances and speeds, with top speed and a trace sampled evenly in time.

The trace changes its acceleration abruptly where a shift begins and ends and where the
rev limiter takes over; it carries such an instant twice, with the acceleration before and
after. :func:`sample_trace` reads every sample from the span it falls in, so a sample
inside a shift shows the coasting deceleration and one at the rev limit shows zero.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray
from scipy.optimize import brentq

from core.runs.drive_model import DriveModel
from core.runs.milestones import (
    STANDARD_DISTANCES,
    STANDARD_ROLLOUT_M,
    STANDARD_SPEEDS,
    TimedDistance,
    TimedSpeed,
    strip_times,
    time_at_distance,
    time_at_speed,
)
from core.runs.performance import TopSpeed, top_speed
from core.runs.simulate import RunResult, simulate_run

__all__ = [
    "QUARTER_MILE_M",
    "RunReport",
    "SampledTrace",
    "run_report",
    "sample_trace",
    "traction_limited_to",
]

FloatArray = NDArray[np.float64]
QUARTER_MILE_M = 402.336


@dataclass(frozen=True)
class SampledTrace:
    """The run at evenly spaced times.

    Attributes
    ----------
    time_s, speed_m_s, distance_m, engine_rpm, acceleration_m_s2 : ndarray, shape (k,)
        [s, m/s, m, rpm, m/s^2].
    gear : ndarray of int, shape (k,)
        Gear number.
    """

    time_s: FloatArray
    speed_m_s: FloatArray
    distance_m: FloatArray
    gear: NDArray[np.int64]
    engine_rpm: FloatArray
    acceleration_m_s2: FloatArray


def sample_trace(run: RunResult, points: int, end_time_s: float) -> SampledTrace:
    """Resample a run at ``points`` even times from 0 to ``end_time_s`` [s].

    Each sample is interpolated linearly between the two trace points around it, taking
    the later of two points at the same instant, so it never mixes values from either side
    of a shift's start or end or of the rev limiter's onset.
    """
    time = run.time_s
    t = np.linspace(0.0, min(end_time_s, float(time[-1])), points)
    k = np.clip(np.searchsorted(time, t, side="right") - 1, 0, time.size - 1)
    nxt = np.minimum(k + 1, time.size - 1)
    span = time[nxt] - time[k]
    w = np.where(span > 0.0, (t - time[k]) / np.where(span > 0.0, span, 1.0), 0.0)

    def at(values: FloatArray) -> FloatArray:
        out: FloatArray = values[k] + w * (values[nxt] - values[k])
        return out

    return SampledTrace(
        time_s=t,
        speed_m_s=at(run.speed_m_s),
        distance_m=at(run.distance_m),
        gear=run.gear[k],
        engine_rpm=at(run.engine_rpm),
        acceleration_m_s2=at(run.acceleration_m_s2),
    )


def traction_limited_to(model: DriveModel, run: RunResult) -> float | None:
    """Highest speed at which the tires limited the drive [m/s], None where they never did.

    Where the trace passes from a traction-limited point to one that is not within a gear,
    the speed between them where the drive force falls to the traction limit is found by
    ``scipy.optimize.brentq`` on the force balance; a gear left while still limited gives
    its shift speed.
    """
    limited = run.traction_limited
    if not limited.any():
        return None
    best = float(run.speed_m_s[limited].max())
    ends = np.flatnonzero(limited[:-1] & ~limited[1:] & (run.gear[:-1] == run.gear[1:]))
    for i in ends.tolist():
        g = int(run.gear[i]) - 1
        launching = run.speed_m_s[0] == 0.0 and g == run.start_gear - 1
        v0, v1 = float(run.speed_m_s[i]), float(run.speed_m_s[i + 1])
        if v1 <= v0:
            continue

        def excess(v: float, g: int = g, launching: bool = launching) -> float:
            force, _ = model.drive(g, np.array([v]), launching=launching)
            return float(force[0]) - model.traction_limit_n

        if excess(v0) > 0.0 >= excess(v1):
            best = max(best, float(brentq(excess, v0, v1, xtol=1e-9, rtol=1e-12)))
    return best


@dataclass(frozen=True)
class RunReport:
    """Everything a timed run reports.

    Attributes
    ----------
    run : RunResult
        The simulated run.
    finish : TimedDistance or TimedSpeed
        The caller's finish.
    distances : tuple of TimedDistance
        Strip distances, then the caller's.
    speeds : tuple of TimedSpeed
        Standard speed milestones, then the caller's intervals.
    top : TopSpeed
        Top speed, gear and limiter.
    traction_limited_to_m_s : float or None
        Highest speed at which the tires limited the drive [m/s], by root finding
        (:func:`traction_limited_to`).
    finish_time_s : float
        Time since first motion at the finish (or the run's end) [s].
    """

    run: RunResult
    finish: TimedDistance | TimedSpeed
    distances: tuple[TimedDistance, ...]
    speeds: tuple[TimedSpeed, ...]
    top: TopSpeed
    traction_limited_to_m_s: float | None
    finish_time_s: float


def run_report(
    model: DriveModel,
    shift_rpm: Sequence[float] | FloatArray,
    *,
    start_speed_m_s: float = 0.0,
    start_gear: int | None = None,
    rollout_m: float = STANDARD_ROLLOUT_M,
    finish_distance_m: float | None = None,
    finish_speed_m_s: float | None = None,
    extra_distances_m: Sequence[float] = (),
    extra_speeds_m_s: Sequence[tuple[float, float]] = (),
) -> RunReport:
    """Simulate and time a run.

    Parameters
    ----------
    model : DriveModel
        The car.
    shift_rpm : sequence of float, length g - 1
        Shift rpm per gear change [rpm].
    start_speed_m_s : float
        0 for a standing start, else a rolling start [m/s].
    start_gear : int, optional
        Gear to start in (1 = first); by default the lowest gear that can pull the start
        speed below its shift rpm.
    rollout_m : float
        Standing start: distance rolled before the clock starts [m]; ignored when rolling.
    finish_distance_m, finish_speed_m_s : float or None
        The finish (default the quarter mile): a distance from the clock start [m] or a
        speed [m/s].
    extra_distances_m : sequence of float
        More distances to time [m].
    extra_speeds_m_s : sequence of (float, float)
        More speed intervals to time [m/s].

    Returns
    -------
    RunReport
    """
    rollout = rollout_m if start_speed_m_s == 0.0 else 0.0
    if finish_distance_m is None and finish_speed_m_s is None:
        finish_distance_m = QUARTER_MILE_M
    dists = [(n, d, trap) for n, d, trap in STANDARD_DISTANCES]
    dists += [(f"{d:g} m", d, True) for d in extra_distances_m]
    speeds = [(n, a, b) for n, a, b in STANDARD_SPEEDS] + [
        (f"{a:g}-{b:g} m/s", a, b) for a, b in extra_speeds_m_s
    ]
    cover_d = max([d for _, d, _ in dists] + [finish_distance_m or 0.0]) + rollout
    cover_v = max([b for _, _, b in speeds] + [finish_speed_m_s or 0.0])
    run = simulate_run(
        model,
        shift_rpm,
        start_speed_m_s=start_speed_m_s,
        start_gear=start_gear,
        cover_distance_m=cover_d,
        cover_speed_m_s=cover_v,
    )
    target = float(finish_speed_m_s or 0.0)
    finish_d = [] if finish_distance_m is None else [("finish", finish_distance_m, True)]
    finish_v = [] if finish_d else [("finish", float(run.speed_m_s[0]), target)]
    timed_d, timed_v = strip_times(run, dists + finish_d, speeds + finish_v, rollout_m=rollout)
    finish: TimedDistance | TimedSpeed
    if finish_distance_m is not None:
        finish, timed_d = timed_d[-1], timed_d[:-1]
        end = time_at_distance(run, finish_distance_m + rollout)
    else:
        finish, timed_v = timed_v[-1], timed_v[:-1]
        end = time_at_speed(run, target)
    return RunReport(
        run=run,
        finish=finish,
        distances=timed_d,
        speeds=timed_v,
        top=top_speed(model),
        traction_limited_to_m_s=traction_limited_to(model, run),
        finish_time_s=float(run.time_s[-1]) if end is None else end,
    )
