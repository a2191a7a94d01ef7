"""What a described car does beyond wheel force: shifts by net acceleration, top speed,
cruise rpm, gradeability, and shift rpms that minimise the time of a run."""

from __future__ import annotations

import enum
import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from core.batchrun import batch_finish_times
from core.milestones import time_at_distance, time_at_speed
from core.plan import ShiftPoint, shift_plan
from core.roadload import gradeability_percent
from core.shifting import ShiftChoice, best_shifts
from core.shiftpattern import pattern_search
from core.simulate import DriveModel, RunResult, simulate_run

__all__ = [
    "OptimalShifts",
    "ShiftCriterion",
    "TopSpeed",
    "acceleration_shift_points",
    "acceleration_shifts",
    "cruise_rpm",
    "gradeability_by_gear",
    "optimal_shift_rpm",
    "planned_shift_rpm",
    "top_speed",
]

FloatArray = NDArray[np.float64]
_GRID = 257
_SEARCH_STEP = 0.08  # first step of the shift search, as a share of the rev limit
_SEARCH_MIN_STEP_RPM = 2.0
_SEARCH_ROUNDS = 14


def acceleration_shifts(model: DriveModel) -> tuple[ShiftChoice, ...]:
    """Quickest shifts by net acceleration: road load and rotating inertia counted.

    The same search as the wheel-force plan (:func:`core.shifting.best_shifts`) with each
    gear's effort its net acceleration ``(min(F, F_traction) - R(v)) / m_g``. The heavier
    equivalent mass of the lower gear moves the shift below the force crossover. Crossings
    are located on the 513-point scan by linear interpolation within the bracketing cell.

    Parameters
    ----------
    model : DriveModel
        The car.

    Returns
    -------
    tuple of ShiftChoice, length g - 1
    """
    ratios = model.drivetrain.overall_ratios
    step = ratios[1:] / ratios[:-1]
    r_factor = model.tire.rolling_radius_m * (2.0 * math.pi / 60.0)

    def efforts(n: FloatArray) -> tuple[FloatArray, FloatArray]:
        cur = np.empty_like(n)
        nxt = np.empty_like(n)
        for k in range(n.shape[0]):
            v = n[k] * r_factor / ratios[k]
            cur[k] = model.acceleration(k, v)[0]
            nxt[k] = model.acceleration(k + 1, v)[0]
        return cur, nxt

    low = model.curve.rpm_min / step
    return best_shifts(efforts, None, low, np.full(step.size, model.rev_limit_rpm))


@dataclass(frozen=True)
class TopSpeed:
    """Highest speed and what holds the car there.

    Attributes
    ----------
    speed_m_s : float
        Top speed [m/s].
    gear : int
        Gear it is reached in (1 = first).
    limited_by : str
        ``"drag"`` (road load equals drive force) or ``"rev_limit"``.
    by_gear_m_s : ndarray, shape (g,)
        Top speed in each gear [m/s] (NaN where the gear cannot accelerate at all).
    """

    speed_m_s: float
    gear: int
    limited_by: str
    by_gear_m_s: FloatArray


def top_speed(model: DriveModel) -> TopSpeed:
    """Top speed in each gear and overall, from where drive force meets road load.

    Parameters
    ----------
    model : DriveModel
        The car.

    Returns
    -------
    TopSpeed
    """
    gears = model.drivetrain.gear_count
    by_gear = np.full(gears, np.nan)
    limits = ["rev_limit"] * gears
    for g in range(gears):
        lo = model.speed_at_rpm(g, model.curve.rpm_min)
        hi = model.speed_at_rpm(g, model.rev_limit_rpm)
        v = np.linspace(lo, hi, _GRID)
        force, _ = model.drive(g, v)
        spare = np.minimum(force, model.traction_limit_n) - model.vehicle.road_load.force_n(v)
        spare[-1] = min(spare[-1], spare[-2])  # the limiter cuts drive just past the limit
        strong = np.flatnonzero(spare > 0.0)
        if strong.size == 0:
            continue  # the gear cannot hold any speed in its range
        first = int(strong[0])  # the car reaches this gear's range above here
        neg = np.flatnonzero(spare[first:] <= 0.0)
        if neg.size == 0:
            by_gear[g] = hi
            continue
        k = first + int(neg[0])
        frac = spare[k - 1] / (spare[k - 1] - spare[k])
        by_gear[g] = v[k - 1] + frac * (v[k] - v[k - 1])
        limits[g] = "drag"
    if np.all(np.isnan(by_gear)):
        return TopSpeed(0.0, 1, "drag", by_gear)
    best = int(np.nanargmax(by_gear))
    return TopSpeed(float(by_gear[best]), best + 1, limits[best], by_gear)


