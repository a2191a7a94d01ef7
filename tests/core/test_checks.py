"""The scalar argument checks: each raises the caller's error naming the argument."""

from __future__ import annotations

import math

import pytest

from core.checks import require_finite, require_non_negative, require_positive, require_range
from core.errors import CorrectionError, DrivetrainError, VehicleError


def test_a_value_that_passes_comes_back_as_a_float() -> None:
    assert require_positive(3, "final_drive_ratio", DrivetrainError) == 3.0
    assert isinstance(require_range(1, "share", 0.0, 1.0, VehicleError), float)
    assert require_non_negative(0.0, "grade", VehicleError) == 0.0
    assert require_finite(-2.5, "offset", VehicleError) == -2.5


@pytest.mark.parametrize(
    ("value", "match"),
    [
        pytest.param(0.0, r"`mass_kg` must be finite and > 0, got 0.0", id="zero"),
        pytest.param(-1.0, r"`mass_kg` must be finite and > 0, got -1.0", id="negative"),
        pytest.param(math.nan, r"`mass_kg` must be finite and > 0, got nan", id="nan"),
        pytest.param(math.inf, r"`mass_kg` must be finite and > 0, got inf", id="inf"),
    ],
)
def test_require_positive_names_the_argument_and_the_limit(value: float, match: str) -> None:
    with pytest.raises(VehicleError, match=match) as info:
        require_positive(value, "mass_kg", VehicleError)
    assert info.value.parameter == "mass_kg"


def test_require_positive_with_an_upper_bound_rejects_a_value_above_it() -> None:
    with pytest.raises(DrivetrainError, match=r"`gear_ratios\[0\]` must be <= 50, got 51.0"):
        require_positive(51.0, "gear_ratios[0]", DrivetrainError, at_most=50.0)


def test_require_non_negative_accepts_zero_and_rejects_below() -> None:
    with pytest.raises(VehicleError, match=r"`grade` must be finite and >= 0, got -0\.1"):
        require_non_negative(-0.1, "grade", VehicleError)


@pytest.mark.parametrize(
    ("value", "match"),
    [
        pytest.param(math.nan, "`elevation_m` must be finite, got nan", id="nan"),
        pytest.param(7000.0, r"`elevation_m` must lie in \[-500, 6000\], got 7000", id="above"),
        pytest.param(-501.0, r"`elevation_m` must lie in \[-500, 6000\], got -501", id="below"),
    ],
)
def test_require_range_raises_the_callers_error(value: float, match: str) -> None:
    with pytest.raises(CorrectionError, match=match) as info:
        require_range(value, "elevation_m", -500.0, 6000.0, CorrectionError)
    assert info.value.parameter == "elevation_m"


def test_require_range_includes_both_ends() -> None:
    assert require_range(-500.0, "elevation_m", -500.0, 6000.0, CorrectionError) == -500.0
    assert require_range(6000.0, "elevation_m", -500.0, 6000.0, CorrectionError) == 6000.0
