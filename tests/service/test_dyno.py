"""POST /v1/dyno-correction and POST /v1/torque-curves/import."""

from __future__ import annotations

import pytest
from numpy.testing import assert_allclose

from tests.conftest import ApiClient

AMBIENT = {"temperature": 30, "relative_humidity": 50, "station_pressure": 95.0}


def test_correction_factors_match_reference_cross_check(api: ApiClient) -> None:
    # REFERENCES.md cross-check computed from the standards' formulas: 30 C, 50 % RH,
    # 95.0 kPa -> J1349 (1990) 1.08862, ISO 1585 1.09078, DIN 70020 1.08463
    r = api.post("/v1/dyno-correction", json={"ambient": AMBIENT})
    assert r.status_code == 200, r.text
    f = {c["standard"]: c["factor"] for c in r.json()["corrections"]}
    assert_allclose(f["sae_j1349_1990"], 1.08862, rtol=2e-5)
    assert_allclose(f["iso_1585"], 1.09078, rtol=2e-5)
    assert_allclose(f["din_70020"], 1.08463, rtol=2e-5)


def test_correction_is_applied_to_the_curve(api: ApiClient) -> None:
    body = {
        "ambient": AMBIENT,
        "standard": "din_70020",
        "curve": {"rpm": [2000, 4000, 6000], "torque": [200, 250, 220]},
    }
    out = api.post("/v1/dyno-correction", json=body).json()
    factor = next(c["factor"] for c in out["corrections"] if c["standard"] == "din_70020")
    assert_allclose(
        out["corrected_curve"]["torque"], [200 * factor, 250 * factor, 220 * factor], rtol=1e-4
    )


def test_ambient_needs_one_pressure(api: ApiClient) -> None:
    r = api.post(
        "/v1/dyno-correction", json={"ambient": {"temperature": 20, "relative_humidity": 40}}
    )
    assert r.status_code == 422
    assert r.json()["field"] == "ambient"


def test_semicolon_file_with_decimal_commas_imports(api: ApiClient) -> None:
    # invented export: semicolon separated, decimal commas, units in the header
    text = "Engine Speed (rpm);Torque [N*m]\n2000;200,5\n3000;240,0\n4000;250,0\n"
    r = api.post(
        "/v1/torque-curves/import", content=text.encode(), headers={"content-type": "text/csv"}
    )
    assert r.status_code == 200, r.text
    body = r.json()
    assert body["curve"]["rpm"] == [2000.0, 3000.0, 4000.0]
    assert body["curve"]["torque"] == [200.5, 240.0, 250.0]
    assert body["delimiter"] == ";"


@pytest.mark.parametrize(
    ("text", "where"),
    [
        pytest.param(
            "rpm,torque (lbf*ft)\n2000,200\n3000,abc\n4000,250\n", "line 3", id="bad-number"
        ),
        pytest.param("rpm,torque (lbf*ft)\n2000,", "body", id="truncated"),
        pytest.param("\x00\x01\x02binary", "line 1", id="binary-garbage"),
    ],
)
def test_bad_file_names_line_and_column(api: ApiClient, text: str, where: str) -> None:
    r = api.post(
        "/v1/torque-curves/import", content=text.encode(), headers={"content-type": "text/csv"}
    )
    assert r.status_code == 422, r.text
    assert where in r.json()["field"]


def test_file_over_the_size_limit_is_413(api: ApiClient) -> None:
    text = "rpm,torque (N*m)\n" + "1000,100\n" * 40_000
    r = api.post(
        "/v1/torque-curves/import", content=text.encode(), headers={"content-type": "text/csv"}
    )
    assert r.status_code == 413


def test_import_rejects_json_body_type(api: ApiClient) -> None:
    r = api.post(
        "/v1/torque-curves/import", content=b"{}", headers={"content-type": "application/json"}
    )
    assert r.status_code == 415


def test_multipart_upload_imports_the_file(api: ApiClient) -> None:
    # invented export, tab separated, power in PS
    text = "rpm\tpower (PS)\n2000\t50\n3000\t80\n4000\t100\n"
    r = api.post(
        "/v1/torque-curves/import",
        files={"file": ("run.tsv", text.encode(), "text/tab-separated-values")},
    )
    assert r.status_code == 200, r.text
    assert r.json()["curve"]["rpm"] == [2000.0, 3000.0, 4000.0]


def test_multipart_without_file_is_422(api: ApiClient) -> None:
    body = b'--zz\r\nContent-Disposition: form-data; name="note"\r\n\r\nhi\r\n--zz--\r\n'
    r = api.post(
        "/v1/torque-curves/import",
        content=body,
        headers={"content-type": "multipart/form-data; boundary=zz"},
    )
    assert r.status_code == 422
    assert r.json()["field"] == "file"
