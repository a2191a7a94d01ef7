"""One test per bad-input rule: RFC 9457 problem details naming the field, never a 500."""

from __future__ import annotations

from typing import Any

import pytest

from tests.conftest import ApiClient, load_demo

URL = "/v1/shift-plan"


def _problem(r: Any, status: int) -> dict[str, Any]:
    assert r.status_code == status, r.text
    assert r.headers["content-type"] == "application/problem+json"
    body: dict[str, Any] = r.json()
    assert {"type", "title", "status", "detail", "instance"} <= body.keys()
    assert body["status"] == status and body["instance"] == URL
    assert "Traceback" not in r.text
    return body


def _with(path: str, value: Any) -> dict[str, Any]:
    body = load_demo("demo_coupe_us")
    node: Any = body
    keys = path.split(".")
    for k in keys[:-1]:
        node = node[k]
    if value is _DELETE:
        del node[keys[-1]]
    else:
        node[keys[-1]] = value
    return body


_DELETE = object()


@pytest.mark.parametrize(
    ("path", "value", "field"),
    [
        pytest.param(
            "engine.curve.rpm",
            [1500, 2000, 1900, 3000, 3500, 4000, 4500, 5000, 5500, 6000, 6500, 7000],
            "engine.curve.rpm[2]",
            id="rpm-not-increasing",
        ),
        pytest.param("engine.curve.rpm", [1500, 2000], "engine.curve.rpm", id="too-few-points"),
        pytest.param(
            "engine.curve.torque",
            [262, -281, 300, 318, 331, 338, 340, 333, 318, 296, 268, 236],
            "engine.curve.torque[1]",
            id="negative-torque",
        ),
        pytest.param(
            "drivetrain.gear_ratios",
            [3.1, 0.0, 1.48],
            "drivetrain.gear_ratios[1]",
            id="zero-ratio",
        ),
        pytest.param(
            "drivetrain.final_drive_ratio",
            -3.55,
            "drivetrain.final_drive_ratio",
            id="negative-final-drive",
        ),
        pytest.param(
            "drivetrain.gear_ratios",
            [3.1, 2.05, 2.4],
            "drivetrain.gear_ratios[2]",
            id="gears-not-descending",
        ),
        pytest.param(
            "engine.rev_limit_rpm", 1200, "engine.rev_limit_rpm", id="rev-limit-below-curve"
        ),
        pytest.param(
            "drivetrain.tire", {"size": "255/40Q18"}, "drivetrain.tire.size", id="unparseable-tire"
        ),
        pytest.param(
            "drivetrain.tire",
            {"size": "255/40R18", "diameter": 26},
            "drivetrain.tire",
            id="two-tire-descriptions",
        ),
        pytest.param(
            "drivetrain.efficiency", [0.9, 0.9], "drivetrain.efficiency", id="efficiency-count"
        ),
        pytest.param("engine.curve.power", [1, 2, 3], "engine.curve", id="torque-and-power"),
        pytest.param("units", "imperial", "units", id="unknown-units"),
        pytest.param("surprise", 1, "surprise", id="unknown-field"),
        pytest.param("engine.curve", _DELETE, "engine.curve", id="missing-curve"),
        pytest.param(
            "drivetrain.tire", {"diameter": 5}, "drivetrain.tire.diameter", id="tire-too-small"
        ),
        pytest.param("table", {"rpm_step": 1}, "table.rpm_step", id="too-many-rows"),
    ],
)
def test_invalid_value_is_422_naming_the_field(
    api: ApiClient, path: str, value: Any, field: str
) -> None:
    problem = _problem(api.post(URL, json=_with(path, value)), 422)
    assert problem["field"] == field, problem
    assert problem["errors"][0]["field"] == field


