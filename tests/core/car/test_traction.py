"""Tests of core.car.traction: axle loads under acceleration and the traction limit."""

from __future__ import annotations

import math
import re
from collections.abc import Callable

import numpy as np
import pytest
from numpy.testing import assert_allclose

from core.car.road_load import RoadLoad
from core.car.traction import AxleGeometry, AxleLoads, DriveLayout, axle_loads, traction_limit_n
from core.car.vehicle import Vehicle
from core.errors import VehicleError

G = 9.80665

# Gillespie, Fundamentals of Vehicle Dynamics, ch. 2 example (REFERENCES.md): front axle
# 952.5 kg, rear 839.1 kg, CG height 0.533 m, wheelbase 2.743 m, mu 0.62.
FRONT_KG, REAR_KG, CG_HEIGHT_M, WHEELBASE_M, MU = 952.5, 839.1, 0.533, 2.743, 0.62
MASS_KG = FRONT_KG + REAR_KG
EXAMPLE = AxleGeometry.from_axle_masses(WHEELBASE_M, CG_HEIGHT_M, FRONT_KG, REAR_KG)


def test_rear_drive_limit_matches_the_gillespie_example() -> None:
    # Gillespie ch. 2 formula, REFERENCES.md check value 5802.6 N. That value appears to use
    # g = 9.81 m/s^2; this module uses standard gravity 9.80665, 3.4e-4 lower.
    limit = traction_limit_n(MASS_KG, EXAMPLE, MU, DriveLayout.REAR)
    assert_allclose(limit, 5802.6, rtol=5e-4)


def test_rear_drive_limit_equals_the_closed_form() -> None:
    # Gillespie ch. 2: Fx = mu*W*(b/L) / (1 - mu*h/L), b/L the static rear share.
    weight = MASS_KG * G
    expected = MU * weight * (REAR_KG / MASS_KG) / (1.0 - MU * CG_HEIGHT_M / WHEELBASE_M)
    limit = traction_limit_n(MASS_KG, EXAMPLE, MU, DriveLayout.REAR)
    assert_allclose(limit, expected, rtol=1e-12)


def test_front_drive_limit_equals_the_closed_form() -> None:
    # Gillespie ch. 2: Fx = mu*W*(c/L) / (1 + mu*h/L), c/L the static front share.
    weight = MASS_KG * G
    expected = MU * weight * (FRONT_KG / MASS_KG) / (1.0 + MU * CG_HEIGHT_M / WHEELBASE_M)
    limit = traction_limit_n(MASS_KG, EXAMPLE, MU, DriveLayout.FRONT)
    assert_allclose(limit, expected, rtol=1e-12)


@pytest.mark.parametrize(
    ("share", "layout"),
    [
        pytest.param(0.0, DriveLayout.REAR, id="all-torque-rear"),
        pytest.param(1.0, DriveLayout.FRONT, id="all-torque-front"),
    ],
)
def test_all_wheel_drive_with_an_extreme_split_equals_single_axle_drive(
    share: float, layout: DriveLayout
) -> None:
    awd = traction_limit_n(MASS_KG, EXAMPLE, MU, DriveLayout.ALL, front_torque_share=share)
    assert_allclose(awd, traction_limit_n(MASS_KG, EXAMPLE, MU, layout), rtol=1e-14)


def test_all_wheel_drive_split_matching_the_dynamic_front_load_reaches_mu_w() -> None:
    # Closed form derived in the docstring: s = c/L - mu*h/L saturates both axles at once.
    share = FRONT_KG / MASS_KG - MU * CG_HEIGHT_M / WHEELBASE_M
    awd = traction_limit_n(MASS_KG, EXAMPLE, MU, DriveLayout.ALL, front_torque_share=share)
    assert_allclose(awd, MU * MASS_KG * G, rtol=1e-12)


def test_no_all_wheel_drive_split_exceeds_mu_w() -> None:
    limits = [
        traction_limit_n(MASS_KG, EXAMPLE, MU, DriveLayout.ALL, front_torque_share=s)
        for s in np.linspace(0.0, 1.0, 41)
    ]
    assert max(limits) <= MU * MASS_KG * G * (1.0 + 1e-12)


