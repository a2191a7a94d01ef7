"""The objective of a final-drive sweep at one ratio, and its continuous optimum.

The optimum is searched between the listed ratios either side of the best listed one: the
sampled candidates locate the basin, the search refines it, so a local minimum elsewhere
in the span is not mistaken for it. The search is a nested grid: up to ``_OPTIMUM_GRID``
evenly spaced ratios across the bracket are evaluated together, in one batch of runs
(:func:`core.runs.batch.batch_runs`, the integrator of the single run), and the bracket
narrows to the neighbours of the best of them, until it is narrower than
``_OPTIMUM_XATOL``. The objective of a run is not smooth in the ratio everywhere (a shift
moves across a timing line), which a grid takes in its stride.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from core.choice.sweep_spec import SWEEP_DISTANCES, SWEEP_SPEEDS, CruiseTarget, SweepObjective
from core.driveline.drivetrain import Drivetrain
from core.driveline.tires import Tire
from core.engine.curves import RPM_TO_RAD_S
from core.errors import SimulationError
from core.runs.drive_model import DriveModel
from core.runs.milestones import timed_distance, timed_speed
from core.runs.performance import top_speed
from core.runs.simulate import simulate_run

__all__ = ["SweepOptimum", "continuous_optimum", "objective_at", "top_gear_rpm"]

FloatArray = NDArray[np.float64]
IntArray = NDArray[np.int64]
Evaluate = Callable[[FloatArray], FloatArray]
_OPTIMUM_XATOL = 2e-3  # [-] in final drive ratio; axles are sold in steps of 0.05 or more
_OPTIMUM_GRID = 33  # most ratios evaluated together in each narrowing of the bracket
_OPTIMUM_ROUNDS = 6


@dataclass(frozen=True)
class SweepOptimum:
    """The continuous optimum of the objective near the best listed ratio.

    Attributes
    ----------
    final_drive_ratio : float
        Ratio found [-].
    objective_value : float
        Objective there (as in :attr:`FinalDriveSweep.objective_value`).
    bounds : tuple of (float, float)
        The bracket searched: the listed ratios either side of the best one [-].
    evaluations : int
        Objective evaluations spent.
    """

    final_drive_ratio: float
    objective_value: float
    bounds: tuple[float, float]
    evaluations: int


def top_gear_rpm(
    drivetrain: Drivetrain, tire: Tire, f: FloatArray, speed_m_s: float | None
) -> FloatArray:
    """Top-gear engine speed at a road speed with each final drive, no slip.

    ``rpm = v * N_top / (2*pi/60 * r)``, the inverse of mph = rpm * D_in / (N * 336.135)
    (common practice).

    Parameters
    ----------
    drivetrain : Drivetrain
        Gear ratios and extra reduction; its own final drive is not used.
    tire : Tire
        Driven tires.
    f : ndarray, shape (c,)
        Final drive ratios [-].
    speed_m_s : float or None
        Road speed [m/s]; None gives NaN.

    Returns
    -------
    ndarray, shape (c,)
        Engine speed [rpm].

    Examples
    --------
    >>> from core.driveline.drivetrain import make_drivetrain
    >>> from core.driveline.tires import tire_from_diameter
    >>> rpm = top_gear_rpm(make_drivetrain([1.0], 3.0), tire_from_diameter(26 * 0.0254),
    ...                    np.array([3.0]), 154.6996 * 0.44704)
    >>> round(float(rpm[0]), 1)
    6000.0
    """
    if speed_m_s is None:
        return np.full(f.size, np.nan)
    overall = float(drivetrain.gear_ratios[-1]) * f * drivetrain.extra_reduction
    result: FloatArray = speed_m_s * overall / (tire.rolling_radius_m * RPM_TO_RAD_S)
    return result


def objective_at(
    objective: SweepObjective,
    model: DriveModel | None,
    shifts: FloatArray,
    ratio: float,
    setting: tuple[Drivetrain, Tire, CruiseTarget | None],
    rollout_m: float,
) -> float:
    """The objective at one ratio, by the one-car functions.

    Parameters
    ----------
    objective : SweepObjective
        What is measured.
    model : DriveModel or None
        The car with this final drive ratio; None only for the cruise target.
    shifts : ndarray, shape (g - 1,)
        Shift rpm per gear change [rpm].
    ratio : float
        The final drive ratio [-].
    setting : tuple of (Drivetrain, Tire, CruiseTarget or None)
        Gearing, tires and cruise target for the cruise objective.
    rollout_m : float
        Distance rolled before the clock starts [m].

    Returns
    -------
    float
        As :attr:`core.choice.sweep.FinalDriveSweep.objective_value`; NaN where not reached or
        where the car cannot move off.
    """
    drivetrain, tire, target = setting
    if objective is SweepObjective.CRUISE_RPM_TARGET:
        if target is None:  # checked by the caller
            raise SimulationError("`cruise_target` is missing", parameter="cruise_target")
        rpm = float(top_gear_rpm(drivetrain, tire, np.array([ratio]), target.speed_m_s)[0])
        return abs(rpm - target.rpm)
    if model is None:  # checked by the caller
        raise SimulationError(f"`{objective.value}` needs the vehicle", parameter="vehicle")
    if objective is SweepObjective.TOP_SPEED:
        top = top_speed(model).speed_m_s
        return top if top > 0.0 else math.nan
    named = {
        SweepObjective.QUARTER_MILE_ET: "1/4 mile",
        SweepObjective.EIGHTH_MILE_ET: "1/8 mile",
        SweepObjective.ZERO_TO_60_MPH: "0-60 mph",
        SweepObjective.ZERO_TO_100_KMH: "0-100 km/h",
    }
    name = named[objective]
    try:
        for label, d, trap in SWEEP_DISTANCES:
            if label == name:
                run = simulate_run(model, shifts, cover_distance_m=d + rollout_m)
                timed = timed_distance(run, name, d, rollout_m=rollout_m, trap=trap)
                return math.nan if timed.elapsed_s is None else timed.elapsed_s
        for label, a, b in SWEEP_SPEEDS:
            if label == name:
                run = simulate_run(model, shifts, cover_distance_m=rollout_m, cover_speed_m_s=b)
                reached = timed_speed(run, name, a, b, rollout_m=rollout_m)
                return math.nan if reached.elapsed_s is None else reached.elapsed_s
    except SimulationError:  # the car cannot move off with this ratio
        return math.nan
    raise SimulationError(f"`{objective.value}` is not timed", parameter="objective")


def continuous_optimum(
    objective: SweepObjective,
    f: FloatArray,
    values: FloatArray,
    order: IntArray,
    evaluate: Evaluate,
) -> SweepOptimum | None:
    """The optimum of the objective between the neighbours of the best listed ratio.

    Parameters
    ----------
    objective : SweepObjective
        Minimised, except top speed which is maximised.
    f : ndarray, shape (c,)
        The listed ratios [-].
    values : ndarray, shape (c,)
        Their objective values, NaN where not reached.
    order : ndarray of int, shape (c,)
        Candidate indices, best first.
    evaluate : callable
        The objective at an array of ratios in the span, evaluated together; NaN where not
        reached.

    Returns
    -------
    SweepOptimum or None
        None when no candidate reached the objective; the best listed ratio itself when
        the search found nothing better.
    """
    best = int(order[0])
    if not math.isfinite(float(values[best])):
        return None
    listed = np.unique(f)
    at = int(np.searchsorted(listed, f[best]))
    lo = float(listed[max(at - 1, 0)])
    hi = float(listed[min(at + 1, listed.size - 1)])
    sign = -1.0 if objective is SweepObjective.TOP_SPEED else 1.0
    found, found_cost = float(f[best]), sign * float(values[best])
    if hi <= lo:
        return SweepOptimum(found, float(values[best]), (lo, hi), 0)
    left, right, spent = lo, hi, 0
    for _ in range(_OPTIMUM_ROUNDS):
        # fine enough to end the search in this round where that takes few ratios
        count = min(_OPTIMUM_GRID, max(5, math.ceil((right - left) / _OPTIMUM_XATOL) + 1))
        grid = np.linspace(left, right, count)
        cost = sign * evaluate(grid)
        spent += grid.size
        cost = np.where(np.isfinite(cost), cost, np.inf)
        k = int(np.argmin(cost))
        if cost[k] < found_cost:
            found, found_cost = float(grid[k]), float(cost[k])
        step = grid[1] - grid[0]
        left, right = max(float(grid[k]) - step, lo), min(float(grid[k]) + step, hi)
        if step <= _OPTIMUM_XATOL:
            break
    return SweepOptimum(found, sign * found_cost, (lo, hi), spent)
