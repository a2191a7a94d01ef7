"""The served service over real HTTP: workers, shared metrics, headers on the wire."""

from __future__ import annotations

import gzip
import json
import time
import urllib.request

from prometheus_client.parser import text_string_to_metric_families

from tests.conftest import DATA
from tests.e2e.conftest import WORKERS


def _get(url: str, headers: dict[str, str] | None = None) -> tuple[int, dict[str, str], bytes]:
    request = urllib.request.Request(url, headers=headers or {})
    with urllib.request.urlopen(request, timeout=10) as r:
        return r.status, {k.lower(): v for k, v in r.headers.items()}, r.read()


def _healthz_count(base: str) -> float:
    text = _get(base + "/metrics")[2].decode()
    return sum(
        s.value
        for family in text_string_to_metric_families(text)
        for s in family.samples
        if s.name == "gearwork_http_requests_total" and s.labels.get("route") == "/healthz"
    )


def test_metrics_count_every_worker_whichever_answers_the_scrape(server: str) -> None:
    assert WORKERS > 1
    before = _healthz_count(server)
    for _ in range(40):
        _get(server + "/healthz")
    # a request is counted just after its answer went out, so the last may lag a moment
    for _ in range(100):
        if _healthz_count(server) - before >= 40:
            break
        time.sleep(0.02)
    # then every scrape, whichever worker answers it, sees all 40 (multiprocess mode)
    assert [_healthz_count(server) - before for _ in range(4)] == [40.0] * 4


def test_large_result_is_gzipped_on_the_wire_with_a_weak_etag(server: str) -> None:
    body = (DATA / "demo_coupe_us.json").read_bytes()
    request = urllib.request.Request(
        server + "/v1/shift-plan",
        data=body,
        headers={"Content-Type": "application/json", "Accept-Encoding": "gzip"},
    )
    with urllib.request.urlopen(request, timeout=10) as r:
        headers = {k.lower(): v for k, v in r.headers.items()}
        raw = r.read()
    assert headers["content-encoding"] == "gzip"
    assert headers["etag"].startswith('W/"')
    assert json.loads(gzip.decompress(raw))["reference"] == "WO-2291"
