"""Final-drive sweeps: candidate ring-and-pinion ratios ranked by an objective, under
constraints, with the continuous optimum between them.

Every candidate shares the engine, gearbox, tires and car, so the candidates are simulated
together (:func:`core.runs.batch.batch_runs`, :func:`core.choice.batch_drive.batch_top_speed`), not
one run per candidate. The shifts are those of the wheel-force plan, whose crossover rpms do
not depend on the final drive (it scales both gears' force alike and cancels), or the
caller's rpms; so is the rpm each shift lands at, ``shift_rpm * next / current``. Cruise rpm
is the top gear's, with no slip: ``rpm = v * N_top / (2*pi/60 * r)``, i.e. mph * tire
diameter [in] / (overall ratio * 336.135) inverted (common practice).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from core.car.vehicle import Launch, Vehicle
from core.choice.batch_drive import BatchTopSpeed, batch_top_speed, checked_final_drives
from core.choice.sweep_optimum import SweepOptimum, continuous_optimum, top_gear_rpm
from core.choice.sweep_spec import (
    SWEEP_DISTANCES,
    SWEEP_SPEEDS,
    CruiseTarget,
    Rejection,
    SweepConstraints,
    SweepObjective,
    checked_sweep,
)
from core.driveline.drivetrain import Drivetrain
from core.driveline.tires import Tire
from core.engine.curves import RPM_TO_RAD_S, TorqueCurve
from core.errors import SimulationError
from core.notices import Notice
from core.runs.batch import BatchRuns, batch_runs
from core.runs.drive_model import drive_model
from core.runs.milestones import STANDARD_ROLLOUT_M
from core.shifts.plan import resolve_rev_limit, shift_plan
from core.shifts.shift_rpm import checked_shift_rpm

__all__ = ["FinalDriveSweep", "sweep_final_drives"]

FloatArray = NDArray[np.float64]
IntArray = NDArray[np.int64]


@dataclass(frozen=True)
class FinalDriveSweep:
    """Every candidate's figures, its rank, and the constraints it fails.

    Attributes
    ----------
    objective : SweepObjective
        What was ranked.
    final_drive_ratio : ndarray, shape (c,)
        The candidates as given [-].
    objective_value : ndarray, shape (c,)
        Elapsed time [s] for the timed objectives, top speed [m/s], or the distance of the
        cruise rpm from its target [rpm]; NaN where not reached.
    order : ndarray of int, shape (c,)
        Candidate indices, best first by the objective alone (unreached last).
    rank : ndarray of int, shape (c,)
        Each candidate's place in ``order``, 1 for the best.
    rejections : tuple of tuple of Rejection, length c
        The constraints each candidate fails; empty when it meets them all.
    best_index : int or None
        The best candidate meeting every constraint.
    optimum : SweepOptimum or None
        The continuous optimum, ignoring the constraints; None when nothing was reached.
    shift_rpm, landing_rpm : ndarray, shape (g - 1,)
        Shift rpm of each gear change and the rpm it lands at, the same for every
        candidate [rpm].
    speed_at_rev_limit_m_s : ndarray, shape (c, g)
        Road speed at the rev limit in each gear [m/s].
    cruise_speed_m_s : float or None
        Road speed of the cruise rpm [m/s]: the constraint's, else the target's.
    cruise_rpm : ndarray, shape (c,)
        Top-gear rpm at ``cruise_speed_m_s`` [rpm]; NaN without one.
    rev_limit_rpm : float
        Rev limit used [rpm].
    runs : BatchRuns or None
        The timed runs, with the car described.
    top_speed : BatchTopSpeed or None
        Top speeds, with the car described.
    notices : tuple of Notice
        Warnings about the inputs.
    """

    objective: SweepObjective
    final_drive_ratio: FloatArray
    objective_value: FloatArray
    order: IntArray
    rank: IntArray
    rejections: tuple[tuple[Rejection, ...], ...]
    best_index: int | None
    optimum: SweepOptimum | None
    shift_rpm: FloatArray
    landing_rpm: FloatArray
    speed_at_rev_limit_m_s: FloatArray
    cruise_speed_m_s: float | None
    cruise_rpm: FloatArray
    rev_limit_rpm: float
    runs: BatchRuns | None
    top_speed: BatchTopSpeed | None
    notices: tuple[Notice, ...]


def _ranking(objective: SweepObjective, values: FloatArray) -> tuple[IntArray, IntArray]:
    key = -values if objective is SweepObjective.TOP_SPEED else values
    key = np.where(np.isnan(key), np.inf, key)
    order = np.argsort(key, kind="stable").astype(np.int64)
    rank = np.empty(order.size, dtype=np.int64)
    rank[order] = np.arange(1, order.size + 1)
    return order, rank


def sweep_final_drives(
    curve: TorqueCurve,
    drivetrain: Drivetrain,
    tire: Tire,
    final_drive_ratio: ArrayLike,
    objective: SweepObjective,
    *,
    vehicle: Vehicle | None = None,
    launch: Launch | None = None,
    rev_limit_rpm: float | None = None,
    shift_rpm: ArrayLike | None = None,
    constraints: SweepConstraints | None = None,
    cruise_target: CruiseTarget | None = None,
    rollout_m: float = STANDARD_ROLLOUT_M,
) -> FinalDriveSweep:
    """Rank candidate final drive ratios for one car.

    Parameters
    ----------
    curve : TorqueCurve
        Engine (or chassis) torque.
    drivetrain : Drivetrain
        Gear ratios, extra reduction and efficiency; its final drive is replaced by each
        candidate.
    tire : Tire
        Driven tires.
    final_drive_ratio : array_like, shape (c,)
        Candidates [-], 1 to 200, each in (0, 50]; candidates times gears at most 1200.
    objective : SweepObjective
        What to rank by: elapsed time (least first), top speed (highest first) or the
        top-gear cruise rpm nearest ``cruise_target``.
    vehicle : Vehicle, optional
        The car; needed for every objective but the cruise target, and for the top-speed
        constraint.
    launch : Launch, optional
        Clutch or converter; default a clutch launch at 3000 rpm.
    rev_limit_rpm : float, optional
        Rev limit [rpm], clipped to the curve.
    shift_rpm : array_like, shape (g - 1,), optional
        Shift rpm per gear change [rpm]; default the wheel-force crossover plan.
    constraints : SweepConstraints, optional
        Limits the best listed ratio must keep; default none.
    cruise_target : CruiseTarget, optional
        Target of the ``CRUISE_RPM_TARGET`` objective.
    rollout_m : float
        Distance rolled before the clock starts [m].

    Returns
    -------
    FinalDriveSweep

    Raises
    ------
    DrivetrainError
        On a bad candidate or too many candidates.
    SimulationError
        When the objective or a constraint needs the vehicle and none is given, a limit is
        not finite and > 0, or the shift rpms do not fit the gears.
    """
    f = checked_final_drives(final_drive_ratio)
    gears = drivetrain.gear_count
    constraints = constraints or SweepConstraints()
    checked_sweep(f, gears, objective, vehicle is not None, constraints, cruise_target)
    limit, notices = resolve_rev_limit(curve, rev_limit_rpm)
    if shift_rpm is None:
        plan = shift_plan(curve, drivetrain, tire, rev_limit_rpm=limit)
        shifts = np.array([s.shift_rpm for s in plan.shifts], dtype=np.float64)
        notes = list(plan.notices)
    else:
        shifts = checked_shift_rpm(curve, limit, gears, shift_rpm)
        notes = list(notices)
    landing = shifts * drivetrain.gear_ratios[1:] / drivetrain.gear_ratios[:-1]
    model = None
    if vehicle is not None:
        model = drive_model(
            curve, drivetrain, tire, vehicle, launch or Launch(), rev_limit_rpm=limit
        )
        notes += [n for n in model.notices if n not in notes]
    overall = drivetrain.gear_ratios[None, :] * f[:, None] * drivetrain.extra_reduction
    reach = limit * RPM_TO_RAD_S * tire.rolling_radius_m / overall
    cruise_v = constraints.cruise_speed_m_s
    if cruise_v is None and cruise_target is not None:
        cruise_v = cruise_target.speed_m_s
    cruise = top_gear_rpm(drivetrain, tire, f, cruise_v)
    runs = top = None
    if model is not None:
        runs = batch_runs(
            model, f, shifts, distances=SWEEP_DISTANCES, speeds=SWEEP_SPEEDS, rollout_m=rollout_m
        )
        top = batch_top_speed(model, f)
    setting = (drivetrain, tire, cruise_target)

    def evaluate(ratios: FloatArray) -> FloatArray:
        """The objective at many ratios, by one batch of runs or top speeds."""
        if objective is SweepObjective.CRUISE_RPM_TARGET or model is None:
            return _values(objective, None, None, setting, ratios)
        if objective is SweepObjective.TOP_SPEED:
            return _values(objective, None, batch_top_speed(model, ratios), setting, ratios)
        # only the objective's own timer: the runs stop once it is read
        name = _TIMED[objective]
        more = batch_runs(
            model,
            ratios,
            shifts,
            distances=[d for d in SWEEP_DISTANCES if d[0] == name],
            speeds=[v for v in SWEEP_SPEEDS if v[0] == name],
            rollout_m=rollout_m,
        )
        return _values(objective, more, None, setting, ratios)

    values = _values(objective, runs, top, setting, f)
    order, rank = _ranking(objective, values)
    rejections = _rejections(f, values, runs, top, cruise, landing, constraints)
    passing = [int(c) for c in order.tolist() if not rejections[c]]
    return FinalDriveSweep(
        objective=objective,
        final_drive_ratio=f,
        objective_value=values,
        order=order,
        rank=rank,
        rejections=rejections,
        best_index=passing[0] if passing else None,
        optimum=continuous_optimum(objective, f, values, order, evaluate),
        shift_rpm=shifts,
        landing_rpm=landing,
        speed_at_rev_limit_m_s=reach,
        cruise_speed_m_s=cruise_v,
        cruise_rpm=cruise,
        rev_limit_rpm=limit,
        runs=runs,
        top_speed=top,
        notices=tuple(notes),
    )


_TIMED = {
    SweepObjective.QUARTER_MILE_ET: "1/4 mile",
    SweepObjective.EIGHTH_MILE_ET: "1/8 mile",
    SweepObjective.ZERO_TO_60_MPH: "0-60 mph",
    SweepObjective.ZERO_TO_100_KMH: "0-100 km/h",
}


def _values(
    objective: SweepObjective,
    runs: BatchRuns | None,
    top: BatchTopSpeed | None,
    setting: tuple[Drivetrain, Tire, CruiseTarget | None],
    f: FloatArray,
) -> FloatArray:
    """The objective of every candidate, read off the sweep's own runs and top speeds."""
    drivetrain, tire, target = setting
    if objective is SweepObjective.CRUISE_RPM_TARGET and target is not None:
        return np.abs(top_gear_rpm(drivetrain, tire, f, target.speed_m_s) - target.rpm)
    if objective is SweepObjective.TOP_SPEED and top is not None:
        return np.where(top.speed_m_s > 0.0, top.speed_m_s, np.nan)
    if runs is None:  # checked by the caller
        raise SimulationError(f"`{objective.value}` needs the vehicle", parameter="vehicle")
    name = _TIMED[objective]
    if objective in (SweepObjective.QUARTER_MILE_ET, SweepObjective.EIGHTH_MILE_ET):
        return runs.distance(name).elapsed_s
    return runs.speed(name).elapsed_s


