"""POST /v1/final-drive-sweep through httpx: candidates ranked, constraints, the optimum."""

from __future__ import annotations

from typing import Any

import pytest
from numpy.testing import assert_allclose

from tests.conftest import ApiClient, load_demo

URL = "/v1/final-drive-sweep"
RPM_PER_MPH_IN = 63360.0 / (60.0 * 3.141592653589793)  # 336.135 (REFERENCES.md)
TOP_GEAR = 0.79
# 255/40R18 by the ISO metric formula (REFERENCES.md): 18 + 2*255*0.40/25.4 in
TIRE_DIAMETER_IN = 18.0 + 2.0 * 255.0 * 0.40 / 25.4


@pytest.fixture
def demo() -> dict[str, Any]:
    return load_demo("demo_sweep_us")


def post(api: ApiClient, body: dict[str, Any]) -> dict[str, Any]:
    r = api.post(URL, json=body)
    assert r.status_code == 200, r.text
    data: dict[str, Any] = r.json()
    return data


def test_demo_sweep_ranks_the_stocked_ratios_by_quarter_mile(
    api: ApiClient, demo: dict[str, Any]
) -> None:
    body = post(api, demo)
    rows = body["candidates"]
    assert sorted(r["final_drive_ratio"] for r in rows) == sorted(demo["ratios"])
    assert [r["rank"] for r in rows] == list(range(1, len(rows) + 1))
    values = [r["objective_value"] for r in rows]
    assert values == sorted(values)
    for r in rows:
        assert r["objective_value"] == pytest.approx(r["quarter_mile"]["elapsed"], abs=1e-3)
        assert r["meets_constraints"] == (not r["rejected_because"])
        assert len(r["speed_at_rev_limit"]) == 6
    assert body["objective_unit"] == "s"
    assert all(len(line) <= 80 for line in body["summary"].splitlines())
    assert len(body["cautions"]) >= 4


def test_best_listed_ratio_is_the_quickest_that_keeps_highway_rpm(
    api: ApiClient, demo: dict[str, Any]
) -> None:
    body = post(api, demo)
    passing = [r for r in body["candidates"] if r["meets_constraints"]]
    failing = [r for r in body["candidates"] if not r["meets_constraints"]]
    assert passing and failing
    assert body["best"] == passing[0]
    for r in failing:
        codes = {w["code"] for w in r["rejected_because"]}
        assert codes <= {"cruise_rpm_too_high", "top_speed_too_low"}
        if "cruise_rpm_too_high" in codes:
            assert r["cruise_rpm"] > 2450
            assert "above the 2450 rpm allowed" in r["rejected_because"][0]["message"]
    assert all(r["cruise_rpm"] <= 2450 for r in passing)


def test_cruise_rpm_of_every_candidate_matches_the_336_formula(
    api: ApiClient, demo: dict[str, Any]
) -> None:
    # common practice (REFERENCES.md): rpm = mph * overall ratio * 336.135 / tire diameter
    body = post(api, demo)
    assert body["cruise_speed"] == 70.0
    for r in body["candidates"]:
        expected = 70.0 * TOP_GEAR * r["final_drive_ratio"] * RPM_PER_MPH_IN / TIRE_DIAMETER_IN
        assert_allclose(r["cruise_rpm"], expected, atol=0.51)


def test_shifts_are_shared_and_land_at_the_ratio_step(
    api: ApiClient, demo: dict[str, Any]
) -> None:
    # closed form: rpm after = shift rpm * next ratio / current ratio, whatever the axle
    body = post(api, demo)
    gears = demo["drivetrain"]["gear_ratios"]
    for s in body["shifts"]:
        k = s["from_gear"] - 1
        assert_allclose(s["rpm_after"], s["shift_rpm"] * gears[k + 1] / gears[k], atol=0.11)


def test_one_candidate_agrees_with_the_acceleration_run(
    api: ApiClient, demo: dict[str, Any]
) -> None:
    body = post(api, demo)
    row = next(r for r in body["candidates"] if r["final_drive_ratio"] == 3.73)
    run = {k: demo[k] for k in ("units", "engine", "drivetrain", "vehicle", "launch")}
    run["drivetrain"] = {**demo["drivetrain"], "final_drive_ratio": 3.73}
    run["shifts"] = {"criterion": "custom", "rpm": [s["shift_rpm"] for s in body["shifts"]]}
    r = api.post("/v1/acceleration-run", json=run)
    assert r.status_code == 200, r.text
    quarter = next(d for d in r.json()["distances"] if d["name"] == "1/4 mile")
    assert_allclose(row["quarter_mile"]["elapsed"], quarter["elapsed"], atol=1.5e-3)
    assert_allclose(row["quarter_mile"]["trap_speed"], quarter["trap_speed"], atol=0.02)


def test_optimum_lies_between_the_neighbours_of_the_best_listed_ratio(
    api: ApiClient, demo: dict[str, Any]
) -> None:
    body = post(api, demo)
    opt, best = body["optimum"], body["candidates"][0]
    assert opt["bounds"][0] <= opt["final_drive_ratio"] <= opt["bounds"][1]
    assert opt["bounds"][0] <= best["final_drive_ratio"] <= opt["bounds"][1]
    assert opt["objective_value"] <= best["objective_value"] + 1e-4


