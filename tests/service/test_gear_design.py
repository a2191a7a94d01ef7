"""POST /v1/gear-spacing and POST /v1/speedometer-correction through httpx."""

from __future__ import annotations

import itertools
import math
from typing import Any

import pytest
from numpy.testing import assert_allclose

from tests.conftest import ApiClient, load_demo

SPACING = "/v1/gear-spacing"
SPEEDO = "/v1/speedometer-correction"


@pytest.fixture
def spacing() -> dict[str, Any]:
    return load_demo("demo_gear_spacing_us")


@pytest.fixture
def speedo() -> dict[str, Any]:
    return load_demo("demo_speedometer_us")


def post(api: ApiClient, url: str, body: dict[str, Any]) -> dict[str, Any]:
    r = api.post(url, json=body)
    assert r.status_code == 200, r.text
    data: dict[str, Any] = r.json()
    return data


def by_name(body: dict[str, Any]) -> dict[str, dict[str, Any]]:
    return {s["name"]: s for s in body["sets"]}


# --- gear spacing -------------------------------------------------------------------------


def test_demo_spacing_gives_geometric_progressive_and_given_sets(
    api: ApiClient, spacing: dict[str, Any]
) -> None:
    body = post(api, SPACING, spacing)
    sets = by_name(body)
    assert list(sets) == ["geometric", "progressive", "given"]
    for s in sets.values():
        assert s["gear_ratios"][0] == 3.1 and s["gear_ratios"][-1] == 0.79
        assert len(s["shifts"]) == 5
        assert s["peak_torque_rpm"] == 4500.0  # the demo curve's highest sample
        assert s["band_rpm"] == [s["peak_torque_rpm"], s["peak_power_rpm"]]
    assert sets["progressive"]["progression_factor"] == 1.06
    assert sets["given"]["progression_factor"] is None
    assert all(len(line) <= 80 for line in body["summary"].splitlines())
    assert len(body["cautions"]) >= 4


def test_geometric_step_is_the_root_of_the_spread(api: ApiClient, spacing: dict[str, Any]) -> None:
    # closed form: every step of a geometric set is (first/top)^(1/(n-1))
    geo = by_name(post(api, SPACING, spacing))["geometric"]
    step = (3.10 / 0.79) ** (1.0 / 5.0)
    assert_allclose(geo["steps"], [step] * 5, rtol=1e-5)
    assert_allclose(geo["spread"], 3.10 / 0.79, rtol=1e-5)
    assert_allclose(geo["gear_ratios"], [3.10 / step**k for k in range(6)], rtol=1e-5)


def test_progressive_steps_shrink_by_the_factor(api: ApiClient, spacing: dict[str, Any]) -> None:
    # closed form: phi_(k+1) = phi_k / psi, and the steps multiply to the spread
    prog = by_name(post(api, SPACING, spacing))["progressive"]
    steps = prog["steps"]
    assert_allclose([a / b for a, b in itertools.pairwise(steps)], [1.06] * 4, rtol=1e-4)
    assert_allclose(math.prod(steps), 3.10 / 0.79, rtol=1e-4)


def test_every_shift_lands_at_the_shift_rpm_over_the_step(
    api: ApiClient, spacing: dict[str, Any]
) -> None:
    # closed form: rpm after the shift = shift rpm * next / current ratio, at the rev limit
    for s in post(api, SPACING, spacing)["sets"]:
        for shift in s["shifts"]:
            assert shift["shift_rpm"] == 7000.0
            k = shift["from_gear"] - 1
            ratio_step = s["gear_ratios"][k + 1] / s["gear_ratios"][k]
            assert_allclose(shift["landing_rpm"], 7000.0 * ratio_step, atol=0.06)
            assert_allclose(shift["rpm_drop"], 7000.0 - shift["landing_rpm"], atol=0.11)
            assert_allclose(
                shift["from_torque_peak_rpm"], shift["landing_rpm"] - 4500.0, atol=0.11
            )
            assert shift["in_band"] == (4500.0 <= shift["landing_rpm"] <= s["band_rpm"][1])


