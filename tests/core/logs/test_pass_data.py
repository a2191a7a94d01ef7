"""Tests of core.logs.pass_data: channel units, validation of a logged pass, even resampling."""

from __future__ import annotations

import numpy as np
import pytest
from numpy.testing import assert_allclose
from scipy import constants

from core.errors import LogDataError
from core.logs.pass_data import (
    AccelerationUnit,
    SpeedUnit,
    TimeUnit,
    pass_log,
    uniform_samples,
)

T = np.arange(40) * 0.05
V = np.linspace(0.0, 60.0, 40)


@pytest.mark.parametrize(
    ("unit", "m_s"),
    [
        # reference library: scipy.constants (1 km/h = 1/3.6 m/s; 1 mph = 0.44704 m/s exactly)
        pytest.param(SpeedUnit.KM_H, constants.kmh, id="km/h"),
        pytest.param(SpeedUnit.MPH, constants.mph, id="mph"),
        pytest.param(SpeedUnit.M_S, 1.0, id="m/s"),
    ],
)
def test_speed_units_convert_like_scipy_constants(unit: SpeedUnit, m_s: float) -> None:
    log = pass_log(T, V, speed_unit=unit)
    assert_allclose(log.speed_m_s, V * m_s, rtol=1e-12)


def test_acceleration_in_g_uses_standard_gravity() -> None:
    # standard gravity 9.80665 m/s^2 (scipy.constants.g)
    log = pass_log(T, V, speed_unit=SpeedUnit.KM_H, acceleration=np.full(40, 0.5))
    assert log.acceleration_m_s2 is not None
    assert_allclose(log.acceleration_m_s2, 0.5 * constants.g, rtol=1e-12)
    assert log.channels == ("time", "speed", "acceleration")


def test_time_in_milliseconds_is_converted() -> None:
    log = pass_log(T * 1000.0, V, speed_unit=SpeedUnit.KM_H, time_unit=TimeUnit.MS)
    assert_allclose(log.time_s, T, rtol=1e-12)


@pytest.mark.parametrize(
    ("kwargs", "parameter", "match"),
    [
        pytest.param(
            {"time": np.concatenate((T[:5], T[4:5], T[6:]))},
            "time[5]",
            "strictly increasing",
            id="time-not-increasing",
        ),
        pytest.param({"speed": V[:-1]}, "speed", "one value per `time` sample", id="lengths"),
        pytest.param({"time": T[:10], "speed": V[:10]}, "time", "20 to 20000", id="too-few"),
        pytest.param(
            {"speed": np.where(T > 1, -1.0, V)}, "speed[21]", "must lie in", id="negative"
        ),
        pytest.param({"rpm": np.full(40, 40000.0)}, "rpm[0]", "30000", id="rpm-high"),
        pytest.param({"rpm": np.full(40, np.nan)}, "rpm[0]", "finite", id="rpm-nan"),
        pytest.param({"time": T * 20.0}, "time", "median sample interval", id="slow-logger"),
        pytest.param({"acceleration": np.full(40, 9.0)}, "acceleration[0]", r"5\] g", id="accel"),
    ],
)
def test_bad_channels_name_the_sample(
    kwargs: dict[str, np.ndarray], parameter: str, match: str
) -> None:
    args = {"time": T, "speed": V, **kwargs}
    with pytest.raises(LogDataError, match=match) as err:
        pass_log(
            args["time"],
            args["speed"],
            speed_unit=SpeedUnit.KM_H,
            rpm=args.get("rpm"),
            acceleration=args.get("acceleration"),
            acceleration_unit=AccelerationUnit.G,
        )
    assert err.value.parameter == parameter


def test_accelerations_beyond_five_g_are_rejected_in_g_units() -> None:
    with pytest.raises(LogDataError, match=r"\[-5, 5\] g"):
        pass_log(T, V, speed_unit=SpeedUnit.KM_H, acceleration=np.full(40, 6.0))


def test_a_gap_in_the_log_is_reported() -> None:
    t = np.concatenate((T, T[-1] + 2.0 + T))
    log = pass_log(t, np.linspace(0, 80, t.size), speed_unit=SpeedUnit.KM_H)
    assert [n.code for n in log.notices] == ["log_gap"]


def test_uniform_samples_keep_an_even_log_and_even_out_jitter() -> None:
    even = uniform_samples(pass_log(T, V, speed_unit=SpeedUnit.M_S))
    assert_allclose(even.time_s, T, atol=1e-12)
    assert_allclose(even.speed_m_s, V, atol=1e-9)
    jitter = 0.02 + T + np.random.default_rng(3).uniform(-0.01, 0.01, T.size)
    out = uniform_samples(pass_log(jitter, 2.0 * jitter, speed_unit=SpeedUnit.M_S))
    assert_allclose(np.diff(out.time_s), out.interval_s, rtol=1e-9)
    assert_allclose(out.speed_m_s, 2.0 * out.time_s, rtol=1e-9)  # a line stays a line


def test_a_1000_hz_log_is_accepted_despite_rounding_of_its_interval() -> None:
    t = np.arange(500) * 0.001  # the median step rounds to 0.000999... s
    log = pass_log(t, np.linspace(0.0, 10.0, 500), speed_unit=SpeedUnit.M_S)
    assert log.samples == 500
