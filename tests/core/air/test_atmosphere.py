"""Tests of core.air.atmosphere: vapour pressure, standard pressure, humid-air density."""

from __future__ import annotations

import math

import fluids
import numpy as np
import psychrolib
import pytest
from CoolProp.CoolProp import HAPropsSI, PropsSI
from numpy.testing import assert_allclose

from core.air.atmosphere import (
    AirState,
    air_density_kg_m3,
    air_state,
    saturation_vapour_pressure_pa,
    standard_pressure_pa,
)
from core.errors import VehicleError

EARTH_RADIUS_M = 6356766.0  # radius used by ISO 2533 / US 1976 for geopotential altitude


def _psychrolib_si() -> None:
    psychrolib.SetUnitSystem(psychrolib.SI)


def _geometric_altitude_m(geopotential_m: float) -> float:
    return EARTH_RADIUS_M * geopotential_m / (EARTH_RADIUS_M - geopotential_m)


def test_saturation_vapour_pressure_at_25_c_matches_coolprop() -> None:
    # CoolProp (IAPWS-95): 3169.93 Pa at 25 C; Buck (1996) is good to a few parts in 10^4.
    reference = PropsSI("P", "T", 298.15, "Q", 0, "Water")
    assert_allclose(reference, 3169.93, rtol=1e-5)
    assert_allclose(saturation_vapour_pressure_pa(298.15), reference, rtol=1e-3)


def test_saturation_vapour_pressure_at_25_c_matches_psychrolib() -> None:
    # psychrolib (ASHRAE Handbook Fundamentals 2017, ch. 1): 3169.22 Pa at 25 C.
    _psychrolib_si()
    reference = psychrolib.GetSatVapPres(25.0)
    assert_allclose(reference, 3169.22, rtol=1e-5)
    assert_allclose(saturation_vapour_pressure_pa(298.15), reference, rtol=1e-3)


def test_saturation_vapour_pressure_at_25_c_equals_buck_formula_value() -> None:
    # Buck (1996) formula evaluated at 25 C: 3.16853 kPa (REFERENCES.md, computed).
    assert_allclose(saturation_vapour_pressure_pa(298.15), 3168.53, rtol=2e-6)


def test_saturation_vapour_pressure_at_0_c_is_the_buck_constant() -> None:
    # Closed form: at t = 0 C the exponent vanishes and e_s = 611.21 Pa exactly.
    assert_allclose(saturation_vapour_pressure_pa(273.15), 611.21, rtol=1e-14)


def test_saturation_vapour_pressure_tracks_coolprop_from_triple_point_to_350_k() -> None:
    # CoolProp (IAPWS-95) saturation curve of water, over the range where liquid water exists.
    temperature = np.linspace(273.16, 350.0, 12)
    reference = np.array([PropsSI("P", "T", t, "Q", 0, "Water") for t in temperature])
    assert_allclose(saturation_vapour_pressure_pa(temperature), reference, rtol=1e-3)


def test_saturation_vapour_pressure_keeps_float_and_array_arguments_apart() -> None:
    assert isinstance(saturation_vapour_pressure_pa(300.0), float)
    pressures = saturation_vapour_pressure_pa(np.array([280.0, 300.0]))
    assert isinstance(pressures, np.ndarray)
    assert pressures.shape == (2,)


@pytest.mark.parametrize(
    "altitude_m",
    [
        pytest.param(-500.0, id="below-sea-level"),
        pytest.param(0.0, id="sea-level"),
        pytest.param(1609.0, id="one-mile"),
        pytest.param(4000.0, id="4-km"),
        pytest.param(8000.0, id="8-km"),
    ],
)
def test_standard_pressure_matches_fluids_atmosphere_1976(altitude_m: float) -> None:
    # Reference library: fluids.ATMOSPHERE_1976 (US Standard Atmosphere 1976, identical to
    # ISO 2533 in the troposphere); it takes geometric altitude, so convert from geopotential.
    reference = fluids.ATMOSPHERE_1976(_geometric_altitude_m(altitude_m)).P
    assert_allclose(standard_pressure_pa(altitude_m), reference, rtol=2e-6)


def test_standard_pressure_at_sea_level_is_the_iso_2533_value() -> None:
    # ISO 2533: p0 = 101325 Pa by definition.
    assert standard_pressure_pa(0.0) == 101325.0


def test_standard_pressure_is_vectorised_and_falls_with_altitude() -> None:
    altitude = np.array([0.0, 1000.0, 2000.0, 3000.0])
    pressure = standard_pressure_pa(altitude)
    assert pressure.shape == (4,)
    assert np.all(np.diff(pressure) < 0.0)


def test_dry_air_density_at_iso_sea_level_matches_fluids() -> None:
    # Reference library: fluids.ATMOSPHERE_1976 gives 1.2250 kg/m^3 at sea level; the small
    # difference in the dry-air gas constant (287.058 vs 287.053) is inside the tolerance.
    reference = fluids.ATMOSPHERE_1976(0.0).rho
    assert_allclose(air_density_kg_m3(101325.0, 288.15, 0.0), reference, rtol=1e-4)


def test_humid_air_density_is_the_sum_of_partial_densities() -> None:
    # Closed form: rho = p_d/(R_d*T) + p_v/(R_v*T).
    vapour = 0.5 * saturation_vapour_pressure_pa(303.15)
    expected = (95000.0 - vapour) / (287.058 * 303.15) + vapour / (461.495 * 303.15)
    assert_allclose(air_density_kg_m3(95000.0, 303.15, 0.5), expected, rtol=1e-14)


