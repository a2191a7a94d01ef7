"""Each constant and unit factor of core.units against outside references."""

from __future__ import annotations

import pint
import pytest
from numpy.testing import assert_allclose
from scipy import constants

from core import units

_REGISTRY: pint.UnitRegistry[float] = pint.UnitRegistry()


@pytest.mark.parametrize(
    ("value", "pint_unit"),
    [
        pytest.param(units.INCH_M, "inch", id="inch"),
        pytest.param(units.FOOT_M, "foot", id="foot"),
        pytest.param(units.MILE_M, "mile", id="mile"),
        pytest.param(units.MPH_M_S, "mile/hour", id="mph"),
        pytest.param(units.KM_H_M_S, "kilometer/hour", id="km/h"),
        pytest.param(units.POUND_KG, "pound", id="pound"),
        pytest.param(units.POUND_FORCE_N, "force_pound", id="lbf"),
        pytest.param(units.KILOGRAM_FORCE_N, "kilogram_force", id="kgf"),
        pytest.param(units.POUND_FORCE_FOOT_NM, "force_pound * foot", id="lbf*ft"),
        pytest.param(units.HORSEPOWER_W, "horsepower", id="hp"),
        pytest.param(units.METRIC_HORSEPOWER_W, "metric_horsepower", id="metric-hp"),
        pytest.param(units.KILOPASCAL_PA, "kilopascal", id="kPa"),
        pytest.param(units.HECTOPASCAL_PA, "millibar", id="mbar"),
        pytest.param(units.INCH_OF_MERCURY_PA, "inch_Hg", id="inHg"),
        pytest.param(units.STANDARD_GRAVITY_M_S2, "standard_gravity", id="g0"),
        pytest.param(units.ISO_SEA_LEVEL_PRESSURE_PA, "atmosphere", id="atm"),
    ],
)
def test_unit_factor_matches_pint(value: float, pint_unit: str) -> None:
    # pint's default registry (units defined by NIST SP 811 / the 1959 yard and pound).
    expected = _REGISTRY.Quantity(1.0, pint_unit).to_base_units().magnitude
    assert_allclose(value, expected, rtol=1e-12)


@pytest.mark.parametrize(
    ("value", "scipy_name"),
    [
        pytest.param(units.INCH_M, "inch", id="inch"),
        pytest.param(units.FOOT_M, "foot", id="foot"),
        pytest.param(units.MILE_M, "mile", id="mile"),
        pytest.param(units.MPH_M_S, "mph", id="mph"),
        pytest.param(units.KM_H_M_S, "kmh", id="km/h"),
        pytest.param(units.POUND_KG, "pound", id="pound"),
        pytest.param(units.POUND_FORCE_N, "pound_force", id="lbf"),
        pytest.param(units.KILOGRAM_FORCE_N, "kgf", id="kgf"),
        pytest.param(units.HORSEPOWER_W, "hp", id="hp"),
        pytest.param(units.STANDARD_GRAVITY_M_S2, "g", id="g0"),
        pytest.param(units.ISO_SEA_LEVEL_PRESSURE_PA, "atm", id="atm"),
        pytest.param(units.ZERO_CELSIUS_K, "zero_Celsius", id="0-degC"),
    ],
)
def test_unit_factor_matches_scipy_constants(value: float, scipy_name: str) -> None:
    # scipy.constants (CODATA / NIST SP 811 definitions), to a unit in the last place.
    assert_allclose(value, getattr(constants, scipy_name), rtol=1e-15)


def test_inch_of_mercury_is_the_conventional_one() -> None:
    # NIST SP 811 appendix B.8: inch of mercury, conventional = 3.386 389 E+03 Pa.
    assert_allclose(units.INCH_OF_MERCURY_PA, 3.386389e3, rtol=2e-7)


def test_standard_atmosphere_sea_level_density_follows_from_its_constants() -> None:
    # ISO 2533: rho0 = p0 / (R * T0) = 1.225 kg/m^3 at sea level.
    rho0 = units.ISO_SEA_LEVEL_PRESSURE_PA / (
        units.ISO_AIR_GAS_CONSTANT_J_KG_K * units.ISO_SEA_LEVEL_TEMPERATURE_K
    )
    assert_allclose(rho0, 1.225, rtol=1e-4)


def test_zero_celsius_is_273_15_kelvin() -> None:
    # ITS-90 / SI: 0 degC = 273.15 K exactly (pint's degC offset).
    zero = _REGISTRY.Quantity(0.0, "degC").to("kelvin").magnitude
    assert_allclose(units.ZERO_CELSIUS_K, zero, rtol=1e-15)
