"""Tests of core.logs.signal: Savitzky-Golay smoothing, gear matching with calibration and
dwell, and shift dips in acceleration alone."""

from __future__ import annotations

import numpy as np
import pytest
from numpy.testing import assert_allclose
from numpy.typing import NDArray

from core.engine.curves import RPM_TO_RAD_S
from core.logs.signal import (
    MIN_DWELL_S,
    acceleration_dips,
    gear_segments,
    match_gears,
    smoothed,
    window_points,
)

FloatArray = NDArray[np.float64]
RATIOS = np.array([12.0, 8.0, 5.6])
RADIUS_M = 0.3
DT = 0.04


@pytest.mark.parametrize(
    ("window_s", "interval_s", "samples", "points"),
    [
        pytest.param(0.3, 0.04, 500, 9, id="25-hz"),
        pytest.param(0.3, 0.02, 500, 15, id="50-hz"),
        pytest.param(0.05, 0.1, 500, 5, id="at-least-five"),
        pytest.param(2.0, 0.01, 21, 21, id="at-most-the-data"),
    ],
)
def test_window_points_is_odd_and_bounded(
    window_s: float, interval_s: float, samples: int, points: int
) -> None:
    assert window_points(window_s, interval_s, samples) == points


def test_savgol_derivative_of_a_quadratic_is_exact() -> None:
    # Savitzky & Golay (Anal. Chem. 36, 1964): a least-squares quadratic reproduces any
    # polynomial up to its order, so v = v0 + a*t + c*t^2 gives dv/dt = a + 2*c*t exactly
    t = np.arange(200) * DT
    v = 3.0 + 4.0 * t - 0.1 * t**2
    assert_allclose(smoothed(v, DT, 0.3, derivative=True), 4.0 - 0.2 * t, rtol=1e-9, atol=1e-9)
    assert_allclose(smoothed(v, DT, 0.3), v, rtol=1e-12)


def _rpm(speed: FloatArray, gear: NDArray[np.int64]) -> FloatArray:
    # rpm = v * N / (r * 2*pi/60) (Gillespie ch. 2)
    return np.asarray(speed * RATIOS[gear - 1] / (RADIUS_M * RPM_TO_RAD_S), dtype=np.float64)


def test_gears_match_the_rpm_to_speed_ratio_with_calibration() -> None:
    speed = np.linspace(5.0, 40.0, 300)
    gear = np.repeat(np.array([1, 2, 3]), 100)
    match = match_gears(speed, _rpm(speed, gear) * 1.03, RATIOS, RADIUS_M, DT)
    assert_allclose(match.calibration, 1.03, rtol=1e-9)
    assert (match.gear == gear).all()


def test_a_short_flip_of_gear_is_ignored() -> None:
    speed = np.linspace(5.0, 20.0, 200)
    gear = np.ones(200, dtype=np.int64)
    gear[100:103] = 2  # three samples (0.12 s) read as second: noise, not a shift
    match = match_gears(speed, _rpm(speed, gear), RATIOS, RADIUS_M, DT)
    assert 3 * DT < MIN_DWELL_S
    assert gear_segments(match.gear, DT) == gear_segments(np.ones(200, dtype=np.int64), DT)


def test_slow_samples_are_not_matched() -> None:
    speed = np.linspace(0.0, 4.0, 50)
    match = match_gears(speed, np.full(50, 900.0), RATIOS, RADIUS_M, DT)
    assert (match.gear[speed <= 2.0] == 0).all()


def test_a_torque_interruption_is_found_in_acceleration_alone() -> None:
    t = np.arange(250, dtype=np.float64) * DT
    a = np.where((t >= 4.0) & (t < 4.3), -0.3, 3.0)
    dips = acceleration_dips(t, smoothed(a, DT, 0.2), np.asarray(5.0 + 3.0 * t, np.float64), DT)
    assert len(dips) == 1
    assert_allclose([dips[0].start_s, dips[0].end_s], [4.0, 4.3], atol=DT)


def test_a_dip_too_short_or_in_a_weak_pull_is_not_a_shift() -> None:
    t = np.arange(250, dtype=np.float64) * DT
    speed = np.asarray(5.0 + t, np.float64)
    blip = np.where(np.abs(t - 4.0) < 0.5 * DT, -1.0, 3.0).astype(np.float64)  # noise
    weak = np.where((t >= 4.0) & (t < 4.3), 0.0, 0.2).astype(np.float64)  # below 0.3 m/s^2
    assert acceleration_dips(t, blip, speed, DT) == []
    assert acceleration_dips(t, weak, speed, DT) == []
