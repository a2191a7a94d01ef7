"""POST /v1/acceleration-run and the shift plan's vehicle part, through httpx."""

from __future__ import annotations

import copy
from typing import Any

import pytest
from numpy.testing import assert_allclose

from tests.conftest import ApiClient, load_demo

URL = "/v1/acceleration-run"


@pytest.fixture
def sedan() -> dict[str, Any]:
    return load_demo("demo_sedan_run_metric")


@pytest.fixture
def wagon() -> dict[str, Any]:
    return load_demo("demo_wagon_converter_us")


def _by_name(items: list[dict[str, Any]]) -> dict[str, dict[str, Any]]:
    return {i["name"]: i for i in items}


def test_sedan_run_reports_strip_and_road_test_times(
    api: ApiClient, sedan: dict[str, Any]
) -> None:
    r = api.post(URL, json=sedan)
    assert r.status_code == 200, r.text
    body = r.json()
    assert body["reference"] == "RUN-0412"
    dist = _by_name(body["distances"])
    for name in ("60 ft", "330 ft", "1/8 mile", "1000 ft", "1/4 mile", "400 m", "1000 m"):
        assert dist[name]["elapsed"] is not None
    times = [dist[n]["elapsed"] for n in ("60 ft", "330 ft", "1/8 mile", "1000 ft", "1/4 mile")]
    assert times == sorted(times)
    assert dist["1/4 mile"]["trap_speed"] is not None and dist["60 ft"]["trap_speed"] is None
    speeds = _by_name(body["speeds"])
    assert speeds["0-100 km/h"]["elapsed"] > speeds["0-60 mph"]["elapsed"]
    assert body["finish"]["name"] == "finish"
    assert_allclose(body["finish"]["elapsed"], dist["1/4 mile"]["elapsed"], rtol=1e-9)
    trace = body["trace"]
    assert len(trace["time"]) == 200
    assert all(len(col) == 200 for col in trace.values())
    assert body["top_speed"]["limited_by"] in {"drag", "rev_limit"}
    assert all(len(line) <= 80 for line in body["summary"].splitlines())
    assert len(body["cautions"]) >= 4


def test_run_is_the_same_in_us_units(api: ApiClient, sedan: dict[str, Any]) -> None:
    us = copy.deepcopy(sedan)
    us["units"] = "us"
    nm_per_lbft = 1.3558179483314004
    us["engine"]["curve"]["torque"] = [t / nm_per_lbft for t in sedan["engine"]["curve"]["torque"]]
    v = us["vehicle"]
    v["mass"] = sedan["vehicle"]["mass"] / 0.45359237
    v["wheelbase"] = sedan["vehicle"]["wheelbase"] / 25.4
    v["cg_height"] = sedan["vehicle"]["cg_height"] / 25.4
    v["road_load"]["frontal_area"] = 2.25 / 0.3048**2
    v["air"] = {"temperature": 68.0, "altitude": 150 / 0.3048, "relative_humidity": 50}
    metric_body = api.post(URL, json=sedan).json()
    us_body = api.post(URL, json=us).json()
    m = _by_name(metric_body["distances"])["1/4 mile"]
    u = _by_name(us_body["distances"])["1/4 mile"]
    assert_allclose(u["elapsed"], m["elapsed"], rtol=1e-4)
    assert_allclose(u["trap_speed"] * 1.609344, m["trap_speed"], rtol=1e-3)
    assert_allclose(us_body["shift_rpm"], metric_body["shift_rpm"], rtol=1e-4)


def test_converter_run_with_shift_search_is_not_slower(
    api: ApiClient, wagon: dict[str, Any]
) -> None:
    body = api.post(URL, json=wagon).json()
    best = body["optimal_shifts"]
    assert best is not None
    assert best["elapsed"] <= best["plan_elapsed"] + 1e-9
    assert_allclose(best["gain"], best["plan_elapsed"] - best["elapsed"], atol=2e-3)


def test_finish_speed_ends_the_run_there(api: ApiClient, sedan: dict[str, Any]) -> None:
    sedan["run"] = {"finish_speed": 100}
    body = api.post(URL, json=sedan).json()
    assert body["finish"]["end"] == 100.0
    assert_allclose(
        body["finish"]["elapsed"], _by_name(body["speeds"])["0-100 km/h"]["elapsed"], rtol=1e-9
    )


def test_rolling_start_times_passing_interval(api: ApiClient, sedan: dict[str, Any]) -> None:
    sedan["run"] = {"start_speed": 70, "extra_speed_intervals": [{"start": 80, "end": 120}]}
    body = api.post(URL, json=sedan).json()
    speeds = body["speeds"]
    assert speeds[-1]["elapsed"] is not None
    assert _by_name(speeds)["0-60 mph"]["elapsed"] is None


def test_custom_shift_rpms_are_used(api: ApiClient, sedan: dict[str, Any]) -> None:
    sedan["shifts"] = {"criterion": "custom", "rpm": [6000, 6000, 6000, 6000, 6000]}
    body = api.post(URL, json=sedan).json()
    assert body["shift_rpm"] == [6000.0] * 5
    assert all(abs(s["rpm_before"] - 6000.0) < 1.0 for s in body["shifts"])


