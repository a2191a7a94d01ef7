"""Result cache and ETag of deterministic POST results."""

from __future__ import annotations

from typing import Any

import scipy.constants
from numpy.testing import assert_allclose

from tests.conftest import ApiClient

URL = "/v1/shift-plan"


def test_same_request_gets_same_body_and_etag(api: ApiClient, coupe_us: dict[str, Any]) -> None:
    first = api.post(URL, json=coupe_us)
    second = api.post(URL, json=coupe_us)
    assert first.status_code == second.status_code == 200
    assert first.content == second.content
    assert first.headers["etag"] == second.headers["etag"]


def test_different_request_gets_different_etag(api: ApiClient, coupe_us: dict[str, Any]) -> None:
    a = api.post(URL, json=coupe_us).headers["etag"]
    coupe_us["drivetrain"]["final_drive_ratio"] = 3.73
    b = api.post(URL, json=coupe_us)
    assert b.headers["etag"] != a
    assert b.json()["gears"][0]["overall_ratio"] == round(3.10 * 3.73, 4)


def test_matching_if_none_match_is_304_without_body(
    api: ApiClient, coupe_us: dict[str, Any]
) -> None:
    etag = api.post(URL, json=coupe_us).headers["etag"]
    r = api.post(URL, json=coupe_us, headers={"if-none-match": etag})
    assert r.status_code == 304
    assert r.content == b""


def test_errors_are_not_cached_and_carry_no_etag(api: ApiClient) -> None:
    bad = {"units": "us"}
    for _ in range(2):
        r = api.post(URL, json=bad)
        assert r.status_code == 422
        assert "etag" not in r.headers


def test_cached_json_body_sent_as_text_is_still_415(
    api: ApiClient, coupe_us: dict[str, Any]
) -> None:
    import json

    raw = json.dumps(coupe_us).encode()
    assert api.post(URL, content=raw, headers={"content-type": "application/json"}).is_success
    r = api.post(URL, content=raw, headers={"content-type": "text/plain"})
    assert r.status_code == 415


# --- the key covers everything the answer depends on (issue 11) ---------------------------

IMPORT = "/v1/torque-curves/import"
# invented export: rpm and torque in N*m
CSV = b"Engine Speed (rpm),Torque [N*m]\n2000,200\n3000,240\n4000,250\n"


def test_same_file_imported_in_other_units_is_not_answered_from_the_cache(
    api: ApiClient,
) -> None:
    # only `units` in the query differs; 1 lbf*ft = 1.3558179483314004 N*m exactly
    # (scipy.constants: pound_force * foot)
    metric = api.post(IMPORT + "?units=metric", content=CSV, headers={"content-type": "text/csv"})
    us = api.post(IMPORT + "?units=us", content=CSV, headers={"content-type": "text/csv"})
    assert metric.status_code == us.status_code == 200
    assert metric.headers["etag"] != us.headers["etag"]
    lbf_ft = scipy.constants.pound_force * scipy.constants.foot
    assert_allclose(
        us.json()["curve"]["torque"], [200 / lbf_ft, 240 / lbf_ft, 250 / lbf_ft], rtol=1e-4
    )
    assert metric.json()["curve"]["torque"] == [200.0, 240.0, 250.0]


def test_invalid_query_after_a_cached_answer_is_still_refused(api: ApiClient) -> None:
    headers = {"content-type": "text/csv"}
    assert api.post(IMPORT + "?rpm_step=100", content=CSV, headers=headers).status_code == 200
    r = api.post(IMPORT + "?rpm_step=abc", content=CSV, headers=headers)
    assert r.status_code == 422


def test_if_none_match_star_on_post_is_412_even_for_a_valid_body(
    api: ApiClient, coupe_us: dict[str, Any]
) -> None:
    # RFC 9110, 13.1.2: a false If-None-Match on a method other than GET or HEAD is 412
    for body in (coupe_us, {"units": "us"}):
        r = api.post(URL, json=body, headers={"if-none-match": "*"})
        assert r.status_code == 412
        assert r.headers["content-type"] == "application/problem+json"
        assert r.json()["field"] == "If-None-Match"
