"""Unit systems of the API and the one place where quantities are converted to and from SI.

``metric``: N*m, kW, km/h, N, mm, kg, m (distance), m^2, kPa, degC, kg*m^2 (inertia),
rpm/sqrt(N*m) (converter K-factor), N/(km/h) and N/(km/h)^2 (coast-down terms), km (odometer).
``us``: lbf*ft, hp (550 ft*lbf/s), mph, lbf, in, lb, ft (distance), ft^2, inHg, degF,
lb*ft^2, rpm/sqrt(lbf*ft), lbf/mph and lbf/mph^2, mi (odometer).
Engine speed is rpm in both. Log channels may name their own unit (`NAMED_UNITS`).
Factors are exact by definition, each defined once in :mod:`core.units` (from
scipy.constants); temperature converts with its offset (to kelvin).
"""

from __future__ import annotations

import enum
from dataclasses import dataclass
from typing import overload

import numpy as np
from numpy.typing import NDArray

from core.units import (
    FOOT_M,
    HORSEPOWER_W,
    INCH_M,
    INCH_OF_MERCURY_PA,
    KM_H_M_S,
    MILE_M,
    MPH_M_S,
    POUND_FORCE_FOOT_NM,
    POUND_FORCE_N,
    POUND_KG,
    STANDARD_GRAVITY_M_S2,
    ZERO_CELSIUS_K,
)

__all__ = [
    "NAMED_UNITS",
    "Quantity",
    "UnitSystem",
    "from_named",
    "from_si",
    "si_label",
    "to_named",
    "to_si",
    "unit_label",
    "unit_labels",
]

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
    DISTANCE = "distance"
    AREA = "area"
    PRESSURE = "pressure"
    TEMPERATURE = "temperature"
    INERTIA = "inertia"
    K_FACTOR = "k_factor"
    FORCE_PER_SPEED = "force_per_speed"
    FORCE_PER_SPEED_SQUARED = "force_per_speed_squared"
    ODOMETER = "odometer"
    DENSITY = "density"


@dataclass(frozen=True)
class _Unit:
    label: str
    si_per_unit: float


_TABLE: dict[UnitSystem, dict[Quantity, _Unit]] = {
    UnitSystem.METRIC: {
        Quantity.TORQUE: _Unit("N*m", 1.0),
        Quantity.POWER: _Unit("kW", 1000.0),
        Quantity.SPEED: _Unit("km/h", KM_H_M_S),
        Quantity.FORCE: _Unit("N", 1.0),
        Quantity.LENGTH: _Unit("mm", 0.001),
        Quantity.MASS: _Unit("kg", 1.0),
        Quantity.DISTANCE: _Unit("m", 1.0),
        Quantity.AREA: _Unit("m^2", 1.0),
        Quantity.PRESSURE: _Unit("kPa", 1000.0),
        Quantity.TEMPERATURE: _Unit("degC", 1.0),
        Quantity.INERTIA: _Unit("kg*m^2", 1.0),
        Quantity.K_FACTOR: _Unit("rpm/sqrt(N*m)", 1.0),
        Quantity.FORCE_PER_SPEED: _Unit("N/(km/h)", 3.6),
        Quantity.FORCE_PER_SPEED_SQUARED: _Unit("N/(km/h)^2", 3.6**2),
        Quantity.ODOMETER: _Unit("km", 1000.0),
        Quantity.DENSITY: _Unit("kg/m^3", 1.0),
    },
    UnitSystem.US: {
        Quantity.TORQUE: _Unit("lbf*ft", POUND_FORCE_FOOT_NM),
        Quantity.POWER: _Unit("hp", HORSEPOWER_W),
        Quantity.SPEED: _Unit("mph", MPH_M_S),
        Quantity.FORCE: _Unit("lbf", POUND_FORCE_N),
        Quantity.LENGTH: _Unit("in", INCH_M),
        Quantity.MASS: _Unit("lb", POUND_KG),
        Quantity.DISTANCE: _Unit("ft", FOOT_M),
        Quantity.AREA: _Unit("ft^2", FOOT_M**2),
        Quantity.PRESSURE: _Unit("inHg", INCH_OF_MERCURY_PA),
        Quantity.TEMPERATURE: _Unit("degF", 5.0 / 9.0),
        Quantity.INERTIA: _Unit("lb*ft^2", POUND_KG * FOOT_M**2),
        # K = rpm / sqrt(torque): a K in rpm/sqrt(lbf*ft) is K / sqrt(1.3558...) in SI
        Quantity.K_FACTOR: _Unit("rpm/sqrt(lbf*ft)", POUND_FORCE_FOOT_NM**-0.5),
        Quantity.FORCE_PER_SPEED: _Unit("lbf/mph", POUND_FORCE_N / MPH_M_S),
        Quantity.FORCE_PER_SPEED_SQUARED: _Unit("lbf/mph^2", POUND_FORCE_N / MPH_M_S**2),
        Quantity.ODOMETER: _Unit("mi", MILE_M),
        Quantity.DENSITY: _Unit("lb/ft^3", POUND_KG / FOOT_M**3),
    },
}
_SI_LABELS: dict[Quantity, str] = {
    Quantity.TORQUE: "N*m",
    Quantity.POWER: "W",
    Quantity.SPEED: "m/s",
    Quantity.FORCE: "N",
    Quantity.LENGTH: "m",
    Quantity.MASS: "kg",
    Quantity.DISTANCE: "m",
    Quantity.AREA: "m^2",
    Quantity.PRESSURE: "Pa",
    Quantity.TEMPERATURE: "K",
    Quantity.INERTIA: "kg*m^2",
    Quantity.K_FACTOR: "rpm/sqrt(N*m)",
    Quantity.FORCE_PER_SPEED: "N/(m/s)",
    Quantity.FORCE_PER_SPEED_SQUARED: "N/(m/s)^2",
    Quantity.ODOMETER: "m",
    Quantity.DENSITY: "kg/m^3",
}

