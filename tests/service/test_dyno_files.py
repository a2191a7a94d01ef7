"""POST /v1/torque-curves/import with dyno files as shops have them, in both unit systems.

The files in tests/data are invented exports: made-up layouts and numbers.
"""

from __future__ import annotations

import math
from typing import Any

import pint
import pytest
from numpy.testing import assert_allclose

from tests.conftest import DATA, ApiClient

URL = "/v1/torque-curves/import"
UREG: pint.UnitRegistry[float] = pint.UnitRegistry()


def _q(value: float, unit: str, to: str) -> float:
    """Convert with pint (reference library for the unit definitions)."""
    return float(UREG.Quantity(value, unit).to(to).magnitude)


def _upload(api: ApiClient, name: str, query: str = "", **fields: str) -> Any:
    files = {"file": (name, (DATA / name).read_bytes(), "text/csv")}
    return api.post(URL + query, files=files, data=fields)


def test_wheel_columns_import_as_a_chassis_curve_in_us_units(api: ApiClient) -> None:
    r = _upload(api, "dyno_wheel_columns_us.csv", "?units=us")
    assert r.status_code == 200, r.text
    body = r.json()
    assert body["curve"]["source"] == "chassis"
    assert body["curve"]["torque"][0] == pytest.approx(250.0, rel=1e-6)
    assert body["columns"]["torque"] == "Whl Tq (lb-ft)"
    codes = [w["code"] for w in body["warnings"]]
    assert {"chassis_curve", "summary_rows_skipped", "blank_rows_skipped"} <= set(codes)
    assert body["rows"] == 7


def test_imported_chassis_curve_is_not_reduced_by_drivetrain_efficiency_again(
    api: ApiClient,
) -> None:
    # A chassis curve is already net of losses: wheel torque = T * overall ratio with
    # efficiency 1 whatever `drivetrain.efficiency` says (Gillespie, Fundamentals of
    # Vehicle Dynamics, ch. 2: Fx = T * Ntf * eta / r, eta already in T).
    curve = _upload(api, "dyno_wheel_columns_us.csv", "?units=us").json()["curve"]
    body = {
        "units": "us",
        "engine": {"curve": curve},
        "drivetrain": {
            "gear_ratios": [2.5, 1.6, 1.0],
            "final_drive_ratio": 3.73,
            "efficiency": 0.85,
            "tire": {"diameter": 26.0},
        },
        "table": {"rpm_step": 500},
    }
    r = api.post("/v1/shift-plan", json=body)
    assert r.status_code == 200, r.text
    table = r.json()["gears"][0]["table"]
    k = table["rpm"].index(3000.0)
    assert_allclose(table["wheel_torque"][k], 250.0 * 2.5 * 3.73, rtol=1e-3)


def test_speed_based_force_export_converts_with_query_parameters_in_metric(
    api: ApiClient,
) -> None:
    # rpm = v * N / r * 60 / (2*pi) and T = F * r / N (Gillespie ch. 2, efficiency 1);
    # tire by diameter 640 mm -> rolling radius 0.32 m.
    r = _upload(api, "dyno_road_speed_force_metric.csv", "?overall_ratio=5.254&tire_diameter=640")
    assert r.status_code == 200, r.text
    body = r.json()
    v = 40.0 / 3.6
    assert_allclose(body["curve"]["rpm"][0], v * 5.254 / 0.32 * 60 / (2 * math.pi), atol=0.06)
    assert_allclose(body["curve"]["torque"][0], 3200.0 * 0.32 / 5.254, rtol=1e-4)
    assert body["curve"]["source"] == "chassis"
    assert body["columns"]["road_speed"] == "Speed (km/h)"
    assert body["columns"]["force"] == "Tractive force (N)"
    conversion = body["road_speed_conversion"]
    assert conversion["rolling_radius"] == pytest.approx(320.0)
    assert_allclose(conversion["rpm_per_speed"], 5.254 / 0.32 * 60 / (2 * math.pi) / 3.6, 1e-5)


