"""Vehicle physics through the HTTP API, in both unit systems: gradeability and grip,
converter tables, the seeded shift search, the default shift rule, the log check's
confidence and the physical bounds of inputs. Every car and log here is invented."""

from __future__ import annotations

import copy
from typing import Any

import pytest
from numpy.testing import assert_allclose

from tests.conftest import ApiClient, load_demo

LB_KG = 0.45359237  # scipy.constants.lb
INCH_M = 0.0254  # scipy.constants.inch


def sedan_plan(units: str) -> dict[str, Any]:
    """The demo sedan as a shift-plan request, in metric or converted to US units."""
    run = load_demo("demo_sedan_run_metric")
    body = {k: run[k] for k in ("engine", "drivetrain", "vehicle")}
    body["units"] = units
    vehicle = body["vehicle"]
    vehicle["air"] = {}
    vehicle["road_load"] = {"drag_area": 0.0, "rolling_coefficient": 0.011}
    if units == "us":
        curve = body["engine"]["curve"]
        curve["torque"] = [t / 1.3558179483314004 for t in curve["torque"]]
        vehicle["mass"] = vehicle["mass"] / LB_KG
        vehicle["wheelbase"] = vehicle["wheelbase"] / 1000.0 / INCH_M
        vehicle["cg_height"] = vehicle["cg_height"] / 1000.0 / INCH_M
    return body


@pytest.mark.parametrize("units", ["metric", "us"])
def test_first_gear_gradeability_is_gillespies_front_drive_grip_limit(
    api: ApiClient, units: str
) -> None:
    # Gillespie ch. 2, front drive on a grade: tan(theta) = (mu*c/L - fr)/(1 + mu*h/L);
    # the sedan: mu 0.95, front share c/L 0.6, h/L = 540/2720, fr 0.011 (drag set to 0)
    r = api.post("/v1/shift-plan", json=sedan_plan(units))
    assert r.status_code == 200, r.text
    body = r.json()
    perf = body["performance"]
    expected = 100.0 * (0.95 * 0.6 - 0.011) / (1.0 + 0.95 * 540.0 / 2720.0)
    assert perf["gradeability_limited_by"][0] == "grip"
    assert_allclose(perf["gradeability"][0], expected, rtol=2e-4)
    assert all(isinstance(g, float) for g in perf["gradeability"])
    assert "gradeability_grip_limited" in {w["code"] for w in body["warnings"]}


def test_traction_limit_counts_the_rolling_resistance_term(api: ApiClient) -> None:
    # Gillespie ch. 2, eq. 2-20 (front drive): Fx = mu*W*(c + fr*h)/L / (1 + mu*h/L)
    body = sedan_plan("metric")
    perf = api.post("/v1/shift-plan", json=body).json()["performance"]
    weight = 1520.0 * 9.80665
    expected = 0.95 * weight * (0.6 + 0.011 * 540.0 / 2720.0) / (1.0 + 0.95 * 540.0 / 2720.0)
    assert_allclose(perf["traction_limit"], expected, rtol=2e-5)


def test_converter_tables_in_the_shift_plan_carry_engine_rpm_and_torque_ratio(
    api: ApiClient,
) -> None:
    # wheel force = converter torque ratio x engine torque x ratio x efficiency / r
    # (Gillespie ch. 2, common practice): with a flat curve that is the torque ratio times
    # the plain (clutch) force at the same gearbox input speed; locked gears (3-6) run 1:1
    wagon = load_demo("demo_wagon_converter_us")
    curve = wagon["engine"]["curve"]
    curve["torque"] = [300.0] * len(curve["rpm"])
    body = {k: wagon[k] for k in ("units", "engine", "drivetrain", "vehicle", "launch")}
    plain = {k: wagon[k] for k in ("units", "engine", "drivetrain")}
    conv = api.post("/v1/shift-plan", json=body).json()
    ref = api.post("/v1/shift-plan", json=plain).json()
    first = conv["gears"][0]["table"]
    assert first["torque_ratio"][0] > 1.5
    for i, gear in enumerate(conv["gears"]):
        table, base = gear["table"], ref["gears"][i]["table"]
        assert "torque_ratio" not in base
        for k, ratio in enumerate(table["torque_ratio"]):
            if table["engine_rpm"][k] < 5999.0:
                assert_allclose(
                    table["tractive_force"][k], ratio * base["tractive_force"][k], rtol=2e-3
                )
        if i >= 2:
            assert table["torque_ratio"] == [1.0] * len(table["torque_ratio"])


