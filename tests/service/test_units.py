"""Unit factors of the API against the reference library scipy.constants."""

from __future__ import annotations

import numpy as np
import pint
import pytest
from numpy.testing import assert_allclose
from scipy import constants

from service.units import Quantity, UnitSystem, from_si, to_si, unit_labels


@pytest.mark.parametrize(
    ("quantity", "si_per_unit"),
    [
        # reference library: scipy.constants (CODATA / NIST SP 811 exact definitions)
        pytest.param(Quantity.TORQUE, constants.pound_force * constants.foot, id="lbf*ft"),
        pytest.param(Quantity.POWER, constants.horsepower, id="hp"),
        pytest.param(Quantity.SPEED, constants.mile / constants.hour, id="mph"),
        pytest.param(Quantity.FORCE, constants.pound_force, id="lbf"),
        pytest.param(Quantity.LENGTH, constants.inch, id="in"),
        pytest.param(Quantity.MASS, constants.pound, id="lb"),
    ],
)
def test_us_factor_matches_scipy_constants(quantity: Quantity, si_per_unit: float) -> None:
    assert_allclose(to_si(1.0, quantity, UnitSystem.US), si_per_unit, rtol=1e-12)


@pytest.mark.parametrize(
    ("quantity", "si_per_unit"),
    [
        pytest.param(Quantity.POWER, constants.kilo, id="kW"),
        pytest.param(Quantity.SPEED, constants.kilo / constants.hour, id="km/h"),
        pytest.param(Quantity.LENGTH, constants.milli, id="mm"),
    ],
)
def test_metric_factor_matches_scipy_constants(quantity: Quantity, si_per_unit: float) -> None:
    assert_allclose(to_si(1.0, quantity, UnitSystem.METRIC), si_per_unit, rtol=1e-12)


def test_reference_values_from_references_md() -> None:
    # REFERENCES.md: 1 lbf = 4.4482216152605 N; 1 lbf*ft = 1.3558179483314 N*m;
    # 1 mph = 0.44704 m/s; 1 hp = 745.69987 W
    us = UnitSystem.US
    assert_allclose(to_si(1.0, Quantity.FORCE, us), 4.4482216152605, rtol=1e-13)
    assert_allclose(to_si(1.0, Quantity.TORQUE, us), 1.3558179483314, rtol=1e-12)
    assert_allclose(to_si(1.0, Quantity.SPEED, us), 0.44704, rtol=1e-15)
    assert_allclose(to_si(1.0, Quantity.POWER, us), 745.69987, rtol=1e-8)


@pytest.mark.parametrize("system", [pytest.param(s, id=s.value) for s in UnitSystem])
def test_conversion_round_trips(system: UnitSystem) -> None:
    x = np.array([0.5, 12.0, 3.3e4])
    for q in Quantity:
        assert_allclose(from_si(to_si(x, q, system), q, system), x, rtol=1e-12)


def test_labels_name_every_quantity() -> None:
    assert set(unit_labels(UnitSystem.US)) == {q.value for q in Quantity} | {"engine_speed"}


@pytest.mark.parametrize(
    ("quantity", "system", "si_per_unit"),
    [
        # reference library: scipy.constants
        pytest.param(Quantity.DISTANCE, UnitSystem.US, constants.foot, id="ft"),
        pytest.param(Quantity.AREA, UnitSystem.US, constants.foot**2, id="ft^2"),
        pytest.param(Quantity.DISTANCE, UnitSystem.METRIC, 1.0, id="m"),
        pytest.param(Quantity.PRESSURE, UnitSystem.METRIC, constants.kilo, id="kPa"),
    ],
)
def test_run_and_air_factors_match_scipy_constants(
    quantity: Quantity, system: UnitSystem, si_per_unit: float
) -> None:
    assert_allclose(to_si(1.0, quantity, system), si_per_unit, rtol=1e-12)


@pytest.mark.parametrize(
    ("system", "unit"),
    [
        pytest.param(UnitSystem.METRIC, "kg/m^3", id="kg/m^3"),
        pytest.param(UnitSystem.US, "lb/ft^3", id="lb/ft^3"),
    ],
)
def test_air_density_factor_matches_pint(system: UnitSystem, unit: str) -> None:
    # reference library: pint (pound 0.45359237 kg and foot 0.3048 m, exact by definition);
    # ISO 2533 sea-level air, 1.225 kg/m^3, is about 0.0765 lb/ft^3
    si_per_unit = pint.UnitRegistry().Quantity(1.0, unit).to("kg/m^3").magnitude
    assert_allclose(to_si(1.0, Quantity.DENSITY, system), si_per_unit, rtol=1e-12)
    assert unit_labels(system)["density"] == unit


def test_inch_of_mercury_matches_pint() -> None:
    # reference library: pint's inch of mercury (conventional mercury density, 32 degF);
    # NIST SP 811 lists 3.386389e3 Pa
    inhg_pa = pint.UnitRegistry().Quantity(1.0, "inHg").to("Pa").magnitude
    assert_allclose(to_si(1.0, Quantity.PRESSURE, UnitSystem.US), inhg_pa, rtol=1e-6)


@pytest.mark.parametrize(
    ("system", "scale"),
    [pytest.param(UnitSystem.METRIC, "C", id="degC"), pytest.param(UnitSystem.US, "F", id="degF")],
)
def test_temperature_matches_scipy_convert_temperature(system: UnitSystem, scale: str) -> None:
    # reference library: scipy.constants.convert_temperature
    values = np.array([-40.0, 0.0, 15.0, 68.0, 100.0])
    expected = constants.convert_temperature(values, scale, "K")
    assert_allclose(to_si(values, Quantity.TEMPERATURE, system), expected, rtol=1e-12)