NAMED_UNITS: dict[str, float] = {
    "km/h": KM_H_M_S,
    "mph": MPH_M_S,
    "m/s": 1.0,
    "g": STANDARD_GRAVITY_M_S2,
    "m/s^2": 1.0,
}
"""SI per unit of the units a logged channel may name for itself (speed, acceleration)."""


def _zero_offset_k(system: UnitSystem) -> float:
    """Kelvin at the zero of the system's temperature scale (0 degC or 0 degF)."""
    return ZERO_CELSIUS_K if system is UnitSystem.METRIC else ZERO_CELSIUS_K - 32.0 * 5.0 / 9.0


@overload
def to_si(value: float, quantity: Quantity, system: UnitSystem) -> float: ...
@overload
def to_si(value: FloatArray, quantity: Quantity, system: UnitSystem) -> FloatArray: ...
def to_si(value: float | FloatArray, quantity: Quantity, system: UnitSystem) -> float | FloatArray:
    """Convert a caller's value to SI (N*m, W, m/s, N, m, kg, m^2, Pa, K)."""
    si = value * _TABLE[system][quantity].si_per_unit
    if quantity is Quantity.TEMPERATURE:
        return si + _zero_offset_k(system)
    return si


@overload
def from_si(value: float, quantity: Quantity, system: UnitSystem) -> float: ...
@overload
def from_si(value: FloatArray, quantity: Quantity, system: UnitSystem) -> FloatArray: ...
def from_si(
    value: float | FloatArray, quantity: Quantity, system: UnitSystem
) -> float | FloatArray:
    """Convert an SI value to the caller's unit."""
    if quantity is Quantity.TEMPERATURE:
        value = value - _zero_offset_k(system)
    return value / _TABLE[system][quantity].si_per_unit


def from_named(value: float, unit: str) -> float:
    """A value in a unit of :data:`NAMED_UNITS` (``km/h``, ``mph``, ``m/s``, ``g``) in SI."""
    return value * NAMED_UNITS[unit]


def to_named(value: float, unit: str) -> float:
    """An SI value in a unit of :data:`NAMED_UNITS`."""
    return value / NAMED_UNITS[unit]


def unit_label(quantity: Quantity, system: UnitSystem) -> str:
    """The caller's unit of a quantity, e.g. ``ft^2``."""
    return _TABLE[system][quantity].label


def si_label(quantity: Quantity) -> str:
    """The SI unit of a quantity, e.g. ``m^2``."""
    return _SI_LABELS[quantity]


_LABELS: dict[UnitSystem, dict[str, str]] = {
    system: {**{q.value: u.label for q, u in table.items()}, "engine_speed": "rpm"}
    for system, table in _TABLE.items()
}


def unit_labels(system: UnitSystem) -> dict[str, str]:
    """The unit of every quantity in a response, by quantity name, rpm included (a new
    dict each call, the caller's to change)."""
    return dict(_LABELS[system])
