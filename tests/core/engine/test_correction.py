"""Tests of core.engine.correction: dyno correction factors to each standard's reference air."""

from __future__ import annotations

import math

import numpy as np
import pint
import psychrolib
import pytest
from CoolProp.CoolProp import PropsSI
from numpy.testing import assert_allclose
from scipy.constants import convert_temperature, kilo

from core.air.altimeter import station_pressure_from_altimeter_pa
from core.air.atmosphere import saturation_vapour_pressure_pa
from core.engine.correction import (
    Correction,
    apply_correction,
    correction_factor,
    correction_factors,
)
from core.engine.curves import CurveSource, Interpolation, torque_curve_from_torque
from core.engine.reference_air import CorrectionStandard, reference_conditions
from core.errors import CorrectionError

UREG: pint.UnitRegistry[float] = pint.UnitRegistry()


def _convert(value: float, unit: str, to: str) -> float:
    """Convert with pint (reference library for the unit definitions)."""
    return float(UREG.Quantity(value, unit).to(to).magnitude)


J1349 = CorrectionStandard.SAE_J1349_1990
J1349_2004 = CorrectionStandard.SAE_J1349_2004
J607 = CorrectionStandard.SAE_J607
DIN = CorrectionStandard.DIN_70020
ISO = CorrectionStandard.ISO_1585

# REFERENCES.md cross-check air: 30 C, 50 % relative humidity, 95.0 kPa station pressure.
HOT_T_K = 303.15
HOT_RH = 0.5
HOT_P_PA = 95_000.0


def _factor(standard: CorrectionStandard, t_k: float, rh: float, p_pa: float) -> float:
    return correction_factor(standard, t_k, rh, station_pressure_pa=p_pa).factor


@pytest.mark.parametrize(
    ("standard", "expected"),
    [
        pytest.param(J1349, 1.08862, id="sae-j1349-1990"),
        pytest.param(ISO, 1.09078, id="iso-1585"),
        pytest.param(DIN, 1.08463, id="din-70020-total-pressure"),
    ],
)
def test_cross_check_at_30_c_50_percent_95_kpa_matches_references(
    standard: CorrectionStandard, expected: float
) -> None:
    # REFERENCES.md cross-check, computed from the printed formulas and given to 6 digits;
    # rtol 2e-5 allows the last-digit rounding and the vapour-pressure formula used there.
    assert_allclose(_factor(standard, HOT_T_K, HOT_RH, HOT_P_PA), expected, rtol=2e-5)


def test_din_70020_uses_total_pressure_so_humidity_has_no_effect() -> None:
    # DIN 70020 takes the total pressure [mbar] (REFERENCES.md); the SAE formula does not.
    dry = _factor(DIN, HOT_T_K, 0.0, HOT_P_PA)
    humid = _factor(DIN, HOT_T_K, 1.0, HOT_P_PA)
    assert dry == humid
    assert _factor(J1349, HOT_T_K, 1.0, HOT_P_PA) > _factor(J1349, HOT_T_K, 0.0, HOT_P_PA)


def test_cross_check_dry_pressure_is_station_less_half_the_buck_saturation_pressure() -> None:
    # Buck (1996) via core.air.atmosphere: p_d = p - RH * e_s(T).
    result = correction_factor(J1349, HOT_T_K, HOT_RH, station_pressure_pa=HOT_P_PA)
    vapour = HOT_RH * saturation_vapour_pressure_pa(HOT_T_K)
    assert_allclose(result.vapour_pressure_pa, vapour, rtol=1e-14)
    assert_allclose(result.dry_pressure_pa, HOT_P_PA - vapour, rtol=1e-14)
    assert result.station_pressure_pa == HOT_P_PA


def test_iso_1585_temperature_exponent_matches_bosch_example() -> None:
    # Bosch Automotive Handbook, 5th ed., p. 415: (560/540)^0.6 = 1.022 (printed to 3 places).
    t_low = 290.0
    t_high = t_low * 560.0 / 540.0
    ratio = _factor(ISO, t_high, 0.0, 99_000.0) / _factor(ISO, t_low, 0.0, 99_000.0)
    assert_allclose(ratio, 1.022, rtol=5e-4)
    assert_allclose(ratio, (560.0 / 540.0) ** 0.6, rtol=1e-12)


def test_iso_1585_pressure_exponent_matches_bosch_example() -> None:
    # Bosch Automotive Handbook, 5th ed., p. 415: (30/29.5)^1.2 = 1.0204 (printed to 4 places).
    p_high = 99_000.0
    p_low = p_high * 29.5 / 30.0
    ratio = _factor(ISO, 298.0, 0.0, p_low) / _factor(ISO, 298.0, 0.0, p_high)
    assert_allclose(ratio, 1.0204, rtol=5e-5)
    assert_allclose(ratio, (30.0 / 29.5) ** 1.2, rtol=1e-12)


