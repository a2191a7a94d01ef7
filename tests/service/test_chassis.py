"""POST /v1/chassis-dyno/convert through httpx. The demo curve is invented."""

from __future__ import annotations

from typing import Any

import pytest
from numpy.testing import assert_allclose

from tests.conftest import ApiClient, load_demo

URL = "/v1/chassis-dyno/convert"


@pytest.fixture
def demo() -> dict[str, Any]:
    return load_demo("demo_chassis_metric")


def test_wheel_power_becomes_an_engine_estimate(api: ApiClient) -> None:
    # common practice (Gillespie ch. 2): wheel = engine x efficiency; 170 kW at 85 % -> 200 kW
    body = {
        "curve": {"rpm": [6000], "power": [170.0]},
        "driveline": {"loss_percent": 15},
    }
    r = api.post(URL, json=body)
    assert r.status_code == 200, r.text
    out = r.json()
    assert_allclose(out["curve"]["engine_power"], [200.0], rtol=1e-6)
    assert out["efficiency"] == 0.85 and out["loss_percent"] == 15.0
    assert out["gears"] is None


def test_engine_to_wheels_to_engine_is_the_identity(api: ApiClient, demo: dict[str, Any]) -> None:
    demo["driveline"] = {"efficiency": 0.87}
    first = api.post(URL, json=demo).json()
    back = {
        "curve": {
            "rpm": first["curve"]["rpm"],
            "power": first["curve"]["engine_power"],
            "measured_at": "engine",
        },
        "driveline": {"efficiency": 0.87},
    }
    again = api.post(URL, json=back).json()
    assert_allclose(again["curve"]["wheel_power"], demo["curve"]["power"], rtol=1e-5)


def test_us_units_convert_in_hp_and_lbf_ft(api: ApiClient) -> None:
    body = {
        "units": "us",
        "curve": {"rpm": [5252.113], "torque": [300.0], "measured_at": "engine"},
        "driveline": {"efficiency": 0.9},
    }
    out = api.post(URL, json=body).json()
    # hp = lbf*ft * rpm / 5252.113 (REFERENCES.md units): 300 lbf*ft at 5252.113 rpm = 300 hp
    assert_allclose(out["curve"]["engine_power"], [300.0], rtol=1e-6)
    assert_allclose(out["curve"]["wheel_power"], [270.0], rtol=1e-6)
    assert_allclose(out["curve"]["wheel_torque"], [270.0], rtol=1e-6)
    assert out["units"]["power"] == "hp"


def test_demo_curve_is_re_expressed_for_every_gear(api: ApiClient, demo: dict[str, Any]) -> None:
    r = api.post(URL, json=demo)
    assert r.status_code == 200, r.text
    out = r.json()
    etas = demo["driveline"]["gear_efficiencies"]
    assert out["measured_gear"] == 4 and out["efficiency"] == etas[3]
    for gear, eta in zip(out["gears"], etas, strict=True):
        assert_allclose(gear["factor"], eta / etas[3], rtol=1e-5)
        assert_allclose(
            gear["wheel_power"], [p * eta / etas[3] for p in demo["curve"]["power"]], rtol=1e-5
        )
    assert out["peaks"]["power_rpm"] == 6000.0
    lines = out["summary"].splitlines()
    assert all(len(line) <= 80 and line.isascii() for line in lines)
    assert lines[0].endswith("ref: DYNO-0107")


def test_equal_gear_efficiencies_leave_the_curve_unchanged(
    api: ApiClient, demo: dict[str, Any]
) -> None:
    demo["driveline"] = {"gear_efficiencies": [0.88] * 5, "measured_gear": 2}
    out = api.post(URL, json=demo).json()
    assert {"equal_efficiencies", "estimate"} <= {w["code"] for w in out["warnings"]}
    for gear in out["gears"]:
        assert_allclose(gear["wheel_power"], demo["curve"]["power"], rtol=1e-6)


@pytest.mark.parametrize(
    ("change", "field"),
    [
        pytest.param(
            {"curve": {"rpm": [3000, 2000, 4000], "power": [1, 2, 3]}},
            "curve.rpm[1]",
            id="rpm-not-increasing",
        ),
        pytest.param(
            {"curve": {"rpm": [3000, 4000], "power": [1, 2, 3]}},
            "curve.power",
            id="mismatched-lengths",
        ),
        pytest.param(
            {"driveline": {"loss_percent": 15, "efficiency": 0.85}},
            "driveline",
            id="loss-and-efficiency",
        ),
        pytest.param(
            {"driveline": {"gear_efficiencies": [0.9, 0.9], "measured_gear": 3}},
            "driveline.measured_gear",
            id="gear-not-listed",
        ),
        pytest.param(
            {"driveline": {"efficiency": 0.9, "measured_gear": 1}},
            "driveline",
            id="gear-without-efficiencies",
        ),
        pytest.param({"driveline": {"loss_percent": 80}}, "driveline.loss_percent", id="loss"),
        pytest.param(
            {"curve": {"rpm": [3000], "power": [1], "torque": [1]}}, "curve", id="two-series"
        ),
    ],
)
def test_bad_input_names_the_field(
    api: ApiClient, demo: dict[str, Any], change: dict[str, Any], field: str
) -> None:
    demo.update(change)
    r = api.post(URL, json=demo)
    assert r.status_code == 422, r.text
    assert r.json()["field"] == field