def test_range_of_candidates_with_the_top_speed_objective(
    api: ApiClient, demo: dict[str, Any]
) -> None:
    demo.pop("ratios")
    demo["ratio_range"] = {"low": 2.8, "high": 4.4, "step": 0.2}
    demo["objective"] = "top_speed"
    body = post(api, demo)
    assert len(body["candidates"]) == 9 and body["objective_unit"] == "mph"
    values = [r["objective_value"] for r in body["candidates"]]
    assert values == sorted(values, reverse=True)
    assert values[0] == pytest.approx(body["candidates"][0]["top_speed"]["speed"], abs=1e-2)


def test_cruise_target_without_a_vehicle_finds_the_closed_form_ratio(
    api: ApiClient, demo: dict[str, Any]
) -> None:
    # closed form from the 336.135 formula: ratio = rpm * D / (mph * 336.135 * top gear)
    for key in ("vehicle", "launch", "constraints"):
        demo.pop(key)
    demo.pop("ratios")
    demo["ratio_range"] = {"low": 2.5, "high": 4.5, "step": 0.25}
    demo["objective"] = "cruise_rpm_target"
    demo["cruise_target"] = {"speed": 65, "rpm": 2200}
    body = post(api, demo)
    exact = 2200 * TIRE_DIAMETER_IN / (65 * RPM_PER_MPH_IN * TOP_GEAR)
    assert_allclose(body["optimum"]["final_drive_ratio"], exact, atol=2e-3)
    assert body["candidates"][0]["quarter_mile"] is None
    assert body["candidates"][0]["top_speed"] is None


def test_landing_limit_fails_every_candidate_alike(api: ApiClient, demo: dict[str, Any]) -> None:
    demo["constraints"] = {"min_rpm_after_shift": 5000}
    body = post(api, demo)
    assert body["best"] is None
    for r in body["candidates"]:
        assert [w["code"] for w in r["rejected_because"]] == ["rpm_after_shift_too_low"]
    assert "No listed ratio meets every constraint." in body["summary"]


@pytest.mark.parametrize(
    ("change", "field"),
    [
        pytest.param({"ratios": [3.5] * 201}, "ratios", id="too-many-ratios"),
        pytest.param(
            {"ratios": [3.5] * 150, "drivetrain.gear_ratios": [3.0 - 0.2 * g for g in range(12)]},
            "ratios",
            id="too-much-work",
        ),
        pytest.param({"ratios": [60.0]}, "ratios[0]", id="ratio-out-of-range"),
        pytest.param({"ratios": []}, "ratios", id="no-ratios"),
        pytest.param(
            {"ratio_range": {"low": 2.0, "high": 6.0, "step": 0.01}, "ratios": None},
            "ratio_range.step",
            id="range-too-fine",
        ),
        pytest.param(
            {"ratio_range": {"low": 4.0, "high": 3.0, "step": 0.1}, "ratios": None},
            "ratio_range",
            id="range-reversed",
        ),
        pytest.param({"shift_rpm": [6000, 6000]}, "shift_rpm", id="shift-count"),
        pytest.param({"shift_rpm": [9000] * 5}, "shift_rpm[0]", id="shift-above-limit"),
        pytest.param({"objective": "fastest"}, "objective", id="unknown-objective"),
        pytest.param(
            {"constraints": {"cruise": {"speed": 70}}},
            "constraints.cruise.max_rpm",
            id="cruise-half",
        ),
        pytest.param({"rollout": -1}, "rollout", id="negative-rollout"),
    ],
)
def test_invalid_sweep_is_422_naming_the_field(
    api: ApiClient, demo: dict[str, Any], change: dict[str, Any], field: str
) -> None:
    for key, value in change.items():
        if key == "drivetrain.gear_ratios":
            demo["drivetrain"]["gear_ratios"] = value
        elif value is None:
            demo.pop(key)
        else:
            demo[key] = value
    r = api.post(URL, json=demo)
    assert r.status_code == 422, r.text
    assert r.headers["content-type"] == "application/problem+json"
    assert r.json()["field"] == field


@pytest.mark.parametrize(
    ("change", "detail"),
    [
        pytest.param(
            {"ratio_range": {"low": 3, "high": 4, "step": 0.5}}, "exactly one", id="both"
        ),
        pytest.param({"ratios": None}, "exactly one", id="neither"),
        pytest.param({"objective": "cruise_rpm_target"}, "cruise_target", id="no-target"),
        pytest.param({"vehicle": None, "launch": None}, "need `vehicle`", id="no-vehicle"),
        pytest.param(
            {
                "vehicle": None,
                "launch": None,
                "objective": "cruise_rpm_target",
                "cruise_target": {"speed": 60, "rpm": 2000},
            },
            "min_top_speed",
            id="top-speed-limit-without-vehicle",
        ),
    ],
)
def test_inconsistent_sweep_is_422(
    api: ApiClient, demo: dict[str, Any], change: dict[str, Any], detail: str
) -> None:
    for key, value in change.items():
        if value is None:
            demo.pop(key)
        else:
            demo[key] = value
    r = api.post(URL, json=demo)
    assert r.status_code == 422, r.text
    assert detail in r.json()["detail"]


def test_base_ratio_below_the_floor_is_422_naming_it(api: ApiClient, demo: dict[str, Any]) -> None:
    demo["drivetrain"]["gear_ratios"] = [3.1, 2.05, 1.48, 1.16, 0.94, 1e-300]
    r = api.post(URL, json=demo)
    assert r.status_code == 422, r.text
    assert r.json()["field"] == "drivetrain.gear_ratios[5]"
