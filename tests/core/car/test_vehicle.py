"""Tests of core.car.vehicle: effective mass, traction limit and the validation of Vehicle,
Launch and RotatingInertia. Every car here is invented demo data."""

from __future__ import annotations

import math
import re
from collections.abc import Callable

import numpy as np
import pytest
from numpy.testing import assert_allclose

from core.car.road_load import RoadLoad
from core.car.traction import AxleGeometry, DriveLayout
from core.car.vehicle import Coupling, Launch, RotatingInertia, Vehicle
from core.driveline.drivetrain import make_drivetrain
from core.driveline.tires import tire_from_diameter
from core.errors import VehicleError

G = 9.80665  # standard gravity [m/s^2], scipy.constants.g

# The traction example of REFERENCES.md (computed there from Gillespie's ch. 2 formula):
# front axle 952.5 kg, rear 839.1 kg, CG height 0.533 m, wheelbase 2.743 m, mu 0.62.
FRONT_KG, REAR_KG, CG_HEIGHT_M, WHEELBASE_M, MU = 952.5, 839.1, 0.533, 2.743, 0.62
EXAMPLE_KG = FRONT_KG + REAR_KG
EXAMPLE_GEOMETRY = AxleGeometry.from_axle_masses(WHEELBASE_M, CG_HEIGHT_M, FRONT_KG, REAR_KG)

TIRE = tire_from_diameter(0.64)
GEOMETRY = AxleGeometry(2.6, 0.52, 1.25)


def sedan(
    *,
    mass_kg: float = 1450.0,
    friction_coefficient: float = 0.9,
    inertia: RotatingInertia | None = None,
    layout: DriveLayout = DriveLayout.REAR,
) -> Vehicle:
    """An invented sedan on a level road."""
    return Vehicle(
        mass_kg=mass_kg,
        road_load=RoadLoad.from_constant_rolling(mass_kg, 0.65, 1.2, 0.012),
        geometry=GEOMETRY,
        layout=layout,
        friction_coefficient=friction_coefficient,
        inertia=inertia,
    )


@pytest.mark.parametrize(
    ("overall_ratio", "expected"),
    [
        pytest.param(10.5, 1.31563, id="ntf-10.5"),
        pytest.param(3.0, 1.0625, id="ntf-3"),
    ],
)
def test_effective_mass_without_inertia_data_uses_the_mass_factor_check_values(
    overall_ratio: float, expected: float
) -> None:
    # Gillespie, Fundamentals of Vehicle Dynamics, ch. 2, and Wong, Theory of Ground
    # Vehicles: mass factor 1.04 + 0.0025*Ntf^2 (both from memory). The check values of
    # REFERENCES.md are rounded to 5-6 digits, hence rtol 1e-5.
    drivetrain = make_drivetrain([overall_ratio], 1.0)
    mass = sedan(mass_kg=1000.0).effective_mass_kg(drivetrain, TIRE)
    assert_allclose(mass, [1000.0 * expected], rtol=1e-5)


def test_effective_mass_without_inertia_data_is_mass_times_the_factor_in_every_gear() -> None:
    # Gillespie ch. 2 / Wong (memory): m*(1.04 + 0.0025*Ntf^2), Ntf = gear * final drive
    drivetrain = make_drivetrain([3.6, 2.2, 1.5, 1.15, 0.92, 0.78], 3.7)
    ntf = drivetrain.overall_ratios
    mass = sedan().effective_mass_kg(drivetrain, TIRE)
    assert mass.shape == (6,)
    assert_allclose(mass, 1450.0 * (1.04 + 0.0025 * ntf**2), rtol=1e-14)


