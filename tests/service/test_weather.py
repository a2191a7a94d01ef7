"""POST /v1/weather-correction through httpx. The car and its slip are invented."""

from __future__ import annotations

from typing import Any

import fluids
import pytest
from numpy.testing import assert_allclose

from tests.conftest import ApiClient, load_demo

URL = "/v1/weather-correction"


@pytest.fixture(scope="module")
def metric(api: ApiClient) -> dict[str, Any]:
    r = api.post(URL, json=load_demo("demo_weather_metric"))
    assert r.status_code == 200, r.text
    return dict(r.json())


def test_cooler_denser_air_predicts_a_quicker_slip(metric: dict[str, Any]) -> None:
    slip = metric["slip"]
    assert slip["et"] == 16.62 and slip["trap"] == 138.4
    assert slip["predicted_et"] < slip["et"] and slip["predicted_trap"] > slip["trap"]
    assert metric["predict_for"]["density_altitude"] < metric["taken_in"]["density_altitude"]
    assert metric["cautions"] and "Limits" in metric["summary"]
    assert all(len(line) <= 80 for line in metric["summary"].splitlines())


def test_standard_air_in_us_units_reads_its_altitude_in_feet(api: ApiClient) -> None:
    # 1000 m of the ISO 2533 / US 1976 standard atmosphere (fluids.ATMOSPHERE_1976), dry
    atm = fluids.ATMOSPHERE_1976(1000.0)
    body = {
        "units": "us",
        "taken_in": {
            "temperature": (atm.T - 273.15) * 9 / 5 + 32,
            "pressure": atm.P / 3386.389,
        },
    }
    r = api.post(URL, json=body)
    assert r.status_code == 200, r.text
    out = r.json()
    assert_allclose(out["taken_in"]["density_altitude"], 1000.0 / 0.3048, atol=2.0)
    assert out["slip"] is None and out["units"]["distance"] == "ft"
    # its density in lb/ft^3 (pound 0.45359237 kg, foot 0.3048 m, exact by definition)
    assert out["units"]["density"] == "lb/ft^3"
    lb_ft3 = atm.rho * 0.3048**3 / 0.45359237
    assert_allclose(out["taken_in"]["density"], lb_ft3, rtol=2e-4)


def test_prediction_without_the_car_is_a_problem(api: ApiClient) -> None:
    body = {
        "taken_in": {"temperature": 20, "pressure": 100},
        "predict_for": {"temperature": 30, "pressure": 95},
    }
    r = api.post(URL, json=body)
    assert r.status_code == 422
    assert r.headers["content-type"].startswith("application/problem+json")


def test_temperature_outside_the_standard_names_the_field(api: ApiClient) -> None:
    r = api.post(URL, json={"taken_in": {"temperature": 70, "pressure": 100}})
    assert r.status_code == 422, r.text
    assert r.json()["field"].startswith("taken_in")


def test_air_outside_the_standards_band_is_warned(api: ApiClient) -> None:
    # ISO 1585 states a validity band for its factor, 0.93..1.07 (from memory, as
    # core.engine.correction records it): 40 degC at 90 kPa lies outside it
    body = {"standard": "iso_1585", "taken_in": {"temperature": 40, "pressure": 90}}
    r = api.post(URL, json=body)
    assert r.status_code == 200, r.text
    codes = [w["code"] for w in r.json()["warnings"]]
    assert codes == ["correction_factor_out_of_range"]
    assert "Warnings:" in r.json()["summary"]
