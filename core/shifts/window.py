"""Shift windows: the time each gear change's shift rpm costs to the finish.

For every gear change the run is simulated with that change made at each rpm of a grid
across its usable range (from where the next gear would land below the curve's lowest
rpm, up to the rev limit) while the other changes stay at their time-optimal rpm
(:func:`core.runs.performance.optimal_shift_rpm`). The loss is the run's time to the finish
less the time-optimal run's. The window is the span of rpm around the best one where the
loss stays within a tolerance, its edges interpolated linearly between grid points. The
other shifts are held at their optimum rather than re-optimised at every grid point, which
is exact at the optimum and a close bound beside it (the shifts interact only through
the speed at which the next gear starts).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from core.errors import SimulationError
from core.runs.drive_model import DriveModel
from core.runs.milestones import time_at_distance, time_at_speed
from core.runs.performance import ShiftCriterion, optimal_shift_rpm, planned_shift_rpm
from core.runs.simulate import simulate_run
from core.shifts.search import OptimalShifts

__all__ = ["DEFAULT_TOLERANCE_S", "ShiftWindow", "ShiftWindows", "shift_windows"]

FloatArray = NDArray[np.float64]
DEFAULT_TOLERANCE_S = 0.01
MIN_POINTS, MAX_POINTS = 5, 61


@dataclass(frozen=True)
class ShiftWindow:
    """One gear change: loss against shift rpm, and the window within the tolerance.

    Attributes
    ----------
    from_gear, to_gear : int
        Gear numbers, 1 for first.
    reached : bool
        False when the change comes after the finish (its rpm cannot matter).
    rpm : ndarray, shape (n,)
        Shift rpm grid [rpm], the optimum included.
    loss_s : ndarray, shape (n,)
        Time lost to the finish at each rpm [s]; ``inf`` where the finish is not reached.
    best_rpm : float
        Time-optimal shift rpm [rpm].
    low_rpm, high_rpm : float
        Edges of the window where the loss stays within the tolerance [rpm].
    """

    from_gear: int
    to_gear: int
    reached: bool
    rpm: FloatArray
    loss_s: FloatArray
    best_rpm: float
    low_rpm: float
    high_rpm: float


@dataclass(frozen=True)
class ShiftWindows:
    """Windows for every gear change and the time-optimal run they are measured from.

    Attributes
    ----------
    optimal : OptimalShifts
        The time-optimal shift rpms and time to the finish [s].
    tolerance_s : float
        Loss accepted inside a window [s].
    windows : tuple of ShiftWindow
    evaluations : int
        Simulated runs, the search's included.
    """

    optimal: OptimalShifts
    tolerance_s: float
    windows: tuple[ShiftWindow, ...]
    evaluations: int


def _edge(rpm: FloatArray, loss: FloatArray, tol: float, k: int, step: int) -> float:
    """Walk from the best grid point ``k`` by ``step`` to where the loss crosses ``tol``."""
    j = k
    while 0 <= j + step < rpm.size and loss[j + step] <= tol:
        j += step
    nxt = j + step
    if not 0 <= nxt < rpm.size or not math.isfinite(loss[nxt]):
        return float(rpm[j])
    share = (tol - loss[j]) / (loss[nxt] - loss[j])
    return float(rpm[j] + share * (rpm[nxt] - rpm[j]))


def _gear_window(
    model: DriveModel,
    best: OptimalShifts,
    k: int,
    reached: bool,
    points: int,
    tolerance_s: float,
    time_to_finish: Callable[[FloatArray], tuple[float, float]],
) -> ShiftWindow:
    """The window of the shift out of gear index ``k``: the time lost against the best
    plan at each shift rpm on a grid from where the next gear lands on the curve's first
    point up to the rev limit (all zero when the run does not get to that shift)."""
    ratios = model.drivetrain.overall_ratios
    limit = model.rev_limit_rpm
    lower = min(
        max(model.curve.rpm_min * ratios[k] / ratios[k + 1], model.curve.rpm_min + 1.0),
        limit - 1.0,
    )
    opt = float(best.shift_rpm[k])
    grid = np.unique(np.concatenate([np.linspace(lower, limit, points), [opt]]))
    if not reached:
        return ShiftWindow(k + 1, k + 2, False, grid, np.zeros(grid.size), opt, lower, limit)
    loss = np.empty(grid.size)
    for j, r in enumerate(grid):
        trial = best.shift_rpm.copy()
        trial[k] = r
        loss[j] = time_to_finish(trial)[0] - best.time_s
    i = int(np.argmin(loss))
    return ShiftWindow(
        k + 1,
        k + 2,
        True,
        grid,
        loss,
        opt,
        _edge(grid, loss, tolerance_s, i, -1),
        _edge(grid, loss, tolerance_s, i, 1),
    )


def shift_windows(
    model: DriveModel,
    *,
    start_speed_m_s: float,
    rollout_m: float,
    finish_distance_m: float | None,
    finish_speed_m_s: float | None,
    tolerance_s: float = DEFAULT_TOLERANCE_S,
    points: int = 21,
    max_search_evaluations: int = 120,
) -> ShiftWindows:
    """Time lost to the finish against each gear change's shift rpm, and its window.

    Parameters
    ----------
    model : DriveModel
        The car.
    start_speed_m_s, rollout_m : float
        As for the run [m/s, m].
    finish_distance_m, finish_speed_m_s : float or None
        The finish: a distance from the clock start [m], or a speed [m/s]; one of them.
    tolerance_s : float
        Loss accepted inside a window [s], in (0, 1].
    points : int
        Grid points per gear change, 5 to 61.
    max_search_evaluations : int
        Budget of the time-optimal search [runs].

    Returns
    -------
    ShiftWindows

    Raises
    ------
    SimulationError
        A bad tolerance or grid size, no finish, or a car that cannot move off.
    """
    if not (math.isfinite(tolerance_s) and 0.0 < tolerance_s <= 1.0):
        raise SimulationError(
            f"`tolerance_s` must lie in (0, 1], got {tolerance_s}", parameter="tolerance_s"
        )
    if not MIN_POINTS <= points <= MAX_POINTS:
        raise SimulationError(
            f"`points` must lie in [{MIN_POINTS}, {MAX_POINTS}], got {points}", parameter="points"
        )
    if (finish_distance_m is None) == (finish_speed_m_s is None):
        raise SimulationError("give one finish: a distance or a speed", parameter="finish")
    best = optimal_shift_rpm(
        model,
        planned_shift_rpm(model, ShiftCriterion.NET_ACCELERATION),
        start_speed_m_s=start_speed_m_s,
        rollout_m=rollout_m,
        finish_distance_m=finish_distance_m,
        finish_speed_m_s=finish_speed_m_s,
        max_evaluations=max_search_evaluations,
    )
    cover = (finish_distance_m or 0.0) + rollout_m
    evaluations = best.evaluations

    def time_to_finish(shift_rpm: FloatArray) -> tuple[float, float]:
        """Time to the finish [s] and the clock time at which it is crossed [s]."""
        run = simulate_run(
            model,
            shift_rpm,
            start_speed_m_s=start_speed_m_s,
            cover_distance_m=cover,
            cover_speed_m_s=finish_speed_m_s or 0.0,
        )
        if finish_distance_m is not None:
            end = time_at_distance(run, cover)
            start = time_at_distance(run, rollout_m) or 0.0
        else:
            end, start = time_at_speed(run, float(finish_speed_m_s or 0.0)), 0.0
        if end is None:
            return math.inf, math.inf
        return end - start, end

    base = simulate_run(
        model,
        best.shift_rpm,
        start_speed_m_s=start_speed_m_s,
        cover_distance_m=cover,
        cover_speed_m_s=finish_speed_m_s or 0.0,
    )
    _, finish_clock = time_to_finish(best.shift_rpm)
    evaluations += 2
    windows = []
    for k in range(model.drivetrain.overall_ratios.size - 1):
        reached = k < len(base.shifts) and base.shifts[k].time_s < finish_clock
        window = _gear_window(model, best, k, reached, points, tolerance_s, time_to_finish)
        evaluations += window.rpm.size if reached else 0
        windows.append(window)
    return ShiftWindows(best, tolerance_s, tuple(windows), evaluations)
