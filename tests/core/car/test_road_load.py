"""Tests of core.car.road_load: road-load forms, grade force and gradeability."""

from __future__ import annotations

import math
from collections.abc import Callable

import numpy as np
import pytest
from numpy.testing import assert_allclose
from scipy import constants

from core.car.road_load import (
    RADIAL_ROLLING_COEFFICIENT,
    RADIAL_ROLLING_SPEED_COEFFICIENT_S_M,
    RoadLoad,
    RoadLoadForm,
    gradeability_percent,
)
from core.errors import VehicleError

G = 9.80665
MASS_KG = 1500.0
SPEED_M_S = np.array([0.0, 10.0, 25.0, 40.0])


def test_constant_rolling_force_is_drag_plus_rolling_resistance() -> None:
    # Gillespie, Fundamentals of Vehicle Dynamics, ch. 4: DA = 0.5*rho*Cd*A*V^2, Rx = fr*W.
    load = RoadLoad.from_constant_rolling(MASS_KG, 0.7, 1.2, 0.012)
    expected = 0.012 * MASS_KG * G + 0.5 * 1.2 * 0.7 * SPEED_M_S**2
    assert_allclose(load.force_n(SPEED_M_S), expected, rtol=1e-14)
    assert load.form is RoadLoadForm.CONSTANT_ROLLING


def test_speed_dependent_rolling_defaults_are_gillespie_radial_tire_values() -> None:
    # Gillespie ch. 4: fr = 0.0041 + 0.000041*V_mph for radial tires; at 60 mph fr = 0.00656.
    # Unit: 1 mph = 0.44704 m/s (scipy.constants).
    assert RADIAL_ROLLING_COEFFICIENT == 0.0041
    assert_allclose(RADIAL_ROLLING_SPEED_COEFFICIENT_S_M, 0.000041 / constants.mph, rtol=1e-14)
    load = RoadLoad.from_speed_dependent_rolling(MASS_KG, 0.0, 1.2)
    sixty_mph = 60.0 * constants.mph
    assert_allclose(load.force_n([sixty_mph]), [0.00656 * MASS_KG * G], rtol=1e-12)


def test_speed_dependent_rolling_adds_drag() -> None:
    load = RoadLoad.from_speed_dependent_rolling(MASS_KG, 0.65, 1.18, 0.008, 0.0001)
    expected = (0.008 + 0.0001 * SPEED_M_S) * MASS_KG * G + 0.5 * 1.18 * 0.65 * SPEED_M_S**2
    assert_allclose(load.force_n(SPEED_M_S), expected, rtol=1e-14)


def test_drag_agrees_with_the_us_units_rule_of_thumb() -> None:
    # DA [lbf] = 0.00256*Cd*A[ft^2]*V[mph]^2 at standard sea-level density (memory; the
    # constant is rounded, hence the loose tolerance). Units from scipy.constants.
    cd, area_m2, mph = 0.32, 2.2, 70.0
    rule_n = 0.00256 * cd * (area_m2 / constants.foot**2) * mph**2 * constants.pound_force
    load = RoadLoad.from_constant_rolling(MASS_KG, cd * area_m2, 1.225, 0.0)
    assert_allclose(load.force_n([mph * constants.mph]), [rule_n], rtol=5e-3)


def test_coast_down_form_adds_only_the_grade_force() -> None:
    # Common practice (vehicle certification): coast-down F0 + F1*v + F2*v^2 on a level road;
    # on a grade only m*g*sin(theta) is added.
    load = RoadLoad.from_coast_down(MASS_KG, 130.0, 1.1, 0.42, grade_percent=5.0)
    theta = math.atan(0.05)
    expected = 130.0 + 1.1 * SPEED_M_S + 0.42 * SPEED_M_S**2 + MASS_KG * G * math.sin(theta)
    assert_allclose(load.force_n(SPEED_M_S), expected, rtol=1e-14)
    assert load.form is RoadLoadForm.COAST_DOWN


def test_grade_percent_is_one_hundred_times_tan_theta() -> None:
    # Common practice: grade % = 100*tan(theta), so 100 % is 45 degrees.
    load = RoadLoad.from_constant_rolling(MASS_KG, 0.0, 1.2, 0.01, grade_percent=100.0)
    assert_allclose(load.grade_angle_rad, math.pi / 4.0, rtol=1e-15)
    assert_allclose(load.grade_force_n, MASS_KG * G / math.sqrt(2.0), rtol=1e-14)
    # Rolling resistance follows the normal load, m*g*cos(theta).
    expected = (0.01 + 1.0) * MASS_KG * G / math.sqrt(2.0)
    assert_allclose(load.force_n([0.0]), [expected], rtol=1e-14)