@pytest.mark.parametrize(
    "share",
    [pytest.param(0.2, id="rear-biased"), pytest.param(0.7, id="front-biased")],
)
def test_at_the_all_wheel_drive_limit_one_axle_uses_exactly_mu_times_its_load(
    share: float,
) -> None:
    # Consistency with axle_loads: at ax = Fx/m, the saturated axle needs mu*W_axle and the
    # other axle needs no more than that.
    force = traction_limit_n(MASS_KG, EXAMPLE, MU, DriveLayout.ALL, front_torque_share=share)
    loads = axle_loads(MASS_KG, EXAMPLE, [force / MASS_KG])
    front_use = share * force / (MU * loads.front_n[0])
    rear_use = (1.0 - share) * force / (MU * loads.rear_n[0])
    assert_allclose(max(front_use, rear_use), 1.0, rtol=1e-12)
    assert min(front_use, rear_use) < 1.0


def test_rear_drive_is_capped_where_the_front_wheels_lift() -> None:
    # Closed form: with mu > c/h the front axle unloads fully at Fx = W*c/h.
    geometry = AxleGeometry.from_front_weight_share(2.5, 0.6, 0.4)
    mu = 3.0
    assert mu > geometry.cg_to_rear_axle_m / geometry.cg_height_m
    limit = traction_limit_n(1000.0, geometry, mu, DriveLayout.REAR)
    expected = 1000.0 * G * geometry.cg_to_rear_axle_m / geometry.cg_height_m
    assert_allclose(limit, expected, rtol=1e-12)
    loads = axle_loads(1000.0, geometry, [limit / 1000.0])
    assert_allclose(loads.front_n, [0.0], atol=1e-9)


def test_axle_loads_follow_the_gillespie_load_transfer_formula() -> None:
    # Gillespie ch. 2: Wf = W*(c/L - (ax/g)*h/L), Wr = W*(b/L + (ax/g)*h/L).
    acceleration = np.array([-7.0, 0.0, 3.0, 6.0])
    loads = axle_loads(MASS_KG, EXAMPLE, acceleration)
    assert isinstance(loads, AxleLoads)
    weight = MASS_KG * G
    transfer = weight * (acceleration / G) * CG_HEIGHT_M / WHEELBASE_M
    assert_allclose(loads.front_n, FRONT_KG * G - transfer, rtol=1e-12)
    assert_allclose(loads.rear_n, REAR_KG * G + transfer, rtol=1e-12)
    assert_allclose(loads.front_n + loads.rear_n, np.full(4, weight), rtol=1e-14)


def test_front_weight_share_places_the_centre_of_gravity() -> None:
    # Static front load W*c/L: a 60 % front share puts the CG 40 % of L behind the front axle.
    geometry = AxleGeometry.from_front_weight_share(2.6, 0.5, 0.6)
    assert_allclose(geometry.cg_to_front_axle_m, 0.4 * 2.6, rtol=1e-15)
    assert_allclose(geometry.cg_to_rear_axle_m, 0.6 * 2.6, rtol=1e-15)
    assert_allclose(geometry.front_weight_share, 0.6, rtol=1e-15)


def test_all_wheel_drive_without_a_front_torque_share_is_rejected() -> None:
    with pytest.raises(VehicleError, match="`front_torque_share` must be given") as info:
        traction_limit_n(MASS_KG, EXAMPLE, MU, DriveLayout.ALL)
    assert info.value.parameter == "front_torque_share"


def test_front_torque_share_with_rear_drive_is_rejected() -> None:
    with pytest.raises(VehicleError, match="applies to all-wheel drive only"):
        traction_limit_n(MASS_KG, EXAMPLE, MU, DriveLayout.REAR, front_torque_share=0.3)


