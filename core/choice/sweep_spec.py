"""What a final-drive sweep is asked: the objective, the constraints, the candidates.

See :mod:`core.choice.sweep` for the sweep itself.
"""

from __future__ import annotations

import enum
import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from core.checks import require_positive
from core.choice.batch_drive import checked_final_drives
from core.errors import DrivetrainError, SimulationError
from core.runs.milestones import STANDARD_DISTANCES
from core.units import KM_H_M_S, MPH_M_S

__all__ = [
    "MAX_CANDIDATES",
    "MAX_CANDIDATE_GEARS",
    "SWEEP_DISTANCES",
    "SWEEP_SPEEDS",
    "CruiseTarget",
    "Rejection",
    "SweepConstraints",
    "SweepObjective",
    "checked_sweep",
    "final_drive_range",
]

FloatArray = NDArray[np.float64]
IntArray = NDArray[np.int64]
BoolArray = NDArray[np.bool_]

MAX_CANDIDATES = 200
MAX_CANDIDATE_GEARS = 1200
"""Candidates times forward gears per sweep: bounds the work of one sweep."""
SWEEP_DISTANCES = tuple(d for d in STANDARD_DISTANCES if d[0] in ("60 ft", "1/8 mile", "1/4 mile"))
SWEEP_SPEEDS = (("0-60 mph", 0.0, 60.0 * MPH_M_S), ("0-100 km/h", 0.0, 100.0 * KM_H_M_S))


class SweepObjective(enum.Enum):
    """What the sweep ranks the candidates by."""

    QUARTER_MILE_ET = "quarter_mile_et"
    EIGHTH_MILE_ET = "eighth_mile_et"
    ZERO_TO_60_MPH = "zero_to_60_mph"
    ZERO_TO_100_KMH = "zero_to_100_kmh"
    TOP_SPEED = "top_speed"
    CRUISE_RPM_TARGET = "cruise_rpm_target"

    @property
    def needs_vehicle(self) -> bool:
        """Whether the objective needs the car described (everything but cruise rpm)."""
        return self is not SweepObjective.CRUISE_RPM_TARGET


class Rejection(enum.Enum):
    """Why a candidate does not meet the constraints."""

    CANNOT_MOVE_OFF = "cannot_move_off"
    OBJECTIVE_NOT_REACHED = "objective_not_reached"
    CRUISE_RPM_TOO_HIGH = "cruise_rpm_too_high"
    TOP_SPEED_TOO_LOW = "top_speed_too_low"
    RPM_AFTER_SHIFT_TOO_LOW = "rpm_after_shift_too_low"


@dataclass(frozen=True)
class CruiseTarget:
    """The cruise rpm to aim for.

    Attributes
    ----------
    speed_m_s : float
        Road speed [m/s], > 0.
    rpm : float
        Engine speed wanted in top gear at that speed [rpm], > 0.
    """

    speed_m_s: float
    rpm: float


@dataclass(frozen=True)
class SweepConstraints:
    """Limits a candidate must keep; None leaves a limit out.

    Attributes
    ----------
    max_cruise_rpm : float or None
        Highest top-gear rpm allowed at ``cruise_speed_m_s`` [rpm].
    cruise_speed_m_s : float or None
        Road speed of the cruise limit [m/s]; given with, and only with, ``max_cruise_rpm``.
    min_top_speed_m_s : float or None
        Lowest top speed allowed [m/s] (needs the car described).
    min_rpm_after_shift : float or None
        Lowest engine speed allowed right after any shift [rpm].
    """

    max_cruise_rpm: float | None = None
    cruise_speed_m_s: float | None = None
    min_top_speed_m_s: float | None = None
    min_rpm_after_shift: float | None = None


