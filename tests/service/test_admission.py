"""Admission: calculations off the event loop, a bounded queue, a wait budget, slow bodies.

Every test here failed before calculation slots existed (issue 11): a calculation ran on
the event loop, so a probe waited for it; requests were counted only once the loop got to
them; a stalled body held its place forever. No test asserts on timing: blocking is made
with events, and each wait is bounded so a regression fails instead of hanging.
"""

from __future__ import annotations

import json
import threading
from collections.abc import Callable, Iterator, MutableMapping
from typing import Any

import anyio
import httpx
import pytest
from fastapi import FastAPI
from prometheus_client.parser import text_string_to_metric_families

from service.app import create_app
from service.routes import shift_plan
from service.settings import get_settings
from tests.conftest import load_demo

URL = "/v1/shift-plan"
BOUND_S = 20.0  # upper bound on any wait in these tests; reached only by a regression


@pytest.fixture
def build(monkeypatch: pytest.MonkeyPatch) -> Iterator[Callable[..., FastAPI]]:
    """An app under GEARWORK_* settings (``build(calc_slots="1")``)."""

    def make(**env: str) -> FastAPI:
        for name, value in env.items():
            monkeypatch.setenv(f"GEARWORK_{name.upper()}", value)
        get_settings.cache_clear()
        try:
            return create_app()
        finally:
            get_settings.cache_clear()

    yield make
    get_settings.cache_clear()


@pytest.fixture
def gate(monkeypatch: pytest.MonkeyPatch) -> Iterator[threading.Event]:
    """Shift-plan calculations block (their thread) until the event is set."""
    release = threading.Event()
    real = getattr(shift_plan, "compute_shift_plan")  # noqa: B009 (not in __all__)

    def held(*args: Any, **kwargs: Any) -> Any:
        release.wait(BOUND_S)
        return real(*args, **kwargs)

    monkeypatch.setattr(shift_plan, "compute_shift_plan", held)
    yield release
    release.set()


def _client(app: FastAPI) -> httpx.AsyncClient:
    return httpx.AsyncClient(transport=httpx.ASGITransport(app=app), base_url="http://t")


def _body(reference: str) -> dict[str, Any]:
    return {**load_demo("demo_coupe_us"), "reference": reference}


async def _until(predicate: Callable[[], bool]) -> None:
    with anyio.fail_after(BOUND_S):
        while not predicate():
            await anyio.sleep(0.01)


def test_probe_is_answered_while_a_calculation_holds_the_only_slot(
    build: Callable[..., FastAPI], gate: threading.Event
) -> None:
    app = build(calc_slots="1")
    order: list[str] = []

    async def go() -> None:
        async with _client(app) as c, anyio.create_task_group() as tg:

            async def calculate() -> None:
                r = await c.post(URL, json=_body("held"))
                order.append(f"calculation {r.status_code}")

            tg.start_soon(calculate)
            await _until(lambda: app.state.admission.computing == 1)
            probe = await c.get("/healthz")
            order.append(f"probe {probe.status_code}")
            gate.set()

    anyio.run(go)
    assert order == ["probe 200", "calculation 200"]


def test_full_queue_is_refused_at_once_with_retry_after_and_readiness_drops(
    build: Callable[..., FastAPI], gate: threading.Event
) -> None:
    app = build(calc_slots="1", queue_limit="1", retry_after_s="4")
    answers: dict[str, httpx.Response] = {}

    async def go() -> None:
        async with _client(app) as c:
            async with anyio.create_task_group() as tg:

                async def post(name: str) -> None:
                    answers[name] = await c.post(URL, json=_body(name))

                tg.start_soon(post, "computing")
                await _until(lambda: app.state.admission.computing == 1)
                tg.start_soon(post, "queued")
                await _until(lambda: app.state.admission.waiting == 1)
                answers["refused"] = await c.post(URL, json=_body("refused"))
                answers["readyz"] = await c.get("/readyz")
                gate.set()
            answers["readyz after"] = await c.get("/readyz")

    anyio.run(go)
    assert answers["computing"].status_code == answers["queued"].status_code == 200
    refused = answers["refused"]
    assert refused.status_code == 503
    assert refused.headers["retry-after"] == "4"
    assert refused.headers["content-type"] == "application/problem+json"
    assert refused.json()["type"].endswith(":busy")
    assert answers["readyz"].status_code == 503
    assert answers["readyz"].json()["type"].endswith(":not-ready")
    assert answers["readyz after"].status_code == 200