def test_downhill_grade_gives_a_negative_grade_force() -> None:
    load = RoadLoad.from_constant_rolling(MASS_KG, 0.6, 1.2, 0.01, grade_percent=-8.0)
    assert load.grade_force_n < 0.0
    assert_allclose(load.grade_force_n, -MASS_KG * G * math.sin(math.atan(0.08)), rtol=1e-14)


def test_force_keeps_the_shape_of_the_speed_argument() -> None:
    load = RoadLoad.from_constant_rolling(MASS_KG, 0.6, 1.2, 0.01)
    assert load.force_n(SPEED_M_S).shape == (4,)
    assert load.force_n(np.linspace(0.0, 50.0, 7)).shape == (7,)


def test_negative_speed_is_rejected_with_its_index() -> None:
    load = RoadLoad.from_constant_rolling(MASS_KG, 0.6, 1.2, 0.01)
    with pytest.raises(VehicleError, match=r"`speed_m_s\[1\]` must be finite and >= 0") as info:
        load.force_n([1.0, -2.0])
    assert info.value.parameter == "speed_m_s[1]"


@pytest.mark.parametrize(
    ("build", "parameter"),
    [
        pytest.param(
            lambda: RoadLoad.from_constant_rolling(0.0, 0.6, 1.2, 0.01), "mass_kg", id="mass-zero"
        ),
        pytest.param(
            lambda: RoadLoad.from_constant_rolling(MASS_KG, -0.1, 1.2, 0.01),
            "drag_area_m2",
            id="drag-area-negative",
        ),
        pytest.param(
            lambda: RoadLoad.from_constant_rolling(MASS_KG, 0.6, 0.0, 0.01),
            "air_density_kg_m3",
            id="density-zero",
        ),
        pytest.param(
            lambda: RoadLoad.from_constant_rolling(MASS_KG, 0.6, 1.2, -0.01),
            "rolling_coefficient",
            id="rolling-negative",
        ),
        pytest.param(
            lambda: RoadLoad.from_speed_dependent_rolling(MASS_KG, 0.6, 1.2, 0.01, -1e-4),
            "rolling_speed_coefficient_s_m",
            id="rolling-speed-negative",
        ),
        pytest.param(
            lambda: RoadLoad.from_coast_down(MASS_KG, -1.0, 0.0, 0.4), "f0_n", id="f0-negative"
        ),
        pytest.param(
            lambda: RoadLoad.from_coast_down(MASS_KG, 100.0, 0.0, math.nan),
            "f2_n_s2_m2",
            id="f2-nan",
        ),
        pytest.param(
            lambda: RoadLoad.from_coast_down(MASS_KG, 100.0, 0.0, 0.4, grade_percent=math.inf),
            "grade_percent",
            id="grade-infinite",
        ),
    ],
)
def test_invalid_road_load_arguments_are_rejected(
    build: Callable[[], RoadLoad], parameter: str
) -> None:
    with pytest.raises(VehicleError, match=f"`{parameter}` must be") as info:
        build()
    assert info.value.parameter == parameter


def test_gradeability_without_rolling_resistance_is_tan_of_asin() -> None:
    # Closed form: F = m*g*sin(theta), grade = 100*tan(theta).
    theta = np.array([0.0, math.atan(0.1), math.atan(0.35), math.atan(1.0)])
    force = MASS_KG * G * np.sin(theta)
    assert_allclose(gradeability_percent(force, MASS_KG), 100.0 * np.tan(theta), atol=1e-10)


def test_gradeability_inverts_the_road_load_on_that_grade() -> None:
    # Round trip: the resistance on a 12 % grade, offered as spare force, climbs 12 %.
    fr = 0.015
    load = RoadLoad.from_constant_rolling(MASS_KG, 0.0, 1.2, fr, grade_percent=12.0)
    force = load.force_n([0.0])
    assert_allclose(gradeability_percent(force, MASS_KG, fr), [12.0], rtol=1e-12)


def test_zero_spare_force_with_rolling_resistance_needs_a_descent() -> None:
    # Closed form: sin(theta) + fr*cos(theta) = 0 gives tan(theta) = -fr.
    assert_allclose(gradeability_percent([0.0], MASS_KG, 0.015), [-1.5], rtol=1e-12)


def test_gradeability_beyond_the_largest_resistance_is_infinite() -> None:
    fr = 0.02
    largest = MASS_KG * G * math.hypot(1.0, fr)
    grade = gradeability_percent([largest, 2.0 * largest, -MASS_KG * G], MASS_KG, fr)
    assert grade.tolist() == [math.inf, math.inf, -math.inf]


def test_gradeability_with_nan_force_is_rejected() -> None:
    with pytest.raises(VehicleError, match=r"`net_force_n\[0\]` must not be NaN"):
        gradeability_percent([math.nan], MASS_KG)


def test_gradeability_with_invalid_mass_is_rejected() -> None:
    with pytest.raises(VehicleError, match="`mass_kg` must be finite and > 0"):
        gradeability_percent([100.0], -5.0)
