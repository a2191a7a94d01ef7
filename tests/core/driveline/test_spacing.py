"""Gear-set spacing: geometric and progressive ratios, and the speed after each shift."""

from __future__ import annotations

from typing import Any

import numpy as np
import pytest
from numpy.testing import assert_allclose
from scipy.optimize import brentq

from core.driveline.drivetrain import make_drivetrain
from core.driveline.spacing import (
    Spacing,
    geometric_gear_set,
    max_progression_factor,
    progressive_gear_set,
    shift_landings,
)
from core.driveline.tires import tire_from_diameter
from core.engine.curves import Interpolation, torque_curve_from_torque
from core.errors import CurveError, DrivetrainError
from core.shifts.plan import shift_plan

SETS = [
    pytest.param(3.5, 0.8, 2, id="two-gears"),
    pytest.param(4.0, 1.0, 3, id="three-gears"),
    pytest.param(3.82, 0.72, 6, id="six-gears"),
    pytest.param(4.7, 0.64, 10, id="ten-gears"),
    pytest.param(5.25, 0.6, 12, id="twelve-gears"),
]


@pytest.mark.parametrize(("first", "top", "n"), SETS)
def test_geometric_step_matches_closed_form(first: float, top: float, n: int) -> None:
    # closed form: constant step (first/top)^(1/(n-1))
    g = geometric_gear_set(first, top, n)
    assert g.spacing is Spacing.GEOMETRIC
    assert g.progression_factor == 1.0
    assert_allclose(g.steps, np.full(n - 1, (first / top) ** (1.0 / (n - 1))), rtol=1e-15)
    assert_allclose(g.gear_ratios[:-1] / g.gear_ratios[1:], g.steps, rtol=1e-12)


@pytest.mark.parametrize(("first", "top", "n"), SETS)
def test_geometric_ratios_are_first_over_powers_of_the_step(
    first: float, top: float, n: int
) -> None:
    # closed form: i_k = first / step^(k-1)
    g = geometric_gear_set(first, top, n)
    step = (first / top) ** (1.0 / (n - 1))
    assert_allclose(g.gear_ratios, first / step ** np.arange(n), rtol=1e-12)


@pytest.mark.parametrize(("first", "top", "n"), SETS)
@pytest.mark.parametrize("psi", [pytest.param(1.0, id="psi-1"), pytest.param(1.04, id="psi-1.04")])
def test_product_of_steps_is_the_spread(first: float, top: float, n: int, psi: float) -> None:
    # closed form: the steps telescope, prod(i_k / i_(k+1)) = first / top
    for g in (
        geometric_gear_set(first, top, n),
        progressive_gear_set(first, top, n, progression_factor=psi),
    ):
        assert_allclose(np.prod(g.steps), first / top, rtol=1e-12)
        assert_allclose(g.spread, first / top, rtol=1e-15)
        assert g.gear_count == n


@pytest.mark.parametrize(("first", "top", "n"), SETS)
def test_gear_sets_hit_first_and_top_exactly(first: float, top: float, n: int) -> None:
    # closed form: both rules are fixed by their end ratios
    for g in (
        geometric_gear_set(first, top, n),
        progressive_gear_set(first, top, n, progression_factor=1.03),
    ):
        assert g.gear_ratios[0] == first
        assert g.gear_ratios[-1] == top
        assert np.all(np.diff(g.gear_ratios) < 0.0)


@pytest.mark.parametrize(("first", "top", "n"), SETS[1:])
def test_progressive_steps_shrink_by_the_progression_factor(
    first: float, top: float, n: int
) -> None:
    # the progressive rule (common practice): each step is the previous one / psi
    g = progressive_gear_set(first, top, n, progression_factor=1.03)
    assert g.spacing is Spacing.PROGRESSIVE
    assert np.all(np.diff(g.steps) < 0.0)
    assert np.all(g.steps > 1.0)
    assert_allclose(g.steps[:-1] / g.steps[1:], np.full(n - 2, 1.03), rtol=1e-12)
    assert_allclose(g.gear_ratios[:-1] / g.gear_ratios[1:], g.steps, rtol=1e-12)