def test_optimised_run_of_an_automatic_names_its_winner_and_is_never_slower(
    api: ApiClient,
) -> None:
    # the search's own seeds are the reference: its time is at most each seed's
    wagon = load_demo("demo_wagon_converter_us")
    best = api.post("/v1/acceleration-run", json=wagon).json()["optimal_shifts"]
    names = {s["name"] for s in best["seeds"]}
    assert {"net_acceleration", "rev_limit"} <= names | {best["won_by"]}
    assert best["won_by"] in names | {"search"}
    assert all(best["elapsed"] <= s["elapsed"] for s in best["seeds"])
    assert best["elapsed"] <= best["plan_elapsed"]


@pytest.mark.parametrize(
    ("path", "demo", "with_vehicle", "expected"),
    [
        pytest.param("/v1/shift-plan", "demo_coupe_us", False, "tractive_force", id="plan"),
        pytest.param("/v1/shift-plan", "demo_coupe_us", True, "net_acceleration", id="plan-car"),
        pytest.param("/v1/comparison", "demo_comparison_us", True, "net_acceleration", id="cmp"),
        pytest.param("/v1/acceleration-run", "demo_sedan_run_metric", True, "net_acceleration"),
    ],
)
def test_one_default_shift_rule_everywhere(
    api: ApiClient, path: str, demo: str, with_vehicle: bool, expected: str
) -> None:
    # the stated rule: net acceleration when the car is described, wheel force otherwise
    body = load_demo(demo)
    if with_vehicle and "vehicle" not in body:
        body["vehicle"] = load_demo("demo_sedan_run_metric")["vehicle"]
        body["vehicle"].update({"mass": 3300, "wheelbase": 107, "cg_height": 21})
        body["vehicle"]["air"] = {}
    r = api.post(path, json=body)
    assert r.status_code == 200, r.text
    assert r.json()["shift_criterion"] == expected


@pytest.mark.parametrize("units", ["metric", "us"])
@pytest.mark.parametrize(
    ("change", "field"),
    [
        pytest.param({"friction_coefficient": 5e-324}, "vehicle.friction_coefficient", id="mu"),
        pytest.param({"rpm": [0.01, 0.02, 0.03]}, "engine.curve.rpm[0]", id="rpm"),
        pytest.param({"torque": [5e-324] * 12}, "engine.curve.torque", id="torque"),
    ],
)
def test_unrealistically_small_inputs_are_refused_with_a_422_naming_the_field(
    api: ApiClient, units: str, change: dict[str, Any], field: str
) -> None:
    body = sedan_plan(units)
    if "friction_coefficient" in change:
        body["vehicle"].update(change)
    else:
        body["engine"]["curve"].update(change)
        body["engine"]["rev_limit_rpm"] = None
    r = api.post("/v1/shift-plan", json=body)
    assert r.status_code == 422, r.text
    assert r.json()["field"] == field


@pytest.mark.parametrize(
    ("query", "header"),
    [
        pytest.param("", "Torque [N*m]", id="metric-torque"),
        pytest.param("?units=us", "Torque [lbf*ft]", id="us-torque"),
        pytest.param("", "Power [kW]", id="metric-power"),
    ],
)
def test_a_dyno_file_value_that_overflows_is_refused_not_answered_with_null(
    api: ApiClient, query: str, header: str
) -> None:
    text = f"Engine Speed (rpm),{header}\n2000,1e308\n3000,200\n4000,210\n"
    r = api.post(
        "/v1/torque-curves/import" + query,
        content=text.encode(),
        headers={"content-type": "text/csv"},
    )
    assert r.status_code == 422, r.text
    assert "line 2, column 2" in r.json()["detail"]


def test_log_check_summary_prints_the_model_shift_rpm_and_flags_extrapolation(
    api: ApiClient,
) -> None:
    body = load_demo("demo_log_text_request_metric")
    doc = api.post("/v1/log-analysis", json=body).json()
    assert "Model shift rpm" in doc["summary"]
    for s in doc["shifts"]:
        assert s["logged_rpm"][0] <= s["logged_rpm"][1]
        assert isinstance(s["crossover_extrapolated"], bool)
        assert f"{s['model_shift_rpm']:.0f}" in doc["summary"]
    early = copy.deepcopy(body)
    assert early == body  # the request is not changed by the call