@pytest.mark.parametrize(
    ("call", "parameter"),
    [
        pytest.param(lambda: AxleGeometry(0.0, 0.5, 1.0), "wheelbase_m", id="wheelbase-zero"),
        pytest.param(lambda: AxleGeometry(2.5, -0.1, 1.0), "cg_height_m", id="height-negative"),
        pytest.param(
            lambda: AxleGeometry(2.5, 0.5, 2.6), "cg_to_front_axle_m", id="cg-behind-rear-axle"
        ),
        pytest.param(
            lambda: AxleGeometry.from_front_weight_share(2.5, 0.5, 1.2),
            "front_weight_share",
            id="share-above-one",
        ),
        pytest.param(
            lambda: AxleGeometry.from_axle_masses(2.5, 0.5, 0.0, 700.0),
            "front_axle_kg",
            id="front-axle-empty",
        ),
        pytest.param(
            lambda: traction_limit_n(MASS_KG, EXAMPLE, 0.0, DriveLayout.REAR),
            "friction_coefficient",
            id="mu-zero",
        ),
        pytest.param(
            lambda: traction_limit_n(
                MASS_KG, EXAMPLE, MU, DriveLayout.ALL, front_torque_share=math.nan
            ),
            "front_torque_share",
            id="share-nan",
        ),
        pytest.param(
            lambda: axle_loads(MASS_KG, EXAMPLE, [0.0, math.inf]),
            "acceleration_m_s2[1]",
            id="acceleration-infinite",
        ),
    ],
)
def test_invalid_traction_arguments_are_rejected(
    call: Callable[[], object], parameter: str
) -> None:
    with pytest.raises(VehicleError, match=f"`{re.escape(parameter)}` must") as info:
        call()
    assert info.value.parameter == parameter


# --- rolling-resistance term and grade (Gillespie ch. 2, eqs. 2-19 and 2-20) -------------

FR = 0.015


@pytest.mark.parametrize(
    ("layout", "arm_kg", "sign", "denominator"),
    [
        pytest.param(
            DriveLayout.REAR, REAR_KG, -1.0, 1.0 - MU * CG_HEIGHT_M / WHEELBASE_M, id="rear"
        ),
        pytest.param(
            DriveLayout.FRONT, FRONT_KG, 1.0, 1.0 + MU * CG_HEIGHT_M / WHEELBASE_M, id="front"
        ),
    ],
)
def test_traction_limit_with_rolling_resistance_is_gillespie_eq_2_19_and_2_20(
    layout: DriveLayout, arm_kg: float, sign: float, denominator: float
) -> None:
    # Gillespie ch. 2: RWD Fx = mu*W*(b - fr*h)/L / (1 - mu*h/L) (eq. 2-19), FWD
    # Fx = mu*W*(c + fr*h)/L / (1 + mu*h/L) (eq. 2-20); b/L and c/L the static axle shares
    weight = MASS_KG * G
    arm = arm_kg / MASS_KG + sign * FR * CG_HEIGHT_M / WHEELBASE_M
    expected = MU * weight * arm / denominator
    limit = traction_limit_n(MASS_KG, EXAMPLE, MU, layout, rolling_resistance_n=FR * weight)
    assert_allclose(limit, expected, rtol=1e-12)


def test_traction_limit_on_a_grade_scales_with_the_normal_load() -> None:
    # on a slope the weight's normal part W*cos(theta) carries the axles and the grade force
    # joins the transfer at the CG height (Gillespie ch. 2 axle loads on a grade), so with the
    # rolling resistance fr*W*cos(theta) the whole limit scales by cos(theta)
    weight = MASS_KG * G
    level = traction_limit_n(
        MASS_KG, EXAMPLE, MU, DriveLayout.REAR, rolling_resistance_n=FR * weight
    )
    cos = math.cos(math.atan(0.2))
    sloped = traction_limit_n(
        MASS_KG,
        EXAMPLE,
        MU,
        DriveLayout.REAR,
        rolling_resistance_n=FR * weight * cos,
        grade_percent=20.0,
    )
    assert_allclose(sloped, level * cos, rtol=1e-12)


def test_vehicle_traction_limit_counts_its_rolling_resistance_at_rest() -> None:
    # Gillespie eq. 2-19 with fr = 0.012 from the vehicle's own constant rolling coefficient
    load = RoadLoad.from_constant_rolling(MASS_KG, 0.7, 1.2, 0.012)
    vehicle = Vehicle(MASS_KG, load, EXAMPLE, DriveLayout.REAR, MU)
    b_over_l = REAR_KG / MASS_KG
    expected = (
        MU
        * MASS_KG
        * G
        * (b_over_l - 0.012 * CG_HEIGHT_M / WHEELBASE_M)
        / (1.0 - MU * CG_HEIGHT_M / WHEELBASE_M)
    )
    assert_allclose(vehicle.traction_limit_n(), expected, rtol=1e-12)