def test_effective_mass_with_inertia_data_follows_the_gillespie_form() -> None:
    # Gillespie ch. 2: M + [(Ie + It)*Ntf^2 + Id*Nf^2 + Iw] / r^2 with Ie + It taken as one
    # inertia. No extra reduction here: where such a reduction sits relative to the
    # driveshaft (hence whether it belongs in Nf) depends on the car.
    ie, i_d, iw = 0.22, 0.06, 3.6
    drivetrain = make_drivetrain([3.6, 2.2, 1.5, 1.15], 3.7)
    ntf = drivetrain.overall_ratios
    r = TIRE.rolling_radius_m
    mass = sedan(inertia=RotatingInertia(ie, i_d, iw)).effective_mass_kg(drivetrain, TIRE)
    expected = 1450.0 + (ie * ntf**2 + i_d * 3.7**2 + iw) / r**2
    assert_allclose(mass, expected, rtol=1e-13)


def test_effective_mass_with_zero_inertia_is_the_bare_mass() -> None:
    drivetrain = make_drivetrain([3.6, 2.2, 1.5], 3.7)
    mass = sedan(inertia=RotatingInertia(0.0, 0.0, 0.0)).effective_mass_kg(drivetrain, TIRE)
    assert_allclose(mass, np.full(3, 1450.0), rtol=0)


def test_effective_mass_falls_from_first_gear_to_top_gear() -> None:
    drivetrain = make_drivetrain([3.6, 2.2, 1.5, 1.15], 3.7)
    for inertia in (None, RotatingInertia(0.22, 0.06, 3.6)):
        mass = sedan(inertia=inertia).effective_mass_kg(drivetrain, TIRE)
        assert np.all(np.diff(mass) < 0.0)


def test_decoupled_mass_keeps_only_the_parts_turning_with_the_wheels() -> None:
    # Gillespie ch. 2 with the engine term dropped (the engine does not follow the wheels
    # while the clutch or converter slips): M + (Id*Nf^2 + Iw)/r^2; without inertia data the
    # fixed 0.04 of the mass factor (memory, as above)
    ie, i_d, iw = 0.22, 0.06, 3.6
    drivetrain = make_drivetrain([3.6, 2.2], 3.7)
    r = TIRE.rolling_radius_m
    with_data = sedan(inertia=RotatingInertia(ie, i_d, iw)).decoupled_mass_kg(drivetrain, TIRE)
    assert_allclose(with_data, 1450.0 + (i_d * 3.7**2 + iw) / r**2, rtol=1e-13)
    assert_allclose(sedan().decoupled_mass_kg(drivetrain, TIRE), 1450.0 * 1.04, rtol=1e-14)


def test_rear_drive_traction_limit_matches_the_reference_example() -> None:
    # REFERENCES.md: RWD Fx = mu*W*(b/L)/(1 - mu*h/L) (Gillespie ch. 2) gives 5802.6 N for
    # this car. That figure was apparently computed with g = 9.81 m/s^2; with standard
    # gravity 9.80665 the limit is 5800.66 N, 3.4e-4 lower, so rtol 5e-4 and not tighter.
    vehicle = Vehicle(
        EXAMPLE_KG,
        RoadLoad.from_coast_down(EXAMPLE_KG, 0.0, 0.0, 0.0),
        EXAMPLE_GEOMETRY,
        DriveLayout.REAR,
        MU,
    )
    assert_allclose(vehicle.traction_limit_n(), 5802.6, rtol=5e-4)
    closed_form = (
        MU * EXAMPLE_KG * G * (REAR_KG / EXAMPLE_KG) / (1.0 - MU * CG_HEIGHT_M / WHEELBASE_M)
    )
    assert_allclose(vehicle.traction_limit_n(), closed_form, rtol=1e-12)


def test_front_drive_traction_limit_equals_the_gillespie_closed_form() -> None:
    # Gillespie ch. 2: FWD Fx = mu*W*(c/L)/(1 + mu*h/L)
    vehicle = Vehicle(
        EXAMPLE_KG,
        RoadLoad.from_coast_down(EXAMPLE_KG, 0.0, 0.0, 0.0),
        EXAMPLE_GEOMETRY,
        DriveLayout.FRONT,
        MU,
    )
    closed_form = (
        MU * EXAMPLE_KG * G * (FRONT_KG / EXAMPLE_KG) / (1.0 + MU * CG_HEIGHT_M / WHEELBASE_M)
    )
    assert_allclose(vehicle.traction_limit_n(), closed_form, rtol=1e-12)