HUMID_CASES = [
    pytest.param(101325.0, 288.15, 0.0, id="iso-sea-level-dry"),
    pytest.param(95000.0, 303.15, 0.5, id="warm-half-humid"),
    pytest.param(85000.0, 313.15, 0.9, id="hot-humid-altitude"),
    pytest.param(100000.0, 273.16, 1.0, id="saturated-at-triple-point"),
]


@pytest.mark.parametrize(("pressure_pa", "temperature_k", "relative_humidity"), HUMID_CASES)
def test_humid_air_density_matches_psychrolib(
    pressure_pa: float, temperature_k: float, relative_humidity: float
) -> None:
    # psychrolib (ASHRAE Handbook Fundamentals 2017, ch. 1): ideal-gas moist-air density;
    # its gas constants and vapour-pressure formula differ slightly from ours.
    _psychrolib_si()
    celsius = temperature_k - 273.15
    ratio = psychrolib.GetHumRatioFromRelHum(celsius, relative_humidity, pressure_pa)
    reference = psychrolib.GetMoistAirDensity(celsius, ratio, pressure_pa)
    density = air_density_kg_m3(pressure_pa, temperature_k, relative_humidity)
    assert_allclose(density, reference, rtol=2e-4)


@pytest.mark.parametrize(("pressure_pa", "temperature_k", "relative_humidity"), HUMID_CASES)
def test_humid_air_density_matches_coolprop_humid_air(
    pressure_pa: float, temperature_k: float, relative_humidity: float
) -> None:
    # CoolProp HAPropsSI (real-gas humid air): density = (1 + W)/v_da = 1/Vha. The ideal-gas
    # mixture agrees to better than 0.1 %.
    volume = HAPropsSI("Vha", "T", temperature_k, "P", pressure_pa, "R", relative_humidity)
    density = air_density_kg_m3(pressure_pa, temperature_k, relative_humidity)
    assert_allclose(density, 1.0 / volume, rtol=1.5e-3)


def test_humid_air_is_lighter_than_dry_air_at_the_same_pressure() -> None:
    # Physics: water vapour (18 g/mol) displaces heavier dry air (29 g/mol).
    assert air_density_kg_m3(100000.0, 305.0, 0.8) < air_density_kg_m3(100000.0, 305.0, 0.0)


def test_air_state_from_altitude_uses_the_standard_pressure() -> None:
    state = air_state(290.0, 0.4, altitude_m=1500.0)
    assert isinstance(state, AirState)
    assert_allclose(state.pressure_pa, standard_pressure_pa(1500.0), rtol=1e-15)
    assert_allclose(
        state.density_kg_m3, air_density_kg_m3(state.pressure_pa, 290.0, 0.4), rtol=1e-15
    )


def test_air_state_partial_pressures_add_up_to_the_total() -> None:
    state = air_state(300.0, 0.6, pressure_pa=98000.0)
    vapour = 0.6 * saturation_vapour_pressure_pa(300.0)
    assert_allclose(state.vapour_pressure_pa, vapour, rtol=1e-15)
    assert_allclose(state.dry_pressure_pa + state.vapour_pressure_pa, 98000.0, rtol=1e-15)
    assert (state.temperature_k, state.relative_humidity) == (300.0, 0.6)


def test_air_state_with_both_pressure_and_altitude_is_rejected() -> None:
    with pytest.raises(VehicleError, match="only one of") as info:
        air_state(290.0, 0.5, pressure_pa=100000.0, altitude_m=100.0)
    assert info.value.parameter == "altitude_m"


def test_air_state_with_neither_pressure_nor_altitude_is_rejected() -> None:
    with pytest.raises(VehicleError, match="got neither"):
        air_state(290.0, 0.5)


@pytest.mark.parametrize(
    ("kwargs", "parameter"),
    [
        pytest.param({"temperature_k": 199.0}, "temperature_k", id="too-cold"),
        pytest.param({"temperature_k": 351.0}, "temperature_k", id="too-hot"),
        pytest.param({"temperature_k": math.nan}, "temperature_k", id="temperature-nan"),
        pytest.param({"relative_humidity": -0.01}, "relative_humidity", id="humidity-negative"),
        pytest.param({"relative_humidity": 1.01}, "relative_humidity", id="humidity-above-one"),
        pytest.param({"pressure_pa": 29_999.0}, "pressure_pa", id="pressure-too-low"),
        pytest.param({"pressure_pa": 120_001.0}, "pressure_pa", id="pressure-too-high"),
    ],
)
def test_out_of_range_air_density_inputs_are_rejected(
    kwargs: dict[str, float], parameter: str
) -> None:
    arguments = {"pressure_pa": 100000.0, "temperature_k": 290.0, "relative_humidity": 0.5}
    arguments.update(kwargs)
    with pytest.raises(VehicleError, match=f"`{parameter}` must lie in") as info:
        air_density_kg_m3(**arguments)
    assert info.value.parameter == parameter


@pytest.mark.parametrize(
    "altitude_m",
    [pytest.param(-501.0, id="too-low"), pytest.param(8001.0, id="too-high")],
)
def test_out_of_range_altitude_is_rejected(altitude_m: float) -> None:
    with pytest.raises(VehicleError, match=r"`altitude_m` must lie in \[-500, 8000\]"):
        standard_pressure_pa(altitude_m)


def test_out_of_range_temperature_in_an_array_names_its_index() -> None:
    with pytest.raises(VehicleError, match=r"`temperature_k\[1\]`") as info:
        saturation_vapour_pressure_pa(np.array([300.0, 400.0]))
    assert info.value.parameter == "temperature_k[1]"


def test_vapour_pressure_reaching_the_total_pressure_is_rejected() -> None:
    # At 350 K saturated vapour alone exceeds 30 kPa.
    with pytest.raises(VehicleError, match="must be below `pressure_pa`"):
        air_state(350.0, 1.0, pressure_pa=30_000.0)
