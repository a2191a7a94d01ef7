"""POST /v1/comparison with a variant carrying its own engine curve: before and after a tune.

The demo (tests/data/demo_before_after_metric.json) is an invented car and invented pulls.
"""

from __future__ import annotations

import copy
import math
from typing import Any

import numpy as np
import pint
import pytest
from numpy.testing import assert_allclose
from scipy.interpolate import PchipInterpolator

from tests.conftest import ApiClient, load_demo

URL = "/v1/comparison"
UREG: pint.UnitRegistry[float] = pint.UnitRegistry()


@pytest.fixture
def demo() -> dict[str, Any]:
    return load_demo("demo_before_after_metric")


def _post(api: ApiClient, body: dict[str, Any]) -> dict[str, Any]:
    r = api.post(URL, json=body)
    assert r.status_code == 200, r.text
    data: dict[str, Any] = r.json()
    return data


def _peak_power_kw(rpm: list[float], torque: list[float]) -> tuple[float, float]:
    """Peak of T(n) * 2*pi*n/60 on a dense grid of scipy's PCHIP (reference library)."""
    grid = np.linspace(rpm[0], rpm[-1], 200_001)
    power = PchipInterpolator(rpm, torque)(grid) * grid * 2.0 * math.pi / 60.0 / 1000.0
    k = int(np.argmax(power))
    return float(power[k]), float(grid[k])


def test_after_tune_curve_gives_peak_deltas_against_the_before_curve(
    api: ApiClient, demo: dict[str, Any]
) -> None:
    body = _post(api, demo)
    before, after = body["setups"]
    assert after["changes"] == ["curve"]
    # A monotone cubic (Fritsch and Carlson 1980; scipy PchipInterpolator) has its extrema
    # at the data points, so the peak torque is the largest point.
    assert after["engine"]["peak_torque"] == pytest.approx(342.0)
    assert after["delta"]["peak_torque"] == pytest.approx(342.0 - 300.0)
    assert after["delta"]["peak_torque_rpm"] == pytest.approx(0.0)
    p0, n0 = _peak_power_kw(demo["engine"]["curve"]["rpm"], demo["engine"]["curve"]["torque"])
    curve = demo["variants"][0]["curve"]
    p1, n1 = _peak_power_kw(curve["rpm"], curve["torque"])
    assert_allclose(before["engine"]["peak_power"], p0, rtol=1e-4)
    assert_allclose(after["engine"]["peak_power"], p1, rtol=1e-4)
    assert_allclose(after["delta"]["peak_power"], p1 - p0, atol=0.02)
    assert_allclose(after["delta"]["peak_power_rpm"], n1 - n0, atol=2.0)


def test_more_torque_everywhere_runs_quicker_and_the_run_deltas_say_so(
    api: ApiClient, demo: dict[str, Any]
) -> None:
    before, after = _post(api, demo)["setups"]
    d = after["delta"]
    assert d["quarter_mile_elapsed"] < 0 and d["quarter_mile_trap_speed"] > 0
    assert d["top_speed"] > 0
    assert_allclose(
        d["quarter_mile_elapsed"],
        after["run"]["quarter_mile"]["elapsed"] - before["run"]["quarter_mile"]["elapsed"],
        atol=2e-3,
    )
    assert d["speed_at_rev_limit"] == [0.0] * 6  # same gearing, same rev limit


def test_both_curves_are_in_the_response_and_the_summary(
    api: ApiClient, demo: dict[str, Any]
) -> None:
    body = _post(api, demo)
    before, after = body["setups"]
    assert before["engine"]["curve"]["torque"] == demo["engine"]["curve"]["torque"]
    assert after["engine"]["curve"]["torque"] == demo["variants"][0]["curve"]["torque"]
    rpm = np.array(after["engine"]["curve"]["rpm"])
    torque = np.array(after["engine"]["curve"]["torque"])
    assert_allclose(after["engine"]["curve"]["power"], torque * rpm / 9549.297, atol=1e-3)
    summary = body["summary"]
    assert "Engine curves" in summary
    assert "after tune     342.0 @  4000" in summary
    assert all(len(line) <= 80 for line in summary.splitlines())


def test_a_variant_without_its_own_curve_uses_the_base_curve(
    api: ApiClient, demo: dict[str, Any]
) -> None:
    demo["variants"].append({"name": "4.10 axle", "final_drive_ratio": 4.10})
    axle = _post(api, demo)["setups"][2]
    assert axle["engine"]["curve"] is None
    assert axle["delta"]["peak_torque"] == 0.0 and axle["delta"]["peak_power"] == 0.0


def test_metric_and_us_before_and_after_agree(api: ApiClient, demo: dict[str, Any]) -> None:
    # N*m -> lbf*ft and kW -> hp with pint's definitions.
    nm_per_lbft = UREG.Quantity(1.0, "lbf*ft").to("N*m").magnitude
    us = copy.deepcopy(demo)
    us["units"] = "us"
    for curve in (us["engine"]["curve"], us["variants"][0]["curve"]):
        curve["torque"] = [t / nm_per_lbft for t in curve["torque"]]
    v = us["vehicle"]
    v["mass"] = UREG.Quantity(1480, "kg").to("lb").magnitude
    v["wheelbase"], v["cg_height"] = 2640 / 25.4, 520 / 25.4
    v["road_load"]["frontal_area"] = UREG.Quantity(2.2, "m**2").to("ft**2").magnitude
    v["air"] = {"temperature": 68.0, "altitude": 100 / 0.3048, "relative_humidity": 50}
    us["cruise_speeds"] = [100 / 1.609344]
    metric_delta = _post(api, demo)["setups"][1]["delta"]
    us_delta = _post(api, us)["setups"][1]["delta"]
    kw_per_hp = UREG.Quantity(1.0, "hp").to("kW").magnitude
    assert_allclose(us_delta["peak_torque"] * nm_per_lbft, metric_delta["peak_torque"], 1e-4)
    assert_allclose(us_delta["peak_power"] * kw_per_hp, metric_delta["peak_power"], rtol=1e-3)
    assert_allclose(
        us_delta["quarter_mile_elapsed"], metric_delta["quarter_mile_elapsed"], atol=2e-3
    )


def test_a_chassis_curve_beside_an_engine_curve_is_flagged(
    api: ApiClient, demo: dict[str, Any]
) -> None:
    demo["variants"][0]["curve"]["source"] = "chassis"
    after = _post(api, demo)["setups"][1]
    flagged = [w for w in after["warnings"] if w["code"] == "curve_source_differs"]
    assert flagged and flagged[0]["field"] == "variants[0].curve"
    assert after["engine"]["source"] == "chassis"


def test_a_bad_variant_curve_is_422_naming_the_variant_field(
    api: ApiClient, demo: dict[str, Any]
) -> None:
    demo["variants"][0]["curve"]["rpm"][1] = 1400
    r = api.post(URL, json=demo)
    assert r.status_code == 422
    problem = r.json()
    assert problem["field"] == "variants[0].curve.rpm[1]"
    assert "`variants[0].curve.rpm`" in problem["detail"]
