"""What a described car does beyond wheel force: shifts by net acceleration, top speed,
cruise rpm, gradeability, and shift rpms that minimise the time of a run."""

from __future__ import annotations

import dataclasses
import enum
import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from core.car.gradeability import gradeability
from core.converter.drive import ConverterDrive
from core.runs.drive_model import DriveModel
from core.shifts.best import ShiftChoice, ShiftReason, best_shifts
from core.shifts.plan import ShiftPoint, shift_plan, shift_point
from core.shifts.search import OptimalShifts, search_shift_rpm

__all__ = [
    "OptimalShifts",
    "ShiftCriterion",
    "TopSpeed",
    "acceleration_shift_points",
    "acceleration_shifts",
    "cruise_rpm",
    "engine_rpm_at",
    "gradeability_by_gear",
    "model_converter",
    "optimal_shift_rpm",
    "planned_shift_rpm",
    "top_speed",
]

FloatArray = NDArray[np.float64]
_GRID = 257


def acceleration_shifts(model: DriveModel) -> tuple[ShiftChoice, ...]:
    """Quickest shifts by net acceleration: road load and rotating inertia counted.

    The same search as the wheel-force plan (:func:`core.shifts.best.best_shifts`) with each
    gear's effort its net acceleration ``(min(F, F_traction) - R(v)) / m_g``. The heavier
    equivalent mass of the lower gear moves the shift below the force crossover. Crossings
    are located on the 513-point scan by linear interpolation within the bracketing cell.
    The search runs in gearbox input speed (proportional to road speed); each shift rpm is
    returned as the engine speed there, which a slipping converter raises. Where both gears
    are held at the traction limit at the shift, its reason is ``TRACTION_LIMIT``.

    Parameters
    ----------
    model : DriveModel
        The car.

    Returns
    -------
    tuple of ShiftChoice, length g - 1
    """
    return tuple(choice for choice, _ in _acceleration_choices(model))


def _acceleration_choices(model: DriveModel) -> list[tuple[ShiftChoice, float]]:
    """The net-acceleration shifts and the gearbox input rpm of each."""
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
    choices = best_shifts(efforts, None, low, np.full(step.size, model.rev_limit_rpm))
    out = []
    for k, choice in enumerate(choices):
        turbine = choice.shift_rpm
        v = np.array([turbine * r_factor / ratios[k]])
        reason = choice.reason
        if reason is ShiftReason.CROSSOVER and all(
            float(model.drive(g, v)[0][0]) > model.traction_limit_n for g in (k, k + 1)
        ):
            reason = ShiftReason.TRACTION_LIMIT
        engine = dataclasses.replace(
            choice,
            shift_rpm=engine_rpm_at(model, k, turbine),
            reason=reason,
            overtake_rpm=tuple(engine_rpm_at(model, k, x) for x in choice.overtake_rpm),
        )
        out.append((engine, turbine))
    return out


def engine_rpm_at(model: DriveModel, gear: int, input_rpm: float) -> float:
    """Engine speed [rpm] at a gearbox input speed in gear index ``gear``: the same with a
    clutch, higher while a torque converter slips (the run shifts on engine speed)."""
    return float(model.gearbox_input(gear, np.array([input_rpm]))[1][0])


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

    The exact force balance with the grip on the slope; see :mod:`core.car.gradeability`.
    """
    return gradeability(model).grade_percent


def optimal_shift_rpm(
    model: DriveModel,
    initial_rpm: FloatArray,
    *,
    start_speed_m_s: float,
    rollout_m: float,
    finish_distance_m: float | None,
    finish_speed_m_s: float | None,
    max_evaluations: int = 120,
    initial_name: str = "plan",
) -> OptimalShifts:
    """Shift rpms minimising the time to the finish, by a pattern search over full simulated
    runs run in batches, shift time and traction included, seeded with the
    caller's plan, the rev limit, the wheel-force crossover and the net-acceleration plan
    (:func:`core.shifts.search.search_shift_rpm`): never slower than any of them.

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
        Budget of simulated runs, seeds included; the search's batches take about two
        runs' time for a dozen runs.
    initial_name : str
        Name reported for ``initial_rpm`` when it wins; the value of a
        :class:`ShiftCriterion` says ``initial_rpm`` is that criterion's plan
        (:func:`planned_shift_rpm`), which is then not planned again.

    Returns
    -------
    OptimalShifts
    """
    initial = np.asarray(initial_rpm, dtype=np.float64)
    seeds = [
        (initial_name, initial),
        ("rev_limit", np.full(model.drivetrain.gear_count - 1, model.rev_limit_rpm)),
    ]
    for criterion in (ShiftCriterion.TRACTIVE_FORCE, ShiftCriterion.NET_ACCELERATION):
        # the caller's plan named after a criterion is that plan: not planned again
        plan = initial if initial_name == criterion.value else planned_shift_rpm(model, criterion)
        seeds.append((criterion.value, plan))
    return search_shift_rpm(
        model,
        seeds,
        start_speed_m_s=start_speed_m_s,
        rollout_m=rollout_m,
        finish_distance_m=finish_distance_m,
        finish_speed_m_s=finish_speed_m_s,
        max_evaluations=max_evaluations,
    )


class ShiftCriterion(enum.Enum):
    """What a shift plan maximises: wheel force, or net acceleration of the described car."""

    TRACTIVE_FORCE = "tractive_force"
    NET_ACCELERATION = "net_acceleration"


def planned_shift_rpm(model: DriveModel, criterion: ShiftCriterion) -> FloatArray:
    """Shift rpm per gear change by the chosen criterion [rpm], shape (g - 1,)."""
    if criterion is ShiftCriterion.NET_ACCELERATION:
        return np.array([c.shift_rpm for c in acceleration_shifts(model)])
    plan = shift_plan(
        model.curve,
        model.drivetrain,
        model.tire,
        rev_limit_rpm=model.rev_limit_rpm,
        converter=model_converter(model),
    )
    return np.array([s.shift_rpm for s in plan.shifts])


def model_converter(model: DriveModel) -> ConverterDrive | None:
    """The car's torque converter and lock-up gears, or None with a clutch."""
    return ConverterDrive.of_launch(model.launch)


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
    out = []
    for i, (choice, turbine) in enumerate(_acceleration_choices(model)):
        n_s = choice.shift_rpm
        v = model.speed_at_rpm(i, turbine)
        before, _ = model.drive(i, np.array([v]))
        after, engine_after = model.drive(i + 1, np.array([v]))
        rpm = (n_s, float(engine_after[0]))
        forces = (float(before[0]), float(after[0]))
        out.append(shift_point(i, choice, rpm, v, forces, choice.overtake_rpm))
    return tuple(out)