def cruise_rpm(model: DriveModel, speed_m_s: float) -> FloatArray:
    """Engine speed [rpm] at a steady road speed in each gear (no converter slip), shape (g,)."""
    return np.array(
        [
            float(model.coupled_rpm(g, np.array([speed_m_s]))[0])
            for g in range(model.drivetrain.gear_count)
        ]
    )


def gradeability_by_gear(model: DriveModel) -> FloatArray:
    """Steepest grade [%] each gear can climb at a steady speed, shape (g,).

    The most spare force over the gear's speed range, ``min(F, F_traction) - R_level(v)``
    with ``R_level`` the road load less its grade term, against ``m*g*sin(theta)``.
    """
    out = np.zeros(model.drivetrain.gear_count)
    load = model.vehicle.road_load
    for g in range(out.size):
        v = np.linspace(
            model.speed_at_rpm(g, model.curve.rpm_min),
            model.speed_at_rpm(g, model.rev_limit_rpm),
            _GRID,
        )
        force, _ = model.drive(g, v)
        spare = np.minimum(force, model.traction_limit_n) - (load.force_n(v) - load.grade_force_n)
        out[g] = float(gradeability_percent(float(spare.max()), model.vehicle.mass_kg))
    return out


@dataclass(frozen=True)
class OptimalShifts:
    """Shift rpms that minimise the time of a run.

    Attributes
    ----------
    shift_rpm : ndarray, shape (g - 1,)
        Best shift rpm per gear change [rpm].
    time_s : float
        Run time with them [s].
    baseline_time_s : float
        Run time with the starting shift rpms [s].
    evaluations : int
        Simulated runs spent.
    """

    shift_rpm: FloatArray
    time_s: float
    baseline_time_s: float
    evaluations: int


