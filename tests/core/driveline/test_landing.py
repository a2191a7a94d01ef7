"""Where shifts land on a torque curve: distance from the peaks and the landing band."""

from __future__ import annotations

import numpy as np
import pytest
from numpy.testing import assert_allclose

from core.driveline.landing import LandingBand, landing_analysis
from core.driveline.spacing import geometric_gear_set, shift_landings
from core.engine.curves import Interpolation, TorqueCurve, torque_curve_from_torque
from core.errors import CurveError, DrivetrainError, GearworkError


def tent_curve() -> TorqueCurve:
    # invented demo curve: linear 200 -> 300 -> 200 N*m over 1000 -> 4000 -> 7000 rpm
    return torque_curve_from_torque(
        [1000, 4000, 7000], [200, 300, 200], interpolation=Interpolation.LINEAR
    )


def test_peaks_of_a_linear_curve_match_closed_form() -> None:
    # closed form: torque peaks at the 4000 rpm sample; above it T = 433.33 - n/30, so
    # P ~ n * T peaks at n = 433.33 * 15 = 6500 rpm
    a = landing_analysis(tent_curve(), [3.0, 2.0, 1.5], 6000.0)
    assert a.peak_torque_rpm == 4000.0
    assert_allclose(a.peak_power_rpm, 6500.0, rtol=1e-5)


def test_distance_from_the_peaks_matches_closed_form() -> None:
    # closed form: landings 6000 * 2/3 = 4000 and 6000 * 1.5/2 = 4500 rpm
    a = landing_analysis(tent_curve(), [3.0, 2.0, 1.5], 6000.0)
    assert_allclose(a.landings.landing_rpm, [4000.0, 4500.0], rtol=1e-15)
    assert_allclose(a.from_torque_peak_rpm, [0.0, 500.0], atol=1e-9)
    assert_allclose(a.from_torque_peak_percent, [0.0, 12.5], atol=1e-9)
    assert_allclose(a.from_power_peak_rpm, [-2500.0, -2000.0], rtol=1e-5)
    assert_allclose(a.from_power_peak_percent, [-2500 / 65, -2000 / 65], rtol=1e-5)


def test_landings_agree_with_shift_landings() -> None:
    g = geometric_gear_set(3.9, 0.8, 6)
    a = landing_analysis(tent_curve(), g.gear_ratios, 6800.0)
    s = shift_landings(g.gear_ratios, 6800.0)
    assert_allclose(a.landings.landing_rpm, s.landing_rpm, rtol=0)
    assert_allclose(a.landing_torque_nm, tent_curve().torque_at(s.landing_rpm), rtol=1e-15)
    assert_allclose(a.landing_power_w, tent_curve().power_at(s.landing_rpm), rtol=1e-15)


def test_default_band_runs_from_torque_peak_to_power_peak() -> None:
    # landings 6000 * [2/3.5, 1.5/2] = [3428.6, 4500] rpm: the first falls below the torque peak
    a = landing_analysis(tent_curve(), [3.5, 2.0, 1.5], 6000.0)
    assert a.band_low_rpm == 4000.0
    assert_allclose(a.band_high_rpm, 6500.0, rtol=1e-5)
    assert a.in_band.tolist() == [False, True]


def test_band_edges_count_as_inside() -> None:
    a = landing_analysis(tent_curve(), [3.0, 2.0, 1.5], 6000.0, band=(4000.0, 4500.0))
    assert a.in_band.tolist() == [True, True]


def test_explicit_band_is_used() -> None:
    a = landing_analysis(tent_curve(), [3.0, 2.0, 1.5], 6000.0, band=(4200.0, 5000.0))
    assert (a.band_low_rpm, a.band_high_rpm) == (4200.0, 5000.0)
    assert a.in_band.tolist() == [False, True]


def test_curve_range_band_flags_a_landing_off_the_curve() -> None:
    # closed form: 1500 * 1/3 = 500 rpm, below the curve's first point (1000 rpm)
    a = landing_analysis(tent_curve(), [3.0, 1.0], 1500.0, band=LandingBand.CURVE_RANGE)
    assert (a.band_low_rpm, a.band_high_rpm) == (1000.0, 7000.0)
    assert a.in_band.tolist() == [False]
    assert [n.code for n in a.notices] == ["landing_below_curve"]
    assert_allclose(a.landing_torque_nm, [200.0], rtol=1e-15)


def test_shift_above_the_curve_is_noticed() -> None:
    a = landing_analysis(tent_curve(), [3.0, 2.0, 1.5], [7500.0, 6000.0])
    assert [n.code for n in a.notices] == ["shift_above_curve"]
    assert "1-2" in a.notices[0].message
    assert a.notices[0].parameter == "shift_rpm"


def test_landings_on_the_curve_give_no_notice() -> None:
    a = landing_analysis(tent_curve(), [3.0, 2.0, 1.5], 6000.0)
    assert a.notices == ()
    assert a.in_band.dtype == np.bool_


@pytest.mark.parametrize(
    ("band", "match"),
    [
        pytest.param((5000.0, 4000.0), r"`band\[1\]` must be >= `band\[0\]`", id="reversed"),
        pytest.param((-1.0, 4000.0), r"`band\[0\]` must be finite and > 0", id="negative"),
        pytest.param((4000.0, float("nan")), r"`band\[1\]` must be finite", id="nan"),
    ],
)
def test_invalid_band_is_rejected(band: tuple[float, float], match: str) -> None:
    with pytest.raises(CurveError, match=match):
        landing_analysis(tent_curve(), [3.0, 2.0], 6000.0, band=band)


@pytest.mark.parametrize(
    ("ratios", "shift_rpm", "error", "match"),
    [
        pytest.param([2.0, 3.0], 6000.0, DrivetrainError, "strictly descending", id="ascending"),
        pytest.param([3.0, 2.0], 0.0, CurveError, r"shift_rpm\[0\]", id="zero-shift-rpm"),
    ],
)
def test_invalid_set_or_shift_rpm_is_rejected(
    ratios: list[float], shift_rpm: float, error: type[GearworkError], match: str
) -> None:
    with pytest.raises(error, match=match):
        landing_analysis(tent_curve(), ratios, shift_rpm)
