"""POST /v1/shift-plan through httpx against the ASGI app."""

from __future__ import annotations

import copy
from typing import Any

import numpy as np
from numpy.testing import assert_allclose

from tests.conftest import ApiClient

URL = "/v1/shift-plan"


def test_demo_coupe_plan_has_a_table_per_gear_and_a_shift_per_change(
    api: ApiClient, coupe_us: dict[str, Any]
) -> None:
    r = api.post(URL, json=coupe_us)
    assert r.status_code == 200, r.text
    body = r.json()
    assert body["reference"] == "WO-2291"
    assert body["units"]["speed"] == "mph" and body["units"]["force"] == "lbf"
    assert [g["gear"] for g in body["gears"]] == [1, 2, 3, 4, 5, 6]
    assert len(body["shifts"]) == 5
    for g in body["gears"]:
        table = g["table"]
        n = len(table["rpm"])
        assert all(len(col) == n for col in table.values())
        assert table["rpm"][-1] == 7000.0
    for s in body["shifts"]:
        assert s["reason"] in {"crossover", "rev_limit"}
        assert s["rpm_after"] < s["shift_rpm"]
        assert_allclose(s["rpm_drop"], s["shift_rpm"] - s["rpm_after"], atol=0.11)
    assert len(body["cautions"]) >= 4


def test_speed_column_matches_336_formula(api: ApiClient, coupe_us: dict[str, Any]) -> None:
    # mph = rpm * tire_in / (overall_ratio * 336.135) (REFERENCES.md)
    body = api.post(URL, json=coupe_us).json()
    diameter_in = body["tire"]["diameter"]
    for g in body["gears"]:
        rpm = np.array(g["table"]["rpm"])
        expected = rpm * diameter_in / (g["overall_ratio"] * 336.135)
        assert_allclose(g["table"]["speed"], expected, rtol=1e-4, atol=0.006)  # 2 decimals


def test_rpm_after_shift_follows_ratio_step(api: ApiClient, coupe_us: dict[str, Any]) -> None:
    body = api.post(URL, json=coupe_us).json()
    ratios = coupe_us["drivetrain"]["gear_ratios"]
    for s in body["shifts"]:
        step = ratios[s["to_gear"] - 1] / ratios[s["from_gear"] - 1]
        assert_allclose(s["rpm_after"], s["shift_rpm"] * step, rtol=1e-4)


def test_same_car_in_metric_and_us_units_gives_same_shifts(
    api: ApiClient, coupe_us: dict[str, Any]
) -> None:
    metric = copy.deepcopy(coupe_us)
    metric["units"] = "metric"
    metric["engine"]["curve"]["torque"] = [
        t * 1.3558179483314004 for t in coupe_us["engine"]["curve"]["torque"]
    ]
    us_body = api.post(URL, json=coupe_us).json()
    metric_body = api.post(URL, json=metric).json()
    us_rpm = [s["shift_rpm"] for s in us_body["shifts"]]
    metric_rpm = [s["shift_rpm"] for s in metric_body["shifts"]]
    assert_allclose(metric_rpm, us_rpm, rtol=1e-6)
    us_speed = np.array([s["shift_speed"] for s in us_body["shifts"]])
    metric_speed = np.array([s["shift_speed"] for s in metric_body["shifts"]])
    assert_allclose(metric_speed, us_speed * 1.609344, rtol=1e-3)


def test_chassis_curve_says_efficiency_not_applied(
    api: ApiClient, hatch_metric: dict[str, Any]
) -> None:
    hatch_metric["drivetrain"]["efficiency"] = 0.9
    body = api.post(URL, json=hatch_metric).json()
    assert body["engine"]["efficiency_applied"] is False
    assert all(g["efficiency"] == 1.0 for g in body["gears"])
    codes = {w["code"]: w["field"] for w in body["warnings"]}
    assert codes["efficiency_not_applied"] == "drivetrain.efficiency"
    assert body["units"]["speed"] == "km/h"


def test_power_curve_with_rpm_step_gives_regular_rows(
    api: ApiClient, hatch_metric: dict[str, Any]
) -> None:
    body = api.post(URL, json=hatch_metric).json()
    rpm = body["gears"][0]["table"]["rpm"]
    assert rpm[0] == 1000.0 and rpm[-1] == 7200.0
    assert_allclose(np.diff(rpm[:-1]), 500.0, rtol=0)


def test_summary_fits_a_work_order(api: ApiClient, coupe_us: dict[str, Any]) -> None:
    summary = api.post(URL, json=coupe_us).json()["summary"]
    lines = summary.splitlines()
    assert all(len(line) <= 80 for line in lines)
    assert all(ch.isprintable() for line in lines for ch in line)
    assert "WO-2291" in lines[0]
    assert "Caution" in summary


def test_rev_limit_above_curve_warns_with_field(api: ApiClient, coupe_us: dict[str, Any]) -> None:
    coupe_us["engine"]["rev_limit_rpm"] = 7500
    body = api.post(URL, json=coupe_us).json()
    assert body["engine"]["rev_limit_rpm"] == 7000.0
    assert {"code": "rev_limit_clipped", "field": "engine.rev_limit_rpm"}.items() <= body[
        "warnings"
    ][0].items()


def test_reference_is_optional(api: ApiClient, coupe_us: dict[str, Any]) -> None:
    del coupe_us["reference"]
    body = api.post(URL, json=coupe_us).json()
    assert body["reference"] is None