def _rejections(
    f: FloatArray,
    values: FloatArray,
    runs: BatchRuns | None,
    top: BatchTopSpeed | None,
    cruise: FloatArray,
    landing: FloatArray,
    constraints: SweepConstraints,
) -> tuple[tuple[Rejection, ...], ...]:
    out = []
    low_landing = (
        constraints.min_rpm_after_shift is not None
        and landing.size > 0
        and float(landing.min()) < constraints.min_rpm_after_shift
    )
    for c in range(f.size):
        why = []
        if runs is not None and not bool(runs.moved[c]):
            why.append(Rejection.CANNOT_MOVE_OFF)
        elif not math.isfinite(float(values[c])):
            why.append(Rejection.OBJECTIVE_NOT_REACHED)
        if constraints.max_cruise_rpm is not None and cruise[c] > constraints.max_cruise_rpm:
            why.append(Rejection.CRUISE_RPM_TOO_HIGH)
        limit_v = constraints.min_top_speed_m_s
        if limit_v is not None and top is not None and top.speed_m_s[c] < limit_v:
            why.append(Rejection.TOP_SPEED_TOO_LOW)
        if low_landing:
            why.append(Rejection.RPM_AFTER_SHIFT_TOO_LOW)
        out.append(tuple(why))
    return tuple(out)
