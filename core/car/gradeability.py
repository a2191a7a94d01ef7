"""Steepest grade each gear can climb at a steady speed: drive force, grip and a stated cap.

At a steady speed ``v`` on a slope of angle ``theta`` the drive force must carry the grade,
the rolling resistance and the drag (Gillespie, Fundamentals of Vehicle Dynamics, ch. 2)::

    F(v) = W*sin(theta) + Rx(v, theta) + D(v)

with ``Rx = (C0 + C1*v)*cos(theta)`` for rolling resistance (``C0 + C1*v`` unscaled for
coast-down coefficients, which are measured on a level road) and ``D = C2*v**2``. No
small-angle form is used: the rolling term keeps its ``cos(theta)``, as in the acceleration
run. The tires must also put ``F`` down: with the weight's normal part ``N = W*cos(theta)``
and the load transfer ``(h/L)*(F - Rx)`` from the grade force, the drag (taken at the CG
height) and the drive force, each driven axle carries at most ``mu`` times its load
(:func:`core.car.traction.grip_limit_n`). With no drag this is Gillespie's grip-limited
gradeability, rear drive ``tan(theta) = (mu*b/L - fr)/(1 - mu*h/L)``, front drive
``tan(theta) = (mu*c/L - fr)/(1 + mu*h/L)``.

Each condition is ``P*cos(theta) - W*sin(theta) >= Q`` for some ``P`` and ``Q``, solved in
closed form as ``theta = acos(Q/hypot(P, W)) - atan2(W, P)``; the steepest grade of a speed
is the least of them, and of a gear the most over its speed range (scanned, then refined
with ``scipy.optimize.minimize_scalar``). ``MAX_GRADE_ANGLE_DEG`` caps the answer so it is
always a finite number; the limit that binds is reported.
"""

from __future__ import annotations

import enum
import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray
from scipy.optimize import minimize_scalar

from core.car.road_load import RoadLoadForm
from core.car.traction import DriveLayout
from core.runs.drive_model import DriveModel
from core.units import STANDARD_GRAVITY_M_S2

__all__ = [
    "MAX_GRADE_ANGLE_DEG",
    "GradeLimit",
    "Gradeability",
    "gradeability",
    "steepest_grade_rad",
]

FloatArray = NDArray[np.float64]

MAX_GRADE_ANGLE_DEG = 85.0
"""The steepest slope reported [deg] (1143 %): a guard so every answer is a finite number."""
_GRID = 257


class GradeLimit(enum.Enum):
    """What stops a gear climbing anything steeper."""

    DRIVE = "drive"
    """The drive force (engine through the driveline) at its best speed."""
    GRIP = "grip"
    """The driven tires' grip on the slope, weight transfer counted."""
    CAP = "cap"
    """``MAX_GRADE_ANGLE_DEG``: neither drive nor grip runs out below it."""


@dataclass(frozen=True)
class Gradeability:
    """Steepest steady climb per gear.

    Attributes
    ----------
    grade_percent : ndarray, shape (g,)
        ``100*tan(theta)`` [%], finite.
    speed_m_s : ndarray, shape (g,)
        Road speed at which it is reached [m/s].
    limited_by : tuple of GradeLimit, length g
        The limit that binds in each gear.
    """

    grade_percent: FloatArray
    speed_m_s: FloatArray
    limited_by: tuple[GradeLimit, ...]


def _angle(p: FloatArray, q: FloatArray, weight_n: float) -> FloatArray:
    """Largest ``theta`` with ``p*cos(theta) - W*sin(theta) >= q`` [rad]."""
    ratio = q / np.hypot(p, weight_n)
    result: FloatArray = np.arccos(np.clip(ratio, -1.0, 1.0)) - np.arctan2(weight_n, p)
    return result


