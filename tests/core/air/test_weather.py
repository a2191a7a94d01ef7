"""Weather: density altitude against the standard atmosphere; slips carried between weathers.

The car is invented.
"""

from __future__ import annotations

import fluids
import pytest
from numpy.testing import assert_allclose

from core.air.weather import Weather, density_altitude_m, predict_slip, weather_air
from core.engine.reference_air import CorrectionStandard
from core.errors import CorrectionError
from tests.core.shifts.test_window import QUARTER_MILE_M, invented_car


@pytest.mark.parametrize("altitude_m", [-300.0, 0.0, 500.0, 1600.0, 3000.0, 6000.0])
def test_density_altitude_of_standard_air_is_its_altitude(altitude_m: float) -> None:
    # ISO 2533 / US Standard Atmosphere 1976 (identical below 32 km) via fluids.ATMOSPHERE_1976
    rho = float(fluids.ATMOSPHERE_1976(altitude_m).rho)
    assert_allclose(density_altitude_m(rho), altitude_m, atol=0.5)


def test_hot_humid_day_reads_a_higher_density_altitude() -> None:
    # standard sea-level air (fluids: 288.15 K, 101325 Pa, dry) reads 0; heat and water
    # vapour lower the density, raising the density altitude: about 120 ft (37 m) per degC
    # above standard plus a little for humidity (rule of thumb at strips, from memory)
    standard = weather_air(Weather(288.15, 101325.0, 0.0), CorrectionStandard.SAE_J1349_2004)
    assert_allclose(standard.density_altitude_m, 0.0, atol=2.0)
    hot = weather_air(Weather(308.15, 101325.0, 0.6), CorrectionStandard.SAE_J1349_2004)
    assert 700.0 < hot.density_altitude_m < 1000.0
    assert hot.correction_factor > 1.0


def test_same_weather_predicts_the_measured_slip() -> None:
    w = Weather(298.15, 99000.0, 0.3)
    p = predict_slip(
        invented_car(),
        1.225,
        w,
        w,
        CorrectionStandard.SAE_J1349_2004,
        finish_distance_m=QUARTER_MILE_M,
        measured_et_s=13.9,
        measured_trap_m_s=44.0,
    )
    assert_allclose(p.predicted_et_s, 13.9, rtol=1e-12)
    assert_allclose(p.predicted_trap_m_s, 44.0, rtol=1e-12)


def test_thinner_air_predicts_a_slower_slip() -> None:
    p = predict_slip(
        invented_car(),
        1.225,
        Weather(288.15, 101325.0, 0.0),
        Weather(303.15, 84000.0, 0.4),
        CorrectionStandard.SAE_J1349_2004,
        finish_distance_m=QUARTER_MILE_M,
    )
    assert p.predicted_et_s > p.simulated_et_s[0]
    assert p.predicted_trap_m_s < p.simulated_trap_m_s[0]


def test_density_out_of_range_is_rejected() -> None:
    with pytest.raises(CorrectionError, match="density_kg_m3"):
        density_altitude_m(2.0)
