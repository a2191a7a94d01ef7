"""Request ids, JSON request logs, Prometheus metrics, readiness."""

from __future__ import annotations

import json
import logging
import re
from collections.abc import Iterator
from contextlib import contextmanager
from typing import Any

import httpx
import pytest
from anyio.from_thread import start_blocking_portal
from fastapi import FastAPI
from prometheus_client.parser import text_string_to_metric_families

from service.app import app, create_app
from service.http.observability import JsonFormatter
from service.routes import health
from tests.conftest import ApiClient

URL = "/v1/shift-plan"
HEX32 = re.compile(r"^[0-9a-f]{32}$")


@contextmanager
def log_lines(name: str) -> Iterator[list[dict[str, Any]]]:
    """JSON log lines written to logger ``name`` inside the block, parsed."""
    lines: list[str] = []

    class Keep(logging.Handler):
        def emit(self, record: logging.LogRecord) -> None:
            lines.append(self.format(record))

    handler = Keep()
    handler.setFormatter(JsonFormatter())
    logger = logging.getLogger(name)
    logger.addHandler(handler)
    parsed: list[dict[str, Any]] = []
    try:
        yield parsed
    finally:
        logger.removeHandler(handler)
        parsed.extend(json.loads(line) for line in lines)


def samples(api: ApiClient, name: str) -> dict[tuple[tuple[str, str], ...], float]:
    """Every sample of metric family ``name`` on /metrics, keyed by sorted labels."""
    text = api.get("/metrics").text
    out = {}
    for family in text_string_to_metric_families(text):
        for s in family.samples:
            if s.name == name:
                out[tuple(sorted(s.labels.items()))] = s.value
    return out


def count(api: ApiClient, name: str, **labels: str) -> float:
    return samples(api, name).get(tuple(sorted(labels.items())), 0.0)


def test_answer_carries_a_generated_request_id(api: ApiClient) -> None:
    r = api.get("/healthz")
    assert HEX32.match(r.headers["x-request-id"])
    assert r.headers["x-request-id"] != api.get("/healthz").headers["x-request-id"]


def test_valid_incoming_request_id_is_sent_back(api: ApiClient) -> None:
    rid = "shop-7.job:2291_b"
    assert api.get("/healthz", headers={"X-Request-ID": rid}).headers["x-request-id"] == rid


@pytest.mark.parametrize(
    "rid",
    [
        pytest.param("x" * 129, id="too-long"),
        pytest.param("has space", id="space"),
        pytest.param("<script>", id="markup"),
        pytest.param("-leading-dash", id="leading-dash"),
        pytest.param("", id="empty"),
    ],
)
def test_invalid_incoming_request_id_is_replaced(api: ApiClient, rid: str) -> None:
    got = api.get("/healthz", headers={"X-Request-ID": rid}).headers["x-request-id"]
    assert HEX32.match(got)


def test_one_json_line_per_request_without_the_body(
    api: ApiClient, coupe_us: dict[str, Any]
) -> None:
    coupe_us["reference"] = "WO-PRIVATE-4417"
    with log_lines("gearwork.access") as lines:
        r = api.post(URL, json=coupe_us, headers={"X-Request-ID": "job-4417"})
    assert r.status_code == 200
    assert len(lines) == 1
    line = lines[0]
    assert {k: line[k] for k in ("method", "route", "status", "request_id", "message")} == {
        "method": "POST",
        "route": URL,
        "status": 200,
        "request_id": "job-4417",
        "message": "request",
    }
    assert isinstance(line["duration_ms"], float)
    assert line["bytes"] == int(r.headers["content-length"])  # as sent, maybe gzipped
    assert "WO-PRIVATE" not in json.dumps(line)
    assert "255/40R18" not in json.dumps(line)


def test_unknown_path_is_logged_as_unmatched_not_the_raw_path(api: ApiClient) -> None:
    with log_lines("gearwork.access") as lines:
        api.get("/v1/secret-path-8841?token=abc")
    assert lines[0]["route"] == "unmatched" and lines[0]["status"] == 404
    assert "secret-path" not in json.dumps(lines[0]) and "token" not in json.dumps(lines[0])


def test_successful_probes_are_counted_but_not_logged(api: ApiClient) -> None:
    with log_lines("gearwork.access") as lines:
        for path in ("/healthz", "/readyz", "/metrics"):
            assert api.get(path).status_code == 200
    assert lines == []


