"""Benchmark helpers measured in process: repeated timing with median and p99, cases
interleaved round by round, the in-process ``GET /healthz`` baseline, CPU per request
through the whole ASGI app, and the demo cars as core drive models.

Interleaving: every case is timed in turn within each round, so that a busy moment of the
shared machine touches all of them alike. Interleaved figures are CPU time of this process
(``time.process_time``): on a machine shared with other work a long call is preempted more
often than a short one, which wall-clock ratios would count against it.
"""

from __future__ import annotations

import asyncio
import contextlib
import inspect
import json
import os
import statistics
import time
from collections.abc import Callable, Collection, Iterator
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import httpx
import numpy as np

from core import Drivetrain, Tire, drive_model, make_drivetrain, tire_from_diameter
from core.runs.drive_model import DriveModel
from service.mapping.inputs import build_curve, build_drivetrain, build_tire
from service.mapping.vehicle import build_launch, build_vehicle
from service.schemas.acceleration import AccelerationRunRequest

__all__ = [
    "DATA",
    "Timing",
    "app_cpu_per_request",
    "asgi_call",
    "async_side_by_side",
    "demo_drive_model",
    "demo_log",
    "healthz_call",
    "interleaved_ms",
    "one_cpu",
    "ratio_line",
    "side_by_side",
    "time_call",
]

DATA = Path(__file__).resolve().parent.parent / "tests" / "data"


@contextlib.contextmanager
def one_cpu() -> Iterator[None]:
    """Keep this thread, and threads it starts meanwhile, on one CPU, as a served
    worker keeps itself (service.http.affinity): an app measured in process then runs its
    calculation threads as a server does. The CPUs allowed before are restored after, so
    servers and load generators started later are not confined (Linux; elsewhere nothing)."""
    if not hasattr(os, "sched_setaffinity"):
        yield
        return
    allowed = os.sched_getaffinity(0)
    os.sched_setaffinity(0, {min(allowed)})
    try:
        yield
    finally:
        os.sched_setaffinity(0, allowed)


@dataclass(frozen=True)
class Timing:
    """Wall-clock statistics of repeated calls [s]."""

    median: float
    p99: float
    runs: int

    def __str__(self) -> str:
        return (
            f"median {self.median * 1e3:8.3f} ms   p99 {self.p99 * 1e3:8.3f} ms"
            f"   ({self.runs} runs)"
        )


def time_call(fn: Callable[[], object], *, runs: int = 300, warmup: int = 20) -> Timing:
    """Call ``fn`` repeatedly and report the median and 99th percentile."""
    for _ in range(warmup):
        fn()
    samples = np.empty(runs)
    for i in range(runs):
        t0 = time.perf_counter()
        fn()
        samples[i] = time.perf_counter() - t0
    return Timing(float(np.median(samples)), float(np.percentile(samples, 99)), runs)


def _interleaved(
    cases: dict[str, tuple[Callable[[], object], int]], rounds: int, warmup: int
) -> dict[str, list[list[float]]]:
    """CPU seconds of each call, per case and round: ``rounds`` rounds, each timing every
    case its ``calls`` times in turn, after ``warmup`` untimed calls of each."""
    for fn, _ in cases.values():
        for _ in range(warmup):
            fn()
    per_round: dict[str, list[list[float]]] = {k: [] for k in cases}
    for _ in range(rounds):
        for key, (fn, calls) in cases.items():
            samples = []
            for _ in range(calls):
                t0 = time.process_time()
                fn()
                samples.append(time.process_time() - t0)
            per_round[key].append(samples)
    return per_round


def side_by_side(
    fns: dict[str, Callable[[], object]], *, rounds: int = 9, calls: int = 20, warmup: int = 3
) -> dict[str, Timing]:
    """CPU time of several calls, interleaved round by round; each figure is the median
    over ``rounds * calls`` calls, p99 too."""
    got = _interleaved({k: (fn, calls) for k, fn in fns.items()}, rounds, warmup)
    pooled = {k: [s for r in v for s in r] for k, v in got.items()}
    return {
        k: Timing(float(np.median(v)), float(np.percentile(v, 99)), len(v))
        for k, v in pooled.items()
    }


def interleaved_ms(
    cases: dict[str, tuple[Callable[[], object], int]], rounds: int
) -> dict[str, float]:
    """Median cost [ms] of each case: ``rounds`` rounds, each timing every case ``calls``
    times in turn and keeping the median; the figure is the median of the rounds."""
    got = _interleaved(cases, rounds, warmup=1)
    return {k: statistics.median(statistics.median(r) * 1e3 for r in v) for k, v in got.items()}


def healthz_call() -> tuple[Callable[[], object], Callable[[], None]]:
    """A callable that answers ``GET /healthz`` in process, and one that closes it."""
    from service.app import app

    loop = asyncio.new_event_loop()
    client = httpx.AsyncClient(transport=httpx.ASGITransport(app=app), base_url="http://bench")

    def call() -> object:
        response = loop.run_until_complete(client.get("/healthz"))
        response.raise_for_status()
        return response

    def close() -> None:
        loop.run_until_complete(client.aclose())
        loop.close()

    return call, close


