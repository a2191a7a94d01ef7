"""Tests of core.car.inertia: equivalent mass of the rotating parts and the mass factor."""

from __future__ import annotations

import math
import re
from collections.abc import Callable

import numpy as np
import pytest
from numpy.testing import assert_allclose

from core.car.inertia import equivalent_mass_kg, mass_factor, rotating_mass_kg
from core.errors import VehicleError

OVERALL_RATIOS = np.array([14.2, 8.6, 5.9, 4.4, 3.5])
FINAL_DRIVE = 3.55
RADIUS_M = 0.31


@pytest.mark.parametrize(
    ("overall_ratio", "expected"),
    [
        pytest.param(10.5, 1.31563, id="ntf-10.5"),
        pytest.param(3.0, 1.0625, id="ntf-3"),
    ],
)
def test_mass_factor_matches_the_rule_of_thumb_check_values(
    overall_ratio: float, expected: float
) -> None:
    # Gillespie, Fundamentals of Vehicle Dynamics, ch. 2 (memory) and Wong, Theory of Ground
    # Vehicles (memory): 1.04 + 0.0025*Ntf^2. Check values from REFERENCES.md, which are
    # computed from that formula and rounded to 5-6 digits.
    assert_allclose(mass_factor([overall_ratio]), [expected], rtol=1e-5)


def test_mass_factor_is_vectorised_over_gears() -> None:
    factor = mass_factor(OVERALL_RATIOS)
    assert factor.shape == (5,)
    assert_allclose(factor, 1.04 + 0.0025 * OVERALL_RATIOS**2, rtol=1e-15)
    assert np.all(np.diff(factor) < 0.0)  # lower gears carry more rotating inertia


def test_equivalent_mass_is_mass_times_the_mass_factor() -> None:
    assert_allclose(
        equivalent_mass_kg(1400.0, OVERALL_RATIOS),
        1400.0 * mass_factor(OVERALL_RATIOS),
        rtol=1e-15,
    )


def test_rotating_mass_matches_the_gillespie_expression() -> None:
    # Gillespie ch. 2: Mr = [(Ie + It)*Ntf^2 + Id*Nf^2 + Iw] / r^2.
    engine, driveshaft, wheels = 0.25, 0.06, 4.8
    mass = rotating_mass_kg(
        OVERALL_RATIOS,
        FINAL_DRIVE,
        RADIUS_M,
        engine_inertia_kg_m2=engine,
        driveshaft_inertia_kg_m2=driveshaft,
        wheel_inertia_kg_m2=wheels,
    )
    expected = (engine * OVERALL_RATIOS**2 + driveshaft * FINAL_DRIVE**2 + wheels) / RADIUS_M**2
    assert_allclose(mass, expected, rtol=1e-14)


def test_engine_side_inertia_scales_with_the_square_of_the_overall_ratio() -> None:
    mass = rotating_mass_kg(
        OVERALL_RATIOS,
        FINAL_DRIVE,
        RADIUS_M,
        engine_inertia_kg_m2=0.2,
        driveshaft_inertia_kg_m2=0.0,
        wheel_inertia_kg_m2=0.0,
    )
    assert_allclose(mass / mass[0], (OVERALL_RATIOS / OVERALL_RATIOS[0]) ** 2, rtol=1e-14)


def test_wheel_inertia_alone_is_the_same_in_every_gear() -> None:
    # A solid disc wheel of mass m and radius r adds m/2 (closed form: I = m*r^2/2).
    disc_mass, radius = 20.0, 0.3
    mass = rotating_mass_kg(
        OVERALL_RATIOS,
        FINAL_DRIVE,
        radius,
        engine_inertia_kg_m2=0.0,
        driveshaft_inertia_kg_m2=0.0,
        wheel_inertia_kg_m2=0.5 * disc_mass * radius**2,
    )
    assert_allclose(mass, np.full(5, disc_mass / 2.0), rtol=1e-14)


def _rotating(**overrides: float) -> Callable[[], object]:
    arguments: dict[str, float] = {
        "final_drive_ratio": FINAL_DRIVE,
        "rolling_radius_m": RADIUS_M,
        "engine_inertia_kg_m2": 0.2,
        "driveshaft_inertia_kg_m2": 0.05,
        "wheel_inertia_kg_m2": 4.0,
    }
    arguments.update(overrides)
    return lambda: rotating_mass_kg(OVERALL_RATIOS, **arguments)


@pytest.mark.parametrize(
    ("call", "parameter"),
    [
        pytest.param(_rotating(final_drive_ratio=0.0), "final_drive_ratio", id="final-zero"),
        pytest.param(_rotating(rolling_radius_m=-0.3), "rolling_radius_m", id="radius-negative"),
        pytest.param(
            _rotating(engine_inertia_kg_m2=-0.1), "engine_inertia_kg_m2", id="engine-negative"
        ),
        pytest.param(
            _rotating(wheel_inertia_kg_m2=math.nan), "wheel_inertia_kg_m2", id="wheels-nan"
        ),
        pytest.param(lambda: mass_factor([3.0, 0.0]), "overall_ratios[1]", id="ratio-zero"),
        pytest.param(lambda: equivalent_mass_kg(0.0, [3.0]), "mass_kg", id="mass-zero"),
    ],
)
def test_invalid_inertia_arguments_are_rejected(
    call: Callable[[], object], parameter: str
) -> None:
    with pytest.raises(VehicleError, match=f"`{re.escape(parameter)}` must be") as info:
        call()
    assert info.value.parameter == parameter


@pytest.mark.parametrize(
    "ratios",
    [pytest.param([], id="empty"), pytest.param([[3.0, 2.0]], id="two-dimensional")],
)
def test_overall_ratios_must_be_a_non_empty_vector(ratios: list[list[float]]) -> None:
    with pytest.raises(VehicleError, match="non-empty 1-D array"):
        mass_factor(ratios)
