"""Speed-based dyno exports: road speed with power or tractive force, referred to engine rpm.

A chassis dyno can log against roller (road) speed instead of engine speed. In one gear the
engine turns at ``rpm = v * N / r * 60 / (2*pi)`` (``N`` the gear's overall ratio: gear *
final drive * extra reduction; ``r`` the tire's rolling radius; no slip), and the torque
referred to the engine that gives the measured figure is ``T = P / omega`` for a power
``P`` or ``T = F * r / N`` for a tractive force ``F`` (the same thing: ``P = F * v``).
Measured at the rollers, the figures are at the wheels, so the curve is a chassis curve,
unless the power header names the engine (``engine``, ``crank``, ``flywheel``, ``bhp``): a
dyno's engine estimate.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from core.dyno.columns import ColumnQuantity, DynoColumn
from core.engine.curves import RPM_TO_RAD_S
from core.errors import DynoFileError

__all__ = [
    "MAX_OVERALL_RATIO",
    "MAX_ROLLING_RADIUS_M",
    "RoadSpeedConversion",
    "names_the_engine",
    "road_speed_conversion",
]

FloatArray = NDArray[np.float64]

MAX_OVERALL_RATIO = 100.0  # gear * final drive * extra reduction; beyond any road vehicle
MAX_ROLLING_RADIUS_M = 2.5
_ENGINE_WORDS = re.compile(r"engine|crank|flywheel|\bbhp\b", re.IGNORECASE)


def names_the_engine(column: DynoColumn) -> bool:
    """Whether a power header names the engine (an estimate at the crank), not the wheels.

    Examples
    --------
    >>> from core.dyno.columns import ColumnUnit
    >>> col = DynoColumn(2, "Crank power (kW)", ColumnQuantity.POWER, ColumnUnit.KILOWATT)
    >>> names_the_engine(col)
    True
    """
    return column.quantity is ColumnQuantity.POWER and bool(_ENGINE_WORDS.search(column.header))


@dataclass(frozen=True)
class RoadSpeedConversion:
    """The gear a speed-based run was made in.

    Attributes
    ----------
    overall_ratio : float
        Gear * final drive * extra reduction [-].
    rolling_radius_m : float
        Tire rolling radius [m].
    """

    overall_ratio: float
    rolling_radius_m: float

    @property
    def rpm_per_m_s(self) -> float:
        """Engine speed per road speed [rpm per m/s]."""
        return self.overall_ratio / self.rolling_radius_m / RPM_TO_RAD_S

    def engine_rpm(self, speed_m_s: FloatArray) -> FloatArray:
        """Engine speed [rpm] at road speeds [m/s]; shape as given."""
        return np.asarray(speed_m_s * self.rpm_per_m_s, dtype=np.float64)

    def engine_torque_nm(
        self, values: FloatArray, quantity: ColumnQuantity, rpm: FloatArray
    ) -> FloatArray:
        """Torque referred to the engine [N*m] from power [W] or tractive force [N].

        Parameters
        ----------
        values : ndarray, shape (n,)
            Power [W] or tractive force [N].
        quantity : ColumnQuantity
            ``POWER`` or ``FORCE``.
        rpm : ndarray, shape (n,)
            Engine speed [rpm], > 0.

        Returns
        -------
        ndarray, shape (n,)
        """
        if quantity is ColumnQuantity.FORCE:
            return np.asarray(values * (self.rolling_radius_m / self.overall_ratio))
        return np.asarray(values / (rpm * RPM_TO_RAD_S))


def road_speed_conversion(
    overall_ratio: float | None, rolling_radius_m: float | None
) -> RoadSpeedConversion | None:
    """The conversion, checked; None when neither is given.

    Parameters
    ----------
    overall_ratio : float or None
        Gear * final drive * extra reduction [-], in (0, 100].
    rolling_radius_m : float or None
        Tire rolling radius [m], in (0, 2.5].

    Returns
    -------
    RoadSpeedConversion or None

    Raises
    ------
    DynoFileError
        When only one is given or either is out of range (``parameter`` names it).

    Examples
    --------
    >>> c = road_speed_conversion(3.55, 0.3)
    >>> round(c.rpm_per_m_s, 3)
    113.0
    """
    if overall_ratio is None and rolling_radius_m is None:
        return None
    limits: list[tuple[str, float | None, float, str]] = [
        ("overall_ratio", overall_ratio, MAX_OVERALL_RATIO, ""),
        ("rolling_radius_m", rolling_radius_m, MAX_ROLLING_RADIUS_M, " m"),
    ]
    for name, value, most, unit in limits:
        if value is None:
            other = "rolling_radius_m" if name == "overall_ratio" else "overall_ratio"
            raise DynoFileError(
                f"`{name}` must be given with `{other}`, got only `{other}`", parameter=name
            )
        if not (math.isfinite(value) and 0.0 < value <= most):
            raise DynoFileError(
                f"`{name}` must lie in (0, {most:g}{unit}], got {value:g}", parameter=name
            )
    return RoadSpeedConversion(float(overall_ratio or 0.0), float(rolling_radius_m or 0.0))
