"""The rating standards of dyno correction and the reference air of each: the temperature
and pressure at which a standard's correction factor is exactly 1, and whether that
pressure is of dry air or total."""

from __future__ import annotations

import enum
from dataclasses import dataclass

from core.units import INCH_OF_MERCURY_PA, ZERO_CELSIUS_K

__all__ = ["CorrectionStandard", "PressureBasis", "ReferenceConditions", "reference_conditions"]


class CorrectionStandard(enum.Enum):
    """A rating standard whose correction factor refers power to its reference air."""

    SAE_J1349_1990 = "sae_j1349_1990"
    SAE_J1349_2004 = "sae_j1349_2004"
    SAE_J607 = "sae_j607"
    DIN_70020 = "din_70020"
    ISO_1585 = "iso_1585"


class PressureBasis(enum.Enum):
    """Which pressure a standard's formula takes: dry-air (``DRY``) or total (``TOTAL``)."""

    DRY = "dry"
    TOTAL = "total"


@dataclass(frozen=True)
class ReferenceConditions:
    """The air in which a standard's correction factor is exactly 1.

    Attributes
    ----------
    temperature_k : float
        Reference air temperature [K], as the formula's constants give it.
    pressure_pa : float
        Reference pressure [Pa], dry-air or total according to ``pressure_basis``.
    pressure_basis : PressureBasis
        Whether the formula takes the dry-air or the total pressure.
    """

    temperature_k: float
    pressure_pa: float
    pressure_basis: PressureBasis


_REFERENCES = {
    CorrectionStandard.SAE_J1349_1990: ReferenceConditions(298.0, 99_000.0, PressureBasis.DRY),
    CorrectionStandard.SAE_J1349_2004: ReferenceConditions(298.0, 99_000.0, PressureBasis.DRY),
    CorrectionStandard.SAE_J607: ReferenceConditions(
        (60.0 - 32.0) / 1.8 + ZERO_CELSIUS_K, 29.92 * INCH_OF_MERCURY_PA, PressureBasis.DRY
    ),
    CorrectionStandard.DIN_70020: ReferenceConditions(293.0, 101_300.0, PressureBasis.TOTAL),
    CorrectionStandard.ISO_1585: ReferenceConditions(298.0, 99_000.0, PressureBasis.DRY),
}


def reference_conditions(standard: CorrectionStandard) -> ReferenceConditions:
    """The reference air of a standard, where its factor is exactly 1.

    Parameters
    ----------
    standard : CorrectionStandard
        The rating standard.

    Returns
    -------
    ReferenceConditions
        Temperature [K] and pressure [Pa], with the pressure's basis (dry or total).

    Examples
    --------
    >>> ref = reference_conditions(CorrectionStandard.DIN_70020)
    >>> ref.temperature_k, ref.pressure_pa, ref.pressure_basis.value
    (293.0, 101300.0, 'total')
    """
    return _REFERENCES[standard]
