"""POST /v1/comparison through httpx: a base setup beside its variants, with deltas."""

from __future__ import annotations

import copy
import re
from typing import Any

import pytest
from numpy.testing import assert_allclose

from tests.conftest import ApiClient, load_demo

URL = "/v1/comparison"
RPM_PER_MPH_IN = 63360.0 / (60.0 * 3.141592653589793)  # 336.135 (REFERENCES.md)


@pytest.fixture
def demo() -> dict[str, Any]:
    return load_demo("demo_comparison_us")


def post(api: ApiClient, body: dict[str, Any]) -> dict[str, Any]:
    r = api.post(URL, json=body)
    assert r.status_code == 200, r.text
    data: dict[str, Any] = r.json()
    return data


def test_demo_comparison_puts_every_variant_beside_the_base(
    api: ApiClient, demo: dict[str, Any]
) -> None:
    body = post(api, demo)
    assert body["reference"] == "PC-1187"
    names = [s["name"] for s in body["setups"]]
    assert names == ["base", "3.91 axle", "4.10 axle", "tall tires", "3.91 + light"]
    base, *variants = body["setups"]
    assert base["delta"] is None and base["changes"] == []
    assert variants[3]["changes"] == ["final_drive_ratio", "mass"]
    for s in body["setups"]:
        run = s["run"]
        assert run is not None
        assert 0 < run["sixty_ft"] < run["eighth_mile"]["elapsed"] < run["quarter_mile"]["elapsed"]
        assert run["quarter_mile"]["trap_speed"] > run["eighth_mile"]["trap_speed"]
        assert run["zero_to_60_mph_less_rollout"] < run["zero_to_60_mph"]
        assert run["top_speed"]["limited_by"] in {"drag", "rev_limit"}
        assert len(s["gears"]) == 6 and len(s["shifts"]) == 5 and len(s["cruise"]) == 2
    assert all(len(line) <= 80 for line in body["summary"].splitlines())
    assert body["summary"].isascii() and len(body["cautions"]) >= 4


def test_deltas_are_the_variant_less_the_base(api: ApiClient, demo: dict[str, Any]) -> None:
    body = post(api, demo)
    base = body["setups"][0]
    for s in body["setups"][1:]:
        d = s["delta"]
        assert_allclose(
            d["quarter_mile_elapsed"],
            s["run"]["quarter_mile"]["elapsed"] - base["run"]["quarter_mile"]["elapsed"],
            atol=2e-3,
        )
        assert_allclose(
            d["top_speed"],
            s["run"]["top_speed"]["speed"] - base["run"]["top_speed"]["speed"],
            atol=2e-2,
        )
        assert_allclose(
            d["speed_at_rev_limit"],
            [
                a["speed_at_rev_limit"] - b["speed_at_rev_limit"]
                for a, b in zip(s["gears"], base["gears"], strict=True)
            ],
            atol=2e-2,
        )
        assert_allclose(
            d["cruise_top_gear_rpm"],
            [
                a["top_gear_rpm"] - b["top_gear_rpm"]
                for a, b in zip(s["cruise"], base["cruise"], strict=True)
            ],
            atol=1.0,
        )


def test_shorter_axle_keeps_the_shifts_and_shortens_every_gear_by_the_ratio(
    api: ApiClient, demo: dict[str, Any]
) -> None:
    # closed form: road speed at a given rpm is inversely proportional to the overall ratio,
    # and the wheel-force crossover does not depend on the final drive (REFERENCES.md)
    body = post(api, {**demo, "shift_criterion": "tractive_force"})
    base, axle = body["setups"][0], body["setups"][1]
    assert [s["shift_rpm"] for s in axle["shifts"]] == [s["shift_rpm"] for s in base["shifts"]]
    reach = [g["speed_at_rev_limit"] for g in axle["gears"]]
    base_reach = [g["speed_at_rev_limit"] for g in base["gears"]]
    assert_allclose(reach, [v * 3.55 / 3.91 for v in base_reach], rtol=1e-3)


def test_cruise_rpm_matches_the_336_formula(api: ApiClient, demo: dict[str, Any]) -> None:
    # common practice (REFERENCES.md): rpm = mph * overall ratio * 336.135 / tire diameter
    body = post(api, demo)
    for s in body["setups"]:
        diameter_in = 2.0 * s["tire"]["rolling_radius"]
        for cruise in s["cruise"]:
            expected = [
                cruise["speed"] * g["overall_ratio"] * RPM_PER_MPH_IN / diameter_in
                for g in s["gears"]
            ]
            assert_allclose(cruise["rpm"], expected, rtol=2e-3)
            assert cruise["top_gear_rpm"] == cruise["rpm"][-1]


