"""Tests of core.logs.crossover: fits of acceleration against speed, their crossover, and the
verdict rule, against closed forms (two straight lines cross where a1 + b1*u = a2 + b2*u)."""

from __future__ import annotations

import numpy as np
import pytest
from numpy.testing import assert_allclose

from core.logs.crossover import (
    CrossoverFit,
    ShiftVerdict,
    VerdictBasis,
    acceleration_fit,
    crossover,
    verdict,
)


def test_fit_recovers_a_quadratic_and_ignores_an_outlier() -> None:
    v = np.linspace(20.0, 30.0, 40)
    a = 4.0 - 0.05 * (v - 25.0) - 0.01 * (v - 25.0) ** 2
    a_spiked = a.copy()
    a_spiked[7] += 3.0  # a driveline shunt
    coef = acceleration_fit(v, a_spiked, 25.0)
    assert coef is not None
    u = v / 25.0 - 1.0
    fitted = coef[0] + coef[1] * u + coef[2] * u**2
    mask = np.arange(v.size) != 7
    assert_allclose(fitted[mask], a[mask], rtol=1e-6)


@pytest.mark.parametrize(
    ("v", "degree"),
    [
        pytest.param(np.linspace(24.0, 25.0, 10), 1, id="narrow-span-line"),
        pytest.param(np.linspace(20.0, 25.0, 30), 2, id="wide-span-quadratic"),
    ],
)
def test_fit_degree_follows_samples_and_span(v: np.ndarray, degree: int) -> None:
    coef = acceleration_fit(v, 3.0 + 0.01 * (v - 25.0) ** 2, 25.0)
    assert coef is not None
    assert (coef[2] != 0.0) == (degree == 2)


@pytest.mark.parametrize(
    "v",
    [
        pytest.param(np.linspace(20.0, 25.0, 5), id="five-samples"),
        pytest.param(np.linspace(24.9, 25.0, 30), id="span-under-3-percent"),
    ],
)
def test_fit_needs_samples_and_span(v: np.ndarray) -> None:
    assert acceleration_fit(v, np.ones(v.size), 25.0) is None


def test_two_lines_cross_at_the_closed_form_speed() -> None:
    # a_i = 3 - 4u, a_j = 2.5 - 2u cross at u = 0.25: 20 m/s shift -> 25 m/s crossover
    fit = crossover(np.array([3.0, -4.0, 0.0]), np.array([2.5, -2.0, 0.0]), 20.0)
    assert fit.current_stronger
    assert fit.speed_m_s is not None
    assert_allclose(fit.speed_m_s, 25.0, rtol=1e-12)


def test_crossing_below_the_shift_is_found_when_the_next_gear_is_already_stronger() -> None:
    # a_i = 2 - 6u, a_j = 2.6 - 3u cross at u = -0.2
    fit = crossover(np.array([2.0, -6.0, 0.0]), np.array([2.6, -3.0, 0.0]), 30.0)
    assert not fit.current_stronger
    assert fit.speed_m_s is not None
    assert_allclose(fit.speed_m_s, 24.0, rtol=1e-12)


def test_parallel_fits_have_no_crossover() -> None:
    fit = crossover(np.array([3.0, -1.0, 0.0]), np.array([2.0, -1.0, 0.0]), 20.0)
    assert fit.speed_m_s is None and fit.current_stronger


@pytest.mark.parametrize(
    ("fit", "limit", "expected", "basis"),
    [
        pytest.param(CrossoverFit(25.0, True, 3.0, 2.5), None, "early", "crossover", id="early"),
        pytest.param(CrossoverFit(16.0, False, 2.0, 2.6), None, "late", "crossover", id="late"),
        pytest.param(
            CrossoverFit(20.4, True, 3.0, 2.9), None, "about_right", "crossover", id="in-band"
        ),
        pytest.param(
            CrossoverFit(26.0, True, 3.0, 2.5), 20.3, "about_right", "rev_limit", id="limit"
        ),
        pytest.param(
            CrossoverFit(None, True, 3.0, 2.0), None, "early", "beyond_range", id="above-range"
        ),
        pytest.param(
            CrossoverFit(None, False, 2.0, 3.0), None, "late", "beyond_range", id="below-range"
        ),
        pytest.param(
            CrossoverFit(30.0, True, 2.51, 2.50), None, "about_right", "crossover", id="alike"
        ),
    ],
)
def test_verdict_rule(fit: CrossoverFit, limit: float | None, expected: str, basis: str) -> None:
    result, used, _, _ = verdict(20.0, fit, limit, 0.03)
    assert result is ShiftVerdict(expected)
    assert used is VerdictBasis(basis)
