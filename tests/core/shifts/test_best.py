"""Shift points against closed forms and against brute-force minimisation of the time."""

from __future__ import annotations

import functools
import itertools
from collections.abc import Callable

import numpy as np
import pytest
from numpy.testing import assert_allclose
from scipy.integrate import simpson
from scipy.optimize import brentq

from core import (
    CurveError,
    CurveSource,
    Interpolation,
    ShiftReason,
    TorqueCurve,
    best_shifts,
    make_drivetrain,
    shift_plan,
    tire_from_diameter,
    torque_curve_from_power,
    torque_curve_from_torque,
)
from core.shifts.best import SCAN_POINTS, XTOL

T0, C = 520.0, 0.06  # T = T0 - C * n [N*m], invented linear curve
RPM = np.linspace(1000.0, 7000.0, 13)
LINEAR = T0 - C * RPM
TIRE = tire_from_diameter(0.65)


@pytest.mark.parametrize(
    "interpolation",
    [
        pytest.param(Interpolation.PCHIP, id="pchip"),
        pytest.param(Interpolation.LINEAR, id="linear"),
    ],
)
@pytest.mark.parametrize(
    ("g1", "g2", "final"),
    [
        pytest.param(3.2, 2.1, 3.73, id="wide"),
        pytest.param(1.3, 1.0, 4.10, id="close"),
        pytest.param(2.5, 1.6, 2.0, id="short-final"),
    ],
)
def test_crossover_linear_curve_matches_closed_form(
    interpolation: Interpolation, g1: float, g2: float, final: float
) -> None:
    # closed form (REFERENCES.md, derived from Newton's second law): for T = T0 - c*n the
    # wheel forces of overall ratios G1 > G2 cross at n1 = (T0/c) * G1/(G1 + G2), and the
    # engine lands at n1 * G2/G1; the final drive cancels
    curve = torque_curve_from_torque(RPM, LINEAR, interpolation=interpolation)
    plan = shift_plan(curve, make_drivetrain([g1, g2], final), TIRE)
    s = plan.shifts[0]
    expected = T0 / C * g1 / (g1 + g2)
    assert s.reason is ShiftReason.CROSSOVER
    assert_allclose(s.shift_rpm, expected, rtol=1e-3)
    assert_allclose(s.rpm_after, expected * g2 / g1, rtol=1e-3)
    assert_allclose(s.rpm_drop, s.shift_rpm - s.rpm_after, rtol=1e-12)
    assert_allclose(s.force_before_n, s.force_after_n, rtol=1e-6)


def test_every_shift_of_six_speed_matches_closed_form() -> None:
    ratios = [3.6, 2.4, 1.7, 1.3, 1.0, 0.82]
    curve = torque_curve_from_torque(RPM, LINEAR)
    plan = shift_plan(curve, make_drivetrain(ratios, 3.42), TIRE)
    for s, (a, b) in zip(plan.shifts, itertools.pairwise(ratios), strict=True):
        expected = min(T0 / C * a / (a + b), 7000.0)
        assert_allclose(s.shift_rpm, expected, rtol=1e-3)


def test_flat_torque_never_crosses_and_shifts_at_rev_limit() -> None:
    curve = torque_curve_from_torque([1000, 4000, 6500], [300.0, 300.0, 300.0])
    plan = shift_plan(curve, make_drivetrain([3.0, 2.0, 1.4], 3.5), TIRE, rev_limit_rpm=6200)
    assert all(s.reason is ShiftReason.REV_LIMIT for s in plan.shifts)
    assert_allclose([s.shift_rpm for s in plan.shifts], [6200.0, 6200.0], rtol=0)
    assert_allclose(plan.shifts[0].rpm_after, 6200.0 * 2.0 / 3.0, rtol=1e-12)


def test_constant_power_gears_coincide_and_plan_says_so() -> None:
    # constant power P: T(n) G1 = (P/w) G1 = T(n G2/G1) G2, so the forces coincide
    rpm = np.linspace(2000.0, 7000.0, 21)
    curve = torque_curve_from_power(rpm, np.full(rpm.size, 150e3))
    plan = shift_plan(curve, make_drivetrain([3.0, 2.2], 3.5), TIRE)
    s = plan.shifts[0]
    assert s.coincident_rpm is not None
    assert s.coincident_rpm[1] - s.coincident_rpm[0] > 1000.0
    assert any(n.code == "coincident_force" for n in plan.notices)


def _crossing_time(
    torque: Callable[[np.ndarray], np.ndarray],
    g1: float,
    g2: float,
    lo: float,
    hi: float,
    ns: float,
) -> float:
    """Time to cross [lo, hi] shifting at ns, up to constant factors: the integral of
    dv/F evaluated by Simpson's rule on 4001 points per side (scipy.integrate.simpson)."""
    q = g2 / g1
    a = np.linspace(lo, ns, 4001)
    b = np.linspace(ns, hi, 4001)
    return float(simpson(1.0 / (g1 * torque(a)), x=a) + simpson(1.0 / (g2 * torque(b * q)), x=b))


