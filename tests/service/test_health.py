"""GET /healthz."""

from __future__ import annotations

from tests.conftest import ApiClient


def test_health_answers_ok(api: ApiClient) -> None:
    r = api.get("/healthz")
    assert r.status_code == 200
    assert r.json()["status"] == "ok"


def test_unknown_path_is_a_problem_document(api: ApiClient) -> None:
    r = api.get("/nowhere")
    assert r.status_code == 404
    assert r.headers["content-type"] == "application/problem+json"
    assert r.json()["status"] == 404
