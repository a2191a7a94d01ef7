"""Coast-down coefficients referred to standard air and temperature (SAE J1263 in outline):
the aerodynamic term scales with air density, the rolling terms with tire temperature."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from core.air.atmosphere import air_density_kg_m3

__all__ = [
    "REFERENCE_PRESSURE_PA",
    "REFERENCE_TEMPERATURE_K",
    "ROLLING_TEMPERATURE_COEFFICIENT_PER_K",
    "ReferenceCorrection",
    "reference_correction",
]

FloatArray = NDArray[np.float64]


REFERENCE_TEMPERATURE_K = 293.15
"""Reference temperature of SAE J1263, 20 degC [K] (from memory)."""
REFERENCE_PRESSURE_PA = 98210.0
"""Reference pressure of SAE J1263, 98.21 kPa [Pa] (from memory)."""
ROLLING_TEMPERATURE_COEFFICIENT_PER_K = 0.00864
"""Rolling-resistance temperature coefficient ``K0`` of SAE J1263 [1/K] (from memory)."""


@dataclass(frozen=True)
class ReferenceCorrection:
    """Coefficients corrected to the reference conditions of SAE J1263 (in outline).

    Attributes
    ----------
    applied : bool
        False when no test conditions were given (coefficients as measured).
    test_density_kg_m3, reference_density_kg_m3 : float
        Air density during the test and at reference [kg/m^3].
    rolling_factor : float
        ``1 + K0*(T - T_ref)``, applied to ``F0`` and ``F1`` [-].
    coefficients : ndarray, shape (3,)
        ``F0`` [N], ``F1`` [N*s/m], ``F2`` [N*s^2/m^2] at reference.
    """

    applied: bool
    test_density_kg_m3: float
    reference_density_kg_m3: float
    rolling_factor: float
    coefficients: FloatArray


def reference_correction(
    coefficients: FloatArray,
    temperature_k: float | None,
    pressure_pa: float | None,
    relative_humidity: float,
) -> ReferenceCorrection:
    """The fitted ``F0``, ``F1``, ``F2`` [N, N*s/m, N*s^2/m^2] corrected from the test's air
    (temperature [K], pressure [Pa], relative humidity [-]) to the reference; as measured
    when no test conditions are given."""
    rho_ref = air_density_kg_m3(REFERENCE_PRESSURE_PA, REFERENCE_TEMPERATURE_K, 0.0)
    if temperature_k is None or pressure_pa is None:
        return ReferenceCorrection(False, rho_ref, rho_ref, 1.0, coefficients.copy())
    rho = air_density_kg_m3(pressure_pa, temperature_k, relative_humidity)
    factor = 1.0 + ROLLING_TEMPERATURE_COEFFICIENT_PER_K * (
        temperature_k - REFERENCE_TEMPERATURE_K
    )
    f0, f1, f2 = coefficients
    corrected = np.array([f0 * factor, f1 * factor, f2 * rho_ref / rho])
    return ReferenceCorrection(True, rho, rho_ref, factor, corrected)