@pytest.mark.parametrize(
    ("change", "field"),
    [
        pytest.param(
            {"shifts": {"criterion": "custom", "rpm": [6000, 6000]}},
            "shifts.rpm",
            id="wrong-shift-count",
        ),
        pytest.param(
            {"shifts": {"criterion": "custom", "rpm": [9000] * 5}},
            "shifts.rpm[0]",
            id="shift-above-rev-limit",
        ),
        pytest.param({"launch": {"coupling": "converter"}}, "launch", id="converter-missing"),
        pytest.param(
            {"launch": {"lockup_gears": [9]}}, "launch.lockup_gears", id="lockup-gear-out-of-range"
        ),
        pytest.param({"vehicle": None}, "vehicle", id="vehicle-missing"),
        pytest.param(
            {"run": {"finish_distance": 100, "finish_speed": 100}}, "run", id="two-finishes"
        ),
    ],
)
def test_invalid_run_is_422_naming_the_field(
    api: ApiClient, sedan: dict[str, Any], change: dict[str, Any], field: str
) -> None:
    sedan.update(change)
    r = api.post(URL, json=sedan)
    assert r.status_code == 422, r.text
    assert r.headers["content-type"] == "application/problem+json"
    assert r.json()["field"] == field


@pytest.mark.parametrize(
    ("path", "value", "field"),
    [
        pytest.param("mass", -5, "vehicle.mass", id="negative-mass"),
        pytest.param("drive", "all", "vehicle", id="awd-without-split"),
        pytest.param("friction_coefficient", 0, "vehicle.friction_coefficient", id="no-grip"),
    ],
)
def test_invalid_vehicle_is_422(
    api: ApiClient, sedan: dict[str, Any], path: str, value: Any, field: str
) -> None:
    sedan["vehicle"][path] = value
    r = api.post(URL, json=sedan)
    assert r.status_code == 422, r.text
    assert r.json()["field"] == field


def test_car_that_cannot_climb_the_grade_is_422(api: ApiClient, sedan: dict[str, Any]) -> None:
    sedan["vehicle"]["road_load"]["grade_percent"] = 30
    sedan["vehicle"]["friction_coefficient"] = 0.2
    r = api.post(URL, json=sedan)
    assert r.status_code == 422, r.text
    assert "cannot move off" in r.json()["detail"]


def test_shift_plan_with_vehicle_reports_performance(
    api: ApiClient, sedan: dict[str, Any]
) -> None:
    plan = {k: sedan[k] for k in ("units", "engine", "drivetrain", "vehicle")}
    plan["shift_criterion"] = "net_acceleration"
    plan["cruise_speeds"] = [100, 120]
    plan["vehicle"]["friction_coefficient"] = 3.0  # grip never caps the drive here
    r = api.post("/v1/shift-plan", json=plan)
    assert r.status_code == 200, r.text
    body = r.json()
    perf = body["performance"]
    assert body["shift_criterion"] == "net_acceleration"
    assert len(perf["gradeability"]) == 6 and perf["gradeability"][0] > perf["gradeability"][-1]
    assert [c["speed"] for c in perf["cruise"]] == [100.0, 120.0]
    assert len(perf["cruise"][0]["rpm"]) == 6
    # with grip to spare, rotating inertia moves net-acceleration shifts to or below the
    # wheel-force crossover (the lower gear carries the heavier equivalent mass)
    for s, crossover in zip(body["shifts"], perf["force_crossover_rpm"], strict=True):
        assert s["shift_rpm"] <= crossover + 1.0


def test_net_acceleration_plan_without_vehicle_is_422(
    api: ApiClient, coupe_us: dict[str, Any]
) -> None:
    coupe_us["shift_criterion"] = "net_acceleration"
    r = api.post("/v1/shift-plan", json=coupe_us)
    assert r.status_code == 422


@pytest.mark.parametrize("demo", ["demo_sedan_run_metric", "demo_wagon_converter_us"])
def test_rolling_start_in_a_chosen_gear_summarises_the_finish_first(
    api: ApiClient, demo: str
) -> None:
    body = load_demo(demo)
    body.setdefault("shifts", {})["optimise"] = False
    body["run"] = {**body.get("run", {}), "start_speed": 60, "start_gear": 3}
    body["run"]["finish_distance"] = 1000
    r = api.post(URL, json=body)
    assert r.status_code == 200, r.text
    doc = r.json()
    assert doc["start_gear"] == 3
    assert doc["trace"]["gear"][0] == 3
    assert all(s["from_gear"] >= 3 for s in doc["shifts"])
    lines = [line for line in doc["summary"].splitlines()[1:] if line.strip()]
    assert lines[0].startswith("Finish at 1000 ")
    assert "in gear 3" in lines[1]
    finish = doc["finish"]["elapsed"]
    listed = [line.split()[0] for line in lines if line.split()[0] in {"1000", "1/4", "400"}]
    # nothing past the finish: a 1000 ft or m finish lists no longer distance
    unit = "ft" if doc["units"]["distance"] == "ft" else "m"
    if unit == "ft":
        assert "1/4" not in listed and "400" not in listed
    for line in lines:
        if line.startswith("Shift "):
            assert float(line.split(";")[0].split(",")[-1].split()[0]) <= finish


def test_start_gear_above_its_rev_limit_is_refused_naming_the_field(
    api: ApiClient, sedan: dict[str, Any]
) -> None:
    sedan["run"] = {**sedan.get("run", {}), "start_speed": 100, "start_gear": 1}
    r = api.post(URL, json=sedan)
    assert r.status_code == 422
    problem = r.json()
    assert problem["field"] == "run.start_gear"
    assert "rev limit" in problem["detail"]