def test_all_wheel_drive_vehicle_passes_its_torque_share_on() -> None:
    # with the split equal to the front load share at the limit, s = c/L - mu*h/L, both
    # axles saturate together and the limit is mu*W (closed form, core.car.traction docstring)
    share = GEOMETRY.front_weight_share - 0.9 * GEOMETRY.cg_height_m / GEOMETRY.wheelbase_m
    vehicle = Vehicle(
        1450.0,
        RoadLoad.from_coast_down(1450.0, 0.0, 0.0, 0.0),
        GEOMETRY,
        DriveLayout.ALL,
        0.9,
        front_torque_share=share,
    )
    assert_allclose(vehicle.traction_limit_n(), 0.9 * 1450.0 * G, rtol=1e-12)


def test_launch_defaults_are_a_clutch_at_3000_rpm_with_quarter_second_shifts() -> None:
    launch = Launch()
    assert launch.coupling is Coupling.CLUTCH
    assert launch.launch_rpm == 3000.0
    assert launch.converter is None
    assert launch.lockup_gears == frozenset()
    assert launch.shift_time_s == 0.25


def _vehicle_with_mass(mass_kg: float) -> Vehicle:
    return Vehicle(
        mass_kg, RoadLoad.from_coast_down(1000.0, 0.0, 0.0, 0.0), GEOMETRY, DriveLayout.REAR, 0.9
    )


def _vehicle_with_mu(mu: float) -> Vehicle:
    return Vehicle(
        1000.0, RoadLoad.from_coast_down(1000.0, 0.0, 0.0, 0.0), GEOMETRY, DriveLayout.REAR, mu
    )


@pytest.mark.parametrize(
    ("call", "parameter"),
    [
        pytest.param(lambda: _vehicle_with_mass(10.0), "mass_kg", id="mass-too-small"),
        pytest.param(lambda: _vehicle_with_mass(60_000.0), "mass_kg", id="mass-too-large"),
        pytest.param(lambda: _vehicle_with_mass(math.nan), "mass_kg", id="mass-nan"),
        pytest.param(lambda: _vehicle_with_mu(0.0), "friction_coefficient", id="mu-zero"),
        pytest.param(lambda: _vehicle_with_mu(5.5), "friction_coefficient", id="mu-above-5"),
        pytest.param(lambda: _vehicle_with_mu(math.inf), "friction_coefficient", id="mu-inf"),
        pytest.param(lambda: Launch(launch_rpm=200.0), "launch_rpm", id="launch-rpm-low"),
        pytest.param(lambda: Launch(launch_rpm=40_000.0), "launch_rpm", id="launch-rpm-high"),
        pytest.param(lambda: Launch(shift_time_s=-0.1), "shift_time_s", id="shift-negative"),
        pytest.param(lambda: Launch(shift_time_s=6.0), "shift_time_s", id="shift-too-long"),
        pytest.param(
            lambda: Launch(coupling=Coupling.CONVERTER), "converter", id="converter-missing"
        ),
        pytest.param(
            lambda: RotatingInertia(-0.1, 0.0, 0.0), "engine_kg_m2", id="engine-negative"
        ),
        pytest.param(
            lambda: RotatingInertia(0.2, 11.0, 0.0), "driveshaft_kg_m2", id="driveshaft-large"
        ),
        pytest.param(
            lambda: RotatingInertia(0.2, 0.05, math.nan), "wheels_kg_m2", id="wheels-nan"
        ),
    ],
)
def test_invalid_vehicle_launch_and_inertia_values_are_rejected(
    call: Callable[[], object], parameter: str
) -> None:
    with pytest.raises(VehicleError, match=f"`{re.escape(parameter)}` must") as info:
        call()
    assert info.value.parameter == parameter