@pytest.mark.parametrize("standard", [pytest.param(s, id=s.value) for s in CorrectionStandard])
def test_factor_is_one_at_each_standards_own_reference_air(standard: CorrectionStandard) -> None:
    # Closed form: every formula reduces to 1 at its own reference temperature and pressure.
    ref = reference_conditions(standard)
    result = correction_factor(
        standard, ref.temperature_k, 0.0, station_pressure_pa=ref.pressure_pa
    )
    assert_allclose(result.factor, 1.0, rtol=1e-14)
    assert result.within_validity
    assert result.notices == ()


def test_j1349_2004_stays_within_a_tenth_of_a_percent_of_1990() -> None:
    # SAE J1349 AUG2004 constants 1.176 / 0.176 are from memory: checked only loosely, as
    # a small change to the 1990 form (both reduce to 1 at the same reference air).
    old = _factor(J1349, HOT_T_K, HOT_RH, HOT_P_PA)
    new = _factor(J1349_2004, HOT_T_K, HOT_RH, HOT_P_PA)
    assert_allclose(new, old, rtol=1e-3)
    assert new < old


def test_j607_in_us_units_matches_the_si_implementation() -> None:
    # SAE J607 as printed: CF = 29.92/(p_b - p_v) * sqrt((t_F + 459.7)/519.7) in inHg and F;
    # inputs converted with pint; p_v from Buck (1996) evaluated in C and kPa.
    t_f, p_b_inhg, rh = 88.0, 29.41, 0.35
    t_c = _convert(t_f, "degF", "degC")
    buck_kpa = 0.61121 * math.exp((18.678 - t_c / 234.5) * t_c / (257.14 + t_c))
    p_v_inhg = rh * _convert(buck_kpa, "kPa", "inHg")
    us = 29.92 / (p_b_inhg - p_v_inhg) * math.sqrt((t_f + 459.7) / 519.7)
    si = _factor(
        J607,
        _convert(t_f, "degF", "K"),
        rh,
        _convert(p_b_inhg, "inHg", "Pa"),
    )
    assert_allclose(si, us, rtol=1e-10)


def test_j1349_in_kpa_matches_scipy_constants_conversion() -> None:
    # SAE J1349 (JUN90) by hand in kPa and C, converted with scipy.constants.
    t_c, p_kpa, rh = 12.0, 101.2, 0.8
    t_k = float(convert_temperature(t_c, "Celsius", "Kelvin"))
    p_d = p_kpa - rh * 0.61121 * math.exp((18.678 - t_c / 234.5) * t_c / (257.14 + t_c))
    by_hand = 1.18 * (99.0 / p_d) * math.sqrt(t_k / 298.0) - 0.18
    assert_allclose(_factor(J1349, t_k, rh, p_kpa * kilo), by_hand, rtol=1e-12)


@pytest.mark.parametrize(
    "t_c", [pytest.param(t, id=f"{t:g}C") for t in (0.01, 10.0, 25.0, 40.0, 55.0)]
)
def test_vapour_pressure_at_saturation_matches_psychrolib(t_c: float) -> None:
    # psychrolib (ASHRAE Handbook Fundamentals 2017, ch. 1); Buck (1996) agrees to 1e-3.
    psychrolib.SetUnitSystem(psychrolib.SI)
    result = correction_factor(J1349, t_c + 273.15, 1.0, station_pressure_pa=100_000.0)
    assert_allclose(result.vapour_pressure_pa, psychrolib.GetSatVapPres(t_c), rtol=1e-3)


@pytest.mark.parametrize(
    "t_c", [pytest.param(t, id=f"{t:g}C") for t in (0.01, 10.0, 25.0, 40.0, 55.0)]
)
def test_vapour_pressure_at_saturation_matches_coolprop(t_c: float) -> None:
    # CoolProp (IAPWS-95) saturation pressure of water; Buck (1996) agrees to 1e-3.
    result = correction_factor(J1349, t_c + 273.15, 1.0, station_pressure_pa=100_000.0)
    reference = PropsSI("P", "T", t_c + 273.15, "Q", 0, "Water")
    assert_allclose(result.vapour_pressure_pa, reference, rtol=1e-3)


def test_factor_with_iapws_vapour_pressure_differs_by_under_2e_5() -> None:
    # The vapour-pressure formula hardly matters: J1349 with CoolProp (IAPWS-95) p_v by hand.
    vapour = HOT_RH * PropsSI("P", "T", HOT_T_K, "Q", 0, "Water")
    p_d_kpa = (HOT_P_PA - vapour) / 1000.0
    iapws = 1.18 * (99.0 / p_d_kpa) * math.sqrt(HOT_T_K / 298.0) - 0.18
    assert_allclose(_factor(J1349, HOT_T_K, HOT_RH, HOT_P_PA), iapws, rtol=2e-5)


def test_iso_1585_factor_outside_band_is_flagged() -> None:
    # ISO 1585 validity band 0.93 <= alpha <= 1.07 (memory); the hot cross-check air is 1.0908.
    result = correction_factor(ISO, HOT_T_K, HOT_RH, station_pressure_pa=HOT_P_PA)
    assert not result.within_validity
    assert [n.code for n in result.notices] == ["correction_factor_out_of_range"]
    assert "1.0908" in result.notices[0].message


