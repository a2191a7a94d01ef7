"""POST /v1/log-analysis through httpx: arrays and text, units, verdicts, bad input.

The demo pass (tests/data/demo_log_pass_metric.csv) is synthetic: an invented car simulated
by the core and logged with noise (tests/core/synthetic_pass.py), shifting at its limiter.
"""

from __future__ import annotations

import copy
from typing import Any

import numpy as np
import pytest
from numpy.testing import assert_allclose

from tests.conftest import DATA, ApiClient, load_demo
from tests.core.synthetic_pass import REV_LIMIT_RPM, crossover_rpm, synthetic_pass

URL = "/v1/log-analysis"
MPH_IN_KM_H = 1.609344  # 1 mph = 1.609344 km/h exactly (scipy.constants.mph / kmh)


@pytest.fixture
def request_body() -> dict[str, Any]:
    body = load_demo("demo_log_request_metric")
    body["log"] = {"text": (DATA / "demo_log_pass_metric.csv").read_text()}
    return body


def arrays(kind: str = "late", *, rpm: bool = True) -> dict[str, Any]:
    shifts = (REV_LIMIT_RPM,) * 3 if kind == "late" else tuple(0.8 * n for n in crossover_rpm())
    p = synthetic_pass(shifts, seed=7)
    out: dict[str, Any] = {
        "time": np.round(p.time_s, 3).tolist(),
        "speed": np.round(p.speed_m_s * 3.6, 2).tolist(),
    }
    if rpm:
        out["rpm"] = np.round(p.rpm).tolist()
    return out


def test_demo_text_log_gets_late_verdicts_and_a_printable_summary(
    api: ApiClient, request_body: dict[str, Any]
) -> None:
    r = api.post(URL, json=request_body)
    assert r.status_code == 200, r.text
    body = r.json()
    assert body["reference"] == "LOG-0031"
    assert body["log"]["source"] == "text" and body["log"]["delimiter"] == ";"
    assert body["log"]["columns"]["speed"] == "Speed [km/h]"
    assert body["gears_from"] == "rpm"
    assert [s["gear"] for s in body["segments"]] == [1, 2, 3, 4]
    assert [s["verdict"] for s in body["shifts"]] == ["late"] * 3
    assert all(s["model_shift_rpm"] is not None for s in body["shifts"])
    assert body["model_criterion"] == "tractive_force"
    assert body["rev_limit_rpm"] == REV_LIMIT_RPM
    assert len(body["cautions"]) >= 4
    lines = body["summary"].splitlines()
    assert all(len(line) <= 80 and line.isascii() for line in lines)
    assert lines[0].startswith("GEARWORK LOG CHECK") and lines[0].endswith("ref: LOG-0031")


def test_text_and_arrays_of_the_same_pass_agree(
    api: ApiClient, request_body: dict[str, Any]
) -> None:
    from_text = api.post(URL, json=request_body).json()
    as_arrays = copy.deepcopy(request_body)
    as_arrays["log"] = arrays()
    from_arrays = api.post(URL, json=as_arrays).json()
    assert_allclose(
        [s["start_time"] for s in from_arrays["shifts"]],
        [s["start_time"] for s in from_text["shifts"]],
        atol=0.05,
    )
    assert [s["verdict"] for s in from_arrays["shifts"]] == ["late"] * 3


def test_us_units_give_the_same_pass_in_mph(api: ApiClient, request_body: dict[str, Any]) -> None:
    metric = copy.deepcopy(request_body)
    metric["log"] = arrays("early")
    us = copy.deepcopy(metric)
    us["units"] = "us"
    us["log"]["speed"] = [v / MPH_IN_KM_H for v in metric["log"]["speed"]]
    us["drivetrain"]["tire"] = {"diameter": 640 / 25.4}
    us["engine"]["curve"]["torque"] = [
        t / 1.3558179483314 for t in metric["engine"]["curve"]["torque"]
    ]
    m, u = api.post(URL, json=metric).json(), api.post(URL, json=us).json()
    assert u["units"]["speed"] == "mph"
    assert_allclose(
        [s["speed_before"] * MPH_IN_KM_H for s in u["shifts"]],
        [s["speed_before"] for s in m["shifts"]],
        rtol=1e-3,
    )
    assert [s["verdict"] for s in u["shifts"]] == ["early"] * 3


def test_speed_only_log_counts_gears_from_the_start_gear(
    api: ApiClient, request_body: dict[str, Any]
) -> None:
    request_body["log"] = arrays(rpm=False)
    request_body["options"] = {"start_gear": 1}
    body = api.post(URL, json=request_body).json()
    assert body["gears_from"] == "acceleration"
    assert [(s["from_gear"], s["to_gear"]) for s in body["shifts"]] == [(1, 2), (2, 3), (3, 4)]
    assert "no_rpm" in {w["code"] for w in body["warnings"]}
    assert all(len(line) <= 80 for line in body["summary"].splitlines())


