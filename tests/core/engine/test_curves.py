"""Torque curves: validation, interpolation, power conversion."""

from __future__ import annotations

import math

import numpy as np
import pytest
from numpy.testing import assert_allclose

from core import CurveError, Interpolation, torque_curve_from_power, torque_curve_from_torque
from service.units import Quantity, UnitSystem, from_si, to_si

RPM = [1000.0, 2000.0, 3000.0, 4000.0, 5000.0]
TORQUE = [200.0, 260.0, 300.0, 280.0, 220.0]


def test_power_from_torque_matches_5252_rule() -> None:
    # hp = lbf*ft * rpm / 5252.113 (REFERENCES.md: 33000/(2*pi); common practice)
    curve = torque_curve_from_torque(RPM, to_si(np.array(TORQUE), Quantity.TORQUE, UnitSystem.US))
    hp = from_si(curve.power_at(RPM), Quantity.POWER, UnitSystem.US)
    assert_allclose(hp, np.array(TORQUE) * np.array(RPM) / 5252.113, rtol=1e-6)


def test_power_from_torque_matches_metric_rule() -> None:
    # kW = N*m * rpm / 9549.297 (REFERENCES.md: 60000/(2*pi))
    curve = torque_curve_from_torque(RPM, TORQUE)
    assert_allclose(curve.power_at(RPM) / 1000.0, np.array(TORQUE) * RPM / 9549.297, rtol=1e-6)


def test_torque_and_power_cross_at_5252_rpm_in_us_units() -> None:
    # common practice: lbf*ft and hp curves cross at 5252 rpm
    curve = torque_curve_from_torque([4000.0, 5252.113, 6000.0], [300.0, 300.0, 300.0])
    hp = from_si(curve.power_at([5252.113]), Quantity.POWER, UnitSystem.US)
    lbft = from_si(curve.torque_at([5252.113]), Quantity.TORQUE, UnitSystem.US)
    assert_allclose(hp, lbft, rtol=1e-6)


def test_curve_from_power_recovers_torque() -> None:
    power = np.array(TORQUE) * np.array(RPM) * 2 * math.pi / 60
    curve = torque_curve_from_power(RPM, power)
    assert_allclose(curve.torque_nm, TORQUE, rtol=1e-12)


def test_pchip_passes_through_samples_without_overshoot() -> None:
    curve = torque_curve_from_torque(RPM, TORQUE)
    assert_allclose(curve.torque_at(RPM), TORQUE, rtol=1e-12)
    fine = np.linspace(RPM[0], RPM[-1], 2001)
    assert curve.torque_at(fine).max() <= max(TORQUE) * (1 + 1e-12)


def test_linear_interpolation_is_piecewise_linear() -> None:
    curve = torque_curve_from_torque(RPM, TORQUE, interpolation=Interpolation.LINEAR)
    assert_allclose(curve.torque_at([1500.0, 4500.0]), [230.0, 250.0], rtol=1e-12)


def test_speeds_outside_curve_are_clipped_not_extrapolated() -> None:
    curve = torque_curve_from_torque(RPM, TORQUE)
    assert_allclose(curve.torque_at([500.0, 9000.0]), [200.0, 220.0], rtol=1e-12)


def test_peaks_are_found_between_samples() -> None:
    curve = torque_curve_from_torque(RPM, TORQUE)
    assert 2900.0 <= curve.peak_torque_rpm() <= 3500.0
    assert curve.peak_power_rpm() > curve.peak_torque_rpm()


@pytest.mark.parametrize(
    ("rpm", "torque", "match"),
    [
        pytest.param([1000, 2000], [1, 2], "at least 3", id="too-few-points"),
        pytest.param([1000, 3000, 2000], [1, 2, 3], "strictly increasing", id="not-increasing"),
        pytest.param([1000, 2000, 2000], [1, 2, 3], "strictly increasing", id="repeated-rpm"),
        pytest.param([1000, 2000, 3000], [1, -2, 3], r"torque_nm\[1\]", id="negative-torque"),
        pytest.param([1000, 2000, 3000], [1, math.nan, 3], "finite", id="nan-torque"),
        pytest.param([0, 2000, 3000], [1, 2, 3], r"rpm\[0\]", id="zero-rpm"),
        pytest.param([1000, 2000, 3000], [1, 2], "one value per rpm", id="length-mismatch"),
        pytest.param([1000, 2000, 3000], [0, 0, 0], "at least one value > 0", id="all-zero"),
    ],
)
def test_invalid_curve_is_rejected(rpm: list[float], torque: list[float], match: str) -> None:
    with pytest.raises(CurveError, match=match):
        torque_curve_from_torque(rpm, torque)


def test_invalid_curve_error_names_the_index() -> None:
    with pytest.raises(CurveError) as info:
        torque_curve_from_torque([1000, 3000, 2000, 4000], [1, 2, 3, 4])
    assert info.value.parameter == "rpm[2]"


@pytest.mark.parametrize(
    "torque",
    [
        pytest.param(TORQUE, id="hump"),
        pytest.param([300.0, 300.0, 310.0, 290.0, 290.0], id="flat-stretches"),
        pytest.param([100.0, 250.0, 260.0, 400.0, 100.0], id="steep-edges"),
        pytest.param([400.0, 300.0, 200.0, 150.0, 10.0], id="falling"),
    ],
)
def test_pchip_fill_matches_scipy_pchip_interpolator(torque: list[float]) -> None:
    # reference library: scipy.interpolate.PchipInterpolator (Fritsch-Carlson slopes)
    from scipy.interpolate import PchipInterpolator

    rpm = np.array([1000.0, 1800.0, 3000.0, 4100.0, 5000.0])
    curve = torque_curve_from_torque(rpm, torque)
    fine = np.linspace(1000.0, 5000.0, 997)
    expected = np.maximum(PchipInterpolator(rpm, torque)(fine), 0.0)
    assert_allclose(curve.torque_at(fine), expected, rtol=1e-12, atol=1e-9)
    assert_allclose([curve.torque_scalar(n) for n in fine[::50]], expected[::50], rtol=1e-12)


@pytest.mark.parametrize(
    "interpolation",
    [
        pytest.param(Interpolation.PCHIP, id="pchip"),
        pytest.param(Interpolation.LINEAR, id="linear"),
    ],
)
def test_compiled_torque_equals_torque_at_to_rounding(interpolation: Interpolation) -> None:
    # the same pieces summed by powers instead of nested: equal to a few units in the
    # last place, any shape, clipped outside the curve (invented random curve)
    rng = np.random.default_rng(3)
    rpm = np.unique(np.round(rng.uniform(800.0, 9000.0, 40)))
    curve = torque_curve_from_torque(
        rpm, rng.uniform(50.0, 500.0, rpm.size), interpolation=interpolation
    )
    n = rng.uniform(500.0, 9500.0, (3, 200))
    assert_allclose(curve.torque_fast(n), curve.torque_at(n.ravel()).reshape(n.shape), rtol=1e-13)
    assert curve.torque_fast(n).min() >= 0.0


def test_pieces_give_torque_scalar_by_nested_sum() -> None:
    # the pieces are the fill itself: evaluated as documented they give torque_scalar
    curve = torque_curve_from_torque(RPM, TORQUE)
    xs, coef = curve.pieces
    for n in np.linspace(1000.0, 4999.0, 37).tolist():
        i = min(int(np.searchsorted(xs, n, side="right")) - 1, len(xs) - 2)
        c0, c1, c2, c3 = coef[i]
        dx = n - xs[i]
        assert ((c0 * dx + c1) * dx + c2) * dx + c3 == curve.torque_scalar(n)
