"""Physical constants and unit factors, each defined once, in SI.

The core computes in SI; it needs a few factors of other units for the conventions of the
trade (a one-foot rollout, strip distances in feet, speed milestones in mph, tire sizes in
inches) and for the columns of dyno and logger files. Every factor is the SI value of one
unit, exact by the 1959 international yard and pound agreement and the CGPM definitions,
taken from :mod:`scipy.constants` where it has the unit. Where scipy computes a factor from
others (foot, mile, pound, mph) and lands one unit in the last place off the decimal
definition, the definition itself is written here (``tests/core/test_units.py`` holds each
against scipy and pint); the conventional inch of mercury and the ISO 2533 standard
atmosphere are given here with their sources.
The service converts its callers' units in ``service/units.py`` with these same factors.
"""

from __future__ import annotations

from typing import Final

from scipy import constants

__all__ = [
    "FOOT_M",
    "HECTOPASCAL_PA",
    "HORSEPOWER_W",
    "INCH_M",
    "INCH_OF_MERCURY_PA",
    "ISO_AIR_GAS_CONSTANT_J_KG_K",
    "ISO_LAPSE_RATE_K_PER_M",
    "ISO_SEA_LEVEL_PRESSURE_PA",
    "ISO_SEA_LEVEL_TEMPERATURE_K",
    "KILOGRAM_FORCE_N",
    "KILOPASCAL_PA",
    "KM_H_M_S",
    "METRIC_HORSEPOWER_W",
    "MILE_M",
    "MPH_M_S",
    "POUND_FORCE_FOOT_NM",
    "POUND_FORCE_N",
    "POUND_KG",
    "STANDARD_GRAVITY_M_S2",
    "ZERO_CELSIUS_K",
]

# Physical constants
STANDARD_GRAVITY_M_S2: Final[float] = constants.g
"""Standard acceleration of gravity, 9.80665 m/s^2 (CGPM 1901, ISO 80000-3)."""
ZERO_CELSIUS_K: Final[float] = constants.zero_Celsius
"""0 degC in kelvin [K]."""

# ISO 2533 standard atmosphere: sea level and the troposphere's lapse rate
ISO_SEA_LEVEL_PRESSURE_PA: Final[float] = constants.atm
"""Sea-level pressure of the standard atmosphere, 101325 Pa."""
ISO_SEA_LEVEL_TEMPERATURE_K: Final[float] = 288.15
"""Sea-level temperature of the standard atmosphere [K]."""
ISO_LAPSE_RATE_K_PER_M: Final[float] = 0.0065
"""Temperature lapse rate of the standard troposphere [K/m]."""
ISO_AIR_GAS_CONSTANT_J_KG_K: Final[float] = 287.05287
"""Specific gas constant of the standard atmosphere's air [J/(kg K)]."""

# Lengths
INCH_M: Final[float] = constants.inch
"""One inch [m]."""
FOOT_M: Final[float] = 0.3048
"""One foot [m]."""
MILE_M: Final[float] = 1609.344
"""One statute mile [m]."""

# Speed
MPH_M_S: Final[float] = 0.44704
"""One mile per hour [m/s]."""
KM_H_M_S: Final[float] = constants.kmh
"""One kilometre per hour [m/s]."""

# Mass, force, torque, power
POUND_KG: Final[float] = 0.45359237
"""One avoirdupois pound [kg]."""
POUND_FORCE_N: Final[float] = constants.pound_force
"""One pound-force [N]."""
KILOGRAM_FORCE_N: Final[float] = constants.kgf
"""One kilogram-force [N]."""
POUND_FORCE_FOOT_NM: Final[float] = POUND_FORCE_N * FOOT_M
"""One pound-force foot [N*m]."""
HORSEPOWER_W: Final[float] = 550.0 * POUND_FORCE_N * FOOT_M
"""One (mechanical) horsepower, 550 ft*lbf/s [W]."""
METRIC_HORSEPOWER_W: Final[float] = 75.0 * KILOGRAM_FORCE_N
"""One metric horsepower, 75 kgf*m/s [W]."""

# Pressure
KILOPASCAL_PA: Final[float] = constants.kilo
"""One kilopascal [Pa]."""
HECTOPASCAL_PA: Final[float] = constants.hecto
"""One hectopascal, or millibar [Pa]."""
INCH_OF_MERCURY_PA: Final[float] = 3386.388640341
"""One conventional inch of mercury [Pa]: 25.4 mm of mercury at 13595.1 kg/m^3 under
standard gravity (NIST SP 811, 3.386389E+03 Pa rounded)."""
