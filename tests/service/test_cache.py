"""Result cache and ETag of deterministic POST results."""

from __future__ import annotations

from typing import Any

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
