"""The fitted trace drawn through a logged coast-down: its start speed and its shape.

With F1 = 0 the equation of motion m_e dv/dt = -(F0 + F2 v^2) has the closed form
t = m_e / sqrt(F0 F2) [atan(v0 sqrt(F2/F0)) - atan(v sqrt(F2/F0))] (separation of
variables; the check named in issue 14), inverted here as
v(t) = sqrt(F0/F2) tan(atan(v0 sqrt(F2/F0)) - t sqrt(F0 F2) / m_e).
"""

from __future__ import annotations

import numpy as np
import pytest
from numpy.testing import assert_allclose

from core.car.coast_down import coast_down_speed
from core.car.coast_down_trace import coast_down_trace
from core.errors import FitError

F0, F2, MASS = 140.0, 0.42, 1250.0  # N, N*s^2/m^2, kg: an invented hatchback
V0 = 32.0  # m/s


def closed_form_speed(t: np.ndarray) -> np.ndarray:
    """Speed of the F1 = 0 coast-down by the closed form above [m/s]."""
    k = np.sqrt(F2 / F0)
    speed = np.sqrt(F0 / F2) * np.tan(np.arctan(V0 * k) - t * np.sqrt(F0 * F2) / MASS)
    return np.asarray(speed, dtype=np.float64)


def test_trace_of_exact_samples_is_the_closed_form_coast_down() -> None:
    t = np.linspace(0.0, 90.0, 91)
    trace = coast_down_trace(t, closed_form_speed(t), [F0, 0.0, F2], MASS, points=61)
    assert_allclose(trace.start_speed_m_s, V0, rtol=1e-6)
    assert_allclose(trace.speed_m_s, closed_form_speed(trace.time_s), rtol=1e-6)
    assert trace.residual_rms_m_s < 1e-5


def test_start_speed_is_the_least_squares_start_not_the_first_sample() -> None:
    # logged like a 10 Hz logger with 0.05 m/s noise and a first sample 1.5 m/s off: the
    # start follows the whole run (the least-squares estimate of a constant offset's
    # standard error is about 0.05 / sqrt(n)), not the bad first sample
    rng = np.random.default_rng(7)
    t = np.linspace(0.0, 90.0, 901)
    logged = closed_form_speed(t) + rng.normal(0.0, 0.05, t.size)
    logged[0] += 1.5
    trace = coast_down_trace(t, logged, [F0, 0.0, F2], MASS)
    assert abs(trace.start_speed_m_s - V0) < 0.02
    assert_allclose(
        trace.residual_rms_m_s, 0.05 * np.sqrt(1 + 1.5**2 / 0.05**2 / t.size), rtol=0.15
    )


def test_trace_with_a_linear_term_matches_the_integrated_equation() -> None:
    t = np.linspace(5.0, 80.0, 76)  # a run need not start at zero
    c = [120.0, 3.5, 0.38]
    v = coast_down_speed(t, 30.0, c, 1300.0)
    trace = coast_down_trace(t, v, c, 1300.0, points=11)
    assert_allclose(trace.time_s[[0, -1]], [5.0, 80.0])
    assert_allclose(trace.speed_m_s, coast_down_speed(trace.time_s, 30.0, c, 1300.0), rtol=1e-6)


@pytest.mark.parametrize(
    ("time", "speed", "coefficients", "mass", "match"),
    [
        pytest.param([0, 1, 2], [30, 29], [100, 0, 0.4], 1000.0, "match", id="lengths"),
        pytest.param([0, 2, 1], [30, 29, 28], [100, 0, 0.4], 1000.0, "increasing", id="order"),
        pytest.param([0, 1, 2], [30, 29, 28], [100, -1, 0.4], 1000.0, "F0, F1", id="negative"),
        pytest.param([0, 1, 2], [30, 29, 28], [100, 0, 0.4], 0.0, "> 0", id="mass"),
    ],
)
def test_bad_inputs_are_refused_naming_the_argument(
    time: list[float], speed: list[float], coefficients: list[float], mass: float, match: str
) -> None:
    with pytest.raises(FitError, match=match):
        coast_down_trace(time, speed, coefficients, mass)
