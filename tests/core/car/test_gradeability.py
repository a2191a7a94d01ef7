"""Tests of core.car.gradeability: the exact steady-climb balance and the grip on the slope.

The references are Gillespie, Fundamentals of Vehicle Dynamics (SAE, 1992), ch. 2 (axle
loads on a grade, grip-limited gradeability) and the closed form of the force balance on a
grade, W*(sin(theta) + fr*cos(theta)) = F, solved as theta = asin(F/(W*sqrt(1 + fr^2))) -
atan(fr). Every car here is invented demo data.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from numpy.testing import assert_allclose

from core.car.gradeability import MAX_GRADE_ANGLE_DEG, GradeLimit, gradeability
from core.car.road_load import RoadLoad
from core.car.traction import AxleGeometry, DriveLayout
from core.car.vehicle import Launch, Vehicle
from core.driveline.drivetrain import make_drivetrain
from core.driveline.tires import tire_from_diameter
from core.engine.curves import torque_curve_from_torque
from core.runs.drive_model import DriveModel, drive_model

G = 9.80665  # standard gravity [m/s^2], scipy.constants.g
MASS_KG = 1500.0
WHEELBASE_M, CG_HEIGHT_M, FRONT_SHARE = 2.7, 0.55, 0.55
GEOMETRY = AxleGeometry.from_front_weight_share(WHEELBASE_M, CG_HEIGHT_M, FRONT_SHARE)
B_M = GEOMETRY.cg_to_front_axle_m  # Gillespie's b: CG to front axle
C_M = GEOMETRY.cg_to_rear_axle_m  # Gillespie's c: CG to rear axle
FR = 0.015
TIRE = tire_from_diameter(0.65)


def car(
    torque_nm: float,
    layout: DriveLayout,
    mu: float,
    *,
    share: float | None = None,
    drag_area_m2: float = 0.0,
) -> DriveModel:
    """A car with a flat torque curve, so the drive force is constant in each gear."""
    load = RoadLoad.from_constant_rolling(MASS_KG, drag_area_m2, 1.2, FR)
    vehicle = Vehicle(MASS_KG, load, GEOMETRY, layout, mu, front_torque_share=share)
    curve = torque_curve_from_torque([1000.0, 4000.0, 7000.0], [torque_nm] * 3)
    drivetrain = make_drivetrain([4.0, 2.0, 1.0], 4.0)
    return drive_model(curve, drivetrain, TIRE, vehicle, Launch())


@pytest.mark.parametrize(
    ("layout", "expected_tan"),
    [
        pytest.param(
            DriveLayout.REAR,
            (0.8 * B_M / WHEELBASE_M - FR) / (1.0 - 0.8 * CG_HEIGHT_M / WHEELBASE_M),
            id="rear-drive",
        ),
        pytest.param(
            DriveLayout.FRONT,
            (0.8 * C_M / WHEELBASE_M - FR) / (1.0 + 0.8 * CG_HEIGHT_M / WHEELBASE_M),
            id="front-drive",
        ),
    ],
)
def test_grip_limited_gradeability_is_gillespies_closed_form(
    layout: DriveLayout, expected_tan: float
) -> None:
    # Gillespie ch. 2, grip-limited gradeability with the normal loads on the slope and the
    # weight transfer of the grade: RWD tan(theta) = (mu*b/L - fr)/(1 - mu*h/L), FWD
    # tan(theta) = (mu*c/L - fr)/(1 + mu*h/L). A strong engine makes grip bind in low gears.
    result = gradeability(car(3000.0, layout, 0.8))
    assert result.limited_by[0] is GradeLimit.GRIP
    assert_allclose(result.grade_percent[0], 100.0 * expected_tan, rtol=1e-12)


def test_all_wheel_drive_grip_gradeability_is_the_lesser_axle_bound() -> None:
    # Gillespie ch. 2 axle loads on a grade, Wf = W*(c*cos - h*sin)/L, Wr = W*(b*cos +
    # h*sin)/L, with a fixed front share s of Fx = W*(sin + fr*cos): front tan <= (mu*c/L -
    # s*fr)/(s + mu*h/L), rear tan <= (mu*b/L - (1 - s)*fr)/(1 - s - mu*h/L)
    mu, s = 0.8, 0.4
    k = mu * CG_HEIGHT_M / WHEELBASE_M
    front = (mu * C_M / WHEELBASE_M - s * FR) / (s + k)
    rear = (mu * B_M / WHEELBASE_M - (1.0 - s) * FR) / (1.0 - s - k)
    result = gradeability(car(3000.0, DriveLayout.ALL, mu, share=s))
    assert result.limited_by[0] is GradeLimit.GRIP
    assert_allclose(result.grade_percent[0], 100.0 * min(front, rear), rtol=1e-12)


def test_drive_limited_gradeability_solves_the_exact_balance_with_cos_theta_rolling() -> None:
    # closed form of W*(sin(theta) + fr*cos(theta)) = F: theta = asin(F/(W*sqrt(1 + fr^2)))
    # - atan(fr); no small-angle form (it would drop cos(theta) from the rolling term)
    model = car(100.0, DriveLayout.REAR, 1.0)
    result = gradeability(model)
    assert result.limited_by == (GradeLimit.DRIVE,) * 3
    force = 100.0 * np.array([16.0, 8.0, 4.0]) / TIRE.rolling_radius_m
    weight = MASS_KG * G
    theta = np.arcsin(force / (weight * math.hypot(1.0, FR))) - math.atan(FR)
    assert_allclose(result.grade_percent, 100.0 * np.tan(theta), rtol=1e-12)


def test_on_the_reported_grade_the_run_road_load_equals_the_drive_force() -> None:
    # the acceleration run's road load on a grade (core.car.road_load, exact in theta) must use up
    # the whole drive force at the reported speed: zero net acceleration, to 1e-9
    model = car(100.0, DriveLayout.REAR, 1.0, drag_area_m2=0.7)
    result = gradeability(model)
    for g in range(3):
        v = np.array([result.speed_m_s[g]])
        force, _ = model.drive(g, v)
        load = RoadLoad.from_constant_rolling(
            MASS_KG, 0.7, 1.2, FR, grade_percent=float(result.grade_percent[g])
        )
        assert_allclose(load.force_n(v), force, rtol=1e-9)


def test_drag_lowers_the_gradeability_at_speed_and_the_best_speed_is_found() -> None:
    # with drag the steepest climb of a flat-torque gear is at its lowest speed, and on that
    # grade W*(sin + fr*cos) + 0.5*rho*CdA*v^2 = F holds (closed form of the balance)
    model = car(100.0, DriveLayout.REAR, 1.0, drag_area_m2=0.7)
    result = gradeability(model)
    lowest = np.array([model.speed_at_rpm(g, 1000.0) for g in range(3)])
    assert_allclose(result.speed_m_s, lowest, rtol=1e-6)
    assert np.all(
        result.grade_percent < gradeability(car(100.0, DriveLayout.REAR, 1.0)).grade_percent
    )


def test_gradeability_is_always_a_finite_number_within_the_cap() -> None:
    # an engine far stronger than any grade needs: grip (or the stated cap) binds, and the
    # answer stays a number (the old level-road form gave +inf, written as null)
    result = gradeability(car(100_000.0, DriveLayout.ALL, 5.0, share=0.5))
    assert np.all(np.isfinite(result.grade_percent))
    cap = 100.0 * math.tan(math.radians(MAX_GRADE_ANGLE_DEG))
    assert np.all(result.grade_percent <= cap * (1.0 + 1e-12))
    assert set(result.limited_by) <= {GradeLimit.GRIP, GradeLimit.CAP}