def test_spacing_without_a_curve_and_with_a_default_factor(api: ApiClient) -> None:
    body = post(
        api,
        SPACING,
        {"spacing": {"first_ratio": 4.0, "top_ratio": 1.0, "gear_count": 3}, "shift_rpm": [6000]},
    )
    sets = by_name(body)
    assert body["max_progression_factor"] == 4.0  # S^(2/((n-1)(n-2))) = 4
    assert sets["progressive"]["progression_factor"] == 1.1
    assert body["warnings"][0]["code"] == "progression_factor_chosen"
    assert sets["geometric"]["shifts"][0]["landing_rpm"] == 3000.0
    assert sets["geometric"]["shifts"][0]["in_band"] is None


def test_two_gear_spacing_has_no_progression_limit(api: ApiClient) -> None:
    body = post(
        api,
        SPACING,
        {"spacing": {"first_ratio": 2.0, "top_ratio": 1.0, "gear_count": 2}, "shift_rpm": [5000]},
    )
    assert body["max_progression_factor"] is None
    assert by_name(body)["geometric"]["steps"] == [2.0]


@pytest.mark.parametrize(
    ("change", "field"),
    [
        pytest.param(
            {"spacing": {"first_ratio": 1.0, "top_ratio": 3.0, "gear_count": 4}},
            "spacing",
            id="top-above-first",
        ),
        pytest.param(
            {"spacing": {"first_ratio": 3.0, "top_ratio": 0.8, "gear_count": 13}},
            "spacing.gear_count",
            id="too-many-gears",
        ),
        pytest.param(
            {
                "spacing": {
                    "first_ratio": 3.1,
                    "top_ratio": 0.79,
                    "gear_count": 6,
                    "progression_factor": 1.5,
                }
            },
            "spacing.progression_factor",
            id="factor-too-large",
        ),
        pytest.param(
            {"gear_ratios": [3.1, 3.2, 1.0]}, "gear_ratios[1]", id="gears-not-descending"
        ),
        pytest.param({"gear_ratios": [3.1]}, "gear_ratios", id="one-gear"),
        pytest.param({"shift_rpm": [7000, 7000]}, "shift_rpm", id="shift-count"),
        pytest.param({"shift_rpm": [0]}, "shift_rpm[0]", id="zero-shift-rpm"),
        pytest.param(
            {"landing_band_rpm": [6000, 4000]}, "landing_band_rpm[1]", id="band-reversed"
        ),
        pytest.param({"landing_band": "everywhere"}, "landing_band", id="unknown-band"),
    ],
)
def test_invalid_spacing_is_422_naming_the_field(
    api: ApiClient, spacing: dict[str, Any], change: dict[str, Any], field: str
) -> None:
    spacing.update(change)
    r = api.post(SPACING, json=spacing)
    assert r.status_code == 422, r.text
    assert r.headers["content-type"] == "application/problem+json"
    assert r.json()["field"] == field


@pytest.mark.parametrize(
    ("body", "detail"),
    [
        pytest.param({"shift_rpm": [6000]}, "`spacing`, `gear_ratios`", id="nothing-to-space"),
        pytest.param({"gear_ratios": [3.0, 2.0]}, "`shift_rpm`, or `engine`", id="no-shift-rpm"),
        pytest.param(
            {"gear_ratios": [3.0, 2.0], "shift_rpm": [6000], "landing_band_rpm": [3000, 5000]},
            "needs `engine`",
            id="band-without-curve",
        ),
    ],
)
def test_incomplete_spacing_is_422(api: ApiClient, body: dict[str, Any], detail: str) -> None:
    r = api.post(SPACING, json=body)
    assert r.status_code == 422, r.text
    assert detail in r.json()["detail"]


# --- speedometer correction ---------------------------------------------------------------