def test_progressive_first_step_matches_a_numerical_root() -> None:
    # an independent oracle for the closed form: solve for the first step with brentq so that
    # dividing first gear by phi_1, phi_1/psi, phi_1/psi^2, ... reaches top gear
    first, top, n, psi = 3.9, 0.68, 7, 1.07

    def miss(phi1: float) -> float:
        return float(first / np.prod(phi1 / psi ** np.arange(n - 1))) - top

    phi1 = brentq(miss, 1.0, 10.0, xtol=1e-14)
    ratios = first / np.cumprod(np.r_[1.0, phi1 / psi ** np.arange(n - 1)])
    g = progressive_gear_set(first, top, n, progression_factor=psi)
    assert_allclose(g.steps[0], phi1, rtol=1e-10)
    assert_allclose(g.gear_ratios, ratios, rtol=1e-10)


def test_progressive_three_speed_matches_hand_working() -> None:
    # closed form worked by hand: S = 4, psi = 1.5625 = 1.25^2 -> phi_1 = 2 * 1.25 = 2.5,
    # phi_2 = 2 / 1.25 = 1.6 -> ratios 4, 1.6, 1
    g = progressive_gear_set(4.0, 1.0, 3, progression_factor=1.5625)
    assert_allclose(g.steps, [2.5, 1.6], rtol=1e-15)
    assert_allclose(g.gear_ratios, [4.0, 1.6, 1.0], rtol=1e-15)


def test_progression_factor_one_gives_the_geometric_set() -> None:
    # closed form: psi = 1 makes every step equal
    g = progressive_gear_set(3.82, 0.72, 6, progression_factor=1.0)
    assert_allclose(g.gear_ratios, geometric_gear_set(3.82, 0.72, 6).gear_ratios, rtol=1e-13)


def test_two_gears_ignore_the_progression_factor() -> None:
    # closed form: one step only, first / top
    g = progressive_gear_set(3.5, 0.8, 2, progression_factor=1.3)
    assert_allclose(g.steps, [3.5 / 0.8], rtol=1e-15)
    assert max_progression_factor(3.5, 0.8, 2) == np.inf


def test_top_step_reaches_one_at_the_largest_progression_factor() -> None:
    # closed form: phi_top = S^(1/(n-1)) * psi^(-(n-2)/2) = 1 at psi = S^(2/((n-1)(n-2)))
    first, top, n = 3.82, 0.72, 6
    limit = max_progression_factor(first, top, n)
    assert_allclose(limit, (first / top) ** (2.0 / ((n - 1) * (n - 2))), rtol=1e-15)
    assert_allclose((first / top) ** (1.0 / (n - 1)) * limit ** (-(n - 2) / 2.0), 1.0, rtol=1e-12)
    g = progressive_gear_set(first, top, n, progression_factor=limit * (1.0 - 1e-6))
    assert 1.0 < g.steps[-1] < 1.0 + 1e-5
    with pytest.raises(DrivetrainError, match="`progression_factor` must be <"):
        progressive_gear_set(first, top, n, progression_factor=limit)


@pytest.mark.parametrize(
    ("kwargs", "match"),
    [
        pytest.param({"top_ratio": 3.5}, r"`top_ratio` must be < `first_ratio`", id="top-eq"),
        pytest.param({"top_ratio": 4.0}, r"`top_ratio` must be < `first_ratio`", id="top-gt"),
        pytest.param({"gear_count": 1}, "between 2 and 12, got 1", id="one-gear"),
        pytest.param({"gear_count": 13}, "between 2 and 12, got 13", id="thirteen-gears"),
        pytest.param({"gear_count": 5.0}, "must be an integer", id="float-count"),
        pytest.param({"first_ratio": float("nan")}, "`first_ratio` must be finite", id="nan"),
        pytest.param({"top_ratio": float("inf")}, "`top_ratio` must be finite", id="inf"),
        pytest.param({"top_ratio": -0.8}, "`top_ratio` must be finite and > 0", id="negative"),
        pytest.param({"first_ratio": 60.0}, "`first_ratio` must be <= 50", id="huge"),
    ],
)
def test_invalid_gear_set_is_rejected(kwargs: dict[str, Any], match: str) -> None:
    args: dict[str, Any] = {"first_ratio": 3.5, "top_ratio": 0.8, "gear_count": 5, **kwargs}
    with pytest.raises(DrivetrainError, match=match) as info:
        geometric_gear_set(**args)
    assert info.value.parameter == next(iter(kwargs))
    with pytest.raises(DrivetrainError, match=match):
        progressive_gear_set(**args, progression_factor=1.05)