def test_vehicle_gives_the_net_acceleration_model_shift_rpm(
    api: ApiClient, request_body: dict[str, Any]
) -> None:
    request_body["vehicle"] = {
        "mass": 1250,
        "wheelbase": 2600,
        "cg_height": 500,
        "front_weight_share": 0.52,
        "friction_coefficient": 1.8,
        "road_load": {"drag_area": 0.65, "rolling_coefficient": 0.012},
    }
    body = api.post(URL, json=request_body).json()
    assert body["model_criterion"] == "net_acceleration"
    # the demo pass was simulated with this car: its crossovers are the model's shift rpm
    assert_allclose([s["model_shift_rpm"] for s in body["shifts"]], crossover_rpm(), rtol=0.01)


def _text_request(request_body: dict[str, Any], text: str) -> dict[str, Any]:
    request_body["log"] = {"text": text}
    return request_body


GOOD_ROWS = "\n".join(f"{0.04 * i:.2f},{2.0 * i:.1f},{1000 + 50 * i}" for i in range(40))


@pytest.mark.parametrize(
    ("text", "field", "match"),
    [
        pytest.param(
            "time [s],speed [km/h],rpm\n" + GOOD_ROWS + "\n1.60,80",
            "log.text:line 42, column 3",
            "truncated",
            id="truncated-file",
        ),
        pytest.param(
            "time [s],speed [furlong/h],rpm\n" + GOOD_ROWS,
            "log.text:line 1, column 2",
            "not a speed unit",
            id="wrong-unit",
        ),
        pytest.param("\x00\x01\x02\x03binary", "log.text:line 1", "binary", id="binary-garbage"),
        pytest.param(
            "time [s],speed [km/h],rpm\n" + GOOD_ROWS.replace("0.40,", "0.10,"),
            "log.text:line 12, column 1",
            "strictly increasing",
            id="time-goes-back",
        ),
        pytest.param("just some words\n", "log.text", "no header row", id="no-header"),
    ],
)
def test_bad_log_text_names_line_and_column(
    api: ApiClient, request_body: dict[str, Any], text: str, field: str, match: str
) -> None:
    r = api.post(URL, json=_text_request(request_body, text))
    assert r.status_code == 422, r.text
    problem = r.json()
    assert r.headers["content-type"] == "application/problem+json"
    assert problem["field"] == field
    assert match in problem["detail"]


@pytest.mark.parametrize(
    ("log", "field"),
    [
        pytest.param(
            {"time": [0.05 * i for i in range(30)], "speed": [1.0] * 29},
            "log.speed",
            id="mismatched-lengths",
        ),
        pytest.param(
            {"time": [0.05 * (i if i != 9 else 3) for i in range(30)], "speed": [1.0] * 30},
            "log.time[9]",
            id="time-not-increasing",
        ),
        pytest.param(
            {"time": [0.05 * i for i in range(30)], "speed": [1.0] * 30, "rpm": [900.0] * 31},
            "log.rpm",
            id="rpm-length",
        ),
        pytest.param({"time": [0.0, 1.0], "speed": [0.0, 1.0]}, "log.time", id="too-few-samples"),
        pytest.param({"time": [0.0], "speed": [0.0], "text": "t"}, "log", id="arrays-and-text"),
    ],
)
def test_bad_log_arrays_name_the_field(
    api: ApiClient, request_body: dict[str, Any], log: dict[str, Any], field: str
) -> None:
    request_body["log"] = log
    r = api.post(URL, json=request_body)
    assert r.status_code == 422, r.text
    assert r.json()["field"] == field


@pytest.mark.parametrize(
    ("change", "field"),
    [
        pytest.param({"options": {"start_gear": 6}}, "options.start_gear", id="start-gear"),
        pytest.param({"engine": None, "vehicle": {"mass": 1}}, "vehicle.wheelbase", id="vehicle"),
        pytest.param({"options": {"rev_limit_rpm": 7000}}, "", id="rev-limit-twice"),
    ],
)
def test_bad_options_are_422(
    api: ApiClient, request_body: dict[str, Any], change: dict[str, Any], field: str
) -> None:
    request_body.update(change)
    if request_body["engine"] is None:
        del request_body["engine"]
    r = api.post(URL, json=request_body)
    assert r.status_code == 422, r.text
    assert r.json().get("field", "") == field


def test_log_over_the_body_limit_is_413(api: ApiClient, request_body: dict[str, Any]) -> None:
    huge = "time [s],speed [km/h]\n" + "12.345,123.45\n" * 30_000
    r = api.post(URL, json=_text_request(request_body, huge))
    assert r.status_code == 413


def test_log_as_bare_csv_body_is_415(api: ApiClient) -> None:
    r = api.post(URL, content=b"time [s],speed [km/h]\n", headers={"content-type": "text/csv"})
    assert r.status_code == 415
