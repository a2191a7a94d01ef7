"""Ambient air: saturation vapour pressure, standard pressure and humid-air density.

Formulas
--------
* Saturation vapour pressure over liquid water, Buck (1996):
  ``e_s = 611.21 * exp((18.678 - t/234.5) * t / (257.14 + t))`` [Pa], ``t`` in degrees
  Celsius. Used over water at every temperature in range (the meteorological convention for
  relative humidity); no enhancement factor is applied.
* Pressure of the ISO 2533 standard atmosphere in the troposphere, from geopotential
  altitude ``H``: ``p = p0 * (1 - L*H/T0) ** (g0/(R*L))`` with ``p0 = 101325 Pa``,
  ``T0 = 288.15 K``, ``L = 0.0065 K/m``, ``g0 = 9.80665 m/s^2``, ``R = 287.05287 J/(kg K)``.
* Humid air as an ideal mixture of dry air and water vapour:
  ``rho = p_d/(R_d*T) + p_v/(R_v*T)`` with ``R_d = 287.058`` and ``R_v = 461.495`` J/(kg K).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import overload

import numpy as np
from numpy.typing import NDArray

from core.errors import VehicleError
from core.units import (
    ISO_AIR_GAS_CONSTANT_J_KG_K,
    ISO_LAPSE_RATE_K_PER_M,
    ISO_SEA_LEVEL_PRESSURE_PA,
    ISO_SEA_LEVEL_TEMPERATURE_K,
    STANDARD_GRAVITY_M_S2,
    ZERO_CELSIUS_K,
)

__all__ = [
    "AIR_PRESSURE_RANGE_PA",
    "AIR_TEMPERATURE_RANGE_K",
    "ALTITUDE_RANGE_M",
    "AirState",
    "air_density_kg_m3",
    "air_state",
    "saturation_vapour_pressure_pa",
    "standard_pressure_pa",
]

_DRY_AIR_GAS_CONSTANT = 287.058  # [J/(kg K)]
_WATER_VAPOUR_GAS_CONSTANT = 461.495  # [J/(kg K)]

AIR_TEMPERATURE_RANGE_K = (200.0, 350.0)
"""Air temperature accepted [K]."""
AIR_PRESSURE_RANGE_PA = (30_000.0, 120_000.0)
"""Station pressure accepted [Pa]."""
ALTITUDE_RANGE_M = (-500.0, 8000.0)
"""Altitude accepted for the ISO 2533 standard pressure [m]."""
_TEMPERATURE_RANGE_K = AIR_TEMPERATURE_RANGE_K
_PRESSURE_RANGE_PA = AIR_PRESSURE_RANGE_PA
_ALTITUDE_RANGE_M = ALTITUDE_RANGE_M


@dataclass(frozen=True)
class AirState:
    """Ambient air described by pressure, temperature and humidity.

    Attributes
    ----------
    pressure_pa : float
        Total (barometric) pressure [Pa].
    temperature_k : float
        Air temperature [K].
    relative_humidity : float
        Relative humidity over liquid water [-], 0..1.
    vapour_pressure_pa : float
        Partial pressure of water vapour [Pa].
    dry_pressure_pa : float
        Partial pressure of the dry air, ``pressure_pa - vapour_pressure_pa`` [Pa].
    density_kg_m3 : float
        Density of the humid air [kg/m^3].
    """

    pressure_pa: float
    temperature_k: float
    relative_humidity: float
    vapour_pressure_pa: float
    dry_pressure_pa: float
    density_kg_m3: float


def _check_range(values: NDArray[np.float64], name: str, low: float, high: float) -> None:
    """Raise on the first element of ``values`` that is not finite or lies outside a range."""
    flat = values.reshape(-1)
    bad = np.flatnonzero(~np.isfinite(flat) | (flat < low) | (flat > high))
    if bad.size:
        index = int(bad[0])
        where = name if values.ndim == 0 else f"{name}[{index}]"
        raise VehicleError(
            f"`{where}` must lie in [{low:g}, {high:g}], got {flat[index]:g}", parameter=where
        )


@overload
def saturation_vapour_pressure_pa(temperature_k: float) -> float: ...
@overload
def saturation_vapour_pressure_pa(temperature_k: NDArray[np.float64]) -> NDArray[np.float64]: ...
def saturation_vapour_pressure_pa(
    temperature_k: float | NDArray[np.float64],
) -> float | NDArray[np.float64]:
    """Saturation vapour pressure over liquid water (Buck 1996).

    Parameters
    ----------
    temperature_k : float or ndarray, shape (n,)
        Air temperature [K], 200..350.

    Returns
    -------
    float or ndarray, shape (n,)
        Saturation vapour pressure [Pa]; a float for a float argument.

    Raises
    ------
    VehicleError
        If a temperature is not finite or lies outside 200..350 K.

    Examples
    --------
    >>> round(saturation_vapour_pressure_pa(298.15), 1)
    3168.5
    """
    kelvin = np.asarray(temperature_k, dtype=np.float64)
    _check_range(kelvin, "temperature_k", *_TEMPERATURE_RANGE_K)
    celsius = kelvin - ZERO_CELSIUS_K
    pressure = 611.21 * np.exp((18.678 - celsius / 234.5) * celsius / (257.14 + celsius))
    if isinstance(temperature_k, np.ndarray):
        return pressure
    return float(pressure)


@overload
def standard_pressure_pa(altitude_m: float) -> float: ...
@overload
def standard_pressure_pa(altitude_m: NDArray[np.float64]) -> NDArray[np.float64]: ...
def standard_pressure_pa(altitude_m: float | NDArray[np.float64]) -> float | NDArray[np.float64]:
    """Pressure of the ISO 2533 standard atmosphere in the troposphere.

    Parameters
    ----------
    altitude_m : float or ndarray, shape (n,)
        Geopotential altitude [m], -500..8000 (the troposphere formula holds to 11 km).

    Returns
    -------
    float or ndarray, shape (n,)
        Standard pressure [Pa]; a float for a float argument.

    Raises
    ------
    VehicleError
        If an altitude is not finite or lies outside -500..8000 m.

    Examples
    --------
    >>> standard_pressure_pa(0.0)
    101325.0
    >>> round(standard_pressure_pa(1000.0), 1)
    89874.6
    """
    altitude = np.asarray(altitude_m, dtype=np.float64)
    _check_range(altitude, "altitude_m", *_ALTITUDE_RANGE_M)
    exponent = STANDARD_GRAVITY_M_S2 / (ISO_AIR_GAS_CONSTANT_J_KG_K * ISO_LAPSE_RATE_K_PER_M)
    temperature_ratio = 1.0 - ISO_LAPSE_RATE_K_PER_M * altitude / ISO_SEA_LEVEL_TEMPERATURE_K
    pressure = ISO_SEA_LEVEL_PRESSURE_PA * temperature_ratio**exponent
    if isinstance(altitude_m, np.ndarray):
        return pressure
    return float(pressure)


def _partial_pressures(
    pressure_pa: float, temperature_k: float, relative_humidity: float
) -> tuple[float, float]:
    """Validate the three inputs and return (vapour, dry-air) partial pressures [Pa]."""
    _check_range(np.asarray(pressure_pa, dtype=np.float64), "pressure_pa", *_PRESSURE_RANGE_PA)
    _check_range(
        np.asarray(temperature_k, dtype=np.float64), "temperature_k", *_TEMPERATURE_RANGE_K
    )
    _check_range(np.asarray(relative_humidity, dtype=np.float64), "relative_humidity", 0.0, 1.0)
    vapour = relative_humidity * saturation_vapour_pressure_pa(temperature_k)
    if vapour >= pressure_pa:
        raise VehicleError(
            f"`relative_humidity` gives a vapour pressure of {vapour:g} Pa, which must be "
            f"below `pressure_pa` {pressure_pa:g} Pa",
            parameter="relative_humidity",
        )
    return vapour, pressure_pa - vapour


def _mixture_density(vapour_pa: float, dry_pa: float, temperature_k: float) -> float:
    """Ideal-gas density of a dry-air and water-vapour mixture [kg/m^3]."""
    return dry_pa / (_DRY_AIR_GAS_CONSTANT * temperature_k) + vapour_pa / (
        _WATER_VAPOUR_GAS_CONSTANT * temperature_k
    )


def air_density_kg_m3(pressure_pa: float, temperature_k: float, relative_humidity: float) -> float:
    """Density of humid air treated as an ideal mixture of dry air and water vapour.

    Parameters
    ----------
    pressure_pa : float
        Total (barometric) pressure [Pa], 30 000..120 000.
    temperature_k : float
        Air temperature [K], 200..350.
    relative_humidity : float
        Relative humidity over liquid water [-], 0..1.

    Returns
    -------
    float
        ``p_d/(R_d*T) + p_v/(R_v*T)`` [kg/m^3].

    Raises
    ------
    VehicleError
        If an argument is out of range or the vapour pressure reaches the total pressure.

    Examples
    --------
    >>> round(air_density_kg_m3(101325.0, 288.15, 0.0), 4)
    1.225
    """
    vapour, dry = _partial_pressures(pressure_pa, temperature_k, relative_humidity)
    return _mixture_density(vapour, dry, temperature_k)


def air_state(
    temperature_k: float,
    relative_humidity: float,
    *,
    pressure_pa: float | None = None,
    altitude_m: float | None = None,
) -> AirState:
    """Describe ambient air from a measured pressure or from an altitude.

    Give exactly one of ``pressure_pa`` and ``altitude_m``. An altitude is turned into the
    ISO 2533 standard pressure at that altitude; the temperature is always the one given,
    not the standard temperature at that altitude.

    Parameters
    ----------
    temperature_k : float
        Air temperature [K], 200..350.
    relative_humidity : float
        Relative humidity over liquid water [-], 0..1.
    pressure_pa : float, optional
        Total (barometric) pressure [Pa], 30 000..120 000.
    altitude_m : float, optional
        Geopotential altitude [m], -500..8000.

    Returns
    -------
    AirState
        Pressures, humidity and density of the air.

    Raises
    ------
    VehicleError
        If both or neither of ``pressure_pa`` and ``altitude_m`` are given, or an argument is
        out of range.

    Examples
    --------
    >>> state = air_state(288.15, 0.0, altitude_m=0.0)
    >>> state.pressure_pa, round(state.density_kg_m3, 4)
    (101325.0, 1.225)
    """
    if altitude_m is not None:
        if pressure_pa is not None:
            raise VehicleError(
                "only one of `pressure_pa` and `altitude_m` may be given, got both",
                parameter="altitude_m",
            )
        pressure_pa = standard_pressure_pa(float(altitude_m))
    elif pressure_pa is None:
        raise VehicleError(
            "one of `pressure_pa` and `altitude_m` must be given, got neither",
            parameter="pressure_pa",
        )
    vapour, dry = _partial_pressures(pressure_pa, temperature_k, relative_humidity)
    return AirState(
        pressure_pa=float(pressure_pa),
        temperature_k=float(temperature_k),
        relative_humidity=float(relative_humidity),
        vapour_pressure_pa=vapour,
        dry_pressure_pa=dry,
        density_kg_m3=_mixture_density(vapour, dry, temperature_k),
    )
