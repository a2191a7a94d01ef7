"""The reference air of each rating standard."""

from __future__ import annotations

import pint
from numpy.testing import assert_allclose

from core.engine.reference_air import CorrectionStandard, PressureBasis, reference_conditions

_REGISTRY: pint.UnitRegistry[float] = pint.UnitRegistry()


def _convert(value: float, unit: str, to: str) -> float:
    return float(_REGISTRY.Quantity(value, unit).to(to).magnitude)


def test_reference_conditions_state_each_standards_air() -> None:
    # REFERENCES.md: J1349 and ISO 1585 298 K / 99 kPa dry; DIN 70020 293 K / 1013 mbar total;
    # J607 60 F / 29.92 inHg dry (pint's inch of mercury).
    j1349 = reference_conditions(CorrectionStandard.SAE_J1349_1990)
    assert j1349 == reference_conditions(CorrectionStandard.SAE_J1349_2004)
    iso = reference_conditions(CorrectionStandard.ISO_1585)
    assert (iso.temperature_k, iso.pressure_pa) == (298.0, 99_000.0)
    din = reference_conditions(CorrectionStandard.DIN_70020)
    assert din.pressure_basis is PressureBasis.TOTAL
    j607 = reference_conditions(CorrectionStandard.SAE_J607)
    assert j607.pressure_basis is PressureBasis.DRY
    assert_allclose(j607.temperature_k, _convert(60.0, "degF", "K"), rtol=1e-14)
    assert_allclose(j607.pressure_pa, _convert(29.92, "inHg", "Pa"), rtol=1e-12)