def test_demo_correction_after_a_tire_and_axle_change(
    api: ApiClient, speedo: dict[str, Any]
) -> None:
    # closed form (transmission-output sensor): true/indicated = (r1/r0) * (N0/N1)
    body = post(api, SPEEDO, speedo)
    r0 = body["original"]["tire"]["rolling_radius"]
    r1 = body["new"]["tire"]["rolling_radius"]
    expected = (r1 / r0) * (3.23 / 3.73)
    assert_allclose(body["true_per_indicated"], expected, rtol=1e-3)
    assert_allclose(body["correction_factor"], 1.0 / expected, rtol=1e-3)
    assert body["reads"] == "high" and body["reading_error_percent"] > 0
    for s in body["speeds"]:
        assert_allclose(s["true"], s["indicated"] * body["true_per_indicated"], atol=0.006)
    assert [d["indicated"] for d in body["distances"]] == [1000.0, 12000.0]
    assert_allclose(body["distances"][1]["true"], 12000 * body["true_per_indicated"], atol=0.01)
    gear = body["driven_gear"]
    assert_allclose(gear["exact_teeth"], 18 * body["indicated_per_true"], rtol=1e-4)
    assert gear["nearest_teeth"] == round(gear["exact_teeth"])
    assert all(len(line) <= 80 for line in body["summary"].splitlines())


@pytest.mark.parametrize(
    ("old_in", "new_in"),
    [
        pytest.param(26.0, 28.0, id="taller"),
        pytest.param(27.5, 25.0, id="shorter"),
    ],
)
def test_wheel_sensor_error_is_the_diameter_ratio(
    api: ApiClient, old_in: float, new_in: float
) -> None:
    # closed form: a wheel sensor reads true/indicated = D_new / D_old, so the error is
    # 100 * (D_old / D_new - 1) per cent; the axle ratio plays no part
    body = post(
        api,
        SPEEDO,
        {
            "units": "us",
            "drive": "wheel",
            "original": {"tire": {"diameter": old_in}, "final_drive_ratio": 3.55},
            "new": {"tire": {"diameter": new_in}, "final_drive_ratio": 4.10},
            "indicated_speeds": [60],
        },
    )
    assert_allclose(body["true_per_indicated"], new_in / old_in, rtol=1e-6)
    assert_allclose(body["reading_error_percent"], 100.0 * (old_in / new_in - 1.0), atol=1e-4)
    assert_allclose(body["speeds"][0]["true"], 60.0 * new_in / old_in, atol=0.006)
    assert body["reads"] == ("low" if new_in > old_in else "high")
    assert body["warnings"][0]["code"] == "axle_change_not_seen"


def test_axle_change_alone_with_default_readings(api: ApiClient) -> None:
    # closed form: same tire, true/indicated = N0/N1
    body = post(
        api,
        SPEEDO,
        {
            "original": {"tire": {"size": "205/55R16"}, "final_drive_ratio": 3.9},
            "new": {"final_drive_ratio": 4.3},
        },
    )
    assert_allclose(body["true_per_indicated"], 3.9 / 4.3, rtol=1e-6)
    assert [s["indicated"] for s in body["speeds"]] == [50.0, 80.0, 100.0, 120.0, 130.0]
    assert body["driven_gear"] is None


@pytest.mark.parametrize(
    ("change", "field"),
    [
        pytest.param({"new": {}}, "new", id="nothing-changed"),
        pytest.param(
            {"new": {"tire": {"size": "big"}}}, "new.tire.size", id="new-tire-unreadable"
        ),
        pytest.param(
            {"original": {"tire": {"diameter": 5}, "final_drive_ratio": 3.23}},
            "original.tire.diameter",
            id="original-tire-too-small",
        ),
        pytest.param({"indicated_speeds": [600]}, "indicated_speeds[0]", id="speed-too-high"),
        pytest.param({"driven_teeth": 0}, "driven_teeth", id="no-teeth"),
        pytest.param({"drive": "cable"}, "drive", id="unknown-drive"),
    ],
)
def test_invalid_correction_is_422_naming_the_field(
    api: ApiClient, speedo: dict[str, Any], change: dict[str, Any], field: str
) -> None:
    speedo.update(change)
    r = api.post(SPEEDO, json=speedo)
    assert r.status_code == 422, r.text
    assert r.json()["field"] == field


def test_new_axle_without_the_original_is_422(api: ApiClient, speedo: dict[str, Any]) -> None:
    speedo["original"].pop("final_drive_ratio")
    r = api.post(SPEEDO, json=speedo)
    assert r.status_code == 422, r.text
    assert "needs the original" in r.json()["detail"]
