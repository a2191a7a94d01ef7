"""Unit systems of the API and the one place where quantities are converted to and from SI.

``metric``: N*m, kW, km/h, N, mm, kg.  ``us``: lbf*ft, hp (550 ft*lbf/s), mph, lbf, in, lb.
Engine speed is rpm in both. Factors are exact by definition (scipy.constants agrees).
"""

from __future__ import annotations

import enum
from dataclasses import dataclass
from typing import overload

import numpy as np
from numpy.typing import NDArray

__all__ = ["Quantity", "UnitSystem", "from_si", "to_si", "unit_labels"]

FloatArray = NDArray[np.float64]


class UnitSystem(enum.StrEnum):
    """Units the caller speaks, for input and output alike."""

    METRIC = "metric"
    US = "us"


class Quantity(enum.StrEnum):
    """Physical quantities that cross the API."""

    TORQUE = "torque"
    POWER = "power"
    SPEED = "speed"
    FORCE = "force"
    LENGTH = "length"
    MASS = "mass"


@dataclass(frozen=True)
class _Unit:
    label: str
    si_per_unit: float


_LBF_N = 4.4482216152605
_FOOT_M = 0.3048
_TABLE: dict[UnitSystem, dict[Quantity, _Unit]] = {
    UnitSystem.METRIC: {
        Quantity.TORQUE: _Unit("N*m", 1.0),
        Quantity.POWER: _Unit("kW", 1000.0),
        Quantity.SPEED: _Unit("km/h", 1000.0 / 3600.0),
        Quantity.FORCE: _Unit("N", 1.0),
        Quantity.LENGTH: _Unit("mm", 0.001),
        Quantity.MASS: _Unit("kg", 1.0),
    },
    UnitSystem.US: {
        Quantity.TORQUE: _Unit("lbf*ft", _LBF_N * _FOOT_M),
        Quantity.POWER: _Unit("hp", 550.0 * _LBF_N * _FOOT_M),
        Quantity.SPEED: _Unit("mph", 0.44704),
        Quantity.FORCE: _Unit("lbf", _LBF_N),
        Quantity.LENGTH: _Unit("in", 0.0254),
        Quantity.MASS: _Unit("lb", 0.45359237),
    },
}


@overload
def to_si(value: float, quantity: Quantity, system: UnitSystem) -> float: ...
@overload
def to_si(value: FloatArray, quantity: Quantity, system: UnitSystem) -> FloatArray: ...
def to_si(value: float | FloatArray, quantity: Quantity, system: UnitSystem) -> float | FloatArray:
    """Convert a caller's value to SI (N*m, W, m/s, N, m, kg)."""
    return value * _TABLE[system][quantity].si_per_unit


@overload
def from_si(value: float, quantity: Quantity, system: UnitSystem) -> float: ...
@overload
def from_si(value: FloatArray, quantity: Quantity, system: UnitSystem) -> FloatArray: ...
def from_si(
    value: float | FloatArray, quantity: Quantity, system: UnitSystem
) -> float | FloatArray:
    """Convert an SI value to the caller's unit."""
    return value / _TABLE[system][quantity].si_per_unit


def unit_labels(system: UnitSystem) -> dict[str, str]:
    """The unit of every quantity in a response, by quantity name, rpm included."""
    labels = {q.value: u.label for q, u in _TABLE[system].items()}
    labels["engine_speed"] = "rpm"
    return labels