def test_requests_are_counted_by_route_template_and_status(
    api: ApiClient, coupe_us: dict[str, Any]
) -> None:
    before = count(api, "gearwork_http_requests_total", method="POST", route=URL, status="200")
    errors = count(api, "gearwork_http_errors_total", method="POST", route=URL, status="422")
    api.post(URL, json=coupe_us)
    api.post(URL, json=coupe_us)  # a cache hit, answered before routing, same label
    api.post(URL, json={"units": "us"})
    assert (
        count(api, "gearwork_http_requests_total", method="POST", route=URL, status="200")
        == before + 2
    )
    assert (
        count(api, "gearwork_http_errors_total", method="POST", route=URL, status="422")
        == errors + 1
    )


def test_raw_paths_never_become_metric_labels(api: ApiClient) -> None:
    api.get("/v1/no-such-thing-5521")
    routes = {dict(k)["route"] for k in samples(api, "gearwork_http_requests_total")}
    assert "unmatched" in routes
    assert not any("no-such-thing" in r for r in routes)


def test_latency_histogram_and_cache_outcomes_are_exposed(
    api: ApiClient, coupe_us: dict[str, Any]
) -> None:
    coupe_us["reference"] = "histogram"
    hits = count(api, "gearwork_result_cache_total", outcome="hit")
    n = count(api, "gearwork_http_request_duration_seconds_count", method="POST", route=URL)
    api.post(URL, json=coupe_us)
    api.post(URL, json=coupe_us)
    assert count(api, "gearwork_result_cache_total", outcome="hit") == hits + 1
    assert (
        count(api, "gearwork_http_request_duration_seconds_count", method="POST", route=URL)
        == n + 2
    )
    assert api.get("/metrics").headers["content-type"].startswith("text/plain")


def test_operational_routes_stay_out_of_the_schema_but_readiness_is_documented() -> None:
    paths = app.openapi()["paths"]
    assert "/metrics" not in paths
    assert not any(p.startswith("/demo") for p in paths)
    assert {"/healthz", "/readyz"} <= paths.keys()


def test_readiness_computes_a_plan(api: ApiClient) -> None:
    r = api.get("/readyz")
    assert r.status_code == 200
    assert r.json() == {"status": "ready", "checks": {"shift_plan": "ok"}}
    assert r.headers["cache-control"] == "no-store"


def test_failed_self_check_is_503_problem_with_retry_after(
    api: ApiClient, monkeypatch: pytest.MonkeyPatch
) -> None:
    def broken() -> float:
        raise FloatingPointError("simulated")

    monkeypatch.setattr(health, "probe_shift_rpm", broken)
    with log_lines("gearwork.errors"):
        r = api.get("/readyz")
    assert r.status_code == 503
    assert r.headers["content-type"] == "application/problem+json"
    assert int(r.headers["retry-after"]) >= 1
    assert r.json()["type"].endswith(":not-ready")


def _call(target: FastAPI, method: str, url: str) -> httpx.Response:
    async def go() -> httpx.Response:
        transport = httpx.ASGITransport(app=target)
        async with httpx.AsyncClient(transport=transport, base_url="http://test") as c:
            return await c.request(method, url, headers={"X-Request-ID": "boom-1"})

    with start_blocking_portal() as portal:
        return portal.call(go)


def test_unhandled_error_is_logged_with_request_id_and_answered_as_a_problem() -> None:
    fresh = create_app()

    async def boom() -> None:
        raise RuntimeError("simulated failure")

    fresh.add_api_route("/boom", boom)
    with log_lines("gearwork.errors") as errors, log_lines("gearwork.access") as access:
        r = _call(fresh, "GET", "/boom")
    assert r.status_code == 500
    assert r.headers["content-type"] == "application/problem+json"
    assert r.headers["x-request-id"] == "boom-1"
    assert "RuntimeError" not in r.text and "Traceback" not in r.text
    assert errors[0]["request_id"] == "boom-1"
    assert "RuntimeError: simulated failure" in errors[0]["exception"]
    assert access[0]["status"] == 500 and access[0]["route"] == "/boom"


def test_metrics_negotiate_openmetrics_for_a_scraper_that_asks(api: ApiClient) -> None:
    # the Accept header Prometheus sends (prometheus.io, scrape_protocols), and plain text
    # for a caller that asks for nothing in particular
    accept = "application/openmetrics-text;version=1.0.0,text/plain;version=0.0.4;q=0.5,*/*;q=0.1"
    om = api.get("/metrics", headers={"accept": accept})
    assert om.status_code == 200
    assert om.headers["content-type"].startswith("application/openmetrics-text")
    assert om.text.endswith("# EOF\n")
    plain = api.get("/metrics")
    assert plain.headers["content-type"].startswith("text/plain")
    assert "# EOF" not in plain.text