def test_every_shift_lands_at_the_shift_rpm_times_the_ratio_step(
    api: ApiClient, demo: dict[str, Any]
) -> None:
    # closed form: rpm after = shift rpm * next ratio / current ratio
    body = post(api, demo)
    for s in body["setups"]:
        ratios = s["gear_ratios"]
        for shift in s["shifts"]:
            k = shift["from_gear"] - 1
            assert_allclose(
                shift["rpm_after"], shift["shift_rpm"] * ratios[k + 1] / ratios[k], atol=0.11
            )


def test_comparison_without_a_vehicle_gives_gearing_only(
    api: ApiClient, demo: dict[str, Any]
) -> None:
    for key in ("vehicle", "launch"):
        demo.pop(key)
    demo["variants"] = demo["variants"][:3]
    body = post(api, demo)
    assert all(s["run"] is None for s in body["setups"])
    assert body["setups"][1]["delta"]["quarter_mile_elapsed"] is None
    assert "1/4" not in body["summary"]


def test_net_acceleration_shifts_and_a_converter_variant(
    api: ApiClient, demo: dict[str, Any]
) -> None:
    demo["shift_criterion"] = "net_acceleration"
    demo["variants"] = [{"name": "converter", "converter": {"stall_rpm": 3200}}]
    body = post(api, demo)
    assert body["shift_criterion"] == "net_acceleration"
    assert body["setups"][1]["changes"] == ["converter"]
    assert body["setups"][1]["run"]["sixty_ft"] != body["setups"][0]["run"]["sixty_ft"]


def test_metric_and_us_requests_agree(api: ApiClient, demo: dict[str, Any]) -> None:
    metric = copy.deepcopy(demo)
    metric["units"] = "metric"
    nm_per_lbft = 1.3558179483314004
    metric["engine"]["curve"]["torque"] = [
        t * nm_per_lbft for t in demo["engine"]["curve"]["torque"]
    ]
    v = metric["vehicle"]
    v["mass"], v["wheelbase"], v["cg_height"] = 3450 * 0.45359237, 107 * 25.4, 20 * 25.4
    v["road_load"]["frontal_area"] = 22.0 * 0.3048**2
    v["air"] = {"temperature": 20.0, "altitude": 500 * 0.3048, "relative_humidity": 40}
    metric["cruise_speeds"] = [70 * 1.609344, 80 * 1.609344]
    metric["variants"][3]["mass"] = 3300 * 0.45359237
    us_body, metric_body = post(api, demo), post(api, metric)
    for u, m in zip(us_body["setups"], metric_body["setups"], strict=True):
        assert_allclose(
            u["run"]["quarter_mile"]["elapsed"], m["run"]["quarter_mile"]["elapsed"], rtol=1e-4
        )
        assert_allclose(
            u["run"]["top_speed"]["speed"] * 1.609344, m["run"]["top_speed"]["speed"], rtol=1e-3
        )
        assert_allclose(u["cruise"][0]["rpm"], m["cruise"][0]["rpm"], atol=1.0)
    # the speed a warning quotes is in the caller's unit: 1 mph = 1.609344 km/h exactly
    # (NIST SP 811); both are rounded to 0.1 for the sentence
    said = 0
    for u, m in zip(us_body["setups"], metric_body["setups"], strict=True):
        for wu, wm in zip(u["warnings"], m["warnings"], strict=True):
            if wu["code"] not in ("drag_limited_speed", "rev_limit_held"):
                continue
            mph = float(re.search(r"([\d.]+) mph", wu["message"]).group(1))  # type: ignore[union-attr]
            kmh = float(re.search(r"([\d.]+) km/h", wm["message"]).group(1))  # type: ignore[union-attr]
            assert "m/s" not in wu["message"] + wm["message"]
            assert_allclose(mph * 1.609344, kmh, atol=0.2)
            said += 1
    assert said >= 2
    sheet = " ".join(us_body["summary"].split())  # the sheet wraps its warnings
    assert re.search(r"(drag-limited speed of|rev limit in gear \d at) [\d.]+ mph", sheet)
    # each warning on the sheet names the setups it concerns
    names = [s["name"] for s in us_body["setups"]]
    for line in us_body["summary"].splitlines():
        if line.startswith("- The car"):
            raise AssertionError(f"warning without its setup: {line}")
        if line.startswith("- ") and ": The car" in line:
            assert line[2 : line.index(": The car")] in names