@pytest.mark.parametrize(
    "psi",
    [
        pytest.param(0.95, id="below-one"),
        pytest.param(float("nan"), id="nan"),
        pytest.param(float("inf"), id="inf"),
    ],
)
def test_invalid_progression_factor_is_rejected(psi: float) -> None:
    with pytest.raises(DrivetrainError, match="`progression_factor` must be finite and >= 1"):
        progressive_gear_set(3.5, 0.8, 5, progression_factor=psi)


def test_landing_rpm_is_shift_rpm_times_ratio_step() -> None:
    # closed form (no slip; the final drive cancels): landing = shift * next / current
    ratios = np.array([3.36, 2.07, 1.43, 1.0, 0.84])
    s = shift_landings(ratios, 6800.0)
    assert s.from_gear.tolist() == [1, 2, 3, 4]
    assert_allclose(s.landing_rpm, 6800.0 * ratios[1:] / ratios[:-1], rtol=1e-15)
    assert_allclose(s.steps, ratios[:-1] / ratios[1:], rtol=1e-15)
    assert_allclose(s.landing_rpm, s.shift_rpm / s.steps, rtol=1e-15)
    assert_allclose(s.rpm_drop, 6800.0 * (1.0 - ratios[1:] / ratios[:-1]), rtol=1e-13)
    assert_allclose(s.drop_percent, 100.0 * (1.0 - 1.0 / s.steps), rtol=1e-13)


def test_each_shift_can_have_its_own_shift_rpm() -> None:
    # closed form: 6000 * 2/3 = 4000, 5400 * 1.5/2 = 4050
    s = shift_landings([3.0, 2.0, 1.5], [6000.0, 5400.0])
    assert_allclose(s.landing_rpm, [4000.0, 4050.0], rtol=1e-15)
    assert_allclose(s.rpm_drop, [2000.0, 1350.0], rtol=1e-15)


def test_geometric_set_lands_every_shift_at_the_same_rpm() -> None:
    # closed form: a constant step gives a constant landing speed, shift / step
    g = geometric_gear_set(4.0, 0.8, 6)
    s = shift_landings(g.gear_ratios, 7000.0)
    assert_allclose(s.landing_rpm, np.full(5, 7000.0 / g.steps[0]), rtol=1e-12)


def test_landing_rpm_matches_the_shift_plan_rpm_after() -> None:
    # REFERENCES.md closed form for a linearly falling torque: the plan shifts at
    # n1 = (T0/c) * G1 / (G1 + G2) and lands at n1 * G2 / G1
    curve = torque_curve_from_torque(
        [1000, 4000, 7000], [350, 200, 50], interpolation=Interpolation.LINEAR
    )
    plan = shift_plan(curve, make_drivetrain([3.0, 2.0], 1.0), tire_from_diameter(0.6))
    s = shift_landings([3.0, 2.0], plan.shifts[0].shift_rpm)
    assert_allclose(s.landing_rpm[0], plan.shifts[0].rpm_after, rtol=1e-12)
    assert_allclose(s.landing_rpm[0], 4800.0 * 2.0 / 3.0, rtol=1e-9)


@pytest.mark.parametrize(
    ("ratios", "match"),
    [
        pytest.param([3.0], "2 to 12 forward gears", id="one-gear"),
        pytest.param([[3.0, 2.0]], "2 to 12 forward gears", id="two-dimensional"),
        pytest.param([3.0, 3.0], "strictly descending", id="equal"),
        pytest.param([2.0, 3.0], "strictly descending", id="ascending"),
        pytest.param([3.0, float("nan")], r"gear_ratios\[1\]", id="nan"),
        pytest.param([float(13 - i) for i in range(13)], "2 to 12", id="thirteen-gears"),
    ],
)
def test_invalid_ratios_for_landings_are_rejected(ratios: list[Any], match: str) -> None:
    with pytest.raises(DrivetrainError, match=match):
        shift_landings(ratios, 6000.0)


@pytest.mark.parametrize(
    ("shift_rpm", "match"),
    [
        pytest.param([6000.0], r"one value or one per shift \(2\)", id="wrong-count"),
        pytest.param(-6000.0, r"`shift_rpm\[0\]` must be finite and > 0", id="negative"),
        pytest.param([6000.0, float("nan")], r"`shift_rpm\[1\]` must be finite", id="nan"),
    ],
)
def test_invalid_shift_rpm_is_rejected(shift_rpm: Any, match: str) -> None:
    with pytest.raises(CurveError, match=match):
        shift_landings([3.0, 2.0, 1.5], shift_rpm)
