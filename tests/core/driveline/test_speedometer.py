"""Speedometer and odometer error after a tire or axle change, and its recalibration."""

from __future__ import annotations

import math
from typing import Any

import numpy as np
import pytest
from numpy.testing import assert_allclose

from core.driveline.speedometer import (
    SpeedometerCorrection,
    SpeedometerDrive,
    driven_gear_change,
    odometer_readings,
    speed_readings,
    speedometer_correction,
    speedometer_setup,
)
from core.driveline.tires import tire_from_diameter, tire_from_size
from core.errors import DrivetrainError, GearworkError, TireSizeError, VehicleError

INCH = 0.0254
KMH = 1.0 / 3.6
MPH = 0.44704  # scipy.constants (REFERENCES.md)
INDICATED = np.array([0.0, 50.0, 100.0, 130.0]) * KMH

BOTH_DRIVES = [
    pytest.param(SpeedometerDrive.TRANSMISSION_OUTPUT, id="transmission-output"),
    pytest.param(SpeedometerDrive.WHEEL, id="wheel"),
]


def correction(
    d0_in: float, d1_in: float, axle0: float, axle1: float, drive: SpeedometerDrive
) -> SpeedometerCorrection:
    return speedometer_correction(
        speedometer_setup(tire_from_diameter(d0_in * INCH), axle0),
        speedometer_setup(tire_from_diameter(d1_in * INCH), axle1),
        drive=drive,
    )


@pytest.mark.parametrize("drive", BOTH_DRIVES)
def test_tire_change_scales_true_speed_by_diameter_ratio(drive: SpeedometerDrive) -> None:
    # closed form: calibrated for D0, fitted with D1 on the same axle, true = indicated * D1/D0
    c = correction(26.0, 28.0, 3.73, 3.73, drive)
    r = speed_readings(c, INDICATED)
    assert_allclose(r.true_m_s, INDICATED * 28.0 / 26.0, rtol=1e-14)
    assert_allclose(r.indicated_m_s, INDICATED, rtol=0)
    assert_allclose(r.error_m_s, INDICATED * (1.0 - 28.0 / 26.0), rtol=1e-12, atol=1e-15)


def test_axle_change_at_a_transmission_sensor_scales_by_inverse_axle_ratio() -> None:
    # closed form: the sensor turns N times per wheel turn, true = indicated * N0/N1
    c = correction(26.0, 26.0, 3.73, 4.10, SpeedometerDrive.TRANSMISSION_OUTPUT)
    assert_allclose(c.true_per_indicated, 3.73 / 4.10, rtol=1e-15)
    assert_allclose(speed_readings(c, INDICATED).true_m_s, INDICATED * 3.73 / 4.10, rtol=1e-14)


def test_axle_change_does_not_affect_a_wheel_sensor() -> None:
    # closed form: a wheel sensor sees only the wheel, true = indicated
    c = correction(26.0, 26.0, 3.73, 4.10, SpeedometerDrive.WHEEL)
    assert c.true_per_indicated == 1.0
    assert c.reading_error_percent == 0.0


def test_tire_and_axle_change_combine_as_a_product() -> None:
    # closed form: true = indicated * (D1/D0) * (N0/N1)
    c = correction(26.0, 28.0, 3.73, 4.10, SpeedometerDrive.TRANSMISSION_OUTPUT)
    assert_allclose(c.true_per_indicated, (28.0 / 26.0) * (3.73 / 4.10), rtol=1e-15)
    w = correction(26.0, 28.0, 3.73, 4.10, SpeedometerDrive.WHEEL)
    assert_allclose(w.true_per_indicated, 28.0 / 26.0, rtol=1e-15)


def test_iso_size_change_worked_example() -> None:
    # ISO 4000-1 / ETRTO diameter D = rim + 2 * width * aspect (REFERENCES.md): 225/45R17 is
    # 24.9724 in; 245/40R18 computed from the same formula is 18 + 2*245*0.40/25.4
    # = 25.71654 in. True / indicated = 25.71654 / 24.97244 = 1.029797 (computed), so an
    # indicated 100 km/h is 102.9797 km/h and the instrument reads 2.8934 % low.
    old, new = tire_from_size("225/45R17"), tire_from_size("245/40R18")
    assert old.free_diameter_m is not None and new.free_diameter_m is not None
    assert_allclose(old.free_diameter_m / INCH, 24.9724, rtol=1e-5)
    assert_allclose(new.free_diameter_m / INCH, 25.71654, rtol=1e-6)
    c = speedometer_correction(
        speedometer_setup(old, 3.42), speedometer_setup(new, 3.42), drive=SpeedometerDrive.WHEEL
    )
    assert_allclose(c.true_per_indicated, 1.029797, rtol=1e-6)
    assert_allclose(speed_readings(c, 100.0 * KMH).true_m_s / KMH, [102.9797], rtol=1e-6)
    assert_allclose(c.reading_error_percent, -2.8934, rtol=1e-4)