@pytest.mark.parametrize(
    ("change", "field"),
    [
        pytest.param({"variants": []}, "variants", id="no-variants"),
        pytest.param(
            {"variants": [{"final_drive_ratio": 4.1}] * 9}, "variants", id="too-many-variants"
        ),
        pytest.param(
            {"variants": [{"name": "same"}]}, "variants[0]", id="variant-changes-nothing"
        ),
        pytest.param(
            {"variants": [{"final_drive_ratio": 60}]},
            "variants[0].final_drive_ratio",
            id="axle-out-of-range",
        ),
        pytest.param(
            {"variants": [{"gear_ratios": [3.1, 3.2, 1.5, 1.2, 1.0, 0.8]}]},
            "variants[0].gear_ratios[1]",
            id="variant-gears-not-descending",
        ),
        pytest.param(
            {"variants": [{"tire": {"size": "huge"}}]},
            "variants[0].tire.size",
            id="variant-tire-unreadable",
        ),
        pytest.param(
            {"variants": [{"rev_limit_rpm": 1000}]},
            "variants[0].rev_limit_rpm",
            id="variant-rev-limit-below-curve",
        ),
        pytest.param(
            {"variants": [{"converter": {"k_factor": 150, "stall_rpm": 3000}}]},
            "variants[0].converter",
            id="variant-converter-twice-described",
        ),
        pytest.param({"cruise_speeds": [900]}, "cruise_speeds[0]", id="cruise-speed-too-high"),
        pytest.param({"shift_criterion": "fastest"}, "shift_criterion", id="unknown-criterion"),
    ],
)
def test_invalid_comparison_is_422_naming_the_field(
    api: ApiClient, demo: dict[str, Any], change: dict[str, Any], field: str
) -> None:
    demo.update(change)
    r = api.post(URL, json=demo)
    assert r.status_code == 422, r.text
    assert r.headers["content-type"] == "application/problem+json"
    assert r.json()["field"] == field


def test_per_gear_efficiency_with_another_gear_count_is_422(
    api: ApiClient, demo: dict[str, Any]
) -> None:
    demo["drivetrain"]["efficiency"] = [0.87] * 6
    demo["variants"] = [{"gear_ratios": [2.9, 1.9, 1.3, 1.0]}]
    r = api.post(URL, json=demo)
    assert r.status_code == 422, r.text
    assert r.json()["field"] == "drivetrain.efficiency"


@pytest.mark.parametrize(
    "change",
    [
        pytest.param({"vehicle": None, "launch": None}, id="mass-variant-without-vehicle"),
        pytest.param(
            {
                "vehicle": None,
                "launch": None,
                "variants": [{"final_drive_ratio": 4.1}],
                "shift_criterion": "net_acceleration",
            },
            id="net-acceleration-without-vehicle",
        ),
    ],
)
def test_vehicle_only_inputs_without_a_vehicle_are_422(
    api: ApiClient, demo: dict[str, Any], change: dict[str, Any]
) -> None:
    demo.update(change)
    r = api.post(URL, json=demo)
    assert r.status_code == 422, r.text
    assert "need `vehicle`" in r.json()["detail"]


def test_base_ratio_below_the_floor_is_422_naming_it(api: ApiClient, demo: dict[str, Any]) -> None:
    demo["drivetrain"]["final_drive_ratio"] = 1e-12
    r = api.post(URL, json=demo)
    assert r.status_code == 422, r.text
    assert r.json()["field"] == "drivetrain.final_drive_ratio"


def test_car_that_cannot_move_off_is_422_naming_the_vehicle(
    api: ApiClient, demo: dict[str, Any]
) -> None:
    demo["vehicle"]["road_load"]["grade_percent"] = 30
    demo["vehicle"]["friction_coefficient"] = 0.2
    r = api.post(URL, json=demo)
    assert r.status_code == 422, r.text
    assert r.json()["field"] == "vehicle"
    assert "cannot move off" in r.json()["detail"]