def test_multiple_crossovers_pick_the_quickest_shift() -> None:
    # a curve with a mid-range dip and a second peak: the forces cross more than once, and
    # the chosen shift must be the one brute-force integration of dv/F says is quickest
    rpm = [2000, 2800, 3600, 4400, 5000, 5600, 6200, 6800, 7400]
    torque = [330, 360, 300, 250, 300, 360, 370, 330, 250]
    curve = torque_curve_from_torque(rpm, torque)
    g1, g2 = 2.0, 1.6
    plan = shift_plan(curve, make_drivetrain([g1, g2], 3.9), TIRE)
    s = plan.shifts[0]
    assert s.crossings >= 2
    lo, hi = 2000.0 / (g2 / g1), 7400.0
    grid = np.linspace(lo, hi, 601)
    times = [_crossing_time(curve.torque_at, g1, g2, lo, hi, ns) for ns in grid]
    best = float(grid[int(np.argmin(times))])
    t_chosen = _crossing_time(curve.torque_at, g1, g2, lo, hi, s.shift_rpm)
    assert t_chosen <= min(times) * (1 + 1e-6)
    assert abs(s.shift_rpm - best) <= (hi - lo) / 600 * 1.5


def test_rev_limit_above_curve_is_clipped_with_notice() -> None:
    curve = torque_curve_from_torque(RPM, LINEAR)
    plan = shift_plan(curve, make_drivetrain([3.0, 2.0], 3.5), TIRE, rev_limit_rpm=8000)
    assert plan.rev_limit_rpm == 7000.0
    assert plan.notices[0].code == "rev_limit_clipped"


def test_rev_limit_below_curve_start_is_rejected() -> None:
    curve = torque_curve_from_torque(RPM, LINEAR)
    with pytest.raises(CurveError, match="rev_limit_rpm"):
        shift_plan(curve, make_drivetrain([3.0, 2.0], 3.5), TIRE, rev_limit_rpm=900)


def test_chassis_curve_is_not_reduced_by_efficiency() -> None:
    curve = torque_curve_from_torque(RPM, LINEAR, source=CurveSource.CHASSIS)
    plan = shift_plan(curve, make_drivetrain([3.0, 2.0], 3.5, efficiency=0.85), TIRE)
    assert not plan.efficiency_applied
    g = plan.gears[0]
    assert_allclose(g.wheel_torque_nm, g.engine_torque_nm * 3.0 * 3.5, rtol=1e-12)
    assert any(n.code == "efficiency_not_applied" for n in plan.notices)


def test_wide_gap_warns_when_engine_lands_below_curve() -> None:
    curve = torque_curve_from_torque([3000, 5000, 7000], [300.0, 320.0, 300.0])
    plan = shift_plan(curve, make_drivetrain([4.0, 1.5], 3.5), TIRE)
    assert plan.shifts[0].reason is ShiftReason.REV_LIMIT
    assert any(n.code == "gear_gap" for n in plan.notices)


def _force_gap(curve: TorqueCurve, g1: float, g2: float, n: float) -> float:
    return g1 * curve.torque_scalar(n) - g2 * curve.torque_scalar(n * g2 / g1)


def test_refined_crossings_agree_with_scipy_brentq_on_random_curves() -> None:
    # reference: scipy.optimize.brentq with xtol=1e-7 on the same bracketing scan cell; both
    # promise the crossing to 1e-7 rpm, so they agree to twice that (invented random curves)
    rng = np.random.default_rng(12)
    checked = 0
    for _ in range(60):
        rpm = np.unique(np.round(rng.uniform(800.0, 9000.0, int(rng.integers(4, 60)))))
        torque = np.abs(300.0 + np.cumsum(rng.normal(0.0, 25.0, rpm.size)))
        curve = torque_curve_from_torque(rpm, torque)
        ratios = np.sort(rng.uniform(0.6, 4.5, int(rng.integers(2, 8))))[::-1].tolist()
        plan = shift_plan(curve, make_drivetrain(ratios, 3.5), TIRE)
        for s, (g1, g2) in zip(plan.shifts, itertools.pairwise(ratios), strict=True):
            if s.reason is not ShiftReason.CROSSOVER or s.coincident_rpm is not None:
                continue
            gap = functools.partial(_force_gap, curve, g1, g2)
            grid = np.linspace(curve.rpm_min * g1 / g2, plan.rev_limit_rpm, SCAN_POINTS)
            j = int(np.clip(np.searchsorted(grid, s.shift_rpm) - 1, 0, SCAN_POINTS - 2))
            if not gap(grid[j]) > 0.0 >= gap(grid[j + 1]):
                continue  # the shift sits on a scan point
            expected = brentq(gap, grid[j], grid[j + 1], xtol=XTOL)
            assert_allclose(s.shift_rpm, expected, rtol=0.0, atol=2.0 * XTOL)
            checked += 1
    assert checked > 40