def test_iso_1585_factor_inside_band_is_not_flagged() -> None:
    result = correction_factor(ISO, 300.0, 0.4, station_pressure_pa=98_000.0)
    assert 0.93 <= result.factor <= 1.07
    assert result.within_validity


def test_other_standards_carry_no_validity_band() -> None:
    results = correction_factors(HOT_T_K, HOT_RH, station_pressure_pa=HOT_P_PA)
    assert list(results) == list(CorrectionStandard)
    assert all(r.within_validity for s, r in results.items() if s is not ISO)
    assert all(isinstance(r, Correction) and r.standard is s for s, r in results.items())


def test_altimeter_inputs_give_the_same_factor_as_their_station_pressure() -> None:
    via_altimeter = correction_factor(
        J1349, 295.0, 0.3, altimeter_setting_pa=101_800.0, elevation_m=1200.0
    )
    station = station_pressure_from_altimeter_pa(101_800.0, 1200.0)
    direct = correction_factor(J1349, 295.0, 0.3, station_pressure_pa=station)
    assert via_altimeter == direct


def test_apply_correction_multiplies_torque_and_keeps_curve_settings() -> None:
    curve = torque_curve_from_torque(
        [1500.0, 3000.0, 4500.0, 6000.0],
        [180.0, 240.0, 230.0, 190.0],
        interpolation=Interpolation.LINEAR,
        source=CurveSource.CHASSIS,
    )
    result = correction_factor(DIN, HOT_T_K, HOT_RH, station_pressure_pa=HOT_P_PA)
    corrected = apply_correction(curve, result)
    assert_allclose(corrected.torque_nm, curve.torque_nm * result.factor, rtol=1e-15)
    assert_allclose(corrected.power_at([3500.0]), curve.power_at([3500.0]) * result.factor)
    np.testing.assert_array_equal(corrected.rpm, curve.rpm)
    assert corrected.interpolation is Interpolation.LINEAR
    assert corrected.source is CurveSource.CHASSIS
    assert_allclose(apply_correction(curve, 1.0).torque_nm, curve.torque_nm, rtol=0)


@pytest.mark.parametrize(
    "factor",
    [
        pytest.param(0.0, id="zero"),
        pytest.param(-1.02, id="negative"),
        pytest.param(math.nan, id="nan"),
        pytest.param(3.5, id="absurd"),
    ],
)
def test_apply_correction_with_bad_factor_is_rejected(factor: float) -> None:
    curve = torque_curve_from_torque([1000.0, 2000.0, 3000.0], [100.0, 110.0, 105.0])
    with pytest.raises(CorrectionError, match="`factor` must") as info:
        apply_correction(curve, factor)
    assert info.value.parameter == "factor"


@pytest.mark.parametrize(
    ("kwargs", "parameter"),
    [
        pytest.param({"temperature_k": 200.0}, "temperature_k", id="cold"),
        pytest.param({"temperature_k": math.inf}, "temperature_k", id="infinite-temperature"),
        pytest.param({"relative_humidity": 1.2}, "relative_humidity", id="humidity-over-one"),
        pytest.param({"relative_humidity": -0.1}, "relative_humidity", id="negative-humidity"),
        pytest.param({"station_pressure_pa": 9.5}, "station_pressure_pa", id="pressure-in-kpa"),
        pytest.param(
            {"station_pressure_pa": None, "altimeter_setting_pa": 101_000.0},
            "elevation_m",
            id="altimeter-without-elevation",
        ),
        pytest.param(
            {"altimeter_setting_pa": 101_000.0, "elevation_m": 0.0},
            "altimeter_setting_pa",
            id="both-pressures",
        ),
        pytest.param({"elevation_m": 300.0}, "elevation_m", id="elevation-with-station"),
        pytest.param({"station_pressure_pa": None}, "station_pressure_pa", id="no-pressure"),
        pytest.param(
            {"station_pressure_pa": None, "altimeter_setting_pa": 101_000.0, "elevation_m": 9e3},
            "elevation_m",
            id="elevation-too-high",
        ),
        pytest.param(
            {"station_pressure_pa": None, "altimeter_setting_pa": 30.0, "elevation_m": 0.0},
            "altimeter_setting_pa",
            id="altimeter-in-inhg",
        ),
    ],
)
def test_bad_ambient_inputs_are_rejected_naming_the_argument(
    kwargs: dict[str, float | None], parameter: str
) -> None:
    args: dict[str, float | None] = {
        "temperature_k": 298.0,
        "relative_humidity": 0.5,
        "station_pressure_pa": 99_000.0,
    }
    args.update(kwargs)
    t_k, rh = args.pop("temperature_k"), args.pop("relative_humidity")
    assert t_k is not None and rh is not None
    with pytest.raises(CorrectionError, match=f"`{parameter}`") as info:
        correction_factor(J1349, t_k, rh, **args)
    assert info.value.parameter == parameter


def test_standard_given_as_text_is_rejected() -> None:
    with pytest.raises(CorrectionError, match="`standard` must be a CorrectionStandard"):
        correction_factor("din_70020", 298.0, 0.5, station_pressure_pa=99_000.0)  # type: ignore[arg-type]