def optimal_shift_rpm(
    model: DriveModel,
    initial_rpm: FloatArray,
    *,
    start_speed_m_s: float,
    rollout_m: float,
    finish_distance_m: float | None,
    finish_speed_m_s: float | None,
    max_evaluations: int = 120,
) -> OptimalShifts:
    """Shift rpms minimising the time to the finish over full simulated runs, shift time and
    traction included, by a pattern search whose trial points are run in batches
    (:func:`core.shiftpattern.pattern_search`, :func:`core.batchrun.batch_finish_times`).

    Parameters
    ----------
    model : DriveModel
        The car.
    initial_rpm : ndarray, shape (g - 1,)
        Starting shift rpms (e.g. the plan's).
    start_speed_m_s, rollout_m : float
        As for the run [m/s, m].
    finish_distance_m, finish_speed_m_s : float or None
        The finish: a distance from the clock start [m], or a speed [m/s].
    max_evaluations : int
        Budget of simulated runs; the search's batches take about two runs' time for a
        dozen runs.

    Returns
    -------
    OptimalShifts
    """
    ratios = model.drivetrain.overall_ratios
    step = ratios[1:] / ratios[:-1]
    limit = model.rev_limit_rpm
    lower = np.minimum(
        np.maximum(model.curve.rpm_min / step, model.curve.rpm_min + 1.0), limit - 1.0
    )
    cover = (finish_distance_m or 0.0) + rollout_m
    evaluations = 0
    x0 = np.clip(np.asarray(initial_rpm, dtype=np.float64), lower, limit)

    def timed(rpm: FloatArray) -> tuple[float, RunResult]:
        nonlocal evaluations
        evaluations += 1
        run = simulate_run(
            model,
            rpm,
            start_speed_m_s=start_speed_m_s,
            cover_distance_m=cover,
            cover_speed_m_s=finish_speed_m_s or 0.0,
        )
        if finish_distance_m is not None:
            t_end = time_at_distance(run, cover)
            t_start = time_at_distance(run, rollout_m) or 0.0
        else:
            t_end = time_at_speed(run, float(finish_speed_m_s or 0.0))
            t_start = 0.0
        return (1e6 if t_end is None else t_end - t_start), run

    baseline, first = timed(x0)
    # only the shifts made before the finish can change its time
    finish_at = baseline + (time_at_distance(first, rollout_m) or 0.0)
    active = np.array(
        [k for k, s in enumerate(first.shifts) if s.time_s < finish_at], dtype=np.int64
    )
    if active.size == 0:
        return OptimalShifts(x0, baseline, baseline, evaluations)

    def time_rows(rows: FloatArray) -> FloatArray:
        return batch_finish_times(
            model,
            rows,
            start_speed_m_s=start_speed_m_s,
            rollout_m=rollout_m,
            finish_distance_m=finish_distance_m,
            finish_speed_m_s=finish_speed_m_s,
        )

    found = pattern_search(
        time_rows,
        x0,
        baseline,
        active,
        (lower, np.full(x0.size, limit)),
        step_rpm=_SEARCH_STEP * limit,
        min_step_rpm=_SEARCH_MIN_STEP_RPM,
        max_rounds=_SEARCH_ROUNDS,
        max_evaluations=max_evaluations - evaluations,
    )
    evaluations += found.evaluations
    return OptimalShifts(found.shift_rpm, found.time_s, baseline, evaluations)


class ShiftCriterion(enum.Enum):
    """What a shift plan maximises: wheel force, or net acceleration of the described car."""

    TRACTIVE_FORCE = "tractive_force"
    NET_ACCELERATION = "net_acceleration"


def planned_shift_rpm(model: DriveModel, criterion: ShiftCriterion) -> FloatArray:
    """Shift rpm per gear change by the chosen criterion [rpm], shape (g - 1,)."""
    if criterion is ShiftCriterion.NET_ACCELERATION:
        return np.array([c.shift_rpm for c in acceleration_shifts(model)])
    plan = shift_plan(model.curve, model.drivetrain, model.tire, rev_limit_rpm=model.rev_limit_rpm)
    return np.array([s.shift_rpm for s in plan.shifts])


def acceleration_shift_points(model: DriveModel) -> tuple[ShiftPoint, ...]:
    """The net-acceleration shifts as shift points, forces at the shift included.

    Parameters
    ----------
    model : DriveModel
        The car.

    Returns
    -------
    tuple of ShiftPoint, length g - 1
    """
    ratios = model.drivetrain.overall_ratios
    out = []
    for i, choice in enumerate(acceleration_shifts(model)):
        n_s = choice.shift_rpm
        q = float(ratios[i + 1] / ratios[i])
        v = model.speed_at_rpm(i, n_s)
        before, _ = model.drive(i, np.array([v]))
        after, _ = model.drive(i + 1, np.array([v]))
        out.append(
            ShiftPoint(
                from_gear=i + 1,
                to_gear=i + 2,
                shift_rpm=n_s,
                shift_speed_m_s=v,
                rpm_after=n_s * q,
                rpm_drop=n_s * (1.0 - q),
                reason=choice.reason,
                force_before_n=float(before[0]),
                force_after_n=float(after[0]),
                crossings=choice.crossings,
                coincident_rpm=choice.coincident_rpm,
            )
        )
    return tuple(out)