def _asgi_scope(path: str, body: bytes | None) -> dict[str, Any]:
    """The ASGI scope of a GET (no body) or a JSON POST from the loopback interface."""
    headers = [(b"host", b"127.0.0.1"), (b"content-type", b"application/json")]
    if body is not None:
        headers.append((b"content-length", str(len(body)).encode()))
    return {
        "type": "http",
        "asgi": {"version": "3.0"},
        "http_version": "1.1",
        "method": "GET" if body is None else "POST",
        "scheme": "http",
        "path": path,
        "raw_path": path.encode(),
        "query_string": b"",
        "root_path": "",
        "headers": headers,
        "client": ("127.0.0.1", 1),
        "server": ("127.0.0.1", 80),
    }


async def asgi_call(app: Any, path: str, body: bytes | None) -> None:
    """One request through ``app``, the answer dropped; anything but a 200 stops the run."""
    sent = False

    async def receive() -> dict[str, Any]:
        nonlocal sent
        if sent:
            await asyncio.sleep(3600)
        sent = True
        return {"type": "http.request", "body": body or b"", "more_body": False}

    async def send(message: dict[str, Any]) -> None:
        if message["type"] == "http.response.start" and message["status"] != 200:
            raise SystemExit(f"{path} answered {message['status']}")

    await app(_asgi_scope(path, body), receive, send)


def app_cpu_per_request(
    app: Any,
    requests: dict[str, tuple[str, list[bytes] | None]],
    *,
    rounds: int = 7,
    calls: int = 40,
) -> dict[str, float]:
    """CPU seconds per request through the whole ASGI app (every middleware, no socket),
    per target, interleaved round by round; the median of the rounds. CPU time of this
    process, so other work on a shared machine does not count. A target is a path and
    either None (GET) or bodies to POST in turn, each one different."""

    async def run() -> dict[str, float]:
        per: dict[str, list[float]] = {k: [] for k in requests}
        counters = dict.fromkeys(requests, 0)
        for warm in (True, False):
            for _ in range(1 if warm else rounds):
                for name, (path, bodies) in requests.items():
                    t0 = time.process_time()
                    for _ in range(calls):
                        body = None
                        if bodies is not None:
                            body = bodies[counters[name] % len(bodies)]
                            counters[name] += 1
                        await asgi_call(app, path, body)
                    if not warm:
                        per[name].append((time.process_time() - t0) / calls)
        return {k: float(np.median(v)) for k, v in per.items()}

    return asyncio.run(run())


def async_side_by_side(
    cases: dict[str, Callable[[], object]], *, rounds: int = 15, calls: int = 40
) -> dict[str, float]:
    """CPU seconds per call of each case, interleaved round by round on one event loop: a
    case's call may return an awaitable, which is awaited inside its timing. The figure is
    the median over the rounds of each round's mean (one untimed round first)."""

    async def run() -> dict[str, float]:
        per: dict[str, list[float]] = {k: [] for k in cases}
        for r in range(rounds + 1):
            for name, fn in cases.items():
                t0 = time.process_time()
                for _ in range(calls):
                    got = fn()
                    if inspect.isawaitable(got):
                        await got
                if r > 0:
                    per[name].append((time.process_time() - t0) / calls)
        return {k: float(np.median(v)) for k, v in per.items()}

    return asyncio.run(run())


def ratio_line(label: str, value: float, target: str) -> str:
    """One ratio with its target, for the benchmark's closing lines."""
    return f"   RATIO {label:<48} {value:8.2f}x   (target {target})"


def demo_drive_model(name: str, leave_out: Collection[str] = ()) -> DriveModel:
    """The car of the demo acceleration-run request ``tests/data/<name>.json`` as a core
    drive model, without the request's ``leave_out`` fields."""
    raw = json.loads((DATA / f"{name}.json").read_text())
    body = AccelerationRunRequest.model_validate({k: raw[k] for k in raw if k not in leave_out})
    u = body.units
    curve = build_curve(body.engine.curve, u)
    return drive_model(
        curve,
        build_drivetrain(body.drivetrain),
        build_tire(body.drivetrain.tire, u),
        build_vehicle(body.vehicle, u),
        build_launch(body.launch, curve, u),
        rev_limit_rpm=body.engine.rev_limit_rpm,
    )


def demo_log() -> tuple[str, Drivetrain, Tire]:
    """The invented demo logger export ``tests/data/demo_log_pass_metric.csv`` and the
    drivetrain and tire of its demo request."""
    text = (DATA / "demo_log_pass_metric.csv").read_text()
    request: dict[str, Any] = json.loads((DATA / "demo_log_request_metric.json").read_text())
    dt = request["drivetrain"]
    drivetrain = make_drivetrain(dt["gear_ratios"], dt["final_drive_ratio"])
    return text, drivetrain, tire_from_diameter(dt["tire"]["diameter"] / 1000.0)