def steepest_grade_rad(
    model: DriveModel, speed_m_s: FloatArray, drive_force_n: FloatArray
) -> tuple[FloatArray, FloatArray]:
    """Steepest slope held at each speed by the drive force and by the grip [rad].

    Parameters
    ----------
    model : DriveModel
        The car (its road load, geometry, layout and grip).
    speed_m_s : ndarray, shape (n,)
        Road speeds [m/s].
    drive_force_n : ndarray, shape (n,)
        Drive force at the contact patch at those speeds [N].

    Returns
    -------
    tuple of ndarray, shape (n,)
        The drive-force bound and the grip bound on ``theta`` [rad].
    """
    vehicle = model.vehicle
    load = vehicle.road_load
    weight = vehicle.mass_kg * STANDARD_GRAVITY_M_S2
    rho = load.constant_n + load.linear_n_s_m * speed_m_s
    drag = load.quadratic_n_s2_m2 * speed_m_s**2
    scaled = load.form is not RoadLoadForm.COAST_DOWN  # rolling follows cos(theta)
    zero = np.zeros_like(speed_m_s)
    if scaled:
        drive = _angle(-rho, drag - drive_force_n, weight)
    else:
        drive = _angle(zero, rho + drag - drive_force_n, weight)
    geometry = vehicle.geometry
    mu, length, h = vehicle.friction_coefficient, geometry.wheelbase_m, geometry.cg_height_m
    if vehicle.layout is DriveLayout.ALL:
        share = float(vehicle.front_torque_share or 0.0)
    else:
        share = 1.0 if vehicle.layout is DriveLayout.FRONT else 0.0
    k = mu * h / length
    # each axle bound is coef*(N*arm +- h*Rx), N = W*cos(theta)
    bounds = [(mu / length / (share + k), geometry.cg_to_rear_axle_m, 1.0)]
    if 1.0 - share - k > 0.0:
        bounds.append((mu / length / (1.0 - share - k), geometry.cg_to_front_axle_m, -1.0))
    grip = np.full_like(speed_m_s, np.inf)
    for coef, arm, sign in bounds:
        if scaled:
            p = coef * (weight * arm + sign * h * rho) - rho
            q = drag
        else:
            p = np.full_like(speed_m_s, coef * weight * arm)
            q = rho + drag - sign * coef * h * rho
        grip = np.minimum(grip, _angle(p, q, weight))
    return drive, grip


def _gear_best(model: DriveModel, gear: int) -> tuple[float, float, GradeLimit]:
    cap = math.radians(MAX_GRADE_ANGLE_DEG)
    lo = model.speed_at_rpm(gear, model.curve.rpm_min)
    hi = model.speed_at_rpm(gear, model.rev_limit_rpm)

    def angles(v: FloatArray) -> tuple[FloatArray, FloatArray]:
        force, _ = model.drive(gear, v)
        return steepest_grade_rad(model, v, force)

    v = np.linspace(lo, hi, _GRID)
    drive, grip = angles(v)
    theta = np.minimum(np.minimum(drive, grip), cap)
    k = int(np.argmax(theta))
    best_v = float(v[k])
    if theta[k] < cap:
        a, b = float(v[max(k - 1, 0)]), float(v[min(k + 1, v.size - 1)])
        res = minimize_scalar(
            lambda x: -float(np.minimum(*angles(np.array([x])))[0]),
            bounds=(a, b),
            method="bounded",
            options={"xatol": 1e-9 * max(b, 1.0)},
        )
        if -float(res.fun) > theta[k]:
            best_v = float(res.x)
    d, g = (float(x[0]) for x in angles(np.array([best_v])))
    angle = max(min(d, g, cap), -cap)
    limit = GradeLimit.DRIVE if d <= g else GradeLimit.GRIP
    return angle, best_v, GradeLimit.CAP if angle >= cap else limit


def gradeability(model: DriveModel) -> Gradeability:
    """Steepest grade each gear climbs at a steady speed somewhere in its range.

    Parameters
    ----------
    model : DriveModel
        The car; the road load's own grade is ignored (the answer is the grade).

    Returns
    -------
    Gradeability
    """
    gears = model.drivetrain.gear_count
    grade = np.zeros(gears)
    speed = np.zeros(gears)
    limits = []
    for g in range(gears):
        angle, v, limit = _gear_best(model, g)
        grade[g] = 100.0 * math.tan(angle)
        speed[g] = v
        limits.append(limit)
    return Gradeability(grade, speed, tuple(limits))