def test_same_rolling_factor_on_both_tires_cancels() -> None:
    # closed form: r = factor * D / 2 on both, so the ratio is still D1 / D0
    old = tire_from_size("225/45R17", rolling_factor=0.97)
    new = tire_from_size("245/40R18", rolling_factor=0.97)
    c = speedometer_correction(
        speedometer_setup(old), speedometer_setup(new), drive=SpeedometerDrive.WHEEL
    )
    assert old.free_diameter_m is not None and new.free_diameter_m is not None
    assert_allclose(c.true_per_indicated, new.free_diameter_m / old.free_diameter_m, rtol=1e-14)


def test_rolling_radius_and_tire_give_the_same_setup() -> None:
    tire = tire_from_diameter(0.66)
    assert speedometer_setup(tire, 3.55) == speedometer_setup(0.33, 3.55)


@pytest.mark.parametrize("drive", BOTH_DRIVES)
def test_reciprocal_identities_hold(drive: SpeedometerDrive) -> None:
    # closed form: indicated/true is the reciprocal of true/indicated; swapping the set-ups
    # inverts the correction; true -> indicated -> true is the identity
    old, new = speedometer_setup(0.315, 3.91), speedometer_setup(0.342, 3.27)
    c = speedometer_correction(old, new, drive=drive)
    back = speedometer_correction(new, old, drive=drive)
    assert_allclose(c.true_per_indicated * c.indicated_per_true, 1.0, rtol=1e-15)
    assert_allclose(c.true_per_indicated * back.true_per_indicated, 1.0, rtol=1e-15)
    assert_allclose(c.pulses_per_distance_factor, c.indicated_per_true, rtol=0)
    assert_allclose(c.reading_error_percent, 100.0 * (1.0 / c.true_per_indicated - 1.0))
    true = speed_readings(c, INDICATED).true_m_s
    assert_allclose(speed_readings(back, true).true_m_s, INDICATED, rtol=1e-14)


def test_pulses_per_distance_factor_makes_an_electronic_speedometer_read_true() -> None:
    # model of a pulse-counting instrument: the sensor gives k pulses per turn of the output
    # shaft, which turns N / (2*pi*r) times per metre; the instrument divides the pulse rate
    # by its pulses-per-metre setting, calibrated for the original set-up
    k = 8.0
    old, new = speedometer_setup(0.3302, 3.73), speedometer_setup(0.3556, 4.10)
    c = speedometer_correction(old, new, drive=SpeedometerDrive.TRANSMISSION_OUTPUT)
    per_metre_old = k * old.final_drive_ratio / (2 * math.pi * old.rolling_radius_m)
    per_metre_new = k * new.final_drive_ratio / (2 * math.pi * new.rolling_radius_m)
    true_speed = 27.0
    pulse_rate = per_metre_new * true_speed
    assert_allclose(pulse_rate / per_metre_old, true_speed * c.indicated_per_true, rtol=1e-14)
    setting = per_metre_old * c.pulses_per_distance_factor
    assert_allclose(pulse_rate / setting, true_speed, rtol=1e-14)


def test_odometer_error_over_an_indicated_distance() -> None:
    # closed form: true distance = indicated * D1/D0; 10 000 mi indicated on a 26 in
    # calibration with 28 in tires is 10 769.23 mi travelled
    c = correction(26.0, 28.0, 3.73, 3.73, SpeedometerDrive.WHEEL)
    d = odometer_readings(c, [1609.344, 10_000 * 1609.344])
    assert_allclose(d.true_m / 1609.344, [28 / 26, 10_000 * 28 / 26], rtol=1e-14)
    assert_allclose(d.error_m, d.indicated_m - d.true_m, rtol=0)
    assert_allclose(d.error_m / d.true_m * 100.0, c.reading_error_percent, rtol=1e-12)