def test_no_request_waits_past_the_budget(
    build: Callable[..., FastAPI], gate: threading.Event
) -> None:
    app = build(calc_slots="1", queue_limit="8", wait_budget_s="0.2")
    answers: dict[str, httpx.Response] = {}

    async def go() -> None:
        async with _client(app) as c, anyio.create_task_group() as tg:

            async def first() -> None:
                answers["first"] = await c.post(URL, json=_body("first"))

            tg.start_soon(first)
            await _until(lambda: app.state.admission.computing == 1)
            answers["second"] = await c.post(URL, json=_body("second"))  # waits 0.2 s
            gate.set()

    anyio.run(go)
    assert answers["first"].status_code == 200
    assert answers["second"].status_code == 503
    # refused by the budget either way: after waiting for it ("within 0.2 s"), or at once
    # when a loaded machine has already spent it reading the body ("would exceed 0.2 s")
    assert "0.2 s" in answers["second"].json()["detail"]
    assert app.state.admission.waiting == 0 and app.state.admission.computing == 0


def test_stalled_body_is_408_and_never_takes_a_slot(build: Callable[..., FastAPI]) -> None:
    # 9 of 2000 declared bytes, then nothing: the body deadline answers, the slot stays
    # free for the caller behind it
    app = build(calc_slots="1", client_timeout_s="0.3")
    seen: dict[str, Any] = {}

    async def go() -> None:
        stalled = anyio.Event()

        async def receive() -> dict[str, Any]:
            if not stalled.is_set():
                stalled.set()
                return {"type": "http.request", "body": b'{"units":', "more_body": True}
            await anyio.sleep(BOUND_S)
            return {"type": "http.disconnect"}

        statuses: list[int] = []

        async def send(message: MutableMapping[str, Any]) -> None:
            if message["type"] == "http.response.start":
                statuses.append(message["status"])

        scope = {
            "type": "http",
            "method": "POST",
            "path": URL,
            "raw_path": URL.encode(),
            "query_string": b"",
            "headers": [(b"content-type", b"application/json"), (b"content-length", b"2000")],
        }
        async with _client(app) as c, anyio.create_task_group() as tg:

            async def slow() -> None:
                with anyio.fail_after(BOUND_S):
                    await app(scope, receive, send)

            tg.start_soon(slow)
            await stalled.wait()
            seen["slots while stalled"] = app.state.admission.computing
            seen["other"] = (await c.post(URL, json=_body("behind"))).status_code
        seen["stalled"] = statuses

    anyio.run(go)
    assert seen["slots while stalled"] == 0
    assert seen["other"] == 200
    assert seen["stalled"] == [408]


def test_queue_depth_and_wait_time_are_exported(build: Callable[..., FastAPI]) -> None:
    app = build(calc_slots="1")

    async def go() -> str:
        async with _client(app) as c:
            assert (await c.post(URL, json=_body("metrics"))).status_code == 200
            return (await c.get("/metrics")).text

    text = anyio.run(go)
    samples = {
        (s.name, tuple(sorted(s.labels.items()))): s.value
        for family in text_string_to_metric_families(text)
        for s in family.samples
    }
    assert samples[("gearwork_calculations_waiting", ())] == 0
    assert samples[("gearwork_calculations_running", ())] == 0
    assert samples[("gearwork_calculation_wait_seconds_count", (("outcome", "admitted"),))] >= 1


def test_inline_mode_still_answers(build: Callable[..., FastAPI]) -> None:
    app = build(calc_slots="0")

    async def go() -> int:
        async with _client(app) as c:
            return (await c.post(URL, json=_body("inline"))).status_code

    assert anyio.run(go) == 200


def test_thousands_of_unknown_fields_are_refused_before_validation(
    build: Callable[..., FastAPI],
) -> None:
    # 15,000 unknown keys (233 KB, under the body limit): refused by one walk naming the
    # crowded object, not by 15,000 validation errors
    body = _body("crowded")
    body.update({f"k{i}": i for i in range(15_000)})
    app = build()

    async def go() -> httpx.Response:
        async with _client(app) as c:
            return await c.post(
                URL, content=json.dumps(body), headers={"content-type": "application/json"}
            )

    r = anyio.run(go)
    assert r.status_code == 422
    problem = r.json()
    assert problem["field"] == "body"
    assert "15004 fields" in problem["detail"]
    assert len(problem["errors"]) == 1


def test_a_wait_that_would_exceed_the_budget_is_refused_at_once() -> None:
    # two ahead of it on one busy slot at 1 s each: 3 s expected against a 2 s budget
    from service.http.admission import Admission

    adm = Admission(slots=1, queue=8, budget_s=2.0, client_timeout_s=10.0, retry_after_s=1)
    assert adm.expected_wait_s() == 0.0  # a free slot: no wait
    adm.computing, adm.waiting = 1, 2
    for _ in range(200):
        adm.record(1.0)
    assert adm.expected_wait_s() == pytest.approx(3.0, rel=1e-6)
    assert adm.expected_wait_s() > adm.budget_s