def test_intersections_count_both_ways_and_overtakes_are_the_falling_roots() -> None:
    # closed form: with efforts whose difference is (n - 3000)*(n - 5000)/1e6, the curves
    # intersect twice (roots of the quadratic); the next gear overtakes at 3000 only (the
    # difference falls through zero there) and falls back behind at 5000
    def efforts(n: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        nxt = np.full_like(n, 10.0)
        return nxt + (n - 3000.0) * (n - 5000.0) / 1e6, nxt

    def diff(_: int, n: float) -> float:
        return (n - 3000.0) * (n - 5000.0) / 1e6

    (choice,) = best_shifts(efforts, diff, [1500.0], [7000.0])
    assert choice.intersections == 2
    assert choice.crossings == 1
    assert_allclose(choice.overtake_rpm, [3000.0], rtol=1e-9)


def test_linear_curve_plan_reports_one_intersection_at_the_closed_form_crossover() -> None:
    # closed form (REFERENCES.md): forces of G1 > G2 with T = T0 - c*n cross once, at
    # n1 = (T0/c)*G1/(G1 + G2); the plan reports that as the single overtaking point
    curve = torque_curve_from_torque(RPM, LINEAR, interpolation=Interpolation.LINEAR)
    s = shift_plan(curve, make_drivetrain([3.2, 2.1], 3.73), TIRE).shifts[0]
    expected = T0 / C * 3.2 / (3.2 + 2.1)
    assert (s.crossings, s.intersections) == (1, 1)
    assert_allclose(s.overtake_rpm, [expected], rtol=1e-6)


def test_flat_torque_reports_no_intersection_and_no_overtake() -> None:
    # flat torque: force ~ overall ratio, so the lower gear is stronger everywhere
    curve = torque_curve_from_torque([1000.0, 4000.0, 7000.0], [300.0] * 3)
    s = shift_plan(curve, make_drivetrain([3.0, 2.0], 3.5), TIRE).shifts[0]
    assert (s.reason, s.crossings, s.intersections, s.overtake_rpm) == (
        ShiftReason.REV_LIMIT,
        0,
        0,
        (),
    )


def _road_loaded_efforts(
    curve: TorqueCurve, ratios: np.ndarray, drag: float, rows: slice = slice(None)
) -> tuple[Callable[..., tuple[np.ndarray, np.ndarray]], Callable[[int, float], float]]:
    """Efforts of the gear changes ``rows`` (force less an invented road load) and the
    force gap of one change at one speed."""
    step = ratios[1:] / ratios[:-1]
    first = rows.start or 0

    def efforts(n: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        road = drag * (n / ratios[:-1][rows, None]) ** 2 / 1000.0
        cur = ratios[:-1][rows, None] * curve.torque_at(n) - road
        return cur, ratios[1:][rows, None] * curve.torque_at(n * step[rows, None]) - road

    def diff(k: int, n: float) -> float:
        k += first
        return float(ratios[k] * curve.torque_scalar(n)) - float(
            ratios[k + 1] * curve.torque_scalar(n * step[k])
        )

    return efforts, diff


def test_gear_changes_found_together_equal_each_found_alone() -> None:
    # every gear change is scanned, cut, banded and counted in one array: rows must not
    # leak into each other, so each change found alone gives the same choice (invented
    # curves; road load makes some gears stall and some ranges empty)
    rng = np.random.default_rng(7)
    for trial in range(40):
        rpm = np.unique(np.round(rng.uniform(800.0, 9000.0, int(rng.integers(4, 40)))))
        torque = np.abs(300.0 + np.cumsum(rng.normal(0.0, 25.0, rpm.size))) + 1.0
        if trial % 5 == 0:  # constant power: coincident bands
            curve = torque_curve_from_power(rpm, np.full(rpm.size, 150e3))
        else:
            curve = torque_curve_from_torque(rpm, torque)
        ratios = np.sort(rng.uniform(0.6, 4.5, int(rng.integers(3, 9))))[::-1]
        drag = 0.0 if trial % 2 else float(rng.uniform(0.0, 400.0))
        low = curve.rpm_min / (ratios[1:] / ratios[:-1])
        high = np.full(low.size, curve.rpm_max * rng.uniform(0.7, 1.0))
        efforts, diff = _road_loaded_efforts(curve, ratios, drag)
        together = best_shifts(efforts, diff if drag == 0.0 else None, low, high)
        for k in range(low.size):
            one, one_diff = _road_loaded_efforts(curve, ratios, drag, slice(k, k + 1))
            (alone,) = best_shifts(
                one, one_diff if drag == 0.0 else None, low[k : k + 1], high[k : k + 1]
            )
            assert together[k] == alone
