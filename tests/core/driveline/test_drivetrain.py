"""Drivetrain validation and overall ratios."""

from __future__ import annotations

from typing import Any

import pytest
from numpy.testing import assert_allclose

from core import DrivetrainError, make_drivetrain


def test_overall_ratio_is_product_of_reductions() -> None:
    d = make_drivetrain([3.0, 1.5], 3.73, extra_reduction=2.72)
    assert_allclose(d.overall_ratios, [3.0 * 3.73 * 2.72, 1.5 * 3.73 * 2.72], rtol=1e-12)


def test_single_efficiency_applies_to_every_gear() -> None:
    d = make_drivetrain([3.0, 2.0, 1.0], 3.5, efficiency=0.9)
    assert_allclose(d.efficiency, [0.9, 0.9, 0.9], rtol=0)


@pytest.mark.parametrize(
    ("kwargs", "match"),
    [
        pytest.param({"gear_ratios": []}, "1 to 12", id="no-gears"),
        pytest.param(
            {"gear_ratios": [float(13 - i) for i in range(13)]}, "1 to 12", id="thirteen-gears"
        ),
        pytest.param({"gear_ratios": [3.0, 3.0]}, "strictly descending", id="equal-gears"),
        pytest.param({"gear_ratios": [2.0, 3.0]}, "strictly descending", id="ascending"),
        pytest.param({"gear_ratios": [3.0, -1.0]}, r"gear_ratios\[1\]", id="negative-ratio"),
        pytest.param({"final_drive_ratio": 0.0}, "final_drive_ratio", id="zero-final"),
        pytest.param({"efficiency": 1.2}, r"efficiency\[0\]", id="efficiency-above-one"),
        pytest.param({"efficiency": [0.9]}, "one per gear", id="efficiency-length"),
    ],
)
def test_invalid_drivetrain_is_rejected(kwargs: dict[str, Any], match: str) -> None:
    args: dict[str, Any] = {"gear_ratios": [3.0, 2.0], "final_drive_ratio": 3.5, **kwargs}
    with pytest.raises(DrivetrainError, match=match):
        make_drivetrain(**args)
