"""Drivetrain: forward gear ratios, final drive, extra reduction, driveline efficiency."""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from core.checks import require_positive
from core.errors import DrivetrainError

__all__ = ["MAX_GEARS", "MAX_RATIO", "Drivetrain", "make_drivetrain"]

MAX_GEARS = 12
MAX_RATIO = 50.0

FloatArray = NDArray[np.float64]


@dataclass(frozen=True)
class Drivetrain:
    """Ratios and losses from the crankshaft to the driven wheels.

    Attributes
    ----------
    gear_ratios : ndarray, shape (g,)
        Transmission ratio of each forward gear, first gear first, strictly descending.
    final_drive_ratio : float
        Ring-and-pinion (axle) ratio.
    extra_reduction : float
        Any further fixed reduction in series (transfer case low range, drop gear); 1 if none.
    efficiency : ndarray, shape (g,)
        Driveline efficiency in each gear, in (0, 1].
    """

    gear_ratios: FloatArray
    final_drive_ratio: float
    extra_reduction: float
    efficiency: FloatArray

    @property
    def gear_count(self) -> int:
        """Number of forward gears."""
        return int(self.gear_ratios.size)

    @property
    def overall_ratios(self) -> FloatArray:
        """Engine revolutions per wheel revolution in each gear, shape (g,)."""
        return self.gear_ratios * self.final_drive_ratio * self.extra_reduction


def make_drivetrain(
    gear_ratios: Sequence[float],
    final_drive_ratio: float,
    *,
    extra_reduction: float = 1.0,
    efficiency: float | Sequence[float] = 1.0,
) -> Drivetrain:
    """Validate and assemble a drivetrain.

    Parameters
    ----------
    gear_ratios : sequence of float, length 1 to 12
        Forward gear ratios, first gear first, strictly descending, each in (0, 50].
    final_drive_ratio : float
        Final drive ratio, in (0, 50].
    extra_reduction : float
        Extra fixed reduction in series, in (0, 50]; 1 for none.
    efficiency : float or sequence of float
        Driveline efficiency in (0, 1]: one value for every gear or one per gear.

    Returns
    -------
    Drivetrain

    Raises
    ------
    DrivetrainError
        On an empty or over-long gear list, a ratio <= 0, gears not descending, or an
        efficiency outside (0, 1].

    Examples
    --------
    >>> d = make_drivetrain([3.0, 2.0, 1.0], 3.5)
    >>> d.overall_ratios.tolist()
    [10.5, 7.0, 3.5]
    """
    ratios = np.asarray(gear_ratios, dtype=np.float64)
    if ratios.ndim != 1 or not 1 <= ratios.size <= MAX_GEARS:
        raise DrivetrainError(
            f"`gear_ratios` must list 1 to {MAX_GEARS} forward gears, got {ratios.size}",
            parameter="gear_ratios",
        )
    for i, r in enumerate(ratios.tolist()):
        require_positive(r, f"gear_ratios[{i}]", DrivetrainError, at_most=MAX_RATIO)
    for i in range(1, ratios.size):
        if ratios[i] >= ratios[i - 1]:
            raise DrivetrainError(
                f"`gear_ratios` must be strictly descending: gear {i + 1} ({ratios[i]:g}) is "
                f"not below gear {i} ({ratios[i - 1]:g})",
                parameter=f"gear_ratios[{i}]",
            )
    final = require_positive(
        final_drive_ratio, "final_drive_ratio", DrivetrainError, at_most=MAX_RATIO
    )
    extra = require_positive(
        extra_reduction, "extra_reduction", DrivetrainError, at_most=MAX_RATIO
    )
    eff = np.asarray(efficiency, dtype=np.float64)
    if eff.ndim == 0:
        eff = np.full(ratios.size, float(eff))
    elif eff.shape != ratios.shape:
        raise DrivetrainError(
            f"`efficiency` must be one value or one per gear ({ratios.size}), got {eff.size}",
            parameter="efficiency",
        )
    for i, e in enumerate(eff.tolist()):
        if not math.isfinite(e) or not 0.0 < e <= 1.0:
            raise DrivetrainError(
                f"`efficiency[{i}]` must be in (0, 1], got {e}", parameter=f"efficiency[{i}]"
            )
    return Drivetrain(ratios, final, extra, eff)
