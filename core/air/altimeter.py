"""Station pressure from an altimeter setting and the station elevation.

An altimeter setting ``A`` is the station pressure reduced to sea level through the
standard atmosphere: an altimeter set to ``A`` reads the station's elevation ``h``. With
the pressure altitude of the ISO 2533 troposphere, ``H(q) = (T0/L) * (1 - (q/p0)**n)``,
that is ``H(p) - H(A) = h``, so

    ``p = p0 * ((A/p0)**n - L*h/T0) ** (1/n)``,  ``n = R*L/g0``,

with the ISO 2533 constants ``p0 = 101325 Pa``, ``T0 = 288.15 K``, ``L = 0.0065 K/m``,
``R = 287.05287 J/(kg K)``, ``g0 = 9.80665 m/s^2`` (from :mod:`core.units`, as in
:mod:`core.air.atmosphere`).
This is the altimeter equation of the Smithsonian Meteorological Tables without its
0.3 hPa barometer-height offset. With ``A = p0`` it gives the standard pressure at ``h``.
"""

from __future__ import annotations

from core.checks import require_range
from core.errors import CorrectionError
from core.units import (
    ISO_AIR_GAS_CONSTANT_J_KG_K,
    ISO_LAPSE_RATE_K_PER_M,
    ISO_SEA_LEVEL_PRESSURE_PA,
    ISO_SEA_LEVEL_TEMPERATURE_K,
    STANDARD_GRAVITY_M_S2,
)

__all__ = ["ALTIMETER_RANGE_PA", "ELEVATION_RANGE_M", "station_pressure_from_altimeter_pa"]

_ISO_EXPONENT = ISO_AIR_GAS_CONSTANT_J_KG_K * ISO_LAPSE_RATE_K_PER_M / STANDARD_GRAVITY_M_S2
"""``n = R*L/g0`` of the altimeter equation [-]."""

ALTIMETER_RANGE_PA = (85_000.0, 110_000.0)
"""Altimeter setting accepted [Pa]."""
ELEVATION_RANGE_M = (-500.0, 6000.0)
"""Station elevation accepted [m]."""
_ALTIMETER_RANGE_PA = ALTIMETER_RANGE_PA
_ELEVATION_RANGE_M = ELEVATION_RANGE_M


def station_pressure_from_altimeter_pa(altimeter_setting_pa: float, elevation_m: float) -> float:
    """Station pressure from an altimeter setting and the station elevation.

    ``p = p0 * ((A/p0)**n - L*h/T0) ** (1/n)`` in the ISO 2533 troposphere (derivation and
    constants in the module docstring).

    Parameters
    ----------
    altimeter_setting_pa : float
        Altimeter setting ``A`` [Pa], 85 000..110 000.
    elevation_m : float
        Station elevation ``h`` above mean sea level [m], -500..6000.

    Returns
    -------
    float
        Station (total) pressure [Pa].

    Raises
    ------
    CorrectionError
        If an argument is not finite or out of range.

    Examples
    --------
    >>> station_pressure_from_altimeter_pa(101325.0, 0.0)
    101325.0
    >>> round(station_pressure_from_altimeter_pa(101325.0, 1000.0), 1)
    89874.6
    """
    require_range(
        altimeter_setting_pa, "altimeter_setting_pa", *_ALTIMETER_RANGE_PA, CorrectionError
    )
    require_range(elevation_m, "elevation_m", *_ELEVATION_RANGE_M, CorrectionError)
    n = _ISO_EXPONENT
    p0, t0 = ISO_SEA_LEVEL_PRESSURE_PA, ISO_SEA_LEVEL_TEMPERATURE_K
    base = (altimeter_setting_pa / p0) ** n - ISO_LAPSE_RATE_K_PER_M * elevation_m / t0
    return float(p0 * base ** (1.0 / n))