@pytest.mark.parametrize(
    "text",
    [
        pytest.param("NaN", id="nan"),
        pytest.param("Infinity", id="infinity"),
        pytest.param("-Infinity", id="minus-infinity"),
    ],
)
def test_non_finite_number_is_rejected(api: ApiClient, text: str) -> None:
    raw = (
        '{"engine": {"curve": {"rpm": [1000, 2000, 3000], "torque": [100, '
        + text
        + ', 100]}}, "drivetrain": {"gear_ratios": [3, 2], "final_drive_ratio": 3.5, '
        '"tire": {"diameter": 650}}}'
    )
    problem = _problem(
        api.post(URL, content=raw, headers={"content-type": "application/json"}), 422
    )
    assert problem["field"] == "engine.curve.torque[1]"


def test_too_many_curve_points_is_rejected(api: ApiClient) -> None:
    body = load_demo("demo_coupe_us")
    body["engine"]["curve"]["rpm"] = list(range(1000, 1000 + 2001))
    body["engine"]["curve"]["torque"] = [100] * 2001
    problem = _problem(api.post(URL, json=body), 422)
    assert problem["field"].startswith("engine.curve")


def test_body_over_size_limit_is_413(api: ApiClient) -> None:
    raw = b'{"pad": "' + b"x" * 300_000 + b'"}'
    _problem(api.post(URL, content=raw, headers={"content-type": "application/json"}), 413)


def test_chunked_body_over_size_limit_is_413(api: ApiClient) -> None:
    async def chunks() -> Any:
        for _ in range(40):
            yield b"x" * 10_000

    _problem(api.post(URL, content=chunks(), headers={"content-type": "application/json"}), 413)


def test_body_not_declared_json_is_415(api: ApiClient) -> None:
    r = api.post(URL, content=b"rpm=1000", headers={"content-type": "text/plain"})
    assert "application/json" in _problem(r, 415)["detail"]


def test_form_body_is_415(api: ApiClient) -> None:
    r = api.post(URL, data={"rpm": "1000"})
    _problem(r, 415)


def test_malformed_json_is_400(api: ApiClient) -> None:
    r = api.post(URL, content=b'{"units": "us",', headers={"content-type": "application/json"})
    _problem(r, 400)


def test_wrong_method_is_405_problem(api: ApiClient) -> None:
    r = api.get(URL)
    assert r.status_code == 405
    assert r.headers["content-type"] == "application/problem+json"


@pytest.mark.parametrize(
    ("units", "sent", "limit"),
    [
        # 0.1 N*m is 0.07376 lbf*ft (1 lbf*ft = 1.3558179483314 N*m, NIST SP 811)
        pytest.param("us", "0.001 lbf*ft", "0.07376 lbf*ft", id="us"),
        pytest.param("metric", "0.001 N*m", "0.1 N*m", id="metric"),
    ],
)
def test_a_curve_too_weak_to_plan_is_refused_in_the_callers_torque_unit(
    api: ApiClient, units: str, sent: str, limit: str
) -> None:
    body = load_demo("demo_coupe_us")
    body["units"] = units
    body["engine"]["curve"]["torque"] = [0.001] * len(body["engine"]["curve"]["rpm"])
    r = api.post("/v1/shift-plan", json=body)
    assert r.status_code == 422
    problem = r.json()
    assert problem["field"] == "engine.curve.torque"
    assert f"must peak at {limit} or more, got {sent}" in problem["detail"]


@pytest.mark.parametrize(
    ("units", "diameter", "said"),
    [
        # 200 mm and 3000 mm are 7.874 in and 118.1 in (1 in = 25.4 mm exactly, NIST SP 811)
        pytest.param("us", 2, "between 7.874 in and 118.1 in, got 2 in", id="us"),
        pytest.param("metric", 50, "between 200 mm and 3000 mm, got 50 mm", id="metric"),
    ],
)
def test_a_tire_too_small_is_refused_in_the_callers_length_unit(
    api: ApiClient, units: str, diameter: float, said: str
) -> None:
    body = load_demo("demo_coupe_us")
    body["units"] = units
    body["drivetrain"]["tire"] = {"diameter": diameter}
    r = api.post("/v1/shift-plan", json=body)
    assert r.status_code == 422
    problem = r.json()
    assert problem["field"] == "drivetrain.tire.diameter"
    assert said in problem["detail"]