def final_drive_range(low: float, high: float, step: float) -> FloatArray:
    """Candidate ratios from ``low`` to ``high`` in steps of ``step``, both ends included.

    Parameters
    ----------
    low, high : float
        First and last ratio [-], 0 < low <= high <= 50.
    step : float
        Spacing [-], > 0; ``high`` is kept when the last step falls short of it by less
        than a millionth of a step.

    Returns
    -------
    ndarray, shape (c,)
        At most 200 ratios.

    Raises
    ------
    DrivetrainError
        On ends outside (0, 50] or out of order, a step <= 0, or more than 200 ratios.

    Examples
    --------
    >>> final_drive_range(3.0, 4.0, 0.25).tolist()
    [3.0, 3.25, 3.5, 3.75, 4.0]
    """
    checked_final_drives([low, high])
    if high < low:
        raise DrivetrainError(f"`high` must be >= `low` ({low:g}), got {high:g}", parameter="high")
    if not math.isfinite(step) or step <= 0.0:
        raise DrivetrainError(f"`step` must be finite and > 0, got {step}", parameter="step")
    count = math.floor((high - low) / step * (1.0 + 1e-12) + 1e-6) + 1
    if count > MAX_CANDIDATES:
        raise DrivetrainError(
            f"`step` of {step:g} gives {count} ratios from {low:g} to {high:g}; at most "
            f"{MAX_CANDIDATES}",
            parameter="step",
        )
    ratios = low + step * np.arange(count, dtype=np.float64)
    return np.minimum(ratios, high)


def checked_sweep(
    f: FloatArray,
    gears: int,
    objective: SweepObjective,
    has_vehicle: bool,
    constraints: SweepConstraints,
    cruise_target: CruiseTarget | None,
) -> None:
    """Check what a sweep is asked before any work is spent on it.

    Parameters
    ----------
    f : ndarray, shape (c,)
        Candidate final drive ratios [-], already checked one by one.
    gears : int
        Forward gears of the drivetrain.
    objective : SweepObjective
        The objective.
    has_vehicle : bool
        Whether the car is described.
    constraints : SweepConstraints
        The limits.
    cruise_target : CruiseTarget or None
        The cruise target.

    Raises
    ------
    DrivetrainError
        On more than 200 candidates, or candidates times gears above 1200.
    SimulationError
        When the objective or the top-speed limit needs the vehicle and none is given, the
        cruise objective has no target, the cruise limit is half given, or a limit is not
        finite and > 0.
    """
    if f.size > MAX_CANDIDATES:
        raise DrivetrainError(
            f"`final_drive_ratio` must list at most {MAX_CANDIDATES} ratios, got {f.size}",
            parameter="final_drive_ratio",
        )
    if f.size * gears > MAX_CANDIDATE_GEARS:
        raise DrivetrainError(
            f"`final_drive_ratio` lists {f.size} ratios for {gears} gears; candidates times "
            f"gears must be at most {MAX_CANDIDATE_GEARS}",
            parameter="final_drive_ratio",
        )
    if objective.needs_vehicle and not has_vehicle:
        raise SimulationError(f"`{objective.value}` needs the vehicle", parameter="vehicle")
    if constraints.min_top_speed_m_s is not None and not has_vehicle:
        raise SimulationError("`min_top_speed_m_s` needs the vehicle", parameter="vehicle")
    if objective is SweepObjective.CRUISE_RPM_TARGET and cruise_target is None:
        raise SimulationError(
            "`cruise_rpm_target` needs `cruise_target`", parameter="cruise_target"
        )
    if (constraints.max_cruise_rpm is None) != (constraints.cruise_speed_m_s is None):
        raise SimulationError(
            "`max_cruise_rpm` and `cruise_speed_m_s` are given together",
            parameter="cruise_speed_m_s",
        )
    values = [
        ("max_cruise_rpm", constraints.max_cruise_rpm),
        ("cruise_speed_m_s", constraints.cruise_speed_m_s),
        ("min_top_speed_m_s", constraints.min_top_speed_m_s),
        ("min_rpm_after_shift", constraints.min_rpm_after_shift),
    ]
    if cruise_target is not None:
        values += [("speed_m_s", cruise_target.speed_m_s), ("rpm", cruise_target.rpm)]
    for name, value in values:
        if value is not None:
            require_positive(value, name, SimulationError)
