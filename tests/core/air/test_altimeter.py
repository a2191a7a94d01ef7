"""Tests of core.air.altimeter: station pressure from an altimeter setting and elevation."""

from __future__ import annotations

import math

import pint
import pytest
from numpy.testing import assert_allclose

from core.air.altimeter import station_pressure_from_altimeter_pa
from core.air.atmosphere import standard_pressure_pa
from core.errors import CorrectionError

UREG: pint.UnitRegistry[float] = pint.UnitRegistry()


def _convert(value: float, unit: str, to: str) -> float:
    """Convert with pint (reference library for the unit definitions)."""
    return float(UREG.Quantity(value, unit).to(to).magnitude)


def test_altimeter_setting_at_sea_level_is_the_station_pressure() -> None:
    # Closed form: at h = 0 the station pressure equals the altimeter setting.
    assert_allclose(station_pressure_from_altimeter_pa(100_500.0, 0.0), 100_500.0, rtol=1e-14)


@pytest.mark.parametrize(
    "elevation_m", [pytest.param(h, id=f"{h:g}m") for h in (-300.0, 750.0, 1609.0, 4300.0)]
)
def test_standard_altimeter_setting_gives_the_iso_2533_pressure(elevation_m: float) -> None:
    # ISO 2533 via core.air.atmosphere: with A = 101325 Pa the station pressure is p_std(h).
    assert_allclose(
        station_pressure_from_altimeter_pa(101_325.0, elevation_m),
        standard_pressure_pa(elevation_m),
        rtol=1e-12,
    )


@pytest.mark.parametrize(
    ("altimeter_inhg", "elevation_ft"),
    [
        pytest.param(30.10, 5280.0, id="one-mile"),
        pytest.param(29.50, 0.0, id="sea-level"),
        pytest.param(31.00, 10000.0, id="high"),
        pytest.param(28.80, 3000.0, id="low-setting"),
    ],
)
def test_altimeter_conversion_matches_nws_equation(
    altimeter_inhg: float, elevation_ft: float
) -> None:
    # NWS ASOS altimeter-setting equation (from the Smithsonian Meteorological Tables):
    # A = (p^0.1903 + 1.313e-5 * H)^5.255, inHg and ft. Its rounded constants are
    # inconsistent by about 1e-4 (at H = 0 it does not return p), hence rtol 2e-4.
    station_inhg = (altimeter_inhg ** (1 / 5.255) - 1.313e-5 * elevation_ft) ** (1 / 0.1903)
    ours = station_pressure_from_altimeter_pa(
        _convert(altimeter_inhg, "inHg", "Pa"),
        _convert(elevation_ft, "ft", "m"),
    )
    assert_allclose(ours, _convert(station_inhg, "inHg", "Pa"), rtol=2e-4)


@pytest.mark.parametrize(
    ("altimeter_pa", "elevation_m", "parameter"),
    [
        pytest.param(30.0, 0.0, "altimeter_setting_pa", id="altimeter-in-inhg"),
        pytest.param(math.nan, 0.0, "altimeter_setting_pa", id="nan-altimeter"),
        pytest.param(101_000.0, 9000.0, "elevation_m", id="elevation-too-high"),
        pytest.param(101_000.0, math.inf, "elevation_m", id="infinite-elevation"),
    ],
)
def test_bad_altimeter_inputs_are_rejected_naming_the_argument(
    altimeter_pa: float, elevation_m: float, parameter: str
) -> None:
    with pytest.raises(CorrectionError, match=f"`{parameter}` must") as info:
        station_pressure_from_altimeter_pa(altimeter_pa, elevation_m)
    assert info.value.parameter == parameter
