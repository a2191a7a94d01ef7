"""Wheel-force crossings found on the curve's cubic pieces, against a closed form and the
same root finding on the curve itself."""

from __future__ import annotations

import functools
import itertools

import numpy as np
import pytest
from numpy.testing import assert_allclose

from core import (
    Interpolation,
    TorqueCurve,
    bracketed_crossing,
    force_crossings,
    torque_curve_from_torque,
)
from core.shifts.best import XTOL

T0, C = 520.0, 0.06  # T = T0 - C * n [N*m], invented linear curve
RPM = np.linspace(1000.0, 7000.0, 13)


@pytest.mark.parametrize(
    "interpolation",
    [
        pytest.param(Interpolation.PCHIP, id="pchip"),
        pytest.param(Interpolation.LINEAR, id="linear"),
    ],
)
def test_crossing_of_linear_curve_matches_closed_form(interpolation: Interpolation) -> None:
    # closed form (REFERENCES.md, derived from Newton's second law): for T = T0 - c*n the
    # forces of G1 > G2 cross at n1 = (T0/c) * G1/(G1 + G2)
    curve = torque_curve_from_torque(RPM, T0 - C * RPM, interpolation=interpolation)
    g1, g2 = 3.2, 2.1
    expected = T0 / C * g1 / (g1 + g2)
    a, b = expected - 7.3, expected + 4.1  # a cell holding the crossing

    def gap(n: float) -> float:
        return g1 * curve.torque_scalar(n) - g2 * curve.torque_scalar(n * g2 / g1)

    cell = [np.array([v]) for v in (a, b, gap(a), gap(b))]
    (n,) = force_crossings(curve, [g1], [g2], [g2 / g1], np.array([0]), *cell)
    assert_allclose(n, expected, rtol=1e-12)


def _gap(curve: TorqueCurve, g1: float, g2: float, q: float, n: float) -> float:
    return g1 * curve.torque_scalar(n) - g2 * curve.torque_scalar(n * q)


def test_crossings_equal_the_same_root_finding_on_the_curve() -> None:
    # the pieces are the curve, so each crossing is the one bracketed_crossing finds on the
    # curve itself, the same root where a cell holds several (invented random curves;
    # scan cells as wide as a shift plan's, 1/512 of the range)
    rng = np.random.default_rng(5)
    checked = 0
    for _ in range(40):
        rpm = np.unique(np.round(rng.uniform(800.0, 9000.0, int(rng.integers(4, 120)))))
        torque = np.abs(300.0 + np.cumsum(rng.normal(0.0, 25.0, rpm.size)))
        curve = torque_curve_from_torque(rpm, torque)
        ratios = np.sort(rng.uniform(0.6, 4.5, int(rng.integers(2, 8))))[::-1].tolist()
        for g1, g2 in itertools.pairwise(ratios):
            q = g2 / g1
            gap = functools.partial(_gap, curve, g1, g2, q)
            grid = np.linspace(curve.rpm_min / q, curve.rpm_max, 513).tolist()
            for a, b in itertools.pairwise(grid):
                fa, fb = gap(a), gap(b)
                if not fa > 0.0 > fb:
                    continue
                cell = [np.array([v]) for v in (a, b, fa, fb)]
                (n,) = force_crossings(curve, [g1], [g2], [q], np.array([0]), *cell)
                assert_allclose(n, bracketed_crossing(gap, a, b, fa, fb), rtol=0, atol=XTOL)
                assert a <= n <= b
                checked += 1
    assert checked > 100