def test_speed_readings_are_vectorised() -> None:
    c = correction(26.0, 27.0, 3.73, 3.73, SpeedometerDrive.WHEEL)
    speeds = np.linspace(0.0, 70.0 * MPH, 257)
    r = speed_readings(c, speeds)
    assert r.true_m_s.shape == (257,)
    assert_allclose(r.true_m_s, speeds * 27.0 / 26.0, rtol=1e-14)
    assert speed_readings(c, 30.0).true_m_s.shape == (1,)


def test_larger_tire_needs_fewer_driven_teeth() -> None:
    # common practice: the cable turns at drive/driven teeth of the output shaft, so a tire
    # 28/26 larger needs 18 * 26/28 = 16.714 driven teeth; 17 leaves the instrument reading
    # (26/28) * 18/17 - 1 = -1.681 % (computed)
    c = correction(26.0, 28.0, 3.73, 3.73, SpeedometerDrive.TRANSMISSION_OUTPUT)
    g = driven_gear_change(c, 18)
    assert g.original_teeth == 18
    assert_allclose(g.exact_teeth, 18 * 26 / 28, rtol=1e-14)
    assert g.nearest_teeth == 17
    assert_allclose(g.residual_error_percent, 100 * ((26 / 28) * 18 / 17 - 1), rtol=1e-12)


def test_exact_driven_teeth_leave_no_error() -> None:
    # closed form: 20 teeth with an axle change from 3.0 to 3.6 needs 20 * 3.6/3.0 = 24 teeth
    c = correction(26.0, 26.0, 3.0, 3.6, SpeedometerDrive.TRANSMISSION_OUTPUT)
    g = driven_gear_change(c, 20)
    assert g.nearest_teeth == 24
    assert_allclose(g.residual_error_percent, 0.0, atol=1e-12)


@pytest.mark.parametrize(
    ("tire", "ratio", "error", "match"),
    [
        pytest.param(0.0, 3.7, TireSizeError, "rolling_radius_m", id="zero-radius"),
        pytest.param(float("nan"), 3.7, TireSizeError, "rolling_radius_m", id="nan-radius"),
        pytest.param(2.0, 3.7, TireSizeError, "between 100 mm and 1500 mm", id="huge-radius"),
        pytest.param(0.33, 0.0, DrivetrainError, "finite and > 0", id="zero-axle"),
        pytest.param(0.33, float("inf"), DrivetrainError, "finite and > 0", id="inf-axle"),
        pytest.param(0.33, -3.7, DrivetrainError, "finite and > 0", id="negative-axle"),
        pytest.param(0.33, 51.0, DrivetrainError, "<= 50", id="huge-axle"),
    ],
)
def test_invalid_setup_is_rejected(
    tire: float, ratio: float, error: type[GearworkError], match: str
) -> None:
    with pytest.raises(error, match=match):
        speedometer_setup(tire, ratio)


@pytest.mark.parametrize(
    ("values", "match"),
    [
        pytest.param([10.0, -1.0], r"\[1\]` must be finite and >= 0", id="negative"),
        pytest.param([float("nan")], r"\[0\]` must be finite and >= 0", id="nan"),
        pytest.param([[1.0, 2.0]], "` must be one-dimensional", id="two-dimensional"),
    ],
)
def test_invalid_speeds_and_distances_are_rejected(values: Any, match: str) -> None:
    c = correction(26.0, 28.0, 3.73, 3.73, SpeedometerDrive.WHEEL)
    with pytest.raises(VehicleError, match="`indicated_speed_m_s" + match):
        speed_readings(c, values)
    with pytest.raises(VehicleError, match="`indicated_distance_m" + match):
        odometer_readings(c, values)


@pytest.mark.parametrize(
    ("teeth", "match"),
    [
        pytest.param(0, "between 1 and 200", id="zero"),
        pytest.param(201, "between 1 and 200", id="too-many"),
        pytest.param(17.5, "whole number", id="fractional"),
    ],
)
def test_invalid_driven_teeth_are_rejected(teeth: Any, match: str) -> None:
    c = correction(26.0, 28.0, 3.73, 3.73, SpeedometerDrive.WHEEL)
    with pytest.raises(DrivetrainError, match=match):
        driven_gear_change(c, teeth)