def test_speed_based_power_export_converts_with_multipart_fields_in_us_units(
    api: ApiClient,
) -> None:
    # tire 26 in overall -> 13 in rolling radius; mph and hp by pint; T = P / omega.
    r = _upload(
        api, "dyno_road_speed_power_us.csv", "?units=us", overall_ratio="3.73", tire_diameter="26"
    )
    assert r.status_code == 200, r.text
    body = r.json()
    radius = _q(13.0, "inch", "m")
    rpm = _q(60.0, "mph", "m/s") * 3.73 / radius * 60 / (2 * math.pi)
    torque_nm = _q(214.0, "hp", "W") / (rpm * 2 * math.pi / 60)
    assert_allclose(body["curve"]["rpm"][2], rpm, atol=0.06)
    assert_allclose(body["curve"]["torque"][2], _q(torque_nm, "N*m", "lbf*ft"), rtol=1e-4)
    assert body["road_speed_conversion"]["rolling_radius"] == pytest.approx(13.0)
    assert body["curve"]["source"] == "chassis"


def test_speed_based_export_without_the_gear_is_a_422_naming_the_parameters(
    api: ApiClient,
) -> None:
    r = _upload(api, "dyno_road_speed_force_metric.csv")
    assert r.status_code == 422
    problem = r.json()
    assert problem["field"] == "overall_ratio"
    assert "`tire_size`" in problem["detail"] and "speed-based" in problem["detail"]


@pytest.mark.parametrize(
    ("query", "fields", "field"),
    [
        pytest.param("?overall_ratio=4", {"overall_ratio": "4"}, "overall_ratio", id="twice"),
        pytest.param("?overall_ratio=4&tire_size=wxyz", {}, "tire_size", id="bad-size"),
        pytest.param(
            "?overall_ratio=4&tire_size=245/40R18&tire_diameter=600", {}, "tire", id="two-tires"
        ),
        pytest.param("", {"overall_ratio": "lots"}, "overall_ratio", id="not-a-number"),
        pytest.param("?tire_diameter=640", {}, "overall_ratio", id="tire-alone"),
        pytest.param("?overall_ratio=4&tire_diameter=99999", {}, "tire_diameter", id="huge"),
        pytest.param(
            "", {"overall_ratio": "0", "tire_size": "245/40R18"}, "overall_ratio", id="zero"
        ),
        pytest.param("?overall_ratio=4&tire_size=ab", {}, "tire_size", id="short-size"),
    ],
)
def test_bad_gear_for_a_speed_based_export_names_the_field(
    api: ApiClient, query: str, fields: dict[str, str], field: str
) -> None:
    r = _upload(api, "dyno_road_speed_force_metric.csv", query, **fields)
    assert r.status_code == 422, r.text
    assert r.json()["field"] == field


@pytest.mark.parametrize(
    ("name", "encoding"),
    [
        pytest.param("dyno_utf16_bom_metric.csv", "UTF-16LE with byte-order mark", id="utf16"),
        pytest.param("dyno_utf8_bom_metric.csv", "UTF-8 with byte-order mark", id="utf8-bom"),
    ],
)
def test_utf16_and_bom_files_import_as_body_and_upload(
    api: ApiClient, name: str, encoding: str
) -> None:
    raw = (DATA / name).read_bytes()
    as_body = api.post(URL, content=raw, headers={"content-type": "text/csv"})
    as_upload = _upload(api, name)
    for r in (as_body, as_upload):
        assert r.status_code == 200, r.text
        assert r.json()["encoding"] == encoding
        assert r.json()["curve"]["torque"] == [180.0, 210.0, 225.0, 215.0]


def test_bytes_neither_utf8_nor_windows_1252_are_a_422_naming_the_byte(api: ApiClient) -> None:
    # 0x81 starts no UTF-8 sequence and is unassigned in windows-1252 (WHATWG Encoding Standard)
    r = api.post(URL, content=b"RPM;\x81\x8d", headers={"content-type": "text/csv"})
    assert r.status_code == 422
    assert r.json()["field"] == "body"
    assert "byte 5" in r.json()["detail"]
    assert "UTF-8 or Windows-1252" in r.json()["detail"]


def test_a_windows_1252_export_is_read_and_says_so(api: ApiClient) -> None:
    """An older Windows program's "ANSI" export: the degree sign is the single byte 0xB0."""
    text = "RPM;Torque (Nm);Intake (\u00b0C)\n2000;150;25\n3000;180;26\n4000;170;27\n"
    raw = text.encode("cp1252")
    assert b"\xb0" in raw
    r = api.post(URL, content=raw, headers={"content-type": "text/csv"})
    assert r.status_code == 200, r.text
    assert r.json()["encoding"] == "Windows-1252"
    assert r.json()["curve"]["torque"] == [150.0, 180.0, 170.0]
