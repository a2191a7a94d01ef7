"""The caller's shift rpms, checked once for every run and sweep that takes them."""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import ArrayLike, NDArray

from core.engine.curves import TorqueCurve
from core.errors import SimulationError

__all__ = ["checked_shift_rpm"]


def checked_shift_rpm(
    curve: TorqueCurve, rev_limit_rpm: float, gear_count: int, shift_rpm: ArrayLike
) -> NDArray[np.float64]:
    """Shift rpms as an array, one per gear change, each above the curve's first point
    and at most the rev limit [rpm].

    Parameters
    ----------
    curve : TorqueCurve
        The torque curve.
    rev_limit_rpm : float
        Rev limit in use [rpm].
    gear_count : int
        Forward gears.
    shift_rpm : array_like, shape (g - 1,)
        Shift rpm per gear change [rpm].

    Returns
    -------
    ndarray, shape (g - 1,)

    Raises
    ------
    SimulationError
        On a wrong count or an rpm out of range, naming ``shift_rpm[i]``.
    """
    shifts = np.asarray(shift_rpm, dtype=np.float64)
    if shifts.shape != (gear_count - 1,):
        raise SimulationError(
            f"`shift_rpm` must give one rpm per gear change ({gear_count - 1}), got {shifts.size}",
            parameter="shift_rpm",
        )
    for i, n in enumerate(shifts.tolist()):
        if not math.isfinite(n) or not curve.rpm_min < n <= rev_limit_rpm + 1e-9:
            raise SimulationError(
                f"`shift_rpm[{i}]` must lie above the curve's first point ({curve.rpm_min:g}) "
                f"and at most the rev limit ({rev_limit_rpm:g}), got {n:g}",
                parameter=f"shift_rpm[{i}]",
            )
    return shifts
